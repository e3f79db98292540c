package fitters

import (
	"math"
	"strings"
	"testing"
)

// TestInvgaussCensoredNoMLEIsNotConverged: four exact values and eight
// suspensions at 3, drawn from a Lévy law (x = 1/Z², Z standard normal,
// seeded; invented data). The censored inverse Gaussian likelihood keeps
// rising as the mean → ∞ (its supremum is the Lévy limit), so there is no
// maximum-likelihood estimate: the fit must be marked not converged, with
// the reason, instead of reporting the huge mean BFGS stops at. The rise
// itself is checked here independently of both routes: the profile
// log-likelihood (shape maximised on a fine grid) grows from mean 10 to
// 10³ to 10⁵.
func TestInvgaussCensoredNoMLEIsNotConverged(t *testing.T) {
	d := &Data{
		Exact: []float64{2.0187372622768174, 0.4715378304925724, 0.5174707927582866, 2.696450231492774},
		Right: []float64{3, 3, 3, 3, 3, 3, 3, 3},
	}
	fam, ok := Lookup("invgauss")
	if !ok {
		t.Fatal("invgauss not registered")
	}
	profile := func(mean float64) float64 {
		best := math.Inf(-1)
		for e := -3.0; e <= 3; e += 0.001 {
			ll := 0.0
			dist := InvGauss{Mean: mean, Shape: math.Pow(10, e)}
			for _, x := range d.Exact {
				ll += dist.LogPDF(x)
			}
			for _, c := range d.Right {
				ll += dist.LogSurvival(c)
			}
			best = math.Max(best, ll)
		}
		return best
	}
	if p1, p3, p5 := profile(10), profile(1e3), profile(1e5); !(p1 < p3 && p3 < p5) {
		t.Fatalf("profile log-likelihood at mean 10, 1e3, 1e5: %v %v %v (expected to rise)", p1, p3, p5)
	}
	fit, err := fam.Fit(d, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if fit.Converged || !strings.Contains(fit.Reason, "no maximum-likelihood estimate") ||
		!strings.Contains(fit.Method, "no interior maximum") {
		t.Fatalf("converged=%v mean=%g method=%q reason=%q", fit.Converged, fit.Estimates[0], fit.Method, fit.Reason)
	}
}
