package fitters

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// incBetaLargeFrom is the size α + β from which the beta family's ln B(α, β)
// and incomplete beta function leave gonum for lnBeta and logIncBetaLarge.
// gonum forms ln B as ln Γ(α) + ln Γ(β) − ln Γ(α+β) and its incomplete beta
// (Cephes' incbet) takes x^α (1−x)^β / B(α, β) from it, so both lose
// ε·ln Γ(α+β) absolutely: 5e-12 relative at α + β = 3e3, 3.5e-6 at 6e8.
// Below this size that loss stays under about 1e-14, and gonum's values
// (and so the numbers of ordinary fits) are kept bit for bit.
const incBetaLargeFrom = 30

// lnBeta returns ln B(a, b) for a, b > 0. From a + b = incBetaLargeFrom on,
// with p = min(a, b), q = max(a, b) and δ(z) = ln Γ(z) − (z − ½) ln z + z −
// ln √(2π) Stirling's remainder (stirlingDelta),
//
//	ln Γ(q) − ln Γ(p+q) = −(q − ½) log1p(p/q) − p ln(p+q) + p + δ(q) − δ(p+q),
//
// a sum of terms no larger than the result, where ln Γ(q) and ln Γ(p+q) are
// each about 2e10 at q = 1e9. For p ≥ 10 ln Γ(p) is also written out, so
//
//	ln B = p ln(p/(p+q)) − ½ ln p − (q − ½) log1p(p/q) + ln √(2π) + δ(p) + δ(q) − δ(p+q).
func lnBeta(a, b float64) float64 {
	if !(a+b >= incBetaLargeFrom) || math.IsInf(a+b, 1) {
		return mathext.Lbeta(a, b)
	}
	p, q := math.Min(a, b), math.Max(a, b)
	s := p + q
	dq := stirlingDelta(q) - stirlingDelta(s)
	if p < 10 {
		lg, _ := math.Lgamma(p)
		return lg - (q-0.5)*math.Log1p(p/q) - p*math.Log(s) + p + dq
	}
	return p*math.Log(p/s) - 0.5*math.Log(p) - (q-0.5)*math.Log1p(p/q) + lnSqrt2Pi + stirlingDelta(p) + dq
}

// lnBetaPower returns ln(x^a y^b / B(a, b)) for y = 1 − x, a + b ≥
// incBetaLargeFrom. With s = a + b, x₀ = a/s, y₀ = b/s, d = x − x₀ = y₀ − y,
// u = d/x₀ and v = −d/y₀ (so a·u + b·v = 0),
//
//	a ln x + b ln y − ln B = a(ln(1+u) − u) + b(ln(1+v) − v) − ln √(2π) + ½ ln(a y₀) − δ(a) − δ(b) + δ(s),
//
// the form of Temme's and DiDonato & Morris's (1992) power terms: a ln x,
// b ln y and ln B, each of size s ln s, never meet, and the result keeps
// its digits wherever it is not itself large. d is formed free of the
// rounding of x₀, which a(ln(1+u) − u) ≈ −s d²/(2x₀y₀) would otherwise
// amplify by about √s.
func lnBetaPower(a, b, x, y float64) float64 {
	// d to a few ε of itself, though x₀ = a/s is rounded twice: with
	// s + e = a + b exactly (Knuth's two-sum) and r = a − x₀·s exactly
	// (math.FMA), the exact x₀ is x₀ + (r − x₀e)/s to O(ε²).
	s := a + b
	bv := s - a
	e := (a - (s - bv)) + (b - bv)
	x0, y0 := a/s, b/s
	var d float64
	if x0 <= y0 {
		d = (x - x0) - (math.FMA(-x0, s, a)-x0*e)/s
	} else {
		d = (y0 - y) + (math.FMA(-y0, s, b)-y0*e)/s
	}
	u, v := d/x0, -d/y0
	return a*lnRatioMinus(x, x0, u) + b*lnRatioMinus(y, y0, v) -
		lnSqrt2Pi + 0.5*math.Log(a*y0) - stirlingDelta(a) - stirlingDelta(b) + stirlingDelta(s)
}

// lnRatioMinus returns ln(z/z₀) − u for u = z/z₀ − 1: log1pmx near z₀,
// else lnRatio (which keeps ln(z/z₀) exact where z ≪ z₀, where 1 + u has
// lost its digits).
func lnRatioMinus(z, z0, u float64) float64 {
	if math.Abs(u) < 0.5 {
		return log1pmx(u)
	}
	return lnRatio(z, z0) - u
}

// incBetaMaxTerms bounds the continued fraction; near the mean it needs
// about √max(a, b) steps (some 3e4 at a = b = 1e9).
const incBetaMaxTerms = 1 << 20

// logIncBetaLarge returns ln I_x(a, b) for a + b ≥ incBetaLargeFrom,
// 0 < x < 1 and y = 1 − x: the smaller tail is x^a y^b/(a B(a, b)) times
// the continued fraction of Abramowitz & Stegun 26.5.8 (evaluated by the
// modified Lentz method; Press et al., 1992, 6.4), with the power term in
// logarithms (lnBetaPower), so that it neither cancels nor underflows; the
// larger tail is log1p of minus the smaller one. The fraction is taken on
// the side x < (a+1)/(a+b+2), where it converges. NaN if it does not
// converge within incBetaMaxTerms steps (a or b beyond about 1e11).
func logIncBetaLarge(a, b, x, y float64) float64 {
	if x*(a+b+2) < a+1 {
		return logIncBetaSmallerTail(a, b, x, y)
	}
	return log1mExp(logIncBetaSmallerTail(b, a, y, x))
}

