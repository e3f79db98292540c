package fitters

import "math"

// positiveQuantile solves F(x) = p for a distribution on x > 0 from the
// starting guess x0: for p ≤ 1/2 it solves ln F(x) = ln p, above it
// ln S(x) = ln(1 − p), so that both tails keep their digits. A bracket is
// found by steps in ln x that double in length, then the root is polished
// by safeguarded Newton (solveBracketed) with d ln F/dx = f/F.
func positiveQuantile(d Dist, p, x0 float64) float64 {
	return positiveQuantileStep(d, p, x0, 1e-3)
}

// positiveQuantileStep is positiveQuantile with the first step of the
// bracket search in ln x given: about a tenth of the spread of ln X, so
// that a narrow distribution (a gamma of large shape, whose ln X has
// spread 1/√k) is bracketed near the quantile and not where its tails
// are e^(−10^13) away.
func positiveQuantileStep(d Dist, p, x0, step0 float64) float64 {
	switch {
	case math.IsNaN(p) || p < 0 || p > 1:
		return math.NaN()
	case p == 0:
		return 0
	case p == 1:
		return math.Inf(1)
	}
	var fdf func(x float64) (float64, float64)
	if p <= 0.5 {
		target := math.Log(p)
		fdf = func(x float64) (float64, float64) {
			lc := d.LogCDF(x)
			return lc - target, math.Exp(d.LogPDF(x) - lc)
		}
	} else {
		target := math.Log1p(-p)
		fdf = func(x float64) (float64, float64) {
			ls := d.LogSurvival(x)
			return target - ls, math.Exp(d.LogPDF(x) - ls)
		}
	}
	h := func(y float64) float64 { v, _ := fdf(math.Exp(y)); return v }
	if !(x0 > 0) || math.IsInf(x0, 0) {
		x0 = 1
	}
	y0 := math.Log(x0)
	lo, hi := y0-step0, y0+step0
	step := step0
	for i := 0; i < 60 && !(h(lo) < 0); i++ {
		step *= 2
		lo -= step
	}
	step = step0
	for i := 0; i < 60 && !(h(hi) > 0); i++ {
		step *= 2
		hi += step
	}
	// A bracket wider than a factor e^½ is narrowed by bisection in ln x
	// first: Newton in x from a bracket of many decades (the lower tail of
	// a small shape, whose quantile is p^(1/k) in size) falls back to
	// halving x, hundreds of times, and ran out of iterations.
	if hi-lo > 0.5 && h(lo) < 0 && h(hi) > 0 {
		for i := 0; i < 200 && hi-lo > 0.5; i++ {
			if mid := 0.5 * (lo + hi); h(mid) < 0 {
				lo = mid
			} else {
				hi = mid
			}
		}
	}
	x, _, err := solveBracketed(fdf, math.Exp(lo), math.Exp(hi), 4e-16, 500)
	if err != nil {
		return math.NaN()
	}
	return x
}
