package bundle

import (
	"bytes"
	"context"
	"path/filepath"
	"strings"
	"testing"

	"fitseal/runner"
)

// sealedPart runs shard sh of the bearings project and seals it as a
// partial bundle made by tool, read back as a Bag named name.
func sealedPart(t *testing.T, sh *runner.Shard, tool Tool, name string) *Bag {
	t.Helper()
	p, err := runner.Load(filepath.Join("testdata", "seal", "fitseal.toml"))
	if err != nil {
		t.Fatal(err)
	}
	res, err := runner.Run(context.Background(), p, runner.RunOptions{Workers: 2, Shard: sh})
	if err != nil {
		t.Fatal(err)
	}
	s := testSigner(t)
	c, err := Seal(res, SealOptions{Created: testCreated, CreatedFrom: "SOURCE_DATE_EPOCH", Signer: s.PublicKey(), Tool: tool, Shard: sh})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteArchive(&buf, c, s); err != nil {
		t.Fatal(err)
	}
	bag, err := ReadArchive(&buf, DefaultLimits)
	if err != nil {
		t.Fatal(err)
	}
	bag.Source = name
	return bag
}

// TestMergeEqualsSeal: two parts merged give the archive that Seal of the
// single run gives, with the same tool, key and created time.
func TestMergeEqualsSeal(t *testing.T) {
	tool := Tool{Name: "fitseal", Version: "v0.0.0-test", GoVersion: "go-test", OS: "testos", Arch: "testarch"}
	single := sealedPart(t, nil, tool, "single")
	parts := []*Bag{sealedPart(t, &runner.Shard{Index: 1, Count: 2}, tool, "b"), sealedPart(t, &runner.Shard{Index: 0, Count: 2}, tool, "a")}
	s := testSigner(t)
	c, _, err := Merge(parts, MergeOptions{Created: testCreated, CreatedFrom: "SOURCE_DATE_EPOCH", Signer: s.PublicKey(), Tool: tool})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteArchive(&buf, c, s); err != nil {
		t.Fatal(err)
	}
	merged, err := ReadArchive(&buf, DefaultLimits)
	if err != nil {
		t.Fatal(err)
	}
	if len(merged.Files) != len(single.Files) {
		t.Errorf("merged bag has %d files, the single run %d", len(merged.Files), len(single.Files))
	}
	for p, want := range single.Files {
		if !bytes.Equal(merged.Files[p], want) {
			t.Errorf("%s differs between the merged and the single run", p)
		}
	}
}

// TestMergeRefusesOtherTool: a part made by another build is refused, and so
// is merging with a build other than the parts'.
func TestMergeRefusesOtherTool(t *testing.T) {
	a := Tool{Name: "fitseal", Version: "v1.0.0", GoVersion: "go-test", OS: "testos", Arch: "testarch"}
	b := a
	b.Version = "v1.0.1"
	s := testSigner(t)
	p0 := sealedPart(t, &runner.Shard{Index: 0, Count: 2}, a, "p0")
	p1 := sealedPart(t, &runner.Shard{Index: 1, Count: 2}, b, "p1")
	_, _, err := Merge([]*Bag{p0, p1}, MergeOptions{Created: testCreated, Signer: s.PublicKey(), Tool: a})
	if err == nil || !strings.Contains(err.Error(), "p1: was made by another build of fitseal (v1.0.1") {
		t.Errorf("parts of two builds: error %v", err)
	}
	p1 = sealedPart(t, &runner.Shard{Index: 1, Count: 2}, a, "p1")
	_, _, err = Merge([]*Bag{p0, p1}, MergeOptions{Created: testCreated, Signer: s.PublicKey(), Tool: b})
	if err == nil || !strings.Contains(err.Error(), "p0: made by another build of fitseal (v1.0.0") {
		t.Errorf("merging with another build: error %v", err)
	}
	if me, ok := err.(*MergeError); !ok || me.Check {
		t.Errorf("another build is bad input (exit 2), got %#v", err)
	}
}
