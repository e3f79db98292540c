package fitters

import "math"

// exponentialCensoredScore returns the censored exponential log-likelihood's
// score and second derivative in the rate λ (Lawless, 2003, §2.4): an exact
// value x adds 1/λ − x; a suspension at x adds −x; a non-detect below x adds
// x·r/q with r = e^(−λx), q = 1 − r; an interval (l, u) adds −l + w·r/q with
// w = u − l, r = e^(−λw) (an unbounded side reduces it to the two forms
// before). Second derivatives: −1/λ² per exact value and −x²·r/q² per
// non-detect or interval term. Every term is concave in λ.
func exponentialCensoredScore(d *Data, lambda float64) (score, curvature float64) {
	nExact := float64(len(d.Exact))
	score = nExact / lambda
	curvature = -nExact / (lambda * lambda)
	for _, x := range d.Exact {
		score -= x
	}
	for _, x := range d.Right {
		score -= x
	}
	below := func(x float64) {
		r, q := math.Exp(-lambda*x), -math.Expm1(-lambda*x)
		score += x * r / q
		curvature -= x * x * r / (q * q)
	}
	for _, x := range d.Left {
		below(x)
	}
	for i, l := range d.Lower {
		u := d.Upper[i]
		lo := l > 0 && !math.IsInf(l, 0)
		switch {
		case lo && math.IsInf(u, 1):
			score -= l
		case !lo && !math.IsInf(u, 1):
			below(u)
		case lo:
			score -= l
			below(u - l)
		}
	}
	return score, curvature
}

// exponentialCensoredNewton maximises the censored exponential likelihood by
// Newton's method in λ with step halving, from lambda0. The likelihood is
// concave in λ (see exponentialCensoredScore), so from any start the
// iteration reaches the single maximum; a step that would leave λ > 0 is
// shortened to halve λ. Convergence: a Newton step below 1e-14 of λ. It
// reports false when it did not converge in 100 steps or met a non-finite
// value, and the caller then uses the generic route.
func exponentialCensoredNewton(d *Data, lambda0 float64) (lambda float64, iterations int, score float64, ok bool) {
	lambda = lambda0
	for iterations = 1; iterations <= 100; iterations++ {
		s, c := exponentialCensoredScore(d, lambda)
		if math.IsNaN(s) || math.IsInf(s, 0) || !(c < 0) {
			return lambda, iterations, s, false
		}
		step := -s / c
		next := lambda + step
		if !(next > 0) {
			next = lambda / 2
		}
		if math.Abs(next-lambda) <= 1e-14*lambda {
			s, _ = exponentialCensoredScore(d, next)
			return next, iterations, s, true
		}
		lambda = next
	}
	return lambda, iterations, score, false
}
