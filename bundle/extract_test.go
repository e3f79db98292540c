package bundle

import (
	"archive/tar"
	"bytes"
	"compress/gzip"
	"errors"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"testing"
	"time"
)

// rawEntry is one tar entry of a hand-made (possibly hostile) archive.
type rawEntry struct {
	name     string
	typ      byte
	body     string
	linkname string
}

// rawArchive writes entries as given, with none of the writer's checks.
func rawArchive(t testing.TB, entries ...rawEntry) []byte {
	t.Helper()
	var buf bytes.Buffer
	zw := gzip.NewWriter(&buf)
	tw := tar.NewWriter(zw)
	for _, e := range entries {
		h := &tar.Header{Name: e.name, Typeflag: e.typ, Mode: 0o644, Linkname: e.linkname, ModTime: testCreated}
		if e.typ == tar.TypeReg {
			h.Size = int64(len(e.body))
		}
		if err := tw.WriteHeader(h); err != nil {
			t.Fatal(err)
		}
		if e.typ == tar.TypeReg {
			tw.Write([]byte(e.body))
		}
	}
	tw.Close()
	zw.Close()
	return buf.Bytes()
}

func dirE(name string) rawEntry        { return rawEntry{name: name, typ: tar.TypeDir} }
func fileE(name, body string) rawEntry { return rawEntry{name: name, typ: tar.TypeReg, body: body} }

// hostileArchives are archives every reader must refuse, with a word that
// the refusal must contain.
func hostileArchives(t testing.TB) []struct {
	name, want string
	data       []byte
} {
	return []struct {
		name, want string
		data       []byte
	}{
		{"dotdot escape", `".."`, rawArchive(t, dirE("p/"), fileE("p/../../evil.txt", "x"))},
		{"leading dotdot", `".."`, rawArchive(t, fileE("../evil.txt", "x"))},
		{"absolute path", "absolute", rawArchive(t, dirE("p/"), fileE("/tmp/fitseal-evil.txt", "x"))},
		{"unclean path", "clean", rawArchive(t, dirE("p/"), fileE("p/./a", "x"))},
		{"backslash", "backslash", rawArchive(t, dirE("p/"), fileE(`p/..\..\evil`, "x"))},
		{"symlink", "link", rawArchive(t, dirE("p/"), rawEntry{name: "p/link", typ: tar.TypeSymlink, linkname: "/etc"}, fileE("p/link/passwd", "x"))},
		{"hardlink", "link", rawArchive(t, dirE("p/"), rawEntry{name: "p/hard", typ: tar.TypeLink, linkname: "/etc/passwd"})},
		{"char device", "device", rawArchive(t, dirE("p/"), rawEntry{name: "p/null", typ: tar.TypeChar})},
		{"block device", "device", rawArchive(t, dirE("p/"), rawEntry{name: "p/sda", typ: tar.TypeBlock})},
		{"fifo", "FIFO", rawArchive(t, dirE("p/"), rawEntry{name: "p/pipe", typ: tar.TypeFifo})},
		{"duplicate", "duplicate", rawArchive(t, dirE("p/"), fileE("p/a", "1"), fileE("p/a", "2"))},
		{"case duplicate", "letter case", rawArchive(t, dirE("p/"), fileE("p/A", "1"), fileE("p/a", "2"))},
		{"two top folders", "more than one top folder", rawArchive(t, dirE("p/"), fileE("p/a", "1"), dirE("q/"), fileE("q/b", "2"))},
		{"file at top", "outside the bag folder", rawArchive(t, fileE("bagit.txt", "x"))},
		{"file then folder", "which is a file", rawArchive(t, dirE("p/"), fileE("p/a", "1"), fileE("p/a/b", "2"))},
		{"folder then file", "where the archive has a folder", rawArchive(t, dirE("p/"), fileE("p/a/b", "1"), fileE("p/a", "2"))},
		{"empty", "empty archive", rawArchive(t)},
		{"not gzip", "gzip", []byte("PK\x03\x04 a zip file")},
		{"not tar", "tar", gzipOf([]byte(strings.Repeat("x", 2000)))},
	}
}

func gzipOf(b []byte) []byte {
	var buf bytes.Buffer
	zw := gzip.NewWriter(&buf)
	zw.Write(b)
	zw.Close()
	return buf.Bytes()
}

