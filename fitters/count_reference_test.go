package fitters

import (
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"
)

// countReference is testdata/counts/reference.json, made by
// testdata/counts/make_reference.py from Debian's scipy (discrete pmfs,
// logcdf, logsf, ppf), with mpmath exact sums where scipy's far tails lose
// digits (each point names its source).
type countReference struct {
	Datasets []struct {
		Name   string
		X      []float64
		Trials []int
		Source string
	}
	Fits []struct {
		Dataset, Family string
		Params          map[string]*float64
		Loglik          float64
		Limit           string
		LimitP          float64 `json:"limit_p"`
	}
	Points []struct {
		Family string
		Params map[string]float64
		Trials *int
		X      float64
		Logpmf float64
		Logcdf float64
		Logsf  *float64
		Source string
	}
	Quantiles []struct {
		Family string
		Params map[string]float64
		Trials *int
		P, Q   float64
	}
}

func loadCountReference(t *testing.T) *countReference {
	t.Helper()
	b, err := os.ReadFile("../testdata/counts/reference.json")
	if err != nil {
		t.Fatalf("reading the count reference: %v (regenerate with /usr/bin/python3 testdata/counts/make_reference.py)", err)
	}
	var r countReference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return &r
}

// countDist builds the family member of a reference point, with its trials.
func countDist(t *testing.T, family string, params map[string]float64, trials *int) Dist {
	t.Helper()
	f, ok := Lookup(family)
	if !ok {
		t.Fatalf("family %s is not registered", family)
	}
	p := make([]float64, 0, 2)
	for _, name := range f.Parameters() {
		p = append(p, params[name])
	}
	d, err := f.New(p)
	if err != nil {
		t.Fatal(err)
	}
	switch v := d.(type) {
	case Binomial:
		v.Trials = *trials
		return v
	case BetaBinomial:
		v.Trials = *trials
		return v
	}
	return d
}

func countCloseRel(got, want, rel float64) bool {
	if math.IsInf(want, 0) || math.IsInf(got, 0) {
		return got == want
	}
	return math.Abs(got-want) <= rel*math.Max(math.Abs(want), 1e-300)
}

// TestCountPointValues checks the log-pmf, log-CDF and log-survival of every
// count family against scipy (body) and mpmath sums (far tails), to 1e-9
// relative; both tails are required to hold their digits.
func TestCountPointValues(t *testing.T) {
	ref := loadCountReference(t)
	for _, pt := range ref.Points {
		d := countDist(t, pt.Family, pt.Params, pt.Trials)
		logsf := math.Inf(-1)
		if pt.Logsf != nil {
			logsf = *pt.Logsf
		}
		for _, c := range []struct {
			what      string
			got, want float64
		}{
			{"logpmf", d.LogPDF(pt.X), pt.Logpmf},
			{"logcdf", d.LogCDF(pt.X), pt.Logcdf},
			{"logsf", d.LogSurvival(pt.X), logsf},
		} {
			if !countCloseRel(c.got, c.want, 1e-9) {
				t.Errorf("%s %v trials=%v x=%v: %s = %.17g, want %.17g (%s)", pt.Family, pt.Params, pt.Trials, pt.X, c.what, c.got, c.want, pt.Source)
			}
		}
	}
}

// TestCountQuantiles checks Quantile (smallest k with F(k) ≥ p) against
// scipy's ppf, which uses the same definition.
func TestCountQuantiles(t *testing.T) {
	ref := loadCountReference(t)
	for _, q := range ref.Quantiles {
		d := countDist(t, q.Family, q.Params, q.Trials)
		if got := d.Quantile(q.P); got != q.Q {
			t.Errorf("%s %v trials=%v: Quantile(%v) = %v, scipy ppf %v", q.Family, q.Params, q.Trials, q.P, got, q.Q)
		}
	}
}

// TestCountReferenceFits checks every count family's fit on the reference
// datasets: log-likelihood ≥ reference − 1e-9 relative, estimates within
// 1e-6 relative, and the limiting families (negbinomial size → ∞,
// betabinomial without overdispersion) reported as converged limits.
func TestCountReferenceFits(t *testing.T) {
	ref := loadCountReference(t)
	data := map[string]*Data{}
	for _, ds := range ref.Datasets {
		data[ds.Name] = &Data{Exact: ds.X, Trials: ds.Trials}
	}
	for _, rf := range ref.Fits {
		t.Run(rf.Family+"/"+rf.Dataset, func(t *testing.T) {
			f, ok := Lookup(rf.Family)
			if !ok {
				t.Fatalf("family %s is not registered", rf.Family)
			}
			fit, err := f.Fit(data[rf.Dataset], Options{})
			if err != nil {
				t.Fatal(err)
			}
			if !fit.Converged {
				t.Fatalf("not converged: %s", fit.Reason)
			}
			if fit.LogLik < rf.Loglik-1e-9*math.Abs(rf.Loglik) {
				t.Errorf("loglik %.15g < reference %.15g", fit.LogLik, rf.Loglik)
			}
			for _, name := range f.Parameters() {
				want := rf.Params[name]
				got := fit.Estimate(name)
				if want == nil { // the limit: the parameter runs to +Inf
					if !math.IsInf(got, 1) {
						t.Errorf("%s = %v, want +Inf (%s limit)", name, got, rf.Limit)
					}
					continue
				}
				if !countCloseRel(got, *want, 1e-6) {
					t.Errorf("%s = %.12g, reference %.12g", name, got, *want)
				}
			}
			if rf.Limit != "" && !strings.Contains(strings.ToLower(fit.Note), rf.Limit+" limit") {
				t.Errorf("note %q does not name the %s limit", fit.Note, rf.Limit)
			}
			if rf.Limit == "" && fit.Note != "" {
				t.Errorf("unexpected note %q", fit.Note)
			}
		})
	}
}
