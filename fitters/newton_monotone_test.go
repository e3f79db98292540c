package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestProfileCertainStep compares the Weibull and Gumbel complete-data fits
// whose last Newton step is taken without a confirming pass (when Taylor
// bounds make it certain) with the same fits confirmed by a pass: same
// estimates and log-likelihood to rounding, the reported profile-equation
// bound at least the confirmed residual, and at least one pass saved.
func TestProfileCertainStep(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 4))
	saved := 0
	for trial := 0; trial < 80; trial++ {
		n := 3 + r.IntN(2500)
		x := make([]float64, n)
		family := "weibull"
		var d Dist = Weibull{math.Exp(r.NormFloat64()), math.Exp(4 * r.NormFloat64())}
		if trial%2 == 1 {
			family = "gumbel"
			d = Gumbel{100 * r.NormFloat64(), math.Exp(3 * r.NormFloat64())}
		}
		for i := range x {
			x[i] = d.Rand(r)
			if trial%7 == 0 {
				x[i] = 1e6 + x[i]*1e-3 // clustered far from zero
			}
		}
		mle := weibullMLE
		if family == "gumbel" {
			mle = gumbelMLE
		}
		a, b, ll, conv := mle(x, Options{})
		skipCertainSteps = true
		ca, cb, cll, cconv := mle(x, Options{})
		skipCertainSteps = false
		if !conv.Converged || !cconv.Converged {
			t.Fatalf("trial %d %s n=%d: %+v / %+v", trial, family, n, conv, cconv)
		}
		if conv.Evaluations < cconv.Evaluations {
			saved++
		}
		rel := func(u, v float64) float64 { return math.Abs(u-v) / math.Max(1e-300, math.Abs(v)) }
		if rel(a, ca) > 1e-12 || rel(b, cb) > 1e-12 || rel(ll, cll) > 1e-13 {
			t.Errorf("trial %d %s n=%d: (%.17g, %.17g, %.17g) against confirmed (%.17g, %.17g, %.17g)", trial, family, n, a, b, ll, ca, cb, cll)
		}
	}
	if saved == 0 {
		t.Error("the certain last step never saved a pass")
	}
}
