package fitters

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// CDFTailer is implemented by distributions that compute, in one go and
// with fewer transcendental calls than LogCDF and LogSurvival apart, the
// three values the empirical-distribution-function statistics need at each
// observation: F(x), ln F(x) and ln S(x). Both logarithms keep the
// accuracy of LogCDF and LogSurvival in their own tail: the smaller of
// F and S is computed directly and its logarithm taken, the larger one's
// logarithm is log1p of minus the smaller, never ln(1 − F) after 1 − F
// has cancelled. F itself is accurate to a few ulps absolutely.
type CDFTailer interface {
	CDFTails(x float64) (cdf, logCDF, logSurvival float64)
}

// CDFTails returns F(x), ln F(x) and ln S(x) of d: through d's own
// CDFTails when it has one, otherwise from LogCDF below the median (where
// ln S = log1p(−F) is accurate) and LogSurvival above it (where
// ln F = ln(1 − S) is).
func CDFTails(d Dist, x float64) (cdf, logCDF, logSurvival float64) {
	if t, ok := d.(CDFTailer); ok {
		return t.CDFTails(x)
	}
	lf := d.LogCDF(x)
	if lf < -math.Ln2 {
		f := fastExp(lf)
		return f, lf, fastLog1p(-f)
	}
	ls := d.LogSurvival(x)
	lf = log1mExp(ls)
	return fastExp(lf), lf, ls
}

// Values below the support: F = 0, ln F = −∞, ln S = 0; and above it.
func belowSupport() (float64, float64, float64) { return 0, math.Inf(-1), 0 }
func aboveSupport() (float64, float64, float64) { return 1, 0, math.Inf(-1) }

// hazardTails returns F, ln F and ln S from the cumulative hazard
// t = −ln S ≥ 0: see hazardTailsLog, with ln t = fastLog(t) below the
// median.
func hazardTails(t float64) (cdf, logCDF, logSurvival float64) {
	if t < math.Ln2 {
		return hazardTailsLog(t, fastLog(t))
	}
	s := fastExp(-t)
	return 1 - s, log1mSmall(s), -t
}

// hazardTailsLog returns F, ln F and ln S from the cumulative hazard
// t = −ln S ≥ 0 and lt = ln t: below the median (t < ln 2) ln F = ln t +
// g(t) (log1mExpRatio: a polynomial, no logarithm) and F = e^(ln F); above
// it S = e^(−t), F = 1 − S and ln F = ln(1 − S) (log1mSmall). Two
// exponentials below the median, one and a logarithm or a short series
// above.
func hazardTailsLog(t, lt float64) (cdf, logCDF, logSurvival float64) {
	if t < math.Ln2 {
		lf := lt + log1mExpRatio(t)
		return fastExp(lf), lf, -t
	}
	s := fastExp(-t)
	return 1 - s, log1mSmall(s), -t
}

// logHazardTails is hazardTails for t = e^lt given by its logarithm, so
// that ln F = ln t − t/2 + O(t²) stays finite where t underflows.
func logHazardTails(lt float64) (cdf, logCDF, logSurvival float64) {
	if lt < -700 {
		t := fastExp(lt)
		return t, lt, -t
	}
	return hazardTailsLog(fastExp(lt), lt)
}

// extremeTails returns F, ln F and ln S for ln F = −u, u = e^(−y) ≥ 0 (the
// Gumbel and GEV form): F = e^(−u) below the median (u > ln 2) and
// ln S = ln(1 − F) (log1mSmall); above it ln S = ln(1 − e^(−u)) = −y + g(u)
// (log1mExpRatio, exact to rounding down to u = 0, so that an underflowing
// u gives no ln 0), S = e^(ln S) and F = 1 − S.
func extremeTails(u, y float64) (cdf, logCDF, logSurvival float64) {
	if u > math.Ln2 {
		f := fastExp(-u)
		return f, -u, log1mSmall(f)
	}
	ls := -y + log1mExpRatio(u)
	return 1 - fastExp(ls), -u, ls
}