func TestReadArchiveRefusesHostile(t *testing.T) {
	for _, tc := range hostileArchives(t) {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadArchive(bytes.NewReader(tc.data), DefaultLimits)
			var ae *ArchiveError
			if !errors.As(err, &ae) || !errors.Is(err, ErrUnsafeArchive) {
				t.Fatalf("error %v, want an *ArchiveError", err)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not say %q", err, tc.want)
			}
		})
	}
}

// TestExtractHostileWritesNothing: extracting a hostile archive fails and
// leaves the sandbox exactly as it was (nothing inside the target, nothing
// beside it, nothing at the absolute path).
func TestExtractHostileWritesNothing(t *testing.T) {
	for _, tc := range hostileArchives(t) {
		t.Run(tc.name, func(t *testing.T) {
			sandbox := t.TempDir()
			src := filepath.Join(sandbox, "in.tar.gz")
			os.WriteFile(src, tc.data, 0o644)
			before := listTree(t, sandbox)
			if _, err := Extract(src, filepath.Join(sandbox, "out", "deeper")); err == nil {
				t.Fatal("extract succeeded")
			}
			if after := listTree(t, sandbox); !equalStrings(before, after) {
				t.Errorf("sandbox changed:\nbefore %v\nafter  %v", before, after)
			}
			if _, err := os.Lstat("/tmp/fitseal-evil.txt"); err == nil {
				t.Error("wrote to an absolute path")
			}
		})
	}
}

func listTree(t *testing.T, dir string) []string {
	t.Helper()
	var out []string
	filepath.Walk(dir, func(p string, fi os.FileInfo, err error) error {
		if err == nil {
			out = append(out, strings.TrimPrefix(p, dir))
		}
		return nil
	})
	sort.Strings(out)
	return out
}

func equalStrings(a, b []string) bool {
	return strings.Join(a, "\n") == strings.Join(b, "\n")
}

func TestReadArchiveLimits(t *testing.T) {
	lim := Limits{MaxEntries: 3, MaxFileSize: 10, MaxTotalSize: 15}
	for _, tc := range []struct {
		name, want string
		data       []byte
	}{
		{"too many entries", "more than 3 entries", rawArchive(t, dirE("p/"), fileE("p/a", ""), fileE("p/b", ""), fileE("p/c", ""))},
		{"file too big", "size 11 bytes exceeds", rawArchive(t, dirE("p/"), fileE("p/a", "12345678901"))},
		{"total too big", "total size exceeds", rawArchive(t, dirE("p/"), fileE("p/a", "1234567890"), fileE("p/b", "123456"))},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadArchive(bytes.NewReader(tc.data), lim)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want %q", err, tc.want)
			}
		})
	}
	if _, err := ReadArchive(bytes.NewReader(rawArchive(t, dirE("p/"), fileE("p/a", "1234567890"), fileE("p/b", "12345"))), lim); err != nil {
		t.Errorf("archive at the limits refused: %v", err)
	}
}

// zeroBomb streams a gzip'd tar holding entries files of size bytes of
// zeros each, generated on the fly (nothing on disk, nothing held in
// memory). It returns the reader and a function that closes the stream and
// returns how many uncompressed bytes the generator produced.
func zeroBomb(entries int, size int64) (io.Reader, func() int64) {
	pr, pw := io.Pipe()
	done := make(chan int64)
	go func() {
		var produced int64
		zw, _ := gzip.NewWriterLevel(pw, gzip.BestSpeed)
		tw := tar.NewWriter(zw)
		zeros := make([]byte, 1<<20)
		err := func() error {
			if err := tw.WriteHeader(&tar.Header{Name: "bomb/", Typeflag: tar.TypeDir, Mode: 0o755}); err != nil {
				return err
			}
			for i := 0; i < entries; i++ {
				h := &tar.Header{Name: "bomb/zeros-" + itoa(i), Typeflag: tar.TypeReg, Mode: 0o644, Size: size}
				if err := tw.WriteHeader(h); err != nil {
					return err
				}
				for left := size; left > 0; {
					n := min(left, int64(len(zeros)))
					if _, err := tw.Write(zeros[:n]); err != nil {
						return err
					}
					left -= n
					produced += n
				}
			}
			if err := tw.Close(); err != nil {
				return err
			}
			return zw.Close()
		}()
		pw.CloseWithError(err)
		done <- produced
	}()
	return pr, func() int64 {
		pr.CloseWithError(errors.New("reader stopped"))
		return <-done
	}
}

