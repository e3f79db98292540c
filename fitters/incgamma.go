package fitters

import "math"

// incGammaMaxShape is the largest shape incGammaTails takes: beyond it
// the series and the continued fraction need O(√a) terms near x = a, and
// the caller uses gonum's evaluator (Temme's uniform expansion there).
const incGammaMaxShape = 100

// incGammaTails returns F = P(a, x), ln P(a, x) and ln Q(a, x) for
// 0 < a ≤ incGammaMaxShape and 0 < x < ∞, with one evaluation of the
// smaller of P and Q (Press et al., Numerical Recipes, 2nd ed., 1992, 6.2):
// for x < a + 1 (see below) the power series
//
//	P(a, x) = x^a e^(−x)/Γ(a+1) · Σ_n x^n/((a+1)…(a+n))
//
// (Abramowitz & Stegun 6.5.29), for x ≥ a + 1 Legendre's continued fraction
//
//	Q(a, x) = x^a e^(−x)/Γ(a) · 1/(x+1−a− 1(1−a)/(x+3−a− 2(2−a)/(x+5−a− …)))
//
// by the modified Lentz method. The logarithm of the prefactor
// x^a e^(−x)/Γ(a) is formed first (ln Γ(a) once per call, or for a ≥ 30 as
// c(a) + a·(ln(x/a) − (x/a − 1)) with c(a) = a ln a − a − ln Γ(a) from
// Stirling's series, free of the cancellation of a ln x − x − ln Γ(a)), so
// that ln P and ln Q stay finite where P or Q underflows. The other tail
// is log1p of minus the one computed. ok is false where that would lose
// digits (the series gives P > 0.9 below x = a + 1, only for a < 1): there
// the caller takes the other tail from a direct evaluator. The series is
// also used from a + 1 to a + 1 + √a/2 while P ≤ 0.9 (Q = 1 − P then keeps
// all but three bits); it is cheaper per term than the fraction there.
func incGammaTails(a, x float64) (cdf, logCDF, logSurvival float64, ok bool) {
	pre := logGammaPrefactor(a, x)
	if x < a+1+0.5*math.Sqrt(a) {
		// Series: the ratios x/(a+n) are independent divisions; only the
		// product is a dependency chain.
		sum, term := 1.0, 1.0
		ap := a
		for n := 0; n < 1000; n++ {
			ap++
			term *= x / ap
			sum += term
			if term < sum*0x1p-54 {
				break
			}
		}
		lp := pre + math.Log(sum/a)
		p := math.Exp(lp)
		if p <= 0.9 {
			return p, lp, log1mSmall(p), true
		}
		if x < a+1 {
			return 0, 0, 0, false
		}
	}
	h := gammaContinuedFraction(a, x)
	lq := pre + math.Log(h)
	q := math.Exp(lq)
	return 1 - q, log1mSmall(q), lq, true
}

// log1mSmall returns ln(1 − p) for 0 ≤ p ≤ 0.9, as math.Log1p(−p) does
// but cheaper: below ¼ by the series
// ln(1 − p) = −2 artanh(u) = −2(u + u³/3 + u⁵/5 + …), u = p/(2 − p) ≤ 1/7
// (Abramowitz & Stegun 4.1.25, 4.6.22), eleven terms reaching u²² < 2ε;
// from ¼ on as ln(1 − p), where 1 − p has at most half an ulp of rounding
// and |ln(1 − p)| > 0.28 keeps it relatively small.
func log1mSmall(p float64) float64 {
	if p >= 0.25 {
		return math.Log(1 - p)
	}
	u := p / (2 - p)
	u2 := u * u
	s := 1.0 / 23
	s = 1.0/21 + u2*s
	s = 1.0/19 + u2*s
	s = 1.0/17 + u2*s
	s = 1.0/15 + u2*s
	s = 1.0/13 + u2*s
	s = 1.0/11 + u2*s
	s = 1.0/9 + u2*s
	s = 1.0/7 + u2*s
	s = 1.0/5 + u2*s
	s = 1.0/3 + u2*s
	return -2 * (u + u*u2*s)
}

// logGammaPrefactor returns ln(x^a e^(−x)/Γ(a)) for a > 0, x > 0.
func logGammaPrefactor(a, x float64) float64 {
	if a < 30 {
		lg, _ := math.Lgamma(a)
		return a*math.Log(x) - x - lg
	}
	// a ln x − x − ln Γ(a) = c(a) + a(ln r − (r − 1)), r = x/a.
	r := x / a
	var l float64
	if r > 0.5 && r < 2 {
		l = log1pmx((x - a) / a)
	} else {
		l = math.Log(r) - (r - 1)
	}
	return gammaStirlingC(a) + a*l
}

// gammaContinuedFraction returns the continued fraction h of Q(a, x) =
// x^a e^(−x)/Γ(a) · h for x ≥ a + 1 by the modified Lentz method (Press
// et al., 1992, 5.2 and 6.2), with its guard against zero divisors.
func gammaContinuedFraction(a, x float64) float64 {
	const tiny = 1e-300
	b := x + 1 - a
	c := 1 / tiny
	d := 1 / b
	h := d
	for i := 1.0; i < 1000; i++ {
		an := -i * (i - a)
		b += 2
		d = an*d + b
		if math.Abs(d) < tiny {
			d = tiny
		}
		c = b + an/c
		if math.Abs(c) < tiny {
			c = tiny
		}
		d = 1 / d
		del := d * c
		h *= del
		if math.Abs(del-1) < 0x1p-53 {
			break
		}
	}
	return h
}
