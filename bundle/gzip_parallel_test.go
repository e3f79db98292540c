package bundle

import (
	"bytes"
	"compress/gzip"
	"io"
	"os/exec"
	"testing"
)

// TestMemberWriter: the members concatenate to the input for Go's reader
// and for the system's gzip (RFC 1952 multi-member files), the bytes are
// the same for 1, 2 and 7 workers and for any write pattern, and an input
// of at most one chunk is exactly the single-stream gzip of that level.
func TestMemberWriter(t *testing.T) {
	for _, size := range []int{0, 100, gzipChunk, gzipChunk + 1, 3*gzipChunk + 12345} {
		data := csvText(size + 1)[:size]
		var ref []byte
		for _, workers := range []int{1, 2, 7} {
			for _, piece := range []int{1 << 30, 511} {
				var out bytes.Buffer
				m := newMemberWriter(&out, gzipLevel, workers)
				for rest := data; len(rest) > 0; {
					k := min(piece, len(rest))
					if _, err := m.Write(rest[:k]); err != nil {
						t.Fatal(err)
					}
					rest = rest[k:]
				}
				if err := m.Close(); err != nil {
					t.Fatal(err)
				}
				if ref == nil {
					ref = out.Bytes()
				} else if !bytes.Equal(out.Bytes(), ref) {
					t.Fatalf("size %d: %d workers, writes of %d: bytes differ", size, workers, piece)
				}
			}
		}
		zr, err := gzip.NewReader(bytes.NewReader(ref))
		if err != nil {
			t.Fatal(err)
		}
		back, err := io.ReadAll(zr)
		if err != nil || !bytes.Equal(back, data) {
			t.Fatalf("size %d: Go's gzip reader gives %d bytes (%v)", size, len(back), err)
		}
		if size <= gzipChunk {
			var one bytes.Buffer
			zw, _ := gzip.NewWriterLevel(&one, gzipLevel)
			zw.Write(data)
			zw.Close()
			if !bytes.Equal(one.Bytes(), ref) {
				t.Errorf("size %d: one chunk is not the plain gzip stream", size)
			}
		}
		if gz, err := exec.LookPath("gzip"); err == nil {
			cmd := exec.Command(gz, "-dc")
			cmd.Stdin = bytes.NewReader(ref)
			back, err := cmd.Output()
			if err != nil || !bytes.Equal(back, data) {
				t.Errorf("size %d: gzip -dc gives %d bytes (%v)", size, len(back), err)
			}
		}
	}
}

// BenchmarkGzipParallel compresses 15 MB of CSV text as 1 MiB members on
// every core, against one stream; the ratio metric shows the size cost.
// Run: go test ./bundle -run '^$' -bench 'Gzip(Parallel|Levels)'
func BenchmarkGzipParallel(b *testing.B) {
	data := csvText(15 << 20)
	b.SetBytes(int64(len(data)))
	var size int
	for b.Loop() {
		var buf bytes.Buffer
		m := newMemberWriter(&buf, gzipLevel, 0)
		m.Write(data)
		m.Close()
		size = buf.Len()
	}
	b.ReportMetric(float64(len(data))/float64(size), "ratio")
}
