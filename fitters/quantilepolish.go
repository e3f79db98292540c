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
// |g| is within the rounding of ln t (4ε·max(1, |ln t|), at least 1e-15)
// or a step does not reduce |g|, after at most 64 steps, and returns the x
// with the smallest |g| seen: x itself when no step helps. A start whose
// |g| is already within startTolerance is returned unchanged, without a
// step: the tails themselves are accurate to about that, so steps there
// only move x within their error and can make the quantile worse (by up
// to 40 ulps of x against mpmath at beta(0.06, 19.9), p = 0.77, and at
// studentt df ≈ 5, p = 1 − 1e-10; testdata/reference/make_polish_start.py).
func polishQuantile(d Dist, p, x float64, step func(x, g, dgdx float64) float64) float64 {
	logTail, target, sign := d.LogSurvival, math.Log1p(-p), -1.0
	if p <= 0.5 {
		logTail, target, sign = d.LogCDF, math.Log(p), 1
	}
	if math.IsNaN(x) || math.IsInf(x, 0) || math.IsInf(target, 0) {
		return x
	}
	best, lnT := x, logTail(x)
	resolution := max(1e-15, 4*0x1p-52*math.Abs(target))
	if math.Abs(lnT-target) <= startTolerance+resolution {
		return x
	}
	for range 64 {
		g := lnT - target
		if !(math.Abs(g) > resolution) {
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

// startTolerance is the accuracy of the families' ln-tail evaluations
// (beta's and studentt's tails agree with mpmath to about 1e-14 in ln T,
// testdata/reference/incbeta.json, testdata/studentt/tails.json): a start
// within it of the target is as good as the tails can tell.
const startTolerance = 1e-13

// newtonStep is the plain Newton step of polishQuantile: x − g/(dg/dx).
func newtonStep(x, g, dgdx float64) float64 { return x - g/dgdx }
