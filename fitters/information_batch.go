package fitters

import "math"

// infoBlock is how many values the observed-information sums take through
// the batch kernels at a time: two buffers of this length (8 KiB) stay in
// the first-level cache.
const infoBlock = 512

// weibullInfoSums returns Σt, Σty and Σty² over x, y = ln(x/λ) and
// t = (x/λ)^k = e^(ky), the sums of the Weibull's observed information,
// a block at a time: the ratios x·(1/λ) into a buffer, their logarithms
// by the batch kernel (logsInto, fastLog's bits), k·y into a second
// buffer and its exponentials (expsInto, fastExp's bits), then the sums.
// fastLog and fastExp are within 0.63 ulp, and the ratio by the
// reciprocal adds at most 2 ulp to x/λ, so each y is within about 2⁻⁵²
// absolute of ln(x/λ) and each term within a few units of 2⁻⁵³ relative
// to its size: the sums agree with the per-value route (lnRatio,
// math.Exp) to about 1e-15 relative (TestInfoSumsAgree). Where a sum is
// not finite — some x ≤ 0, NaN or infinite, or a ratio outside the
// floating-point range — the per-value route decides: ok is false when
// some x is not > 0.
func weibullInfoSums(x []float64, k, lam float64) (st, sty, styy float64, ok bool) {
	if st, sty, styy, ok = weibullInfoSumsBatch(x, k, lam); ok {
		return st, sty, styy, true
	}
	return weibullInfoSumsPerValue(x, k, lam)
}

// weibullInfoSumsPerValue is weibullInfoSums one value at a time, with
// lnRatio (ln(x/λ) with log1p near λ) and math.Exp.
func weibullInfoSumsPerValue(x []float64, k, lam float64) (st, sty, styy float64, ok bool) {
	for _, v := range x {
		if !(v > 0) {
			return 0, 0, 0, false
		}
		y := lnRatio(v, lam)
		t := math.Exp(k * y)
		st += t
		sty += t * y
		styy += t * y * y
	}
	return st, sty, styy, true
}

// weibullInfoSumsBatch is weibullInfoSums by the batch kernels; ok is
// false when a sum is not finite.
func weibullInfoSumsBatch(x []float64, k, lam float64) (st, sty, styy float64, ok bool) {
	buf := borrowScratch(2 * min(len(x), infoBlock))
	defer returnScratch(buf)
	m := len(*buf) / 2
	ys, ts := (*buf)[:m], (*buf)[m:2*m]
	il := 1 / lam
	for start := 0; start < len(x); start += m {
		xb := x[start:min(start+m, len(x))]
		y, t := ys[:len(xb)], ts[:len(xb)]
		for i, v := range xb {
			y[i] = v * il
		}
		logsInto(y, y)
		for i, v := range y {
			t[i] = k * v
		}
		expsInto(t, t)
		for i, tv := range t {
			yv := y[i]
			ty := tv * yv
			st += tv
			sty += ty
			styy += ty * yv
		}
	}
	return st, sty, styy, finite(st) && finite(sty) && finite(styy)
}

// loglogisticInfoSums returns Σg′, Σg″, Σ(g″z + g′) and Σg″z² over x with
// z = β ln(x/α) and g the standard logistic log-density (g′ = −tanh(z/2),
// g″ = −2e^(−|z|)/(1 + e^(−|z|))², as logisticScoreTerms), the sums of the
// log-logistic's observed information, a block at a time through the
// batch kernels as weibullInfoSums (the logarithms of x·(1/α), then the
// exponentials of −|z|). Where a sum is not finite the per-value route
// decides: ok is false when some x is not > 0.
func loglogisticInfoSums(x []float64, alpha, beta float64) (s1, s2, s2z1, s2zz float64, ok bool) {
	if s1, s2, s2z1, s2zz, ok = loglogisticInfoSumsBatch(x, alpha, beta); ok {
		return s1, s2, s2z1, s2zz, true
	}
	return loglogisticInfoSumsPerValue(x, alpha, beta)
}

// loglogisticInfoSumsPerValue is loglogisticInfoSums one value at a time
// (lnRatio, logisticScoreTerms).
func loglogisticInfoSumsPerValue(x []float64, alpha, beta float64) (s1, s2, s2z1, s2zz float64, ok bool) {
	for _, v := range x {
		if !(v > 0) {
			return 0, 0, 0, 0, false
		}
		z := beta * lnRatio(v, alpha)
		g1, g2 := logisticScoreTerms(z)
		s1 += g1
		s2 += g2
		s2z1 += g2*z + g1
		s2zz += g2 * z * z
	}
	return s1, s2, s2z1, s2zz, true
}

// loglogisticInfoSumsBatch is loglogisticInfoSums by the batch kernels;
// ok is false when a sum is not finite.
func loglogisticInfoSumsBatch(x []float64, alpha, beta float64) (s1, s2, s2z1, s2zz float64, ok bool) {
	buf := borrowScratch(2 * min(len(x), infoBlock))
	defer returnScratch(buf)
	m := len(*buf) / 2
	zs, es := (*buf)[:m], (*buf)[m:2*m]
	ia := 1 / alpha
	for start := 0; start < len(x); start += m {
		xb := x[start:min(start+m, len(x))]
		z, e := zs[:len(xb)], es[:len(xb)]
		for i, v := range xb {
			z[i] = v * ia
		}
		logsInto(z, z)
		for i, v := range z {
			zv := beta * v
			z[i] = zv
			e[i] = -math.Abs(zv)
		}
		expsInto(e, e)
		for i, ev := range e {
			zv := z[i]
			iq := 1 / (1 + ev)
			t := math.Copysign((1-ev)*iq, zv) // tanh(z/2)
			g1, g2 := -t, -2*ev*iq*iq
			s1 += g1
			s2 += g2
			s2z1 += g2*zv + g1
			s2zz += g2 * zv * zv
		}
	}
	return s1, s2, s2z1, s2zz, finite(s1) && finite(s2) && finite(s2z1) && finite(s2zz)
}