// logisticTails returns F, ln F and ln S of the standard logistic at z:
// with e = e^(−|z|) and q = 1/(1 + e), the smaller tail probability is
// p = e·q ≤ ½ (S for z ≥ 0, F below), the larger one's logarithm
// ln(1 − p) = −ln(1 + e) by log1mSmall, and the smaller one's
// ln p = −|z| + ln(1 − p): one exponential, one division and a short
// series (or one logarithm where p > ¼), the logarithms of logLogisticCDF.
func logisticTails(z float64) (cdf, logCDF, logSurvival float64) {
	if z >= 0 {
		e := fastExp(-z)
		q := 1 / (1 + e)
		l := log1mSmall(e * q) // ln F = −ln(1 + e)
		return q, l, -z + l
	}
	e := fastExp(z)
	q := 1 / (1 + e)
	l := log1mSmall(e * q) // ln S
	return e * q, z + l, l
}

// normalTails returns Φ(z), ln Φ(z) and ln(1 − Φ(z)): the smaller tail
// probability from erfc (accurate relatively down to 1e−300), its
// logarithm, and log1p of minus it for the other; beyond |z| = 37, where
// erfc nears underflow, the smaller tail's logarithm comes from
// logNormalCDF's continued fraction. Three transcendental calls.
func normalTails(z float64) (cdf, logCDF, logSurvival float64) {
	switch {
	case math.IsNaN(z):
		return z, z, z
	case z <= 0:
		f, lf := normalSmallTail(-z)
		return f, lf, log1mSmall(f)
	}
	s, ls := normalSmallTail(z)
	return 1 - s, log1mSmall(s), ls
}

// normalSmallTail returns Q(t) = 1 − Φ(t) and ln Q(t) for t ≥ 0.
func normalSmallTail(t float64) (q, lq float64) {
	if t < 37 {
		q = 0.5 * math.Erfc(t/sqrt2)
		return q, fastLog(q)
	}
	lq = logNormalCDF(-t)
	return fastExp(lq), lq
}

// CDFTails of the normal distribution: see normalTails.
func (d Normal) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	return normalTails((x - d.Mu) / d.Sigma)
}

// CDFTails of the lognormal distribution: normalTails of (ln x − μ)/σ.
func (d LogNormal) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	if !(x > 0) {
		return belowSupport()
	}
	return normalTails((fastLog(x) - d.Mu) / d.Sigma)
}

// CDFTails of the three-parameter lognormal: normalTails of (ln(x−γ) − μ)/σ.
func (d Lognormal3) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	r, _, ok := d.r(x)
	if !ok {
		return belowSupport()
	}
	return normalTails(r)
}

// CDFTails of the exponential distribution: cumulative hazard λx.
func (d Exponential) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	if !(x > 0) {
		return belowSupport()
	}
	return hazardTails(d.Rate * x)
}

// CDFTails of the Weibull distribution: cumulative hazard (x/λ)^k, given
// by its logarithm k ln(x/λ).
func (d Weibull) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	if !(x > 0) {
		return belowSupport()
	}
	return logHazardTails(d.Shape * lnRatioFast(x, d.Scale))
}

// CDFTails of the three-parameter Weibull: cumulative hazard ((x−γ)/λ)^k.
func (d Weibull3) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	s, ok := d.lz(x)
	if !ok {
		return belowSupport()
	}
	return logHazardTails(d.Shape * s)
}

// CDFTails of the Pareto distribution: cumulative hazard α ln(x/x_m).
func (d Pareto) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	if !(x > d.Scale) {
		return belowSupport()
	}
	return hazardTails(d.Shape * d.lnExcess(x))
}

