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
// (gammaContinuedFraction). The logarithm of the prefactor
// x^a e^(−x)/Γ(a) is formed first (ln Γ(a) once per call, or for a ≥ 30 as
// c(a) + a·(ln(x/a) − (x/a − 1)) with c(a) = a ln a − a − ln Γ(a) from
// Stirling's series, free of the cancellation of a ln x − x − ln Γ(a)), so
// that ln P and ln Q stay finite where P or Q underflows. The other tail's
// logarithm is ln(1 − T) of the one computed (log1mSmall). ok is false where that would lose
// digits (the series gives P > 0.9 below x = a + 1, only for a < 1): there
// the caller takes the other tail from a direct evaluator. The series is
// also used from a + 1 to a + 1 + √a/2 while P ≤ 0.9 (Q = 1 − P then keeps
// all but three bits); it is cheaper per term than the fraction there.
func incGammaTails(a, x float64) (cdf, logCDF, logSurvival float64, ok bool) {
	return incGammaTailsPre(a, x, gammaPrefactorFast(a, x, gammaPrefactorConst(a)))
}

// incGammaTailsPre is incGammaTails with the logarithm of the prefactor,
// pre = ln(x^a e^(−x)/Γ(a)), given (gammaPrefactorFast): a batch forms
// its constant part once.
func incGammaTailsPre(a, x, pre float64) (cdf, logCDF, logSurvival float64, ok bool) {
	// e^pre does not wait for the series or the fraction: the processor
	// overlaps it with them. Where it underflows, the tail T = e^pre·s is
	// below 1e−300 and needed only absolutely; ln T = pre + ln s keeps
	// every digit regardless.
	ePre := fastExp(pre)
	if x < a+1+0.5*math.Sqrt(a) {
		s := gammaSeries(a, x)
		lp := pre + fastLog(s)
		p := ePre * s
		if p <= 0.9 {
			return p, lp, log1mSmall(p), true
		}
		if x < a+1 {
			return 0, 0, 0, false
		}
	}
	h := gammaContinuedFraction(a, x)
	lq := pre + fastLog(h)
	q := ePre * h
	return 1 - q, log1mSmall(q), lq, true
}

// gammaSeries returns s = Σ_n x^n/(a(a+1)…(a+n)), the series of
// P(a, x) = x^a e^(−x)/Γ(a) · s, two terms per step: with a1 = a + 2n + 1
// and ap = a + 2n + 2 (by repeated addition), t1 = term·(x·(1/a1)) and
// term·(x²·(1/(a1·ap))) the next two terms. The term chain is one
// multiplication per two terms; the reciprocals depend on a alone, so that
// a batch takes them from a table (gammaSeriesTerms) and multiplies
// instead of dividing twice per step, with the same bits.
func gammaSeries(a, x float64) float64 {
	sum, term := 1.0, 1.0
	ap, x2 := a, x*x
	for n := 0; n < gammaSeriesMaxSteps; n++ {
		a1 := ap + 1
		ap += 2
		r1, r2 := 1/a1, 1/(a1*ap)
		t1 := term * (x * r1)
		term *= x2 * r2
		sum += t1 + term
		if term < sum*0x1p-54 {
			break
		}
	}
	return sum / a
}

// gammaSeriesMaxSteps bounds the steps of gammaSeries (1000 terms; the
// series needs O(√a) of them below a + 1 + √a/2, a ≤ incGammaMaxShape).
const gammaSeriesMaxSteps = 500

// gammaSeriesTerms holds gammaSeries' reciprocals 1/a1 and 1/(a1·ap) of
// one shape a, step by step, filled as steps are first needed.
type gammaSeriesTerms struct {
	a, ap  float64 // the shape, and ap after the last step filled
	n      int     // steps filled
	r1, r2 [gammaSeriesMaxSteps]float64
}

// reset empties t for the shape a.
func (t *gammaSeriesTerms) reset(a float64) { t.a, t.ap, t.n = a, a, 0 }

// fill adds step t.n.
func (t *gammaSeriesTerms) fill() {
	a1 := t.ap + 1
	t.ap += 2
	t.r1[t.n], t.r2[t.n] = 1/a1, 1/(a1*t.ap)
	t.n++
}

