package infer

import "math"

// findRoot finds t in [a, b] with f(t) = 0, given fa = f(a) and fb = f(b) of
// opposite signs (either may be −Inf: a point where the likelihood vanishes).
// It uses the Illinois variant of regula falsi (Dowell & Jarratt, 1971),
// falling back to bisection while an end value is infinite. It stops when
// the bracket is narrower than xtol·max(1, |t|) or |f| < ftol.
func findRoot(f func(float64) float64, a, b, fa, fb, xtol, ftol float64, maxIter int) (float64, bool) {
	if fa == 0 {
		return a, true
	}
	if fb == 0 {
		return b, true
	}
	if math.IsNaN(fa) || math.IsNaN(fb) || (fa > 0) == (fb > 0) {
		return math.NaN(), false
	}
	side := 0
	for it := 0; it < maxIter; it++ {
		var t float64
		if math.IsInf(fa, 0) || math.IsInf(fb, 0) {
			t = 0.5 * (a + b)
		} else {
			t = (a*fb - b*fa) / (fb - fa)
			if !(t > math.Min(a, b) && t < math.Max(a, b)) {
				t = 0.5 * (a + b)
			}
		}
		ft := f(t)
		if math.IsNaN(ft) {
			return t, false
		}
		if math.Abs(ft) < ftol {
			return t, true
		}
		if (ft > 0) == (fb > 0) {
			b, fb = t, ft
			if side == -1 && !math.IsInf(fa, 0) {
				fa /= 2
			}
			side = -1
		} else {
			a, fa = t, ft
			if side == 1 && !math.IsInf(fb, 0) {
				fb /= 2
			}
			side = 1
		}
		if math.Abs(b-a) <= xtol*math.Max(1, math.Abs(t)) {
			return 0.5 * (a + b), true
		}
	}
	return 0.5 * (a + b), false
}