// logIncBetaSmallerTail is logIncBetaLarge's ln I_x(a, b) on the side
// x < (a+1)/(a+b+2). Up to x = 1/2 it takes the fraction in x; beyond, that
// fraction would round 1 − x at every odd step (the relative error of
// I_x grows as ε/(1 − x)), so it takes the one in z = x/y, formed from y
// itself.
func logIncBetaSmallerTail(a, b, x, y float64) float64 {
	if x > 0.5 {
		return lnBetaPower(a, b, x, y) - math.Log(a) - math.Log(y) + math.Log(incBetaFractionZ(a, b, x/y))
	}
	return lnBetaPower(a, b, x, y) - math.Log(a) + math.Log(incBetaFraction(a, b, x))
}

// incBetaFractionZ returns the continued fraction h of I_x(a, b) =
// x^a (1−x)^(b−1)/(a B(a, b)) · h in z = x/(1 − x) (Abramowitz & Stegun
// 26.5.9, as Cephes' incbd: partial numerators −z(a+m)(b−m−1)/((a+2m)(a+2m+1))
// and z(m+1)(a+b+m)/((a+2m+1)(a+2m+2))), by the fundamental recurrences
// rescaled before they overflow. NaN if it does not converge within
// incBetaMaxTerms steps.
func incBetaFractionZ(a, b, z float64) float64 {
	const big, bigInv = 0x1p52, 0x1p-52
	k1, k2, k3, k4 := a, b-1, a, a+1
	k5, k6, k7, k8 := 1.0, a+b, a+1, a+2
	pkm2, qkm2, pkm1, qkm1 := 0.0, 1.0, 1.0, 1.0
	ans := 1.0
	for n := 0; n < incBetaMaxTerms; n++ {
		xk := -(z * k1 * k2) / (k3 * k4)
		pk := pkm1 + pkm2*xk
		qk := qkm1 + qkm2*xk
		pkm2, pkm1, qkm2, qkm1 = pkm1, pk, qkm1, qk
		xk = (z * k5 * k6) / (k7 * k8)
		pk = pkm1 + pkm2*xk
		qk = qkm1 + qkm2*xk
		pkm2, pkm1, qkm2, qkm1 = pkm1, pk, qkm1, qk
		if qk != 0 {
			r := pk / qk
			if math.Abs(ans-r) < 1e-16*math.Abs(r) {
				return r
			}
			ans = r
		}
		k1++
		k2--
		k3 += 2
		k4 += 2
		k5++
		k6++
		k7 += 2
		k8 += 2
		if math.Abs(qk)+math.Abs(pk) > big {
			pkm2 *= bigInv
			pkm1 *= bigInv
			qkm2 *= bigInv
			qkm1 *= bigInv
		}
		if math.Abs(qk) < bigInv || math.Abs(pk) < bigInv {
			pkm2 *= big
			pkm1 *= big
			qkm2 *= big
			qkm1 *= big
		}
	}
	return math.NaN()
}

// incBetaFraction returns 1/(1 + d₁/(1 + d₂/(1 + …))) with
// d_(2m+1) = −(a+m)(a+b+m)x/((a+2m)(a+2m+1)) and
// d_(2m) = m(b−m)x/((a+2m−1)(a+2m)) (Abramowitz & Stegun 26.5.8), by the
// modified Lentz evaluation; each d is formed from ratios, so that nothing
// overflows at a ~ 1e300 (studentt's ν/2). NaN when incBetaMaxTerms pairs
// of terms do not settle it.
func incBetaFraction(a, b, x float64) float64 {
	const tiny = 1e-300
	c, d := 1.0, 1-(a+b)*x/(a+1)
	if math.Abs(d) < tiny {
		d = tiny
	}
	d = 1 / d
	h := d
	for m := 1; m <= incBetaMaxTerms; m++ {
		fm := float64(m)
		for _, aa := range [2]float64{
			fm / (a + 2*fm - 1) * ((b - fm) / (a + 2*fm)) * x,
			-(a + fm) / (a + 2*fm) * ((a + b + fm) / (a + 2*fm + 1)) * x,
		} {
			d = 1 + aa*d
			if math.Abs(d) < tiny {
				d = tiny
			}
			c = 1 + aa/c
			if math.Abs(c) < tiny {
				c = tiny
			}
			d = 1 / d
			h *= d * c
		}
		if math.Abs(d*c-1) < 1e-16 {
			return h
		}
	}
	return math.NaN()
}

// betaLogRegIncBeta is the beta family's ln I_x(a, b) (y = 1 − x):
// logIncBetaLarge from a + b = incBetaLargeFrom on, logRegIncBeta below.
// Below, for x > 1/2 it takes log1p(−I_y(b, a)) wherever I_y(b, a) < 0.99
// (logRegIncBeta only below 1/2): gonum's I_x(a, b) works from 1 − x, and
// where the caller's x is itself 1 − y rounded (the survival function at a
// small y), that has lost y's digits — 5e-7 relative at a = 0.01, y = 1e-12.
func betaLogRegIncBeta(a, b, x, y float64) float64 {
	if !(x > 0 && y > 0) {
		return logRegIncBeta(a, b, x, y)
	}
	if a+b >= incBetaLargeFrom {
		return logIncBetaLarge(a, b, x, y)
	}
	if x > 0.5 {
		if c := mathext.RegIncBeta(b, a, y); c < 0.99 {
			return math.Log1p(-c)
		}
	}
	return logRegIncBeta(a, b, x, y)
}