// series is gammaSeries(t.a, x), the same operations with the
// reciprocals from the table.
func (t *gammaSeriesTerms) series(x float64) float64 {
	return t.seriesFrom(x, x*x, 1, 1, 0) / t.a
}

// seriesFrom runs series' steps from step n with the running sum and term.
func (t *gammaSeriesTerms) seriesFrom(x, x2, sum, term float64, n int) float64 {
	for ; n < gammaSeriesMaxSteps; n++ {
		if n == t.n {
			t.fill()
		}
		t1 := term * (x * t.r1[n])
		term *= x2 * t.r2[n]
		sum += t1 + term
		if term < sum*0x1p-54 {
			break
		}
	}
	return sum
}

// series2 is (series(xa), series(xb)): the two sums step by step side by
// side, each with series' own operations and stopping rule, so each gets
// series' bits; the one that runs longer finishes alone. Two independent
// chains of multiplications and additions keep the processor's pipelines
// full where one chain waits on each result.
func (t *gammaSeriesTerms) series2(xa, xb float64) (float64, float64) {
	suma, terma, sumb, termb := 1.0, 1.0, 1.0, 1.0
	xa2, xb2 := xa*xa, xb*xb
	for n := 0; n < gammaSeriesMaxSteps; n++ {
		if n == t.n {
			t.fill()
		}
		r1, r2 := t.r1[n], t.r2[n]
		t1a := terma * (xa * r1)
		t1b := termb * (xb * r1)
		terma *= xa2 * r2
		termb *= xb2 * r2
		suma += t1a + terma
		sumb += t1b + termb
		doneA, doneB := terma < suma*0x1p-54, termb < sumb*0x1p-54
		if doneA || doneB {
			if !doneA {
				suma = t.seriesFrom(xa, xa2, suma, terma, n+1)
			}
			if !doneB {
				sumb = t.seriesFrom(xb, xb2, sumb, termb, n+1)
			}
			break
		}
	}
	return suma / t.a, sumb / t.a
}

// log1mSmall returns ln(1 − p) for 0 ≤ p ≤ 0.9, as math.Log1p(−p) does
// but cheaper: below ¼ by the series
// ln(1 − p) = −2 artanh(u) = −2(u + u³/3 + u⁵/5 + …), u = p/(2 − p) ≤ 1/7
// (Abramowitz & Stegun 4.1.25, 4.6.22), eleven terms reaching u²² < 2ε,
// summed by Estrin's scheme;
// from ¼ on as ln(1 − p), where 1 − p has at most half an ulp of rounding
// and |ln(1 − p)| > 0.28 keeps it relatively small.
func log1mSmall(p float64) float64 {
	if p >= 0.25 {
		return fastLog(1 - p)
	}
	return log1mSeries(p)
}

