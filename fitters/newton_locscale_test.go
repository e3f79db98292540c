package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLocScaleCertainStep checks the Chebyshev steps and the unconfirmed
// final step of locScaleNewton: where it reports convergence through
// certainStep, a pass at the reported point gives the reported
// log-likelihood to the rounding of a pass and a score no larger than the
// reported bound, and the estimates are those of plain Newton confirmed by
// a pass, for logistic samples of several sizes, locations and spreads
// (heavy-tailed ones too).
func TestLocScaleCertainStep(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 3))
	used := 0
	for trial := 0; trial < 60; trial++ {
		n := 5 + r.IntN(3000)
		x := make([]float64, n)
		d := Logistic{r.NormFloat64() * 100, math.Exp(3 * r.NormFloat64())}
		for i := range x {
			x[i] = d.Rand(r)
			if trial%5 == 0 && i%50 == 0 {
				x[i] *= 30 // outliers: a large vmax
			}
		}
		_, _, m, sd := spreadOf(x)
		v := make([]float64, n)
		for i, xi := range x {
			v[i] = (xi - m) / sd
		}
		lo, hi := minMax(v)
		eval := func(a, b float64) locScalePoint { return logisticSums(v, make([]float64, len(v)), a, b) }
		bounds := locScaleBounds{logisticG3Bound, logisticG4Bound, math.Max(hi, -lo) * (1 + 1e-12)}
		res := locScaleNewton(eval, 0, math.Pi/math.Sqrt(3), 1e-10, 2000, float64(n), bounds)
		if !res.converged {
			t.Fatalf("trial %d: not converged: %s", trial, res.reason)
		}
		// Confirmed by a pass, and plain Newton (no third derivatives).
		plain := locScaleNewton(func(a, b float64) locScalePoint {
			p := eval(a, b)
			p.cubic = false
			return p
		}, 0, math.Pi/math.Sqrt(3), 1e-10, 2000, float64(n), locScaleBounds{})
		b := 1 / res.scale
		a := res.location * b
		pt := logisticSums(v, make([]float64, len(v)), a, b)
		ll, ga, gb := pt.ll, pt.ga, pt.gb
		// A pass's own rounding: ℓ sums n terms, so it is only good to
		// about 1e-16·|ℓ|·√n in practice, a few times that where its
		// terms (n ln b, Σ|z|, Σ ln(1+e)) cancel.
		if math.Abs(ll-res.logLik) > 3e-16*math.Sqrt(float64(n))*math.Max(1, math.Abs(ll)) {
			t.Errorf("trial %d (n=%d): reported ℓ %.17g, a pass there gives %.17g", trial, n, res.logLik, ll)
		}
		if g := math.Max(math.Abs(ga), math.Abs(gb)); g > res.gradNorm+1e-12*float64(n) {
			t.Errorf("trial %d (n=%d): score %.3g at the reported point exceeds the reported %.3g", trial, n, g, res.gradNorm)
		}
		if res.evaluations < plain.evaluations {
			used++
		}
		// Both routes reach the same maximum.
		if math.Abs(res.location-plain.location) > 1e-9*(1+math.Abs(plain.location)) || math.Abs(res.scale/plain.scale-1) > 1e-9 {
			t.Errorf("trial %d: (%v, %v) against the confirmed (%v, %v)", trial, res.location, res.scale, plain.location, plain.scale)
		}
	}
	if used == 0 {
		t.Error("the certain final step never saved a pass")
	}
}
