package runner

import (
	"encoding/json"
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
