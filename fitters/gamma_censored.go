package fitters

import (
	"math"
)

// gammaCensoredSample holds what the censored gamma Newton route needs
// from a dataset, gathered in one pass: the exact values' sufficient
// statistics about a centre c > 0 (d = (x − c)/c: Σ d, Σ log1pmx(d) =
// Σ (ln(1 + d) − d), Σ ln x) and the censored values as t = x/c, distinct
// ones tallied (field data repeat their limits, so each censored term is
// evaluated once per distinct value).
type gammaCensoredSample struct {
	n, c              float64
	sumD, sumL, sumLn float64
	distinct          bool // at least two distinct exact values
	tallied           censoredPositive
}

// gammaShapeStep is the step in ln k of the shape's finite differences:
// 2⁻¹⁰ ≈ 10⁻³, taken along fixed ν (y ∝ k). With the five-point stencil
// the first derivative's truncation error is h⁴/30·|f⁽⁵⁾| and its rounding
// error 1.5·ε|f|/h ≈ 3·10⁻¹³ of |f| (f = ln D, whose tail probabilities
// are good to a few ulps). Along fixed ν, f varies on the scale 1 of ln k
// (P(k, kρt) depends on √k(ρt − 1) for a large shape), so the truncation
// is about 3·10⁻¹⁴ of |f|; the exception is a far tail where f = ln(1 − T)
// ≈ −T with T ∝ e^(−y) tiny, whose derivatives grow like y^j·T: there the
// relative error grows (to 10⁻⁷ at y = 40) but the absolute error stays
// below 10⁻¹⁵. (A stencil at fixed y would be smooth there instead, but
// for a large shape P(k, y) varies like Φ((y − k)/√k), steep in ln k, and
// its errors reach 3·10⁻¹⁰ absolute at k = 150.) The mpmath comparison is
// TestGammaCensoredShapeDerivatives. The second derivative's rounding
// error, 5.3·ε|f|/h² ≈ 10⁻⁹ of |f|, only slows Newton's last step; it does
// not move the maximum, which is where the score vanishes.
const gammaShapeStep = 0x1p-10

// gammaShapeFactors are e^(jh), j = −2, −1, 1, 2: the stencil's shapes
// are k·e^(jh), each with one rounding.
var gammaShapeFactors = [4]float64{
	math.Exp(-2 * gammaShapeStep), math.Exp(-gammaShapeStep),
	math.Exp(gammaShapeStep), math.Exp(2 * gammaShapeStep),
}

// newGammaCensoredSample gathers d's statistics about centre c. It reports
// false when an observation has no place in the route (a non-positive exact
// value or non-detect limit, a NaN, an empty interval), which leaves the
// data to the generic route.
func newGammaCensoredSample(d *Data, c float64) (gammaCensoredSample, bool) {
	s := gammaCensoredSample{n: float64(len(d.Exact)), c: c}
	if !(c > 0) || math.IsInf(c, 0) {
		return s, false
	}
	ic := 1 / c
	// Σ log1pmx(d): the series where |d| < 0.1, elsewhere ln(1 + d) − d
	// with Σ ln(x/c) from the running product (logAccumulator), one
	// logarithm per few values.
	acc := newLogAccumulator()
	var sumDFar float64
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range d.Exact {
		if !(x > 0) || math.IsInf(x, 1) {
			return s, false
		}
		if x < lo {
			lo = x
		}
		if x > hi {
			hi = x
		}
		dv := (x - c) * ic
		s.sumD += dv
		if math.Abs(dv) < 0.1 {
			s.sumL += log1pmx(dv)
		} else {
			acc.mul(x * ic)
			sumDFar += dv
		}
	}
	s.distinct = lo < hi
	s.sumL += acc.sum() - sumDFar
	// Σ ln x = n ln c + Σ ln(1 + d) = n ln c + Σ d + Σ log1pmx(d).
	s.sumLn = s.n*math.Log(c) + s.sumD + s.sumL
	if !s.tallied.add(d, ic) {
		return s, false
	}
	return s, true
}

