package bundle

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"testing"
)

// fuzzLimits keep the fuzzer's memory small while still exercising every
// limit.
var fuzzLimits = Limits{MaxEntries: 64, MaxFileSize: 1 << 16, MaxTotalSize: 1 << 18}

// FuzzReadBundle feeds arbitrary bytes to the archive reader. It must never
// panic; whatever it accepts must hold only clean relative paths within the
// limits, must verify without panicking, and must survive being written by
// fitseal's own archive writer and read back unchanged. The seed corpus is
// in testdata/fuzz/FuzzReadBundle (regenerate with FITSEAL_WRITE_SEEDS=1 go
// test ./bundle -run TestWriteFuzzSeeds). Run: go test ./bundle -run '^$'
// -fuzz FuzzReadBundle -fuzztime 60s
func FuzzReadBundle(f *testing.F) {
	f.Fuzz(func(t *testing.T, data []byte) {
		bag, err := ReadArchive(bytes.NewReader(data), fuzzLimits)
		if err != nil {
			if bag != nil {
				t.Fatal("error with a bag")
			}
			return
		}
		if err := checkBagName(bag.Name); err != nil {
			t.Fatalf("accepted bag name: %v", err)
		}
		var total int64
		for p, d := range bag.Files {
			if err := checkMemberPath(p); err != nil {
				t.Fatalf("accepted path: %v", err)
			}
			if int64(len(d)) > fuzzLimits.MaxFileSize {
				t.Fatalf("%s: %d bytes over the limit", p, len(d))
			}
			total += int64(len(d))
		}
		if total > fuzzLimits.MaxTotalSize || len(bag.Files) > fuzzLimits.MaxEntries {
			t.Fatalf("accepted %d files, %d bytes: over the limits", len(bag.Files), total)
		}
		_ = bag.Verify(VerifyOptions{})
		again, err := tarGzBytes(bag.Name, sortedMembers(bag.Files), testCreated)
		if err != nil {
			t.Fatalf("accepted bag cannot be rewritten: %v", err)
		}
		back, err := ReadArchive(bytes.NewReader(again), fuzzLimits)
		if err != nil {
			t.Fatalf("rewritten bag refused: %v", err)
		}
		if back.Name != bag.Name || !reflect.DeepEqual(normalise(back.Files), normalise(bag.Files)) {
			t.Fatal("rewritten bag differs")
		}
	})
}

// TestWriteFuzzSeeds writes the seed corpus of FuzzReadBundle: a good
// bundle and every hostile archive of the tests.
func TestWriteFuzzSeeds(t *testing.T) {
	if os.Getenv("FITSEAL_WRITE_SEEDS") == "" {
		t.Skip("set FITSEAL_WRITE_SEEDS=1 to rewrite testdata/fuzz/FuzzReadBundle")
	}
	dir := filepath.Join("testdata", "fuzz", "FuzzReadBundle")
	os.MkdirAll(dir, 0o755)
	seeds := map[string][]byte{"good-bundle": testArchive(t)}
	for i, h := range hostileArchives(t) {
		seeds[fmt.Sprintf("hostile-%02d", i)] = h.data
	}
	for name, data := range seeds {
		text := fmt.Sprintf("go test fuzz v1\n[]byte(%q)\n", data)
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}
