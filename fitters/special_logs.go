package fitters

import "math"

// logsAbout returns y_i = ln(x_i/ref) for positive x, with ref = x[0]
// (or the given ref when it is > 0), computed as log1p((x−ref)/ref) where x
// is near ref and as ln x − ln ref elsewhere. Data tightly clustered far from
// zero (1e7 ± 0.1) keep every digit of their spread this way, which
// ln x − mean(ln x) would lose.
func logsAbout(x []float64, ref float64) (lnRef float64, y []float64) {
	y = make([]float64, len(x))
	lnRef, _ = logsAboutInto(y, x, ref)
	return lnRef, y
}

// logsAboutInto is logsAbout writing y into dst (len(dst) = len(x)); it
// also returns Σ y.
func logsAboutInto(dst, x []float64, ref float64) (lnRef, sum float64) {
	if len(x) == 0 {
		return math.NaN(), 0
	}
	if !(ref > 0) {
		ref = x[0]
	}
	lnRef = math.Log(ref)
	lo, hi := 0.5*ref, 1.5*ref
	dst = dst[:len(x)]
	for i, v := range x {
		var yi float64
		if v > lo && v < hi {
			yi = math.Log1p((v - ref) / ref)
		} else {
			yi = math.Log(v) - lnRef
		}
		dst[i] = yi
		sum += yi
	}
	return lnRef, sum
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

// logProductChunk is how many factors in [1, 2] are multiplied before one
// logarithm is taken: their product stays below 2^512, far from overflow.
const logProductChunk = 512

// sumLogSmall returns Σ ln yᵢ for yᵢ ∈ [1, 2] as Σ_chunks ln(Π yᵢ), one
// logarithm per logProductChunk values instead of one per value. Each
// product of m factors carries a relative rounding error below m·2⁻⁵³, so
// its logarithm is off by less than m·2⁻⁵³ in absolute terms — no more than
// the rounding of m partial sums of the individual logarithms, whose
// magnitudes reach m·ln 2 (TestSumLogSmallAccuracy checks both against a
// 256-bit reference).
func sumLogSmall(y []float64) float64 {
	var s float64
	for start := 0; start < len(y); start += logProductChunk {
		p := 1.0
		for _, v := range y[start:min(start+logProductChunk, len(y))] {
			p *= v
		}
		s += math.Log(p)
	}
	return s
}