// TestZeroBomb: a 2 GiB file of zeros (about 2 MB compressed) is refused
// from its header alone, in well under a second and a few MiB; a bomb of
// many smaller entries (2 GiB in 2048 × 1 MiB) stops at the total limit, so
// memory never exceeds the limit.
func TestZeroBomb(t *testing.T) {
	for _, tc := range []struct {
		name     string
		entries  int
		size     int64
		lim      Limits
		want     string
		maxAlloc int64 // bytes allocated by reader and generator together
	}{
		{"one 2 GiB entry, default limits", 1, 2 << 30, DefaultLimits, "exceeds the limit", 16 << 20},
		{"2048 entries of 1 MiB, 32 MiB total limit", 2048, 1 << 20, Limits{MaxEntries: 10000, MaxFileSize: 4 << 20, MaxTotalSize: 32 << 20}, "total size exceeds", 48 << 20},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r, stop := zeroBomb(tc.entries, tc.size)
			var before, after runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&before)
			start := time.Now()
			_, err := ReadArchive(r, tc.lim)
			elapsed := time.Since(start)
			runtime.ReadMemStats(&after)
			produced := stop()
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v, want %q", err, tc.want)
			}
			alloc := int64(after.TotalAlloc - before.TotalAlloc)
			// The files kept (at most the total limit) plus gzip and tar
			// buffers, and the generator's 1 MiB buffer and compressor.
			if alloc > tc.maxAlloc {
				t.Errorf("allocated %d bytes, want at most %d", alloc, tc.maxAlloc)
			}
			if elapsed > 5*time.Second {
				t.Errorf("took %v to refuse", elapsed)
			}
			if produced > 2*tc.lim.MaxTotalSize && produced > 64<<20 {
				t.Errorf("generator produced %d bytes before the reader stopped", produced)
			}
			t.Logf("refused after %v, %d bytes allocated, %d bytes generated", elapsed, alloc, produced)
		})
	}
}

// TestOpenMissingIsNotArchiveError: a path that cannot be opened is not a
// damaged archive (verify exits 2, not 1), and the message names the path
// and the reason without the system call's name ("stat", "open").
func TestOpenMissingIsNotArchiveError(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "file")
	if err := os.WriteFile(file, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name, path, want string
		notExist         bool
	}{
		{"missing file", filepath.Join(dir, "nope.tar.gz"), filepath.Join(dir, "nope.tar.gz") + ": no such file or directory", true},
		{"under a file", filepath.Join(file, "b.tar.gz"), filepath.Join(file, "b.tar.gz") + ": not a directory", false},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := Open(c.path)
			var ae *ArchiveError
			if err == nil || errors.As(err, &ae) || errors.Is(err, os.ErrNotExist) != c.notExist {
				t.Fatalf("%v, want an error opening the path (verify exits 2), not-exist %v", err, c.notExist)
			}
			if err.Error() != c.want {
				t.Errorf("message %q, want %q", err.Error(), c.want)
			}
		})
	}
}

func TestTrailingGarbageAndDamagedStream(t *testing.T) {
	good := testArchive(t)
	zr, _ := gzip.NewReader(bytes.NewReader(good))
	raw, _ := io.ReadAll(zr)
	// A byte flipped inside the compressed stream: refused as damaged, or
	// (if deflate decodes it) caught by the hashes; never a panic. A flip
	// in a part of a Huffman table that no code uses decodes to the same
	// tar: nothing is damaged then, and nothing need be noticed.
	for i := 20; i < len(good); i += len(good) / 17 {
		d := bytes.Clone(good)
		d[i] ^= 0x40
		if zd, err := gzip.NewReader(bytes.NewReader(d)); err == nil {
			if same, err := io.ReadAll(zd); err == nil && bytes.Equal(same, raw) {
				continue
			}
		}
		bag, err := ReadArchive(bytes.NewReader(d), DefaultLimits)
		if err == nil && len(bag.Verify(VerifyOptions{})) == 0 {
			t.Errorf("flip at byte %d went unnoticed", i)
		}
	}
	// Trailing data past the tar end inside the gzip stream.
	raw = append(raw, bytes.Repeat([]byte{1}, 2<<20)...)
	if _, err := ReadArchive(bytes.NewReader(gzipOf(raw)), DefaultLimits); err == nil || !strings.Contains(err.Error(), "after the tar end") {
		t.Errorf("2 MiB after the tar end: %v", err)
	}
}
