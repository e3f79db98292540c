package fitters

// log1mExpRatio returns g(t) = ln((1 − e^(−t))/t) for 0 ≤ t ≤ ln 2, so
// that ln(1 − e^(−t)) = ln t + g(t) needs no logarithm when ln t is known
// (the Weibull's k ln(x/λ), the Gumbel's −z). From
// d/dt ln(1 − e^(−t)) = 1/(e^t − 1) = 1/t − 1/2 + Σ B_2k t^(2k−1)/(2k)!
// (Abramowitz & Stegun 23.1.1, the generating function of the Bernoulli
// numbers), integrated:
//
//	g(t) = −t/2 + Σ_k B_2k t^(2k) / (2k·(2k)!),
//
// convergent for t < 2π; at t = ln 2 the tenth term is below 1e−20, so
// nine are taken (coefficients from mpmath). TestLog1mExpRatio checks it
// against mpmath (testdata/reference/make_log1mexp_ratio.py).
func log1mExpRatio(t float64) float64 {
	const (
		c1 = 0.04166666666666666666667
		c2 = -0.0003472222222222222222222
		c3 = 0.000005511463844797178130511
		c4 = -1.033399470899470899471e-7
		c5 = 2.087675698786809897921e-9
		c6 = -4.40349178223957765404e-11
		c7 = 9.558954664774770594876e-13
		c8 = -2.118550185201614291769e-14
		c9 = 4.770034475709913646742e-16
	)
	u := t * t
	p := c8 + u*c9
	p = c7 + u*p
	p = c6 + u*p
	p = c5 + u*p
	p = c4 + u*p
	p = c3 + u*p
	p = c2 + u*p
	p = c1 + u*p
	return -0.5*t + u*p
}
