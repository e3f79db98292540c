package runner

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The seed corpora in testdata/fuzz/FuzzReadCSV and FuzzLoadProject are the
// 40 smallest inputs each that the fuzzer found interesting in 60-second runs:
//
//	go test ./runner -run '^$' -fuzz '^FuzzReadCSV$' -fuzztime 60s -fuzzminimizetime 5x
//
// (with the default minimisation time of 60 s per input, a loaded machine
// spends most of a short run minimising; 5x keeps it fuzzing).

// fuzzDatasets are the ways FuzzReadCSV reads its input.
var fuzzDatasets = []Dataset{
	{Column: "x", Missing: []string{"", "NA"}},
	{Column: "x", StatusColumn: "s", Left: []string{"<"}, Right: []string{"+"}, Missing: []string{""}},
	{LowerColumn: "lo", UpperColumn: "hi", Missing: []string{"", "NA"}},
	{Column: "x", TrialsColumn: "n", Missing: []string{""}},
	{Column: "x", SplitBy: "g", Where: &Where{Column: "s", Equals: "keep"}, Missing: []string{""}},
	{Column: "x", Delimiter: ";", Missing: []string{""}},
}

// FuzzReadCSV checks that no input makes the reader panic, that every error
// is a *DataError naming the file, and that accepted data are consistent:
// every row is either filtered, missing or an observation, and the data pass
// fitters' own validation.
func FuzzReadCSV(f *testing.F) {
	for _, s := range []string{
		"x\n1\n2\n", "x,s\n1,<\n2,+\n3,\n", "lo,hi\n1,2\n,3\n4,\n", "x,n\n1,3\n0,2\n",
		"g,s,x\na,keep,1\nb,drop,2\na,keep,3\n", "x;y\n1;2\n", "\ufeffx\n1e308\n-0\n", "x\n\"1\"\"\n",
	} {
		for v := range fuzzDatasets {
			f.Add(s, uint8(v))
		}
	}
	f.Fuzz(func(t *testing.T, data string, variant uint8) {
		d := fuzzDatasets[int(variant)%len(fuzzDatasets)]
		out, err := ReadCSV("fuzz.csv", strings.NewReader(data), &d)
		if err != nil {
			var de *DataError
			if !errors.As(err, &de) || de.File != "fuzz.csv" || de.Msg == "" {
				t.Fatalf("error %v (%T) is not a DataError naming the file", err, err)
			}
			return
		}
		rows, obs := out.Filtered, 0
		for _, g := range out.Groups {
			rows += g.Rows
			obs += g.Data.N() + g.Missing
			if err := g.Data.Validate(); err != nil {
				t.Fatalf("group %q: %v", g.Name, err)
			}
			for _, x := range g.Data.Values() {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Fatalf("group %q holds %v", g.Name, x)
				}
			}
		}
		if rows != out.Rows || obs+out.Filtered != out.Rows {
			t.Fatalf("rows %d: %d filtered, %d in groups, %d observations or missing", out.Rows, out.Filtered, rows, obs)
		}
	})
}

// FuzzLoadProject checks that no project file makes the loader panic, that a
// refused project gives located ProjectErrors, and that an accepted one
// holds only valid settings and resolved references.
func FuzzLoadProject(f *testing.F) {
	dir := f.TempDir()
	if err := os.MkdirAll(filepath.Join(dir, "data"), 0o755); err != nil {
		f.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "data", "life.csv"), []byte("hours,state\n1,\n2,+\n"), 0o644); err != nil {
		f.Fatal(err)
	}
	path := filepath.Join(dir, "fitseal.toml")
	f.Add(goodProject)
	f.Add(strings.Replace(goodProject, "column", "colum", 1))
	f.Add("name = \"x\"\n[[analysis]]\ndataset = 3\n")
	f.Add("[[dataset]]\n[dataset.where]\ncolumn = \"a\"\n[[candidates]]\nfixed = { gpd = { threshold = 30 } }\n")
	f.Add("name = \"\"\"\nmulti\n\"\"\"\n")
	f.Add("a = [\n1,\n{ b = 2 },\n]\n[x.y.z]\n")
	f.Fuzz(func(t *testing.T, src string) {
		p, err := Parse(path, []byte(src))
		if err != nil {
			var pes ProjectErrors
			if !errors.As(err, &pes) || len(pes) == 0 {
				t.Fatalf("error %v (%T) is not ProjectErrors", err, err)
			}
			for _, e := range pes {
				if e.File != path || e.Msg == "" || e.Line < 0 {
					t.Fatalf("badly located error %#v", e)
				}
			}
			return
		}
		if !validName(p.Name) || len(p.Analyses) == 0 {
			t.Fatalf("accepted project with name %q and %d analyses", p.Name, len(p.Analyses))
		}
		s := p.Settings
		if !(s.Confidence > 0 && s.Confidence < 1) || !(s.Tolerance > 0) || s.MaxIterations < 1 || s.Bootstrap < 0 {
			t.Fatalf("accepted settings %+v", s)
		}
		for _, a := range p.Analyses {
			if p.Dataset(a.Dataset) == nil || p.CandidateSet(a.Candidates) == nil {
				t.Fatalf("analysis %q has unresolved references", a.Name)
			}
			for _, q := range a.Quantiles {
				if !(q > 0 && q < 1) {
					t.Fatalf("accepted quantile %v", q)
				}
			}
		}
	})
}