// CDFTails of the generalized Pareto distribution: cumulative hazard
// ln(1 + ξz)/ξ.
func (d GPD) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	w, where := d.w(x)
	switch where {
	case -1:
		return belowSupport()
	case 1:
		return aboveSupport()
	}
	return hazardTails(w)
}

// CDFTails of the Gumbel distribution: ln F = −e^(−z), z = (x − μ)/β.
func (d Gumbel) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	z := (x - d.Location) / d.Scale
	return extremeTails(fastExp(-z), z)
}

// CDFTails of the GEV distribution: ln F = −e^(−y), y = ln(1 + ξz)/ξ.
func (d GEV) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	y, ok := d.y(x)
	if !ok {
		if d.Shape > 0 {
			return belowSupport()
		}
		return aboveSupport()
	}
	return extremeTails(fastExp(-y), y)
}

// CDFTails of the logistic distribution: see logisticTails.
func (d Logistic) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	return logisticTails((x - d.Location) / d.Scale)
}

// CDFTails of the log-logistic distribution: logisticTails of β ln(x/α).
func (d LogLogistic) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	if !(x > 0) {
		return belowSupport()
	}
	return logisticTails(d.Shape * lnRatioFast(x, d.Scale)) // d.z with lnRatioFast
}

// CDFTails of the gamma distribution: for shapes up to
// incGammaMaxShape, incGammaTails (one series or continued fraction; ln x, ln Γ(k), one
// exponential, one logarithm of the sum, and ln(1 − T) by a short series
// where T < ¼); above it incGammaTailsLarge. Where
// incGammaTails declines, one regularized incomplete gamma
// function, P(k, βx) below the mode region or Q(k, βx) above it, whichever
// is under ½ (gonum computes the smaller one directly), its logarithm, and
// log1p of minus it for the other tail; where the first one tried is
// above ½ the other is computed directly as well (as logGammaIncLower and
// logGammaIncUpper do). Below 1e−280 the logarithm comes from the series
// or the continued fraction in log space.
func (d Gamma) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	a, y := d.Shape, d.Rate*x
	switch {
	case math.IsNaN(y) || math.IsNaN(a):
		return math.NaN(), math.NaN(), math.NaN()
	case y <= 0:
		return belowSupport()
	case math.IsInf(y, 1):
		return aboveSupport()
	}
	if a <= incGammaMaxShape {
		if cdf, logCDF, logSurvival, ok := incGammaTails(a, y); ok {
			return cdf, logCDF, logSurvival
		}
		return gammaTailsGonum(a, y)
	}
	return incGammaTailsLarge(a, y)
}

// CDFTailsBatch is CDFTails over x with the constant part of the
// prefactor's logarithm (ln Γ(k), or c(k) from k = 30 on) formed once, in
// blocks of stages (gammaBlock).
func (d Gamma) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	a := d.Shape
	if !(a <= incGammaMaxShape) || math.IsNaN(d.Rate) {
		for i, v := range x {
			cdf[i], logCDF[i], logSurvival[i] = d.CDFTails(v)
		}
		return
	}
	c := gammaPrefactorConst(a)
	w := tailsPool.Get().(*tailsScratch)
	w.series.reset(a)
	for lo := 0; lo < len(x); lo += CDFTailsBlock {
		hi := min(lo+CDFTailsBlock, len(x))
		gammaBlock(d, c, w, x[lo:hi], cdf[lo:hi], logCDF[lo:hi], logSurvival[lo:hi])
	}
	tailsPool.Put(w)
}

// gammaTailsGonum is Gamma.CDFTails at y = βx > 0 by gonum's regularized
// incomplete gamma functions.
func gammaTailsGonum(a, y float64) (cdf, logCDF, logSurvival float64) {
	if y > a {
		if q := mathext.GammaIncRegComp(a, y); q < 0.5 {
			return gammaUpperTails(a, y, q)
		}
	}
	p := mathext.GammaIncReg(a, y)
	if p < 0.5 {
		lp := fastLog(p)
		if !(p > 1e-280) {
			lp = logGammaSeries(a, y)
		}
		return p, lp, fastLog1p(-p)
	}
	return gammaUpperTails(a, y, mathext.GammaIncRegComp(a, y))
}

