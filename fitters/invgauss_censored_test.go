package fitters

import (
	"math"
	"testing"
)

// TestInvgaussCensoredNewtonAgreesWithBFGS compares the censored inverse
// Gaussian Newton route with the generic BFGS route on 360 seeded censored
// datasets from shapes λ/μ = 0.5 (very skewed), 2.4 and 200 (nearly
// normal). Small, heavily censored samples from the skewed member can have
// no interior maximum: the likelihood keeps rising as μ → ∞ (the inverse
// Gaussian's limit there is the Lévy law, whose tail fits them better).
// The route must decline those (BFGS then stops at some huge μ); the test
// recognises them by the generic route's mean above 10⁶ times the data's
// centre and checks the score in c/μ there is still negative (pointing to
// the edge).
func TestInvgaussCensoredNewtonAgreesWithBFGS(t *testing.T) {
	truths := [][]float64{{10, 5}, {5, 12}, {0.02, 4}}
	boundary := func(d *Data, fit *Fit) bool {
		c := censoredCentre(d)
		q := c / fit.Estimates[0]
		s, ok := newInvgaussCensoredSample(d, c)
		if !ok || !(q < 1e-6) {
			return false
		}
		p := invgaussCensoredPoint(&s, q, math.Log(fit.Estimates[1]/c))
		t.Logf("no interior maximum: BFGS mean %.4g (c/μ = %.3g), score in c/μ %.4g", fit.Estimates[0], q, p.g0)
		return p.g0 < 0
	}
	compared, declined := censoredNewtonAgreement(t, "invgauss", "censored Newton", truths, 24, boundary)
	t.Logf("%d datasets compared with BFGS, %d declined", compared, declined)
	if compared < 300 {
		t.Errorf("only %d datasets compared", compared)
	}
}
