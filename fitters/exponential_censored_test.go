package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestExponentialCensoredNewtonAgreesWithBFGS fits the exponential to the
// seeded censored datasets of the location-scale agreement test (two
// detection limits, heavy suspension, binned data, few exact values) by its
// Newton route and by the generic BFGS route on log λ: the maxima agree
// (log-likelihood within 1e-9 relative, rate within 1e-6), Fit takes the
// Newton route, and its score at the optimum is zero to rounding.
func TestExponentialCensoredNewtonAgreesWithBFGS(t *testing.T) {
	f, _ := Lookup("exponential")
	dist, _ := f.New([]float64{0.5})
	compared := 0
	for si, sc := range censoredScenarios {
		for k := 0; k < 12; k++ {
			r := rand.New(rand.NewPCG(uint64(si), uint64(k)))
			n := 15 + r.IntN(186)
			d := sc.make(dist, r, n)
			if f.Applicable(d, nil) != nil || d.IsComplete() || (len(d.Left) == 0 && len(d.Lower) == 0) {
				continue
			}
			label := fmt.Sprintf("%s/seed %d (n=%d)", sc.name, k, n)
			fit, err := f.Fit(d, Options{})
			if err != nil || !fit.Converged {
				t.Fatalf("%s: %v %+v", label, err, fit)
			}
			if !strings.HasPrefix(fit.Method, "Newton in the rate") {
				t.Errorf("%s: Fit took %q", label, fit.Method)
			}
			gen := newFit(f, d)
			m := 0.0
			for _, v := range d.Values() {
				m += v
			}
			rate0 := float64(len(d.Values())) / m
			fitByMinimize(gen, f, d, Options{}, func(t []float64) []float64 { return []float64{math.Exp(t[0])} },
				[][]float64{{math.Log(rate0)}, {math.Log(rate0 / 3)}}, "BFGS on log rate")
			if !gen.Converged {
				continue
			}
			compared++
			if rel := math.Abs(fit.LogLik-gen.LogLik) / math.Max(1, math.Abs(gen.LogLik)); rel > 1e-9 || fit.LogLik < gen.LogLik-1e-9*math.Abs(gen.LogLik) {
				t.Errorf("%s: logL Newton %.15g, BFGS %.15g", label, fit.LogLik, gen.LogLik)
			}
			if rel := math.Abs(fit.Estimates[0]-gen.Estimates[0]) / gen.Estimates[0]; rel > 1e-6 {
				t.Errorf("%s: rate Newton %.15g, BFGS %.15g", label, fit.Estimates[0], gen.Estimates[0])
			}
			if s, _ := exponentialCensoredScore(d, fit.Estimates[0]); math.Abs(s*fit.Estimates[0]) > 1e-9*float64(d.N()) {
				t.Errorf("%s: score λ·ℓ′ = %g at the optimum", label, s*fit.Estimates[0])
			}
		}
	}
	if compared < 20 {
		t.Errorf("only %d datasets compared", compared)
	}
	t.Logf("%d datasets compared", compared)
}

// TestExponentialCensoredScoreFD checks the analytic score and curvature
// against central differences of the family's own log-likelihood, for every
// kind of observation including unbounded interval sides.
func TestExponentialCensoredScoreFD(t *testing.T) {
	f, _ := Lookup("exponential")
	d := &Data{Exact: []float64{0.3, 1.7, 4.2}, Left: []float64{0.1, 0.5}, Right: []float64{2, 6},
		Lower: []float64{0.2, 1, math.Inf(-1), 0}, Upper: []float64{0.9, math.Inf(1), 0.4, 3}}
	for _, lambda := range []float64{0.05, 0.4, 2, 30} {
		s, c := exponentialCensoredScore(d, lambda)
		h := 1e-5 * lambda
		ll := func(l float64) float64 { return f.LogLik([]float64{l}, d) }
		fdS := (ll(lambda+h) - ll(lambda-h)) / (2 * h)
		fdC := (ll(lambda+h) - 2*ll(lambda) + ll(lambda-h)) / (h * h)
		if math.Abs(s-fdS) > 1e-6*math.Max(1, math.Abs(s)) {
			t.Errorf("λ = %v: score %v, finite differences %v", lambda, s, fdS)
		}
		if math.Abs(c-fdC) > 1e-3*math.Max(1, math.Abs(c)) {
			t.Errorf("λ = %v: curvature %v, finite differences %v", lambda, c, fdC)
		}
	}
}