// log1mSeries is log1mSmall's series, for p < ¼.
func log1mSeries(p float64) float64 {
	u := p / (2 - p)
	u2 := u * u
	// s = Σ_{k=0…10} u2^k/(2k+3) by Estrin's scheme (a tree of pairs: four
	// multiply-adds deep instead of Horner's ten).
	w2 := u2 * u2
	w4 := w2 * w2
	w8 := w4 * w4
	q0 := (1.0/3 + u2*(1.0/5)) + w2*(1.0/7+u2*(1.0/9))
	q1 := (1.0/11 + u2*(1.0/13)) + w2*(1.0/15+u2*(1.0/17))
	q2 := (1.0/19 + u2*(1.0/21)) + w2*(1.0/23)
	s := (q0 + w4*q1) + w8*q2
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

// gammaPrefactorConst returns the part of ln(x^a e^(−x)/Γ(a)) that
// depends on a alone, as logGammaPrefactor splits it: ln Γ(a) below a = 30,
// c(a) = a ln a − a − ln Γ(a) (gammaStirlingC) from 30 on.
func gammaPrefactorConst(a float64) float64 {
	if a < 30 {
		lg, _ := math.Lgamma(a)
		return lg
	}
	return gammaStirlingC(a)
}

// gammaPrefactorFast is logGammaPrefactor with c = gammaPrefactorConst(a)
// given and fastLog for the logarithms of x and x/a.
func gammaPrefactorFast(a, x, c float64) float64 {
	if a < 30 {
		return a*fastLog(x) - x - c
	}
	r := x / a
	var l float64
	if r > 0.5 && r < 2 {
		l = log1pmx((x - a) / a)
	} else {
		l = fastLog(r) - (r - 1)
	}
	return c + a*l
}

// gammaContinuedFraction returns the continued fraction h of Q(a, x) =
// x^a e^(−x)/Γ(a) · h for x ≥ a + 1: h = 1/K, K = b₀ + a₁/(b₁ + a₂/(b₂ + …)),
// b_i = x + 2i + 1 − a, a_i = −i(i − a), from the convergents A_n/B_n of K
// by the fundamental recurrences A_n = b_n A_(n−1) + a_n A_(n−2) (and the
// same for B; Wallis; Press et al., 1992, 5.2), rescaled before they
// overflow. Unlike the modified Lentz method, the recurrence has no
// division on its dependency chain; the quotients B_n/A_n that test
// convergence are off it.
func gammaContinuedFraction(a, x float64) float64 {
	b := x + 1 - a
	return gammaCFFrom(a, 1, b, 1, 0, b, 1, 1/b)
}

// gammaCFFrom runs gammaContinuedFraction's steps from step i with its
// state: b_(i−1), the convergents A_(i−2), B_(i−2), A_(i−1), B_(i−1) and
// the last quotient h.
func gammaCFFrom(a, i, b, pa, pb, ca, cb, h float64) float64 {
	for ; i < 1000; i++ {
		an := -i * (i - a)
		b += 2
		pa, ca = ca, b*ca+an*pa
		pb, cb = cb, b*cb+an*pb
		if ca > 0x1p500 {
			pa, ca, pb, cb = pa*0x1p-500, ca*0x1p-500, pb*0x1p-500, cb*0x1p-500
		}
		hn := cb / ca
		if math.Abs(hn-h) <= 0x1p-53*hn {
			return hn
		}
		h = hn
	}
	return h
}

// gammaContinuedFraction2 is (gammaContinuedFraction(a, xa),
// gammaContinuedFraction(a, xb)) with the two recurrences side by side
// (see series2): each with the single one's operations and stopping rule,
// the longer one finished alone.
func gammaContinuedFraction2(a, xa, xb float64) (float64, float64) {
	ba, bb := xa+1-a, xb+1-a
	paA, pbA, caA, cbA, hA := 1.0, 0.0, ba, 1.0, 1/ba
	paB, pbB, caB, cbB, hB := 1.0, 0.0, bb, 1.0, 1/bb
	for i := 1.0; i < 1000; i++ {
		an := -i * (i - a)
		ba += 2
		bb += 2
		paA, caA = caA, ba*caA+an*paA
		paB, caB = caB, bb*caB+an*paB
		pbA, cbA = cbA, ba*cbA+an*pbA
		pbB, cbB = cbB, bb*cbB+an*pbB
		if caA > 0x1p500 {
			paA, caA, pbA, cbA = paA*0x1p-500, caA*0x1p-500, pbA*0x1p-500, cbA*0x1p-500
		}
		if caB > 0x1p500 {
			paB, caB, pbB, cbB = paB*0x1p-500, caB*0x1p-500, pbB*0x1p-500, cbB*0x1p-500
		}
		hnA, hnB := cbA/caA, cbB/caB
		doneA, doneB := math.Abs(hnA-hA) <= 0x1p-53*hnA, math.Abs(hnB-hB) <= 0x1p-53*hnB
		if doneA || doneB {
			switch {
			case doneA && doneB:
				return hnA, hnB
			case doneA:
				return hnA, gammaCFFrom(a, i+1, bb, paB, pbB, caB, cbB, hnB)
			default:
				return gammaCFFrom(a, i+1, ba, paA, pbA, caA, cbA, hnA), hnB
			}
		}
		hA, hB = hnA, hnB
	}
	return hA, hB
}