// gammaCensoredPoint evaluates the censored gamma log-likelihood at
// κ = ln k and ν = ln(βc/k) (so β = k·e^ν/c and y = βx = k·e^ν·t), with its
// score and observed Hessian in (κ, ν).
//
// Exact values: with ρ = e^ν and C(k) = k ln k − k − ln Γ(k),
//
//	Σ ln f(x) = n C(k) + k·M(ν) − Σ ln x,
//	M(ν) = n(ν − (ρ − 1)) + Σ log1pmx(d) − (ρ − 1)·Σ d,
//
// a form free of the cancellation of k ln β + (k−1) ln x − βx for a large
// shape; C′(k) = ln k − ψ(k), C″(k) = 1/k − ψ′(k) (logMinusDigamma),
// M′ = n − ρ(n + Σ d), M″ = −ρ(n + Σ d).
//
// A censored observation adds ln D, D = F(y_L) for a non-detect, S(y_R) for
// a suspension, F(y_u) − F(y_l) for an interval, F(y) = P(k, y) the
// regularized incomplete gamma function. In ν the derivatives are exact:
// ∂P(k, y)/∂ν = y·p(y) = e^π with π = k ln y − y − ln Γ(k) (the prefactor),
// ∂²P/∂ν² = e^π(k − y). In κ, P has no closed-form derivative (Abramowitz &
// Stegun 6.5): ∂ ln D/∂κ and ∂² ln D/∂κ² come from five-point central
// differences of ln D in κ (step gammaShapeStep), and the mixed derivative
// from ∂π/∂κ = k(ln(ρt) − (ρt − 1) + ln k − ψ(k)) analytically:
// ∂² ln D/∂κ∂ν = Σ σ_j w_j ∂π_j/∂κ − (∂ ln D/∂ν)(∂ ln D/∂κ), w_j = e^(π_j)/D.
func gammaCensoredPoint(s *gammaCensoredSample, kappa, nu float64) newton2Point {
	var p newton2Point
	k, rho := math.Exp(kappa), math.Exp(nu)
	if !(k > 0) || math.IsInf(k, 0) || !(rho > 0) || math.IsInf(rho, 0) {
		p.ll = math.Inf(-1)
		return p
	}
	em1 := math.Expm1(nu)
	lmd, dlmd := logMinusDigamma(k) // ln k − ψ(k), 1/k − ψ′(k)
	if s.n > 0 {
		m := s.n*(nu-em1) + s.sumL - em1*s.sumD
		dm := s.n - rho*(s.n+s.sumD)
		d2m := -rho * (s.n + s.sumD)
		gk := s.n*lmd + m
		p.ll = s.n*gammaStirlingC(k) + k*m - s.sumLn
		p.g0 = k * gk
		p.g1 = k * dm
		p.h00 = k*k*s.n*dlmd + k*gk
		p.h01 = k * dm
		p.h11 = k * d2m
	}
	// The stencil's shapes.
	var ks [5]float64
	ks[0], ks[1], ks[2], ks[3], ks[4] = k*gammaShapeFactors[0], k*gammaShapeFactors[1], k, k*gammaShapeFactors[2], k*gammaShapeFactors[3]
	const h = gammaShapeStep
	// term adds count × ln D with derivatives, from ln D at the stencil's
	// shapes (f) and the ends' (t_j, σ_j).
	term := func(count float64, f *[5]float64, ends [2]float64, signs [2]float64, nEnds int) {
		lnD := f[2]
		gK := (f[0] - 8*f[1] + 8*f[3] - f[4]) / (12 * h)
		hKK := (-f[0] + 16*f[1] - 30*f[2] + 16*f[3] - f[4]) / (12 * h * h)
		var gN, sNN, sKN float64
		for j := 0; j < nEnds; j++ {
			t := ends[j]
			rt := rho * t
			y := k * rt
			w := signs[j] * math.Exp(logGammaPrefactor(k, y)-lnD)
			gN += w
			sNN += w * (k - y)
			sKN += w * k * (math.Log(rt) - (rt - 1) + lmd)
		}
		p.ll += count * lnD
		p.g0 += count * gK
		p.g1 += count * gN
		p.h00 += count * hKK
		p.h01 += count * (sKN - gN*gK)
		p.h11 += count * (sNN - gN*gN)
	}
	var f [5]float64
	for i, t := range s.tallied.left.u {
		for j, kj := range ks {
			_, f[j], _ = Gamma{kj, 1}.CDFTails(kj * rho * t)
		}
		term(s.tallied.left.n[i], &f, [2]float64{t}, [2]float64{1}, 1)
	}
	for i, t := range s.tallied.right.u {
		for j, kj := range ks {
			_, _, f[j] = Gamma{kj, 1}.CDFTails(kj * rho * t)
		}
		term(s.tallied.right.n[i], &f, [2]float64{t}, [2]float64{-1}, 1)
	}
	for i, tl := range s.tallied.lower {
		tu := s.tallied.upper[i]
		for j, kj := range ks {
			_, lfl, lsl := Gamma{kj, 1}.CDFTails(kj * rho * tl)
			_, lfu, lsu := Gamma{kj, 1}.CDFTails(kj * rho * tu)
			// F(u) − F(l), or S(l) − S(u) where F(l) > ½ (no cancellation).
			if lfl > -math.Ln2 {
				f[j] = logDiffExp(lsl, lsu)
			} else {
				f[j] = logDiffExp(lfu, lfl)
			}
		}
		term(s.tallied.inCount[i], &f, [2]float64{tu, tl}, [2]float64{1, -1}, 2)
	}
	if math.IsNaN(p.ll) {
		p.ll = math.Inf(-1)
	}
	return p
}

