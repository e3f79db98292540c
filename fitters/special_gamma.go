package fitters

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// logGammaIncLower returns ln P(a, x), the log of the regularized lower
// incomplete gamma function, accurate where P underflows: there it sums the
// series P(a,x) = x^a e^(−x)/Γ(a+1) · Σ_n x^n/((a+1)…(a+n)) in log space
// (Abramowitz & Stegun 6.5.29). Near P = 1 it uses log1p(−Q). Shapes above
// incGammaMaxShape go to incGammaTailsLarge.
func logGammaIncLower(a, x float64) float64 {
	switch {
	case math.IsNaN(x) || math.IsNaN(a):
		return math.NaN()
	case x <= 0:
		return math.Inf(-1)
	case math.IsInf(x, 1):
		return 0
	}
	if a > incGammaMaxShape {
		_, lp, _ := incGammaTailsLarge(a, x)
		return lp
	}
	if x > a {
		q := mathext.GammaIncRegComp(a, x)
		if q < 0.5 {
			return math.Log1p(-q)
		}
	}
	p := mathext.GammaIncReg(a, x)
	if p > 1e-280 && p < 0.5 {
		return math.Log(p)
	}
	if p >= 0.5 {
		return math.Log1p(-mathext.GammaIncRegComp(a, x))
	}
	return logGammaSeries(a, x)
}

// logGammaSeries is ln P(a, x) by the power series, for x well below a (where
// P underflows); the terms decrease from the first one there.
func logGammaSeries(a, x float64) float64 {
	lga, _ := math.Lgamma(a + 1)
	sum, term := 1.0, 1.0
	for n := 1; n < 100000; n++ {
		term *= x / (a + float64(n))
		sum += term
		if term < sum*1e-17 {
			break
		}
	}
	return a*math.Log(x) - x - lga + math.Log(sum)
}

// logGammaIncUpper returns ln Q(a, x) = ln(1 − P(a, x)), accurate where Q
// underflows: there it evaluates Legendre's continued fraction
// Q(a,x) = x^a e^(−x)/Γ(a) · 1/(x+1−a− 1(1−a)/(x+3−a− 2(2−a)/(x+5−a− …)))
// by the modified Lentz method (Press et al., Numerical Recipes, 6.2).
// Near Q = 1 it uses log1p(−P). Shapes above incGammaMaxShape go to
// incGammaTailsLarge.
func logGammaIncUpper(a, x float64) float64 {
	switch {
	case math.IsNaN(x) || math.IsNaN(a):
		return math.NaN()
	case x <= 0:
		return 0
	case math.IsInf(x, 1):
		return math.Inf(-1)
	}
	if a > incGammaMaxShape {
		_, _, lq := incGammaTailsLarge(a, x)
		return lq
	}
	if x < a {
		p := mathext.GammaIncReg(a, x)
		if p < 0.5 {
			return math.Log1p(-p)
		}
	}
	q := mathext.GammaIncRegComp(a, x)
	if q > 1e-280 && q < 0.5 {
		return math.Log(q)
	}
	if q >= 0.5 {
		return math.Log1p(-mathext.GammaIncReg(a, x))
	}
	return logGammaContinuedFraction(a, x)
}

// logGammaContinuedFraction is ln Q(a, x) by Legendre's continued fraction,
// which converges fast for x > a + 1 (where Q underflows).
func logGammaContinuedFraction(a, x float64) float64 {
	const tiny = 1e-300
	b := x + 1 - a
	c := 1 / tiny
	d := 1 / b
	h := d
	for i := 1; i < 100000; i++ {
		an := -float64(i) * (float64(i) - a)
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
		if math.Abs(del-1) < 1e-16 {
			break
		}
	}
	lga, _ := math.Lgamma(a)
	return a*math.Log(x) - x - lga + math.Log(h)
}

// logMinusDigamma returns ln k − ψ(k) > 0 without the cancellation of the
// difference for large k: there it uses the asymptotic series
// ln k − ψ(k) = 1/(2k) + Σ_j B_2j/(2j k^2j) (Abramowitz & Stegun 6.3.18).
// Below 12 the recurrence of ψ lifts k there first (gonum's Digamma is only
// good to about 1e-11). Its derivative is returned as well: 1/k − ψ′(k).
func logMinusDigamma(k float64) (v, dv float64) {
	if k >= 12 {
		r := 1 / k
		r2 := r * r
		// B2/2 = 1/12, B4/4 = −1/120, B6/6 = 1/252, B8/8 = −1/240,
		// B10/10 = 1/132, B12/12 = −691/32760, B14/14 = 1/12.
		v = 0.5*r + r2*(1.0/12+r2*(-1.0/120+r2*(1.0/252+r2*(-1.0/240+r2*(1.0/132+r2*(-691.0/32760+r2*(1.0/12)))))))
		dv = -r2 * (0.5 + r*trigammaTail(r2))
		return v, dv
	}
	// Lift k above 12 with ψ(k) = ψ(k+m) − Σ_{j<m} 1/(k+j):
	// ln k − ψ(k) = −ln(1 + m/k) + [ln(k+m) − ψ(k+m)] + Σ_{j<m} 1/(k+j).
	var inv float64
	m := 0.0
	for k+m < 12 {
		inv += 1 / (k + m)
		m++
	}
	vm, _ := logMinusDigamma(k + m)
	return -math.Log1p(m/k) + vm + inv, 1/k - trigammaFn(k)
}

// trigammaFn returns ψ′(x) for x > 0: the recurrence ψ′(x) = ψ′(x+1) + 1/x²
// lifts x above 12, then the asymptotic series
// ψ′(x) = 1/x + 1/(2x²) + Σ_j B_2j/x^(2j+1) (Abramowitz & Stegun 6.4.12).
func trigammaFn(x float64) float64 {
	var acc float64
	for x < 12 {
		acc += 1 / (x * x)
		x++
	}
	r := 1 / x
	r2 := r * r
	return acc + r + 0.5*r2 + r*r2*trigammaTail(r2)
}

// trigammaTail is Σ_j B_2j r^(2j−2) for j = 1…7 (B2 = 1/6, …, B14 = 7/6),
// the tail of ψ′'s asymptotic series divided by r³.
func trigammaTail(r2 float64) float64 {
	return 1.0/6 + r2*(-1.0/30+r2*(1.0/42+r2*(-1.0/30+r2*(5.0/66+r2*(-691.0/2730+r2*(7.0/6))))))
}
