package bundle

import (
	"bytes"
	"compress/gzip"
	"io"
	"os"
	"path/filepath"
	"testing"
)

// oldCompressorArchive is the harbor-demo golden archive as written before
// the member writer moved from compress/gzip to klauspost/compress (commit
// 8948959): bundles made by earlier fitseal builds must still open, verify
// and extract.
var oldCompressorArchive = filepath.Join("testdata", "compat", "harbor-demo-stdlib-gzip.tar.gz")

// tarStream is the tar inside a .tar.gz, read with the standard library's
// gzip reader (every member, in order).
func tarStream(t *testing.T, gz []byte) []byte {
	t.Helper()
	zr, err := gzip.NewReader(bytes.NewReader(gz))
	if err != nil {
		t.Fatal(err)
	}
	b, err := io.ReadAll(zr)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestGoldenTarStream: whatever the compressor, the tar stream inside a new
// archive is byte for byte the one inside the committed golden archives,
// so only the compressed bytes may differ from them.
func TestGoldenTarStream(t *testing.T) {
	skipOffGoldenPlatform(t)
	want, err := os.ReadFile(goldenArchive)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(tarStream(t, testArchive(t)), tarStream(t, want)) {
		t.Errorf("tar stream differs from the one inside %s", goldenArchive)
	}
	var buf bytes.Buffer
	if err := WriteArchive(&buf, sealContents(t, runSealProject(t, 2), goldenTool), testSigner(t)); err != nil {
		t.Fatal(err)
	}
	want, err = os.ReadFile(goldenSeal)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(tarStream(t, buf.Bytes()), tarStream(t, want)) {
		t.Errorf("tar stream differs from the one inside %s", goldenSeal)
	}
}

// TestReadBothCompressors: a bundle written by the earlier compress/gzip
// writer and one written now both open with the standard library's reader,
// verify with no finding, hold the same members, and extract to the same
// files.
func TestReadBothCompressors(t *testing.T) {
	s := testSigner(t)
	opts := VerifyOptions{ExpectedSigner: s.Fingerprint(), Pinned: s.PublicKey()}
	dir := t.TempDir()
	newPath := filepath.Join(dir, "new.tar.gz")
	if err := os.WriteFile(newPath, testArchive(t), 0o644); err != nil {
		t.Fatal(err)
	}
	var bags []*Bag
	for i, path := range []string{oldCompressorArchive, newPath} {
		bag, err := Open(path)
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		if fs := bag.Verify(opts); len(fs) != 0 {
			t.Errorf("%s: findings %v", path, fs)
		}
		out, err := Extract(path, filepath.Join(dir, "x", string(rune('a'+i))))
		if err != nil {
			t.Fatalf("extract %s: %v", path, err)
		}
		for p, want := range bag.Files {
			got, err := os.ReadFile(filepath.Join(out, filepath.FromSlash(p)))
			if err != nil || !bytes.Equal(got, want) {
				t.Errorf("extract %s: %s differs (%v)", path, p, err)
			}
		}
		bags = append(bags, bag)
	}
	if !equalFiles(bags[0].Files, bags[1].Files) {
		t.Errorf("the two compressors' bundles hold different members")
	}
}

func equalFiles(a, b map[string][]byte) bool {
	if len(a) != len(b) {
		return false
	}
	for p, x := range a {
		if y, ok := b[p]; !ok || !bytes.Equal(x, y) {
			return false
		}
	}
	return true
}