// gammaUpperTails returns F, ln F and ln S from Q = Q(a, y) ≤ ½.
func gammaUpperTails(a, y, q float64) (cdf, logCDF, logSurvival float64) {
	lq := fastLog(q)
	if !(q > 1e-280) {
		lq = logGammaContinuedFraction(a, y)
	}
	return 1 - q, fastLog1p(-q), lq
}

// CDFTails of the inverse Gaussian distribution,
//
//	F = Φ(a) + e^(2λ/μ) Φ(−b),  S = Φ(−a) − e^(2λ/μ) Φ(−b),
//
// a = √(λ/x)(x/μ − 1), b = √(λ/x)(x/μ + 1) (Chhikara & Folks, 1989): see
// invGaussTails.
func (d InvGauss) CDFTails(x float64) (cdf, logCDF, logSurvival float64) {
	if !(x > 0) {
		return belowSupport()
	}
	if math.IsInf(x, 1) {
		return aboveSupport()
	}
	a, b := d.ab(x)
	return invGaussTails(a, b, d.Shape/d.Mean, math.NaN())
}

// invGaussTails returns the inverse Gaussian's F, ln F and ln S at
// a = √(λ/x)(x/μ − 1), b = √(λ/x)(x/μ + 1), with r = λ/μ and e2 =
// e^(2r) (NaN: computed here when needed; batch callers pass it once).
// In linear space where |a| ≤ 37 (φ(a) > 1e−298: nothing underflows), with
// one φ(a) = e^(−a²/2)/√(2π) shared by the Mills-ratio forms: the second
// term is φ(a)R(b) for b ≥ 1.25√2 (φ(b)e^(2λ/μ) = φ(a)) and
// e^(2λ/μ)·erfc(b/√2)/2 below (where 2λ/μ < b²/2 < 1.6), Φ(a) is φ(a)R(−a)
// below a = −1.25√2 and erfc(−a/√2)/2 above, and Φ(−a) likewise; R(t)
// from t ≥ 1.25√2 is mills (fdlibm's rational form of erfc without its
// e^(−t²/2), one exponential, or the continued fraction beyond t = 39.6).
// Below the median ln F is ln F and ln S = ln(1 − F); above it S is
// computed directly, as φ(a)(R(a) − R(b)) by quadrature where the two terms
// nearly cancel (as LogSurvival, with logMillsDifferenceFast), as Φ(−a) −
// e^(2λ/μ)Φ(−b) elsewhere, and ln F = ln(1 − S). Beyond |a| = 37,
// invGaussTailsLog works in log space throughout.
func invGaussTails(a, b, r, e2 float64) (cdf, logCDF, logSurvival float64) {
	if !(math.Abs(a) <= 37) {
		return invGaussTailsLog(a, b)
	}
	phi := fastExp(-0.5*a*a) * invSqrt2Pi
	var second float64
	if b >= millsRationalLo {
		second = phi * mills(b)
	} else {
		if math.IsNaN(e2) {
			e2 = fastExp(2 * r)
		}
		second = e2 * 0.5 * math.Erfc(b/sqrt2)
	}
	var lower float64 // Φ(a)
	if a <= -millsRationalLo {
		lower = phi * mills(-a)
	} else {
		lower = 0.5 * math.Erfc(-a/sqrt2)
	}
	if f := lower + second; f < 0.5 {
		return f, fastLog(f), log1mSmall(f)
	}
	if a > -1 && b-a <= math.Max(1, a) {
		ls := -0.5*a*a - lnSqrt2Pi + logMillsDifferenceFast(a, b)
		s := fastExp(ls)
		return 1 - s, log1mSmall(s), ls
	}
	var upper float64 // Φ(−a)
	if a >= millsRationalLo {
		upper = phi * mills(a)
	} else {
		upper = 0.5 * math.Erfc(a/sqrt2)
	}
	s := upper - second
	return 1 - s, log1mSmall(s), fastLog(s)
}

