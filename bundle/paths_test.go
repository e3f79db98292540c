package bundle

import (
	"fmt"
	"strings"
	"testing"
)

// checkMemberPath is the one rule for member paths, applied by the writer
// and by every reader (extract_test.go tries it on hostile archives).
func TestCheckMemberPath(t *testing.T) {
	for _, tc := range []struct {
		path    string
		refused string // part of the error, "" when accepted
	}{
		{"a", ""},
		{"data/results/fits.csv", ""},
		{"..a", ""},
		{"a..", ""},
		{"a/..b", ""},
		{"a/b../c", ""},
		{".hidden/x", ""},
		{"é/漢.csv", ""},
		{"", "empty"},
		{"..", "escapes"},
		{"../a", "escapes"},
		{"a/..", "escapes"},
		{"a/../b", "escapes"},
		{"a/b/../../..", "escapes"},
		{"/a", "absolute"},
		{`a\b`, "backslash"},
		{"a\x00b", "control"},
		{"a\nb", "control"},
		{"a\x7fb", "control"},
		{"a\xffb", "UTF-8"},
		{".", "clean"},
		{"./a", "clean"},
		{"a/.", "clean"},
		{"a/./b", "clean"},
		{"a//b", "clean"},
		{"a/", "clean"},
	} {
		err := checkMemberPath(tc.path)
		switch {
		case tc.refused == "" && err != nil:
			t.Errorf("%q refused: %v", tc.path, err)
		case tc.refused != "" && err == nil:
			t.Errorf("%q accepted, want an error about %q", tc.path, tc.refused)
		case tc.refused != "" && !strings.Contains(err.Error(), tc.refused):
			t.Errorf("%q: error %q, want it to mention %q", tc.path, err, tc.refused)
		}
	}
}

func TestTarEntries(t *testing.T) {
	files := func(paths ...string) []member {
		var ms []member
		for _, p := range paths {
			ms = append(ms, member{Path: p, Data: []byte(p)})
		}
		return ms
	}
	t.Run("folders listed, everything sorted", func(t *testing.T) {
		got, err := tarEntries("bag", files("run.json", "data/tables/b.md", "bagit.txt", "data/results/fits.csv", "data/tables/a.md", "data/inputs/x/y/z.csv"))
		if err != nil {
			t.Fatal(err)
		}
		var names []string
		for _, e := range got {
			n := e.name
			if e.dir {
				n += "/"
			}
			names = append(names, n)
		}
		want := "bag/ bag/bagit.txt bag/data/ bag/data/inputs/ bag/data/inputs/x/ bag/data/inputs/x/y/ bag/data/inputs/x/y/z.csv " +
			"bag/data/results/ bag/data/results/fits.csv bag/data/tables/ bag/data/tables/a.md bag/data/tables/b.md bag/run.json"
		if strings.Join(names, " ") != want {
			t.Errorf("entries\n got %s\nwant %s", strings.Join(names, " "), want)
		}
		for _, e := range got {
			if !e.dir && string(e.file.Data) != strings.TrimPrefix(e.name, "bag/") {
				t.Errorf("%s carries the data of %q", e.name, e.file.Data)
			}
		}
	})
	for _, tc := range []struct {
		name    string
		bag     string
		paths   []string
		refused string
	}{
		{"duplicate file", "bag", []string{"a/b", "c", "a/b"}, `duplicate member "bag/a/b"`},
		{"file that is a folder", "bag", []string{"a/b/c", "a/b"}, `member "bag/a/b" is both a file and a folder`},
		{"letter case of files", "bag", []string{"data/A.csv", "data/a.csv"}, "differ only in letter case"},
		{"letter case of a folder", "bag", []string{"Data/x", "data/y"}, "differ only in letter case"},
		{"unclean path", "bag", []string{"a/../b"}, "escapes"},
		{"bag name with a slash", "a/b", []string{"x"}, "single folder name"},
		{"empty bag name", "", []string{"x"}, "empty"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := tarEntries(tc.bag, files(tc.paths...))
			if err == nil || !strings.Contains(err.Error(), tc.refused) {
				t.Errorf("error %v, want one containing %q", err, tc.refused)
			}
		})
	}
}

// BenchmarkTarEntries lists the entries of a bag of 6,000 tables, as the
// 1000-analysis batch bundle holds.
func BenchmarkTarEntries(b *testing.B) {
	var ms []member
	for i := range 6000 {
		ms = append(ms, member{Path: fmt.Sprintf("data/tables/bench_s%04d-parameters.tex", i), Data: []byte("x")})
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := tarEntries("bench-fit", ms); err != nil {
			b.Fatal(err)
		}
	}
}