// gammaCensoredStart returns the starting (κ, ν) = (ln k, ln(βc/k)): of
// two candidates, the one with the higher censored log-likelihood. One is
// the complete-data estimate of the exact values when there are two
// distinct ones (Minka's (2002) approximation to the root of
// ln k − ψ(k) = s, from the sample's statistics), which ignores the
// censored values; the other the moment estimate of every recorded value
// (positiveMoments: k = m²/v, β = m/v). Without either, the generic
// route's start (gammaMLE of startSample, or shape 1 at the sample mean).
func gammaCensoredStart(s *gammaCensoredSample, d *Data, opt Options) (kappa0, nu0 float64) {
	best := math.Inf(-1)
	try := func(k, b float64) {
		kappa, nu := math.Log(k), math.Log(b*s.c/k)
		if !finite(kappa) || !finite(nu) {
			return
		}
		if ll := gammaCensoredPoint(s, kappa, nu).ll; ll > best {
			best, kappa0, nu0 = ll, kappa, nu
		}
	}
	if s.n >= 2 && s.distinct {
		dbar := s.sumD / s.n
		if v := -s.sumL/s.n + log1pmx(dbar); v > 0 {
			k := (3 - v + math.Sqrt((v-3)*(v-3)+24*v)) / (12 * v)
			try(k, k/(s.c*(1+dbar)))
		}
	}
	if m, v, _ := positiveMoments(d); m > 0 && v > 0 {
		try(m*m/v, m/v)
	}
	if !math.IsInf(best, -1) {
		return kappa0, nu0
	}
	k0, b0 := gammaRoughStart(d, opt)
	return math.Log(k0), math.Log(b0 * s.c / k0)
}

// fitGammaCensored fits the gamma distribution to censored data by
// censoredNewton2 on (ln k, ln(βc/k)), c the mean of the exact values (of
// every recorded value when there are none), from gammaCensoredStart. On
// success it records the fit and returns ok; otherwise fit is untouched and
// reason says why, for the caller's fallback to the generic route (empty
// when the route does not apply: complete data, fixed parameters, or
// genericCensoredOnly).
func fitGammaCensored(fit *Fit, d *Data, opt Options) (ok bool, reason string) {
	if genericCensoredOnly || len(opt.Fixed) != 0 || d.IsComplete() {
		return false, "" // not this route's data: no fallback to report
	}
	c := censoredCentre(d)
	s, ok := newGammaCensoredSample(d, c)
	if !ok {
		return false, "an observation the route cannot take (a value ≤ 0, NaN or an empty interval)"
	}
	kappa0, nu0 := gammaCensoredStart(&s, d, opt)
	eval := func(kappa, nu float64) newton2Point { return gammaCensoredPoint(&s, kappa, nu) }
	res := censoredNewton2(eval, kappa0, nu0, opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter))
	if !res.converged {
		return false, res.reason
	}
	k := math.Exp(res.t0)
	beta := k * math.Exp(res.t1) / c
	if !(k > 0) || !(beta > 0) || math.IsInf(k, 0) || math.IsInf(beta, 0) || !finite(res.logLik) {
		return false, "the maximum lies where the parameters are not finite"
	}
	fit.setSolved(k, beta, res.logLik, res.convergence("censored Newton on (ln shape, ln(rate·c/shape))"))
	return true, ""
}
