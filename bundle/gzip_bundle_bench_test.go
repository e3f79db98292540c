package bundle

import (
	"archive/tar"
	"bytes"
	"compress/gzip"
	"io"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"

	kgzip "github.com/klauspost/compress/gzip"
)

// BenchmarkGzipBundleLevels compresses the tar stream of a real bundle,
// named by $FITSEAL_BENCH_BUNDLE (e.g. a bundle kept by
// `../shared/bench/run.sh -S 1000 --keep`), as gzipped members of
// gzipChunk on one core by Huffman coding alone and at levels 1 to 6 and 9,
// and as writeTarGz writes it (levelOf), reporting the ratio; and,
// per kind of member (inputs, results.json, the result CSVs, tables,
// run.json and manifests, tar headers), the bytes each level leaves. It
// justifies gzipLevel (tarball.go). The sub-benchmark stdlib-level1 is the
// standard library's compress/gzip at level 1 in the same 1 MiB members,
// the writer fitseal used before. Skipped when the variable is unset.
func BenchmarkGzipBundleLevels(b *testing.B) {
	path := os.Getenv("FITSEAL_BENCH_BUNDLE")
	if path == "" {
		b.Skip("set FITSEAL_BENCH_BUNDLE to a bundle .tar.gz")
	}
	f, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	zr, err := gzip.NewReader(bytes.NewReader(f))
	if err != nil {
		b.Fatal(err)
	}
	stream, err := io.ReadAll(zr)
	if err != nil {
		b.Fatal(err)
	}
	// The members by kind, each kind concatenated; and the files, to be
	// written again as writeTarGz writes them ("as-written": every member
	// at the level of its path).
	kinds := map[string][]byte{}
	var (
		bag   string
		files []member
	)
	tr := tar.NewReader(bytes.NewReader(stream))
	for {
		h, err := tr.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			b.Fatal(err)
		}
		data, _ := io.ReadAll(tr)
		kinds[memberKind(h.Name)] = append(kinds[memberKind(h.Name)], data...)
		if h.Typeflag == tar.TypeReg {
			top, rel, _ := strings.Cut(h.Name, "/")
			bag = top
			files = append(files, member{Path: rel, Data: data})
		}
	}
	b.Run("stdlib-level1", func(b *testing.B) {
		b.SetBytes(int64(len(stream)))
		var size int
		for b.Loop() {
			size = len(stdlibMembers(stream, 1))
		}
		b.ReportMetric(float64(len(stream))/float64(size), "ratio")
		b.ReportMetric(float64(size)/1e6, "MB")
	})
	b.Run("as-written", func(b *testing.B) {
		b.SetBytes(int64(len(stream)))
		var size int
		for b.Loop() {
			var out bytes.Buffer
			if err := writeTarGz(&out, bag, files, time.Unix(0, 0), 1); err != nil {
				b.Fatal(err)
			}
			size = out.Len()
		}
		b.ReportMetric(float64(len(stream))/float64(size), "ratio")
		b.ReportMetric(float64(size)/1e6, "MB")
	})
	for _, level := range []int{kgzip.HuffmanOnly, 1, 2, 3, 4, 5, 6, 9} {
		name := "level" + strconv.Itoa(level)
		if level == kgzip.HuffmanOnly {
			name = "huffman"
		}
		b.Run(name, func(b *testing.B) {
			b.SetBytes(int64(len(stream)))
			var size int
			for b.Loop() {
				var out bytes.Buffer
				m := newMemberWriter(&out, level, 1)
				m.Write(stream)
				m.Close()
				size = out.Len()
			}
			b.ReportMetric(float64(len(stream))/float64(size), "ratio")
			b.ReportMetric(float64(size)/1e6, "MB")
			if !testing.Verbose() {
				return
			}
			for k, data := range kinds {
				var out bytes.Buffer
				start := time.Now()
				m := newMemberWriter(&out, level, 1)
				m.Write(data)
				m.Close()
				b.Logf("level %d %-14s %9d -> %9d bytes (ratio %.2f) in %v", level, k, len(data), out.Len(), float64(len(data))/float64(out.Len()), time.Since(start).Round(time.Millisecond))
			}
		})
	}
}

// stdlibMembers is memberWriter's layout written by compress/gzip on one
// core.
func stdlibMembers(data []byte, level int) []byte {
	var out bytes.Buffer
	for first := true; first || len(data) > 0; first = false {
		k := min(len(data), gzipChunk)
		zw, _ := gzip.NewWriterLevel(&out, level)
		zw.Write(data[:k])
		zw.Close()
		data = data[k:]
	}
	return out.Bytes()
}

func memberKind(name string) string {
	switch {
	case strings.Contains(name, "/data/inputs/"):
		return "inputs"
	case strings.HasSuffix(name, "/results.json"):
		return "results.json"
	case strings.Contains(name, "/data/results/"):
		return "result CSVs"
	case strings.Contains(name, "/data/tables/"):
		return "tables"
	}
	return "run.json, tags"
}
