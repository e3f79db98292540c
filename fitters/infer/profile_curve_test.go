package infer

import (
	"math"
	"testing"
)

// TestProfileLogLikMeetsIntervals: the profile a report draws
// (ProfileLogLik) is the one the intervals are found on: at each closed
// profile-likelihood bound it is at the cut-off ℓ̂ − χ²₁(0.95)/2 (within
// 1e-5, the inner maximisations' precision when reached in one step from
// the estimate rather than along the search's path), at the
// estimate it is the fit's log-likelihood, and a value outside the
// parameter space gives NaN.
func TestProfileLogLikMeetsIntervals(t *testing.T) {
	for _, name := range []string{"weibull", "gamma", "gev", "studentt", "weibull3"} {
		t.Run(name, func(t *testing.T) {
			fam := family(t, name)
			d, opt := familyTestData(fam)
			fit, err := fam.Fit(d, opt)
			if err != nil || !fit.Converged {
				t.Fatalf("not fitted: %v", err)
			}
			rows, err := Intervals(fam, fit, d, MethodProfile, Settings{Level: 0.95})
			if err != nil {
				t.Fatal(err)
			}
			cut := fit.LogLik - chiSquareCut(0.95)
			bounds := 0
			for i, r := range rows {
				if r.Fixed {
					continue
				}
				ll := ProfileLogLik(fam, fit, d, i, []float64{r.Lower, r.Estimate, r.Upper})
				if math.Abs(ll[1]-fit.LogLik) > 1e-9*math.Abs(fit.LogLik) {
					t.Errorf("%s: ℓp at the estimate %v, the fit's %v", r.Parameter, ll[1], fit.LogLik)
				}
				for k, b := range []float64{r.Lower, r.Upper} {
					open := []bool{r.LowerOpen, r.UpperOpen}[k]
					if math.IsNaN(b) || math.IsInf(b, 0) || open {
						continue
					}
					bounds++
					if got := ll[2*k]; !(math.Abs(got-cut) <= 1e-5) {
						t.Errorf("%s: ℓp at the bound %v is %v, the cut-off %v", r.Parameter, b, got, cut)
					}
				}
			}
			if bounds < 2 {
				t.Errorf("only %d closed bounds checked", bounds)
			}
			if ll := ProfileLogLik(fam, fit, d, 1, []float64{-1}); name == "weibull" && !math.IsNaN(ll[0]) {
				t.Errorf("ℓp at a negative scale %v, want NaN", ll[0])
			}
		})
	}
}
