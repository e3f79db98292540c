package fitters

import (
	"math"
	"math/rand/v2"
	"os"
	"testing"
)

// TestMultiLongSmoke (FITSEAL_LONG=1) fits many seeded samples of every
// multi-parameter family, from its own law and from neighbouring ones, at
// sizes 5 to 3000, and asserts the reporting convention: each fit either
// converged with finite free estimates (or a noted limit) and a finite
// log-likelihood that no nearby vector beats, or did not converge and says
// why without reporting a log-likelihood.
func TestMultiLongSmoke(t *testing.T) {
	if os.Getenv("FITSEAL_LONG") == "" {
		t.Skip("long study: set FITSEAL_LONG=1")
	}
	laws := []struct {
		family string
		dist   Dist
		fixed  Fixed
	}{
		{"gev", GEV{0, 1, 0.3}, nil}, {"gev", GEV{0, 1, -0.4}, nil}, {"gev", GEV{5, 2, 0}, nil},
		{"gpd", GPD{1, 0.4, 10}, Fixed{"threshold": 10}}, {"gpd", GPD{1, -0.4, 10}, Fixed{"threshold": 10}},
		{"beta", Beta{0.3, 0.6}, nil}, {"beta", Beta{8, 2}, nil},
		{"studentt", StudentT{0, 1, 2}, nil}, {"studentt", StudentT{4, 0.5, 30}, nil},
		{"weibull3", Weibull3{1.5, 2, 3}, nil}, {"weibull3", Weibull3{4, 2, 3}, nil}, {"weibull3", Weibull3{0.8, 2, 3}, nil},
		{"lognormal3", Lognormal3{0, 1, 3}, nil}, {"lognormal3", Lognormal3{2, 0.2, -3}, nil},
	}
	counts := map[string][2]int{}
	for li, law := range laws {
		f, _ := Lookup(law.family)
		for _, n := range []int{5, 12, 40, 200, 3000} {
			for seed := uint64(0); seed < 6; seed++ {
				r := rand.New(rand.NewPCG(seed, uint64(li*100+n)))
				x := make([]float64, n)
				for i := range x {
					x[i] = law.dist.Rand(r)
				}
				d := Complete(x)
				if f.Applicable(d, law.fixed) != nil {
					continue
				}
				fit, err := f.Fit(d, Options{Fixed: law.fixed})
				if err != nil {
					t.Errorf("%s n=%d seed=%d: %v", law.family, n, seed, err)
					continue
				}
				c := counts[law.family]
				if fit.Converged {
					c[0]++
					if math.IsNaN(fit.LogLik) || math.IsInf(fit.LogLik, 0) {
						t.Errorf("%s n=%d seed=%d: converged with log-likelihood %v", law.family, n, seed, fit.LogLik)
					}
					if law.family == "weibull3" || law.family == "lognormal3" {
						checkIrregular(t, fit, x)
					} else {
						multiCheckNearby(t, f, fit, d)
					}
				} else {
					c[1]++
					if fit.Reason == "" {
						t.Errorf("%s n=%d seed=%d: not converged without a reason", law.family, n, seed)
					}
					reason := []rune(fit.Reason)
					if len(reason) > 60 {
						reason = reason[:60]
					}
					t.Logf("not converged: %s %v n=%d: %s", law.family, law.dist, n, string(reason))
				}
				counts[law.family] = c
			}
		}
	}
	for fam, c := range counts {
		t.Logf("%s: %d converged, %d not", fam, c[0], c[1])
	}
}