// CDFTailsBatch is CDFTails over x with λ/μ and e^(2λ/μ) formed once.
func (d InvGauss) CDFTailsBatch(x, cdf, logCDF, logSurvival []float64) {
	r := d.Shape / d.Mean
	e2 := fastExp(2 * r) // +Inf when 2r > 709: then b ≥ 2√r never needs it
	for i, v := range x {
		switch {
		case !(v > 0):
			cdf[i], logCDF[i], logSurvival[i] = belowSupport()
		case math.IsInf(v, 1):
			cdf[i], logCDF[i], logSurvival[i] = aboveSupport()
		default:
			a, b := d.ab(v)
			cdf[i], logCDF[i], logSurvival[i] = invGaussTails(a, b, r, e2)
		}
	}
}

// invSqrt2Pi is 1/√(2π).
const invSqrt2Pi = 0.39894228040143267793994605993438186847585863116493

// invGaussTailsLog is InvGauss.CDFTails in log space: ln F as LogCDF,
// F = e^(ln F); ln S = log1p(−F) below the median and LogSurvival's
// upper-tail forms above it, sharing a, b and the second term of F with
// ln F. The Mills ratios beyond 5 come from millsRatioShort.
func invGaussTailsLog(a, b float64) (cdf, logCDF, logSurvival float64) {
	second := -0.5*a*a - lnSqrt2Pi + logMillsShort(b) // logSecond(a, b)
	lf := logAddExpPair(logNormalCDFShort(a), second)
	f := fastExp(lf)
	switch {
	case lf < -math.Ln2:
		return f, lf, fastLog1p(-f)
	case a > -1 && b-a <= math.Max(1, a):
		return f, lf, -0.5*a*a - lnSqrt2Pi + logMillsDifference(a, b)
	}
	return f, lf, logDiffExp(logNormalCDFShort(-a), second)
}

// millsRatioShort is millsRatio, the normal Mills ratio R(x) for x ≥ 5 by
// Laplace's continued fraction R = 1/K, K = x + 1/(x + 2/(x + 3/(x + …))),
// with fewer terms: 30 below x = 7, 21 below 10, 16 below 15, 13 below 25
// and 10 beyond. Each is at least four more than the fraction needs to
// settle to half an ulp at the start of its band (25 terms at 5, 17 at 7,
// 12 at 10, 10 at 15, 7 at 25; the need falls as x grows), and
// TestMillsRatioShort compares the result with the 80-term value from 5 to
// 1e6. (The forward recurrences A_n = x A_(n−1) + n A_(n−2), free of
// divisions, were tried: their rounding errors add up to 6 ulps at x = 5.)
func millsRatioShort(x float64) float64 {
	var n float64
	switch {
	case x < 7:
		n = 30
	case x < 10:
		n = 21
	case x < 15:
		n = 16
	case x < 25:
		n = 13
	default:
		n = 10
	}
	t := x
	for k := n; k >= 1; k-- {
		t = x + k/t
	}
	return 1 / t
}

// logMillsShort is logMills with millsRatioShort.
func logMillsShort(t float64) float64 {
	if t >= 5 {
		return fastLog(millsRatioShort(t))
	}
	return logNormalCDF(-t) + 0.5*t*t + lnSqrt2Pi
}

// logNormalCDFShort is logNormalCDF with millsRatioShort below z = −5.
func logNormalCDFShort(z float64) float64 {
	if z < -5 && !math.IsInf(z, -1) {
		x := -z
		return -0.5*x*x - lnSqrt2Pi + fastLog(millsRatioShort(x))
	}
	return logNormalCDF(z)
}
