package bundle

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// goldenArchive is testContents signed with testSigner, written by fitseal.
// Regenerate (after a deliberate format change, or when a Go release changes
// compress/flate's output) with:
//
//	FITSEAL_UPDATE_GOLDEN=1 go test ./bundle -run TestGoldenArchive
var goldenArchive = filepath.Join("testdata", "golden", "harbor-demo.tar.gz")

// TestGoldenArchive compares the archive byte for byte with the committed
// one; on a mismatch it names the members that differ.
func TestGoldenArchive(t *testing.T) {
	got := testArchive(t)
	if os.Getenv("FITSEAL_UPDATE_GOLDEN") != "" {
		os.MkdirAll(filepath.Dir(goldenArchive), 0o755)
		if err := os.WriteFile(goldenArchive, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(goldenArchive)
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Equal(got, want) {
		return
	}
	gb, err1 := ReadArchive(bytes.NewReader(got), DefaultLimits)
	wb, err2 := ReadArchive(bytes.NewReader(want), DefaultLimits)
	if err1 != nil || err2 != nil {
		t.Fatalf("archive differs from %s (%v, %v)", goldenArchive, err1, err2)
	}
	for _, p := range union(gb.Paths(), wb.Paths()) {
		if !bytes.Equal(gb.Files[p], wb.Files[p]) {
			t.Errorf("member %s differs from the golden archive:\n got  %q\n want %q", p, gb.Files[p], wb.Files[p])
		}
	}
	t.Errorf("archive differs from %s (%d vs %d bytes); if the members are equal the tar headers or the compression differ", goldenArchive, len(got), len(want))
}

func union(a, b []string) []string {
	seen := map[string]bool{}
	var out []string
	for _, s := range append(a, b...) {
		if !seen[s] {
			seen[s] = true
			out = append(out, s)
		}
	}
	return out
}
