package infer

import (
	"math"
	"testing"

	"fitseal/fitters"
)

// TestEveryFamily runs every registered family through every interval
// method and derived quantity on data it can take (the ball-bearing times,
// scaled into (0, 1) for beta, over a fixed threshold for gpd; counts for
// the discrete families), and checks the contract the runner relies on: a
// row without an interval says why, and an interval contains its estimate.
// For the regular continuous families, Wald and profile intervals must
// exist, be closed and finite.
func TestEveryFamily(t *testing.T) {
	for _, fam := range fitters.Families() {
		t.Run(fam.Name(), func(t *testing.T) {
			d, opt := familyTestData(fam)
			fit, err := fam.Fit(d, opt)
			if err != nil {
				t.Skipf("not applicable: %v", err)
			}
			if !fit.Converged {
				t.Skipf("fit did not converge: %s", fit.Reason)
			}
			rep, repErr := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 49, Stream: Stream{Master: 1, Family: fam.Name()}})
			s := Settings{Level: 0.9, Replicates: rep}
			for _, m := range []Method{MethodWald, MethodProfile, MethodBootstrap} {
				if m == MethodBootstrap && repErr != nil {
					continue
				}
				rows, err := Intervals(fam, fit, d, m, s)
				if err != nil {
					t.Fatal(err)
				}
				for _, r := range rows {
					if r.Fixed {
						continue
					}
					checkRow(t, string(m)+" "+r.Parameter, r.Estimate, r.Lower, r.Upper, r.Note, m != MethodBootstrap)
					if regularFamilies[fam.Name()] && m != MethodBootstrap && (r.LowerOpen || r.UpperOpen || math.IsNaN(r.Lower) || math.IsNaN(r.Upper)) {
						t.Errorf("%s %s: [%v, %v] open %v/%v (%s), want a closed interval", m, r.Parameter, r.Lower, r.Upper, r.LowerOpen, r.UpperOpen, r.Note)
					}
				}
				for _, q := range []struct {
					q   Quantity
					arg float64
				}{{Quantile, 0.5}, {ReturnLevel, 100}, {Exceedance, 0.5 * ballBearings[22]}} {
					if fam.Name() == "beta" && q.q == Exceedance {
						q.arg = 0.5
					}
					dv, err := Derived(fam, fit, d, q.q, q.arg, m, s)
					if err != nil {
						t.Fatal(err)
					}
					checkRow(t, string(m)+" "+string(q.q), dv.Estimate, dv.Lower, dv.Upper, dv.Note, m != MethodBootstrap)
					if regularFamilies[fam.Name()] && m != MethodBootstrap && (math.IsNaN(dv.Lower) || math.IsNaN(dv.Upper) || dv.LowerOpen || dv.UpperOpen) {
						t.Errorf("%s %s(%v): [%v, %v] (%s), want a closed interval", m, q.q, q.arg, dv.Lower, dv.Upper, dv.Note)
					}
				}
			}
		})
	}
}

// checkRow: no interval without a reason; an interval contains the
// estimate (a bootstrap-t or percentile interval need not, so only for Wald and
// profile, with a little slack for the profile's root-finding tolerance).
func checkRow(t *testing.T, what string, est, lo, hi float64, note string, contains bool) {
	t.Helper()
	if (math.IsNaN(lo) || math.IsNaN(hi)) && note == "" {
		t.Errorf("%s: no interval and no note", what)
	}
	slack := 1e-9 * math.Max(1, math.Abs(est))
	if contains && !math.IsNaN(lo) && !math.IsNaN(hi) && !(lo <= est+slack && est-slack <= hi) {
		t.Errorf("%s: estimate %v outside [%v, %v]", what, est, lo, hi)
	}
}

// regularFamilies are the continuous families whose likelihood is regular
// on familyTestData, so that every interval method must give finite,
// closed intervals.
var regularFamilies = map[string]bool{"normal": true, "lognormal": true, "exponential": true, "gamma": true,
	"weibull": true, "gumbel": true, "gev": true, "logistic": true, "loglogistic": true,
	"invgauss": true, "beta": true}

// familyTestData returns data fam can take, with its fit options: the
// ball-bearing times, scaled into (0, 1) for beta, over a fixed threshold
// for gpd; small counts (with trials for the binomial-type families) for
// the discrete families.
func familyTestData(fam fitters.Family) (*fitters.Data, fitters.Options) {
	counts := []float64{0, 1, 1, 2, 0, 3, 1, 0, 2, 1, 4, 0, 1, 2, 1}
	d := fitters.Complete(ballBearings)
	opt := fitters.Options{}
	switch {
	case fam.Name() == "beta":
		x := make([]float64, len(ballBearings))
		for i, v := range ballBearings {
			x[i] = v / 200
		}
		d = fitters.Complete(x)
	case fam.Name() == "gpd":
		opt.Fixed = fitters.Fixed{"threshold": 15}
	case fam.Name() == "binomial" || fam.Name() == "betabinomial":
		d = &fitters.Data{Exact: counts, Trials: []int{4, 4, 5, 5, 3, 6, 4, 2, 5, 5, 8, 3, 4, 6, 2}}
	case fam.Kind() == fitters.Discrete:
		d = fitters.Complete(counts)
	}
	return d, opt
}
