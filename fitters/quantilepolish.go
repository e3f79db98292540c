package fitters

import "math"

// polishQuantile refines x, an approximate p-quantile of d, by Newton's
// method on
//
//	g(x) = ln T(x) − ln t,
//
// T the tail whose probability t = min(p, 1 − p) is the smaller (F below
// p = 1/2, S above), so that g keeps its digits far out in either tail;
// dg/dx = f/F or −f/S. step(x, g, dg/dx) takes one Newton step in the
// family's own coordinate (x − g/(dg/dx) for a plain one). It stops when
// |g| ≤ 1e-15 or a step does not reduce |g|, after at most 64 steps, and
// returns the x with the smallest |g| seen: x itself when no step helps,
// so a start that already inverts the CDF is returned unchanged.
func polishQuantile(d Dist, p, x float64, step func(x, g, dgdx float64) float64) float64 {
	logTail, target, sign := d.LogSurvival, math.Log1p(-p), -1.0
	if p <= 0.5 {
		logTail, target, sign = d.LogCDF, math.Log(p), 1
	}
	if math.IsNaN(x) || math.IsInf(x, 0) || math.IsInf(target, 0) {
		return x
	}
	best, lnT := x, logTail(x)
	for range 64 {
		g := lnT - target
		if !(math.Abs(g) > 1e-15) {
			break
		}
		dgdx := sign * math.Exp(d.LogPDF(best)-lnT)
		if dgdx == 0 || math.IsInf(dgdx, 0) || math.IsNaN(dgdx) {
			break
		}
		next := step(best, g, dgdx)
		if math.IsNaN(next) || math.IsInf(next, 0) || next == best {
			break
		}
		nextT := logTail(next)
		if !(math.Abs(nextT-target) < math.Abs(g)) {
			break
		}
		best, lnT = next, nextT
	}
	return best
}

// newtonStep is the plain Newton step of polishQuantile: x − g/(dg/dx).
func newtonStep(x, g, dgdx float64) float64 { return x - g/dgdx }
