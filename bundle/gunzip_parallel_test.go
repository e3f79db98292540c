package bundle

import (
	"bytes"
	"compress/gzip"
	"errors"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	kgzip "github.com/klauspost/compress/gzip"
)

// TestSplitReader: a stream cut into pieces at every member start gives
// exactly the bytes of one reader; where a cut is not a member's start (the
// signature inside stored data), a member is damaged or cut short, or a piece holds more
// than maxPiece, Read fails with errSplitFailed instead (and ReadArchive
// reads the stream in one piece).
func TestSplitReader(t *testing.T) {
	data := csvText(3*gzipChunk + 777)
	var members bytes.Buffer
	m := newMemberWriter(&members, gzipLevel, 2)
	m.Write(data[:1000])
	m.setLevel(kgzip.HuffmanOnly)
	m.Write(data[1000 : 2*gzipChunk])
	m.setLevel(gzipLevel)
	m.Write(data[2*gzipChunk:])
	if err := m.Close(); err != nil {
		t.Fatal(err)
	}
	// One member whose stored (level 0) data holds the member signature.
	var stored bytes.Buffer
	zw, _ := gzip.NewWriterLevel(&stored, gzip.NoCompression)
	zw.Write(append(append([]byte("before "), memberStart...), " after"...))
	zw.Close()
	damaged := bytes.Clone(members.Bytes())
	damaged[len(damaged)/2] ^= 0x40
	// A member larger than maxPiece (another writer's single stream).
	var big bytes.Buffer
	zw, _ = gzip.NewWriterLevel(&big, gzip.BestSpeed)
	zw.Write(csvText(maxPiece + 1))
	zw.Close()

	for _, c := range []struct {
		name   string
		stream []byte
		ok     bool
	}{
		{"fitseal's members, two levels", members.Bytes(), true},
		{"one small member", freshMembers(t, data[:5000], gzipLevel), true},
		{"an empty member", freshMembers(t, nil, gzipLevel), true},
		{"signature inside stored data", stored.Bytes(), false},
		{"a damaged member", damaged, false},
		{"the last member without its length", members.Bytes()[:members.Len()-4], false},
		{"the last member without its trailer", members.Bytes()[:members.Len()-8], false},
		{"a member over maxPiece", big.Bytes(), false},
	} {
		for _, workers := range []int{1, 2, 8} {
			sr := newSplitReader(c.stream, workers, 1<<40)
			got, err := io.ReadAll(sr)
			if !c.ok {
				if !errors.Is(err, errSplitFailed) || !sr.failed {
					t.Errorf("%s, %d workers: err %v, want errSplitFailed", c.name, workers, err)
				}
				continue
			}
			zr, _ := gzip.NewReader(bytes.NewReader(c.stream))
			want, _ := io.ReadAll(zr)
			if err != nil || !bytes.Equal(got, want) {
				t.Errorf("%s, %d workers: %d bytes (%v), want %d", c.name, workers, len(got), err, len(want))
			}
		}
	}
	// The budget: more decompressed bytes than allowed fails too.
	if _, err := io.ReadAll(newSplitReader(members.Bytes(), 2, int64(len(data)-1))); !errors.Is(err, errSplitFailed) {
		t.Errorf("over the budget: err %v, want errSplitFailed", err)
	}
}

// TestReadArchiveFileSplitOrNot: a bundle read from a file (split into its
// members) is the bag read from a stream (one reader), and a damaged file
// gives the stream's error.
func TestReadArchiveFileSplitOrNot(t *testing.T) {
	archive := testArchive(t)
	damaged := bytes.Clone(archive)
	damaged[len(damaged)/2] ^= 0x40
	for _, c := range []struct {
		name string
		data []byte
	}{{"intact", archive}, {"damaged", damaged}} {
		path := filepath.Join(t.TempDir(), "b.tar.gz")
		if err := os.WriteFile(path, c.data, 0o644); err != nil {
			t.Fatal(err)
		}
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		fromFile, errFile := ReadArchive(f, DefaultLimits)
		f.Close()
		fromStream, errStream := ReadArchive(bytes.NewReader(c.data), DefaultLimits)
		if !reflect.DeepEqual(fromFile, fromStream) || (errFile == nil) != (errStream == nil) ||
			(errFile != nil && errFile.Error() != errStream.Error()) {
			t.Errorf("%s: from a file %v, %v; from a stream %v, %v", c.name, fromFile != nil, errFile, fromStream != nil, errStream)
		}
		if c.name == "intact" && (errFile != nil || len(fromFile.Files) == 0) {
			t.Errorf("intact archive not read: %v", errFile)
		}
	}
}

// BenchmarkReadArchive reads an archive of some 24 MB of tar (a results
// CSV of 16 MB and an input copy of 8 MB) from a file, whose gzip members
// are decompressed on every core (splitReader), and from a stream, read by
// one reader; the bags are the same.
func BenchmarkReadArchive(b *testing.B) {
	c := testContents()
	c.Payload = map[string][]byte{
		"results/fits.csv":    csvText(16 << 20),
		"inputs/data/big.csv": csvText(8 << 20),
	}
	var buf bytes.Buffer
	if err := WriteArchive(&buf, c, testSigner(b)); err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(b.TempDir(), "b.tar.gz")
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		b.Fatal(err)
	}
	b.Run("file", func(b *testing.B) {
		b.SetBytes(24 << 20)
		for b.Loop() {
			if _, err := Open(path); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("stream", func(b *testing.B) {
		b.SetBytes(24 << 20)
		for b.Loop() {
			if _, err := ReadArchive(bytes.NewReader(buf.Bytes()), DefaultLimits); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// TestReadArchiveTruncated: an archive that ends early is refused as
// damaged, read from a file (its members decompressed in pieces) or from a
// stream, wherever the cut falls: inside the last member's 8-byte trailer
// (CRC-32 and length), inside its deflate data (which may hold only the
// tar's end-of-archive zeros) or in the middle of the payload.
func TestReadArchiveTruncated(t *testing.T) {
	archive := testArchive(t)
	for _, cut := range []int{1, 4, 8, 12, 20, 40, len(archive) / 2} {
		data := archive[:len(archive)-cut]
		path := filepath.Join(t.TempDir(), "b.tar.gz")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		_, errFile := ReadArchive(f, DefaultLimits)
		f.Close()
		_, errStream := ReadArchive(bytes.NewReader(data), DefaultLimits)
		for from, err := range map[string]error{"file": errFile, "stream": errStream} {
			var ae *ArchiveError
			if !errors.As(err, &ae) || !ae.Damaged {
				t.Errorf("%d bytes cut off, read from a %s: err %v, want a damaged-archive error", cut, from, err)
			}
		}
	}
}
