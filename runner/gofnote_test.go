package runner

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"fitseal/fitters/infer"
)

// twoSidedProject is splitProject's censored project with some values
// non-detects as well as suspensions: censored in both directions, which
// the goodness-of-fit check does not cover.
func twoSidedProject(t testing.TB, settings string) string {
	t.Helper()
	path := splitProject(t, 2, 40, `"weibull", "lognormal"`, settings, true)
	csv := filepath.Join(filepath.Dir(path), "life.csv")
	b, err := os.ReadFile(csv)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(b), "\n")
	for i := 1; i < len(lines); i++ {
		if i%7 == 3 && strings.HasSuffix(lines[i], ",") {
			lines[i] += "<"
		}
	}
	proj, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(csv, []byte(strings.Join(lines, "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(strings.Replace(string(proj), `right = ["+"]`, `right = ["+"]`+"\nleft = [\"<\"]", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestNoGOFIsNoted: data censored in one direction (suspensions) get ks
// and cvm against the Kaplan–Meier estimate, with p-values from the
// conditional bootstrap when replicates are drawn; data censored in both
// directions get no row in gof.csv, so each such fit's inference note says
// why, in the results and in results.json; a fit of complete data has its
// three statistics and no such note.
func TestNoGOFIsNoted(t *testing.T) {
	for _, c := range []struct {
		kind     string // "complete", "suspensions", "both"
		settings string
	}{
		{"suspensions", "bootstrap = 0"},
		{"suspensions", "bootstrap = 19"},
		{"both", "bootstrap = 0"},
		{"both", "bootstrap = 19"},
		{"complete", "bootstrap = 0"},
	} {
		path := splitProject(t, 2, 40, `"weibull", "lognormal"`, c.settings, c.kind == "suspensions")
		if c.kind == "both" {
			path = twoSidedProject(t, c.settings)
		}
		res := runResults(t, path, 2)
		none := c.kind == "both"
		want := NoGOFNote + infer.NotApplicableCensored
		for _, a := range res.Analyses {
			for i, row := range a.Comparison.Rows {
				if row.Rank == 0 {
					t.Fatalf("%s %s: not ranked (%s)", a.Name, row.Family, row.Note)
				}
				if got := strings.Contains(a.Inference[i], want); got != none {
					t.Errorf("%s, %s: %s %s: inference note %q", c.kind, c.settings, a.Name, row.Family, a.Inference[i])
				}
				// The reason is one clause: none of it is left among the
				// remarks, which drop the no-goodness-of-fit clause.
				if r := InferenceRemarks(a.Inference[i]); strings.Contains(r, "censored") {
					t.Errorf("%s, %s: %s %s: remarks %q keep part of the reason", c.kind, c.settings, a.Name, row.Family, r)
				}
			}
			wantRows := map[string]int{"complete": 6, "suspensions": 4, "both": 0}[c.kind]
			if len(a.GOF) != wantRows {
				t.Errorf("%s: %s has %d goodness-of-fit rows, want %d", c.kind, a.Name, len(a.GOF), wantRows)
			}
			for _, g := range a.GOF {
				if c.kind != "suspensions" {
					continue
				}
				bootstrapped := c.settings == "bootstrap = 19"
				if g.Statistic == "ad" || !strings.Contains(g.Note, "Kaplan–Meier") ||
					strings.Contains(g.Note, infer.ConditionalBootstrapNote) != bootstrapped || math.IsNaN(g.PValue) == bootstrapped {
					t.Errorf("%s, %s: %s %+v", c.kind, c.settings, a.Name, g)
				}
			}
		}
		files, err := res.Files()
		if err != nil {
			t.Fatal(err)
		}
		var doc struct {
			Analyses []struct {
				Fits []struct {
					Inference string `json:"inference_note"`
				} `json:"fits"`
			} `json:"analyses"`
		}
		if err := json.Unmarshal(files[ResultsFile], &doc); err != nil {
			t.Fatal(err)
		}
		noted := 0
		for _, a := range doc.Analyses {
			for _, f := range a.Fits {
				if strings.Contains(f.Inference, want) {
					noted++
				}
			}
		}
		if wantNoted := map[bool]int{true: 4, false: 0}[none]; noted != wantNoted {
			t.Errorf("%s, %s: results.json notes %d fits, want %d", c.kind, c.settings, noted, wantNoted)
		}
	}
}

// TestBootstrapIntervalsFallBack: with intervals = "bootstrap", data
// censored in both directions (which the bootstrap cannot simulate) get
// profile-likelihood intervals, named as such on every row, and the fit's
// inference note says why; complete data and suspended data (simulated by
// the conditional bootstrap) keep their bootstrap intervals.
func TestBootstrapIntervalsFallBack(t *testing.T) {
	const settings = "bootstrap = 19\nintervals = \"bootstrap\""
	for _, kind := range []string{"both", "suspensions", "complete"} {
		path := splitProject(t, 2, 40, `"weibull", "lognormal"`, settings, kind == "suspensions")
		if kind == "both" {
			path = twoSidedProject(t, settings)
		}
		res := runResults(t, path, 2)
		fallback := kind == "both"
		for _, a := range res.Analyses {
			for i, row := range a.Comparison.Rows {
				if got := strings.Contains(a.Inference[i], BootstrapFallbackNote); got != fallback {
					t.Errorf("%s: %s %s: inference note %q", kind, a.Name, row.Family, a.Inference[i])
				}
				for _, pr := range a.Parameters[i] {
					profile := strings.HasPrefix(pr.CIMethod, "profile")
					if profile != fallback || !(pr.CILower < pr.Estimate && pr.Estimate < pr.CIUpper) {
						t.Errorf("%s: %s %s %s: interval [%v, %v] by %q", kind, a.Name, row.Family, pr.Parameter, pr.CILower, pr.CIUpper, pr.CIMethod)
					}
				}
			}
		}
	}
}

// TestCountFamilyWithoutTrials: beside binomial and betabinomial, which use
// each row's number of trials, poisson models the counts alone, as its fit
// does; so its median and its chi-square statistic are computed from the
// counts alone instead of being left out ("the data give numbers of
// trials"), while the binomial-type families' median stays undefined (each
// row has its own number of trials). A statistic whose cells all pool into
// one gets no p-value even with replicates.
func TestCountFamilyWithoutTrials(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("batch,n,k\n")
	r := rand.New(rand.NewPCG(3, 4))
	for i := range 60 {
		n := 20 + 10*(i%4)
		k := 0
		for range n {
			if r.Float64() < 0.1 {
				k++
			}
		}
		fmt.Fprintf(&b, "%d,%d,%d\n", i, n, k)
	}
	if err := os.WriteFile(filepath.Join(dir, "d.csv"), []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	proj := `name = "counts"
[settings]
bootstrap = 19
[[dataset]]
name = "d"
file = "d.csv"
column = "k"
trials_column = "n"
[[candidates]]
name = "c"
families = ["binomial", "betabinomial", "poisson"]
[[analysis]]
dataset = "d"
candidates = "c"
quantiles = [0.5]
`
	if err := os.WriteFile(filepath.Join(dir, "fitseal.toml"), []byte(proj), 0o644); err != nil {
		t.Fatal(err)
	}
	res := runResults(t, filepath.Join(dir, "fitseal.toml"), 2)
	a := res.Analyses[0]
	gof := map[string]GOFRow{}
	for _, g := range a.GOF {
		gof[g.Family] = g
	}
	for _, d := range a.Derived {
		switch d.Family {
		case "poisson":
			if !(d.Estimate >= 1) {
				t.Errorf("poisson median %v, want a count", d.Estimate)
			}
		case "binomial", "betabinomial":
			if !math.IsNaN(d.Estimate) || !strings.Contains(d.Note, "different numbers of trials") {
				t.Errorf("%s median %v (%q), want none: the rows have different numbers of trials", d.Family, d.Estimate, d.Note)
			}
		}
	}
	g, ok := gof["poisson"]
	if !ok || g.Statistic != "chisq" || math.IsNaN(g.Value) {
		t.Fatalf("poisson has no chi-square statistic: %+v (rows %+v)", g, a.GOF)
	}
	for fam, g := range gof {
		if strings.Contains(g.Note, "carries no information") != math.IsNaN(g.PValue) {
			t.Errorf("%s: p = %v with note %q: an uninformative statistic must have no p-value, an informative one a p-value", fam, g.PValue, g.Note)
		}
	}
}

// TestInferenceRemarks: what show and the PDF print of a fit's inference
// note: not its no-goodness-of-fit clause (the goodness-of-fit tables say
// it), nor why there was no bootstrap unless that changed the intervals;
// families sharing a remark are named on one line.
func TestInferenceRemarks(t *testing.T) {
	censored := noBootstrapNote + "parametric bootstrap not applicable: 3 of 9 observations are censored"
	for _, c := range []struct{ note, want string }{
		{"", ""},
		{NoGOFNote + infer.NotApplicableCensored, ""},
		{censored + "; " + NoGOFNote + infer.NotApplicableCensored, ""},
		{censored + "; " + BootstrapFallbackNote + "; " + NoGOFNote + infer.NotApplicableCensored, censored + "; " + BootstrapFallbackNote},
		{LocalMaximumNote, LocalMaximumNote},
	} {
		if got := InferenceRemarks(c.note); got != c.want {
			t.Errorf("InferenceRemarks(%q) = %q, want %q", c.note, got, c.want)
		}
	}
	got := GroupRemarks([]string{"a", "b", "c", "d"}, []string{"x", "", "x", "y"})
	if want := []string{"a, c: x", "d: y"}; !slices.Equal(got, want) {
		t.Errorf("GroupRemarks = %q, want %q", got, want)
	}
}
