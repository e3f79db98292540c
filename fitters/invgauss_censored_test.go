package fitters

import (
	"math"
	"testing"
)

// TestInvgaussCensoredNewtonAgreesWithBFGS compares the censored inverse
// Gaussian Newton route with the generic BFGS route on seeded censored
// datasets (120, or 600 with FITSEAL_LONG=1) from shapes λ/μ = 0.5 (very skewed), 2.4 and 200 (nearly
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
	seeds := agreementSeeds()
	compared, declined := censoredNewtonAgreement(t, "invgauss", "censored Newton", truths, seeds, boundary)
	t.Logf("%d datasets compared with BFGS, %d declined", compared, declined)
	if compared < len(truths)*len(censoredScenarios)*seeds*9/10 {
		t.Errorf("only %d datasets compared", compared)
	}
}

// checkPointDerivatives compares the score and Hessian of eval at
// (θ₀, θ₁) with five-point central differences (step h) of its own ℓ and
// score, to tol relative to max(1, |value|).
func checkPointDerivatives(t *testing.T, label string, eval newton2Eval, t0, t1, h, tol float64) {
	t.Helper()
	p := eval(t0, t1)
	at := func(i int, k float64) newton2Point {
		if i == 0 {
			return eval(t0+k*h, t1)
		}
		return eval(t0, t1+k*h)
	}
	fd := func(i int, v func(newton2Point) float64) float64 {
		return (v(at(i, -2)) - 8*v(at(i, -1)) + 8*v(at(i, 1)) - v(at(i, 2))) / (12 * h)
	}
	ll := func(p newton2Point) float64 { return p.ll }
	g0 := func(p newton2Point) float64 { return p.g0 }
	g1 := func(p newton2Point) float64 { return p.g1 }
	checks := []struct {
		what      string
		got, want float64
	}{
		{"∂ℓ/∂θ₀", p.g0, fd(0, ll)}, {"∂ℓ/∂θ₁", p.g1, fd(1, ll)},
		{"∂²ℓ/∂θ₀²", p.h00, fd(0, g0)}, {"∂²ℓ/∂θ₀∂θ₁", p.h01, fd(1, g0)},
		{"∂²ℓ/∂θ₁∂θ₀", p.h01, fd(0, g1)}, {"∂²ℓ/∂θ₁²", p.h11, fd(1, g1)},
	}
	for _, ch := range checks {
		if math.Abs(ch.got-ch.want) > tol*math.Max(1, math.Abs(ch.want)) {
			t.Errorf("%s (%v, %v): %s = %.12g, differences %.12g", label, t0, t1, ch.what, ch.got, ch.want)
		}
	}
}

// TestInvgaussCensoredDerivatives checks the analytic score and Hessian of
// invgaussCensoredPoint against differences of its own log-likelihood and
// score (checkPointDerivatives), with every kind of observation and both
// tails (a non-detect at 0.05 and a suspension at 60 for means 1.2 to
// 8.3 and shapes 1.2 to 12), at points around and away from the maximum,
// and its ℓ against the family's LogLik.
func TestInvgaussCensoredDerivatives(t *testing.T) {
	d := &Data{Exact: []float64{1.1, 0.4, 2.6, 0.9, 1.7, 3.3},
		Left: []float64{0.05, 0.3, 0.3}, Right: []float64{4, 60, 4},
		Lower: []float64{0.5, 1.5, 0.2, 2}, Upper: []float64{0.8, 2.5, 0.5, math.Inf(1)}}
	f, _ := Lookup("invgauss")
	c := censoredCentre(d)
	s, ok := newInvgaussCensoredSample(d, c)
	if !ok {
		t.Fatal("sample rejected")
	}
	eval := func(q, sg float64) newton2Point { return invgaussCensoredPoint(&s, q, sg) }
	for _, pt := range [][2]float64{{1, 0.5}, {0.7, 1.2}, {1.4, -0.3}, {0.2, 2}} {
		q, sg := pt[0], pt[1]
		if want, got := f.LogLik([]float64{c / q, c * math.Exp(sg)}, d), eval(q, sg).ll; math.Abs(got-want) > 1e-12*math.Abs(want) {
			t.Errorf("(%v, %v): ℓ %.17g, LogLik %.17g", q, sg, got, want)
		}
		checkPointDerivatives(t, "invgauss", eval, q, sg, 1e-4, 1e-8)
	}
}
