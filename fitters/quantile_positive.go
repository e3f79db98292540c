package fitters

import "math"

// positiveQuantile solves F(x) = p for a distribution on x > 0 from the
// starting guess x0: for p ≤ 1/2 it solves ln F(x) = ln p, above it
// ln S(x) = ln(1 − p), so that both tails keep their digits. A bracket is
// found by steps in ln x that double in length, then the root is polished
// by safeguarded Newton (solveBracketed) with d ln F/dx = f/F.
func positiveQuantile(d Dist, p, x0 float64) float64 {
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
	lo, hi := y0-1e-3, y0+1e-3
	step := 1e-3
	for i := 0; i < 60 && !(h(lo) < 0); i++ {
		step *= 2
		lo -= step
	}
	step = 1e-3
	for i := 0; i < 60 && !(h(hi) > 0); i++ {
		step *= 2
		hi += step
	}
	x, _, err := solveBracketed(fdf, math.Exp(lo), math.Exp(hi), 4e-16, 500)
	if err != nil {
		return math.NaN()
	}
	return x
}
