package runner

import (
	"crypto/sha256"
	"os"
	"path/filepath"
	"testing"
)

// TestReadDatasetDigest: the digest ReadDataset takes while parsing is the
// length and SHA-256 of the whole file as it lies on disk (byte-order
// mark, blank lines, rows left out by where, no final newline), and
// ReadCSV, which reads no file, leaves it zero.
func TestReadDatasetDigest(t *testing.T) {
	for _, text := range []string{
		"x\n1\n2\n",
		"\ufeffx,g\n1,a\n\n2,b\n3,a",
		"x\r\n1.5\r\n2.5\r\n",
	} {
		dir := t.TempDir()
		if err := os.WriteFile(filepath.Join(dir, "d.csv"), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		d := &Dataset{Name: "d", File: "d.csv", Column: "x", Missing: DefaultMissing}
		dd, err := ReadDataset(&Project{Dir: dir}, d)
		if err != nil {
			t.Fatal(err)
		}
		want := FileDigest{Bytes: int64(len(text)), SHA256: sha256.Sum256([]byte(text))}
		if dd.Source != want || dd.Source.IsZero() {
			t.Errorf("%q: digest %+v, want %+v", text, dd.Source, want)
		}
	}
}
