package fitters

import "math"

// logsAbout returns y_i = ln(x_i/ref) for positive x, with ref = x[0]
// (or the given ref when it is > 0), computed as log1p((x−ref)/ref) where x
// is near ref and as ln x − ln ref elsewhere. Data tightly clustered far from
// zero (1e7 ± 0.1) keep every digit of their spread this way, which
// ln x − mean(ln x) would lose.
func logsAbout(x []float64, ref float64) (lnRef float64, y []float64) {
	y = make([]float64, len(x))
	if len(x) == 0 {
		return math.NaN(), y
	}
	if !(ref > 0) {
		ref = x[0]
	}
	lnRef = math.Log(ref)
	lo, hi := 0.5*ref, 1.5*ref
	for i, v := range x {
		if v > lo && v < hi {
			y[i] = math.Log1p((v - ref) / ref)
		} else {
			y[i] = math.Log(v) - lnRef
		}
	}
	return lnRef, y
}

// sumOf returns Σ v.
func sumOf(v []float64) float64 {
	var s float64
	for _, x := range v {
		s += x
	}
	return s
}

// log1pmx returns ln(1 + d) − d without cancellation for small |d|: with
// u = d/(2+d), ln(1+d) = 2 atanh u, so ln(1+d) − d = −d²/(2+d) + 2(u³/3 +
// u⁵/5 + …), six terms being exact to rounding for |d| < 0.1.
func log1pmx(d float64) float64 {
	if math.Abs(d) >= 0.1 {
		return math.Log1p(d) - d
	}
	u := d / (2 + d)
	u2 := u * u
	series := u * u2 * (1.0/3 + u2*(1.0/5+u2*(1.0/7+u2*(1.0/9+u2*(1.0/11+u2*(1.0/13))))))
	return -d*d/(2+d) + 2*series
}

// lnRatio returns ln(x/s) for positive x and s: by log1p near 1, as
// ln x − ln s when the quotient would overflow or underflow.
func lnRatio(x, s float64) float64 {
	r := x / s
	if r > 0.5 && r < 2 {
		// x − s is exact here (Sterbenz): ln(x/s) keeps every digit.
		return math.Log1p((x - s) / s)
	}
	if r > 1e-300 && r < 1e300 {
		return math.Log(r)
	}
	return math.Log(x) - math.Log(s)
}

// powerOfTwoScale returns x·f with f a power of two (so the scaling is
// exact) chosen to bring the largest |x| near 1 when it is beyond 1e±100,
// where squares of deviations would overflow or underflow; otherwise x
// itself and f = 1. A location-scale fit of x·f maps back by dividing the
// location and scale by f and adding n ln f to the log-likelihood.
func powerOfTwoScale(x []float64) ([]float64, float64) {
	var m float64
	for _, v := range x {
		m = math.Max(m, math.Abs(v))
	}
	if m == 0 || (m < 1e100 && m > 1e-100) || math.IsInf(m, 0) || math.IsNaN(m) {
		return x, 1
	}
	_, e := math.Frexp(m)
	f := math.Ldexp(1, -e)
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = v * f
	}
	return out, f
}
