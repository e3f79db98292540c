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
	// logAbout written out: as a call (it does not inline) it costs the
	// fits that take logs this way a few per cent.
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

// logAbout is one value of logsAbout: ln(v/ref), as log1p((v−ref)/ref)
// for v within half of ref, else ln v − lnRef (lnRef = ln ref).
func logAbout(v, ref, lnRef float64) float64 {
	if v > 0.5*ref && v < 1.5*ref {
		return math.Log1p((v - ref) / ref)
	}
	return math.Log(v) - lnRef
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

// lnRatioFast is lnRatio with fastLog1p and fastLog (within 0.63 ulp, as
// math's within one), for the EDF statistics' tails.
func lnRatioFast(x, s float64) float64 {
	r := x / s
	if r > 0.5 && r < 2 {
		return fastLog1p((x - s) / s)
	}
	if r > 1e-300 && r < 1e300 {
		return fastLog(r)
	}
	return fastLog(x) - fastLog(s)
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

// logAccumulator sums logarithms of positive numbers as the logarithm of
// their running product: mul multiplies a factor in (factors outside
// [2⁻²⁵⁰, 2²⁵⁰] are logged on their own), and after every fourth factor the
// product's binary exponent is moved into an integer, keeping it in [1, 2);
// four factors in range cannot take it out of the normal range. Each
// multiplication rounds by at most 2⁻⁵³ relative, so after m factors the
// sum is off by at most m·2⁻⁵³ absolute plus the final rounding — less than
// summing m math.Log values, whose partial sums round at their own
// magnitude (TestSumLogsAccuracy).
type logAccumulator struct {
	p     float64 // running product in [2⁻¹⁰⁰⁰, 2¹⁰⁰²]
	k     int     // factors since the last renormalisation
	exp   int     // binary exponents moved out of p
	loose float64 // logs of the out-of-range factors
}

func newLogAccumulator() logAccumulator { return logAccumulator{p: 1} }

func (a *logAccumulator) mul(v float64) {
	if !(v >= 0x1p-250 && v <= 0x1p250) {
		a.loose += math.Log(v)
		return
	}
	a.p *= v
	a.k++
	if a.k == 4 {
		a.renormalise()
	}
}

func (a *logAccumulator) renormalise() {
	b := math.Float64bits(a.p)
	a.exp += int(b>>52&0x7ff) - 1023
	a.p = math.Float64frombits(b&^(0x7ff<<52) | 1023<<52)
	a.k = 0
}

// sum returns Σ ln of the factors multiplied in.
func (a *logAccumulator) sum() float64 {
	a.renormalise()
	return float64(a.exp)*math.Ln2 + math.Log(a.p) + a.loose
}

// sumLogs returns Σ ln xᵢ for positive x as a logAccumulator would, four
// values at a time: when all four are in range their product
// (x₀x₁)(x₂x₃) ∈ [2⁻¹⁰⁰⁰, 2¹⁰⁰⁰] joins the running product in one step
// (four roundings for four factors, as one by one).
func sumLogs(x []float64) float64 {
	acc := newLogAccumulator()
	i := 0
	for ; i+4 <= len(x); i += 4 {
		a, b, c, d := x[i], x[i+1], x[i+2], x[i+3]
		if lo, hi := widen(a, a, b, c, d, d); lo >= 0x1p-250 && hi <= 0x1p250 {
			if acc.k != 0 {
				acc.renormalise() // p back in [1, 2)
			}
			acc.p *= (a * b) * (c * d)
			acc.renormalise()
			continue
		}
		acc.mul(a)
		acc.mul(b)
		acc.mul(c)
		acc.mul(d)
	}
	for ; i < len(x); i++ {
		acc.mul(x[i])
	}
	return acc.sum()
}

// scanLogs4 is scan4 with Σ ln x added (for positive x, as sumLogs; ln of
// a value ≤ 0 is NaN or −Inf, which the caller's lo > 0 test rejects).
func scanLogs4(x []float64) (lo, hi, sum, sumLog float64) {
	var s0, s1, s2, s3 float64
	lo, hi = x[0], x[0]
	acc := newLogAccumulator()
	i := 0
	for ; i+4 <= len(x); i += 4 {
		a, b, c, d := x[i], x[i+1], x[i+2], x[i+3]
		s0 += a
		s1 += b
		s2 += c
		s3 += d
		l, h := widen(a, a, b, c, d, d)
		lo, hi = widen(lo, hi, l, l, h, h)
		if l >= 0x1p-250 && h <= 0x1p250 {
			if acc.k != 0 {
				acc.renormalise()
			}
			acc.p *= (a * b) * (c * d)
			acc.renormalise()
			continue
		}
		acc.mul(a)
		acc.mul(b)
		acc.mul(c)
		acc.mul(d)
	}
	for ; i < len(x); i++ {
		s0 += x[i]
		lo, hi = widen(lo, hi, x[i], x[i], x[i], x[i])
		acc.mul(x[i])
	}
	return lo, hi, (s0 + s1) + (s2 + s3), acc.sum()
}
