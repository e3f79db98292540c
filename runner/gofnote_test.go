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

// TestNoGOFIsNoted: gof.csv has no row for a fit whose data are censored
// (the KS, CvM and AD statistics need a complete sample), so each such fit's
// inference note says so, in the results and in results.json; a fit of
// complete data has its statistics and no such note.
func TestNoGOFIsNoted(t *testing.T) {
	for _, c := range []struct {
		censored bool
		settings string
	}{
		{true, "bootstrap = 0"},
		{true, "bootstrap = 19"},
		{false, "bootstrap = 0"},
	} {
		res := runResults(t, splitProject(t, 2, 40, `"weibull", "lognormal"`, c.settings, c.censored), 2)
		want := NoGOFNote + infer.NotApplicableCensored
		for _, a := range res.Analyses {
			for i, row := range a.Comparison.Rows {
				if row.Rank == 0 {
					t.Fatalf("%s %s: not ranked (%s)", a.Name, row.Family, row.Note)
				}
				if got := strings.Contains(a.Inference[i], want); got != c.censored {
					t.Errorf("censored=%v, %s: %s %s: inference note %q", c.censored, c.settings, a.Name, row.Family, a.Inference[i])
				}
			}
			if c.censored != (len(a.GOF) == 0) {
				t.Errorf("censored=%v: %s has %d goodness-of-fit rows", c.censored, a.Name, len(a.GOF))
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
		if wantNoted := map[bool]int{true: 4, false: 0}[c.censored]; noted != wantNoted {
			t.Errorf("censored=%v, %s: results.json notes %d fits, want %d", c.censored, c.settings, noted, wantNoted)
		}
	}
}

// TestBootstrapIntervalsFallBack: with intervals = "bootstrap", censored
// data (whose censoring the parametric bootstrap cannot simulate) get
// profile-likelihood intervals, named as such on every row, and the fit's
// inference note says why; complete data keep their bootstrap intervals.
func TestBootstrapIntervalsFallBack(t *testing.T) {
	for _, censored := range []bool{true, false} {
		res := runResults(t, splitProject(t, 2, 40, `"weibull", "lognormal"`, "bootstrap = 19\nintervals = \"bootstrap\"", censored), 2)
		for _, a := range res.Analyses {
			for i, row := range a.Comparison.Rows {
				if got := strings.Contains(a.Inference[i], BootstrapFallbackNote); got != censored {
					t.Errorf("censored=%v: %s %s: inference note %q", censored, a.Name, row.Family, a.Inference[i])
				}
				for _, pr := range a.Parameters[i] {
					profile := strings.HasPrefix(pr.CIMethod, "profile")
					if profile != censored || (censored && !(pr.CILower < pr.Estimate && pr.Estimate < pr.CIUpper)) {
						t.Errorf("censored=%v: %s %s %s: interval [%v, %v] by %q", censored, a.Name, row.Family, pr.Parameter, pr.CILower, pr.CIUpper, pr.CIMethod)
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
