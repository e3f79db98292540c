package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// StudentT is Student's t distribution with location Location, scale
// Scale = σ > 0 and degrees of freedom DF = ν > 0:
//
//	f(x) = Γ((ν+1)/2) / (Γ(ν/2) σ √(νπ)) · (1 + z²/ν)^(−(ν+1)/2),  z = (x − μ)/σ.
//
// F(x) = I_(ν/(ν+z²))(ν/2, 1/2)/2 for z < 0 (Abramowitz & Stegun 26.7.1 in
// incomplete-beta form), the upper tail by symmetry. DF = +Inf is the normal
// limit, the value a fit reports when the likelihood increases all the way
// to it.
type StudentT struct{ Location, Scale, DF float64 }

func (d StudentT) normal() Normal { return Normal{d.Location, d.Scale} }

func (d StudentT) LogPDF(x float64) float64 {
	if math.IsInf(d.DF, 1) {
		return d.normal().LogPDF(x)
	}
	z := (x - d.Location) / d.Scale
	return tLogConst(d.DF) - math.Log(d.Scale) - 0.5*(d.DF+1)*math.Log1p(z*z/d.DF)
}

// tLogConst returns ln Γ((ν+1)/2) − ln Γ(ν/2) − ln(νπ)/2.
func tLogConst(nu float64) float64 {
	return lnGammaHalfStep(nu/2) - 0.5*math.Log(nu*math.Pi)
}

// lnGammaHalfStep returns ln Γ(x + 1/2) − ln Γ(x). From x = 10 on it uses
// Stirling's series for both terms, whose difference keeps absolute
// precision for large x (where the two lgamma values would be ~x ln x):
// x ln(1 + 1/(2x)) − 1/2 + (ln x)/2 + δ(x + 1/2) − δ(x), δ Stirling's
// remainder (stirlingDelta).
func lnGammaHalfStep(x float64) float64 {
	if x < 10 {
		a, _ := math.Lgamma(x + 0.5)
		b, _ := math.Lgamma(x)
		return a - b
	}
	return x*math.Log1p(0.5/x) - 0.5 + 0.5*math.Log(x) + (stirlingDelta(x+0.5) - stirlingDelta(x))
}

// tDFScore returns ∂/∂ν of ln Γ((ν+1)/2) − ln Γ(ν/2) − ln(νπ)/2, that is
// (ψ((ν+1)/2) − ψ(ν/2))/2 − 1/(2ν); beyond ν = 2·10⁵ its asymptotic
// series 1/(16x²) − 1/(128x⁴) in x = ν/2 (derivative of A&S 6.1.41's
// difference), which has no cancellation.
func tDFScore(nu float64) float64 {
	x := nu / 2
	if x > 1e5 {
		x2 := x * x
		return 1/(16*x2) - 1/(128*x2*x2)
	}
	return 0.5*(mathext.Digamma(x+0.5)-mathext.Digamma(x)) - 0.5/nu
}

// tLogLowerTail returns ln P(T ≤ z) for a standard t variate with ν degrees
// of freedom, z ≤ 0: ln(I_x(ν/2, 1/2)/2), x = ν/(ν+z²), 1 − x = z²/(ν+z²).
// Up to ν = tNormalExpansionFrom it is logRegIncBeta; above, where
// q = ln(1 + z²/ν) ≤ tNormalExpansionMaxQ, the normal-limit expansion
// tLogLowerTailNormalExpansion, and beyond that q the continued fraction
// tLogLowerTailFraction, both with the prefactor from lnGammaHalfStep
// (mpmath check: testdata/studentt/tails.json, relative error below 1e-13
// in ln F and ln S from ν = 1 to 1e20).
func tLogLowerTail(z, nu float64) float64 {
	r := z / math.Sqrt(nu)
	r2 := r * r
	if nu <= tNormalExpansionFrom || math.IsNaN(r2) {
		return -math.Ln2 + logRegIncBeta(nu/2, 0.5, 1/(1+r2), r2/(1+r2))
	}
	if z == 0 {
		return -math.Ln2
	}
	if math.Abs(z) < 1e150 {
		r2 = z * z / nu // two roundings, not the three of (z/√ν)²
	}
	q := math.Log1p(r2)
	if math.IsInf(r2, 1) {
		q = 2 * math.Log(math.Abs(r))
	}
	if q <= tNormalExpansionMaxQ {
		return tLogLowerTailNormalExpansion(q, nu)
	}
	return tLogLowerTailFraction(q, r2, nu)
}

// Switch points of tLogLowerTail. Up to ν = 30 gonum's incomplete beta keeps
// ln F within 5e-15 of mpmath; beyond, its Γ-ratio prefactor loses digits
// (9e-13 at ν = 1e3, 4e-9 at 1e7). The expansion's terms shrink like
// (q/2π)^k, 24 terms below 1e-17 at q = 1; the continued fraction for
// x = e^(−q) ≤ 1/e converges in a few dozen steps whatever ν.
const (
	tNormalExpansionFrom = 30.0
	tNormalExpansionMaxQ = 1.0
)

// tLogNormalRatio returns ln K, K = c_ν √(2π ν/(ν+1)), c_ν = Γ((ν+1)/2) /
// (Γ(ν/2) √(νπ)) the t density's constant: ln Γ(x+½) − ln Γ(x) − ½ ln x −
// ½ ln(1 + 1/ν), x = ν/2. With Stirling's series (as in lnGammaHalfStep)
// ln Γ(x+½) − ln Γ(x) − ½ ln x = [x ln(1 + 1/(2x)) − ½] + δ(x+½) − δ(x),
// and the bracket, which cancels for large x, as
// Σ_(n≥2) (−1)^(n+1) / (2n (2x)^(n−1)) from x = 1e4 on (10 terms < 1e-40).
// K → 1 as ν → ∞ (ln K ≈ −3/(4ν)).
func tLogNormalRatio(nu float64) float64 {
	x := nu / 2
	if x < 10 {
		return lnGammaHalfStep(x) - 0.5*math.Log(x) - 0.5*math.Log1p(1/nu)
	}
	var bracket float64
	if x < 1e4 {
		bracket = x*math.Log1p(0.5/x) - 0.5
	} else {
		e := 1 / (2 * x)
		p := e
		for n := 2; n <= 11; n++ {
			t := p / float64(2*n)
			if n%2 == 1 {
				bracket += t
			} else {
				bracket -= t
			}
			p *= e
		}
	}
	return bracket + (stirlingDelta(x+0.5) - stirlingDelta(x)) - 0.5*math.Log1p(1/nu)
}

// tNormalGamma holds the Taylor coefficients γ_k of
// G(q) = e^(3q/4) √((q/2)/sinh(q/2)) = Σ γ_k q^k (radius 2π). Their
// logarithm is ln G = 3q/4 + Σ_(n≥1) (−1)^n ζ(2n) q^(2n) / (2n (2π)^(2n))
// (ln(u/sinh u) by Bernoulli numbers, B_2n through ζ(2n)), and
// γ_k = (1/k) Σ_(j=1..k) j l_j γ_(k−j) exponentiates it.
var tNormalGamma = func() []float64 {
	const n = 60
	l := make([]float64, n+1)
	l[1] = 0.75
	zeta := func(m int) float64 { // ζ(m), m ≥ 2 even
		switch m {
		case 2:
			return math.Pi * math.Pi / 6
		case 4:
			return math.Pow(math.Pi, 4) / 90
		case 6:
			return math.Pow(math.Pi, 6) / 945
		case 8:
			return math.Pow(math.Pi, 8) / 9450
		}
		var s float64
		for k := 200; k >= 1; k-- { // tail below 200^(1−m) < 1e-20
			s += math.Pow(float64(k), -float64(m))
		}
		return s
	}
	for m := 2; m <= n; m += 2 {
		v := zeta(m) / (float64(m) * math.Pow(2*math.Pi, float64(m)))
		if (m/2)%2 == 1 {
			v = -v
		}
		l[m] = v
	}
	g := make([]float64, n+1)
	g[0] = 1
	for k := 1; k <= n; k++ {
		var s float64
		for j := 1; j <= k; j++ {
			s += float64(j) * l[j] * g[k-j]
		}
		g[k] = s / float64(k)
	}
	return g
}()

// tLogLowerTailNormalExpansion returns ln F(−s), s = √(ν(e^q − 1)) > 0,
// by the substitution ((ν+1)/2) ln(1 + t²/ν) = w²/2, which turns the tail
// integral into a normal one:
//
//	F(−s) = K/√(2π) ∫_W^∞ e^(−w²/2) G(w²/(ν+1)) dw,  W² = (ν+1) q,
//
// with K from tLogNormalRatio and dt/dw = √(ν/(ν+1)) G(q). Term by term in
// G's series, with J_k = ∫_W^∞ w^(2k) e^((W²−w²)/2) dw, J_0 = R(W) the
// Mills ratio and J_k = W^(2k−1) + (2k−1) J_(k−1):
//
//	ln F = ln K − ½ ln 2π − W²/2 + ln Σ_k γ_k J_k/(ν+1)^k.
//
// T_k = J_k/(ν+1)^k = q^k/W + (2k−1) T_(k−1)/(ν+1), all positive. The
// series is asymptotic (J_k grows like (2k−1)!!), but for ν > 30 and q ≤ 1
// its terms fall below 1e-17 of the sum long before they could turn up
// (at k ≈ πν). Summation stops after two such terms.
func tLogLowerTailNormalExpansion(q, nu float64) float64 {
	h := 0.5 * (nu + 1) * q // W²/2
	w := math.Sqrt(2 * h)
	lnK := tLogNormalRatio(nu)
	// ln Q(W) = −h + lnQh, R(W) = Q(W)/φ(W) the Mills ratio; −h is
	// added last so that a large ln F takes one rounding, not several.
	var lnQh, mills float64
	if w < 5 {
		lnQ := math.Log(0.5 * math.Erfc(w/math.Sqrt2))
		mills = math.Exp(lnQ + h + lnSqrt2Pi)
		lnQh = lnQ + h
	} else {
		mills = millsRatio(w)
		lnQh = math.Log(mills) - lnSqrt2Pi
	}
	u := 1 / (nu + 1)
	t, p := mills, 1/w
	var corr, prev float64 // Σ_(k≥1) γ_k T_k, the previous term
	for k := 1; k < len(tNormalGamma); k++ {
		p *= q
		t = p + float64(2*k-1)*u*t
		term := tNormalGamma[k] * t
		corr += term
		if small := 1e-17 * (mills + math.Abs(corr)); math.Abs(term) < small && math.Abs(prev) < small {
			break // two terms in a row below 1e-17: at most 22 terms for ν > 30, q ≤ 1
		}
		prev = term
	}
	return -h + (lnQh + (lnK + math.Log1p(corr/mills)))
}

// tLogLowerTailFraction returns ln F(−s) = ln(I_x(a, ½)/2), a = ν/2,
// x = e^(−q) = ν/(ν+s²), r2 = s²/ν, by the incomplete beta's continued
// fraction (Abramowitz & Stegun 26.5.8, modified Lentz evaluation) and
// the prefactor in logarithms without Γ ratios:
//
//	ln I_x(a, ½) = −a q + ½ ln y − ln a − ½ ln π + lnΓ(a+½) − lnΓ(a) + ln cf,
//
// y = 1 − x = r2/(1+r2), ln y = −ln(1 + 1/r2).
func tLogLowerTailFraction(q, r2, nu float64) float64 {
	a, b := nu/2, 0.5
	x := math.Exp(-q)
	lnY := -math.Log1p(1 / r2)
	f := incBetaFraction(a, b, x)
	rest := 0.5*lnY - math.Log(a) - 0.5*math.Log(math.Pi) + lnGammaHalfStep(a) + math.Log(f) - math.Ln2
	return -a*q + rest // the large term last: one rounding at its size
}

func (d StudentT) LogCDF(x float64) float64 {
	if math.IsInf(d.DF, 1) {
		return d.normal().LogCDF(x)
	}
	z := (x - d.Location) / d.Scale
	if z <= 0 {
		return tLogLowerTail(z, d.DF)
	}
	return log1mExp(tLogLowerTail(-z, d.DF))
}

func (d StudentT) LogSurvival(x float64) float64 {
	if math.IsInf(d.DF, 1) {
		return d.normal().LogSurvival(x)
	}
	z := (x - d.Location) / d.Scale
	if z >= 0 {
		return tLogLowerTail(-z, d.DF)
	}
	return log1mExp(tLogLowerTail(z, d.DF))
}

// Quantile inverts the tail q = min(p, 1−p): 2q = I_x(ν/2, 1/2) with
// t² = ν(1−x)/x, or, where 2q > 1/2 and x is near 1, through
// 1 − 2q = I_y(1/2, ν/2) with t² = νy/(1−y), y = 1 − x; Newton steps on
// the tail's logarithm polish it (polishQuantile), since gonum's inverse
// misses the tail probability by a relative 1e-5 at ν = 1000, p = 1e-10,
// and by 1e-4 at ν = 1e12.
func (d StudentT) Quantile(p float64) float64 {
	if p < 0 || p > 1 || math.IsNaN(p) {
		return math.NaN()
	}
	if math.IsInf(d.DF, 1) {
		return d.normal().Quantile(p)
	}
	q, sign := p, -1.0
	if p > 0.5 {
		q, sign = 1-p, 1
	}
	if q == 0.5 {
		return d.Location
	}
	var t2 float64
	if 2*q < 0.5 {
		x := mathext.InvRegIncBeta(d.DF/2, 0.5, 2*q)
		t2 = d.DF * (1 - x) / x
	} else {
		y := mathext.InvRegIncBeta(0.5, d.DF/2, 1-2*q)
		t2 = d.DF * y / (1 - y)
	}
	start := d.Location + sign*d.Scale*math.Sqrt(t2)
	if math.IsNaN(start) || math.IsInf(start, 0) {
		// gonum's inverse fails at ν ~ 1e20: start from the normal quantile
		// with its first correction, z + (z³ + z)/(4ν) (Abramowitz &
		// Stegun 26.7.5).
		z := mathext.NormalQuantile(p)
		start = d.Location + d.Scale*(z+(z*z*z+z)/(4*d.DF))
	}
	return polishQuantile(d, p, start, newtonStep)
}

func (d StudentT) Rand(r *rand.Rand) float64 {
	if math.IsInf(d.DF, 1) {
		return d.normal().Rand(r)
	}
	return distuv.StudentsT{Mu: d.Location, Sigma: d.Scale, Nu: d.DF, Src: r}.Rand()
}

type studentTFamily struct{}

func init() { register(studentTFamily{}) }

func (studentTFamily) Name() string         { return "studentt" }
func (studentTFamily) Parameters() []string { return []string{"location", "scale", "df"} }
func (studentTFamily) Kind() Kind           { return Continuous }
func (studentTFamily) Support() string      { return "real line" }
func (studentTFamily) Route() string {
	return "BFGS on (location, log scale, log df) with analytic score from median/MAD, moment and spread starts; df → ∞ reports the normal limit; above 4000 complete values the starts run on a 2000-value subsample and the best is polished on all values; censored data: Newton on (location, log scale, log df) from the best of the starts above (censored terms' df derivatives by differences), the normal limit when it runs beyond df = 10⁴, the BFGS route if it fails"
}

func (studentTFamily) New(p []float64) (Dist, error) {
	if len(p) != 3 {
		panic("fitters: studentt takes 3 parameters")
	}
	if !finiteParam(p[0]) || !(p[1] > 0) || !finiteParam(p[1]) || !(p[2] > 0) || math.IsNaN(p[2]) {
		return nil, fmt.Errorf("studentt: need finite location, scale > 0 and df > 0 (+Inf for the normal limit), got %v", p)
	}
	return StudentT{p[0], p[1], p[2]}, nil
}

func (f studentTFamily) LogLik(p []float64, d *Data) float64 { return logLikOf(f, p, d) }

func (f studentTFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 3)
}

// studentTNLL is −Σ ln f over x at θ = (μ, ln σ, ln ν) with its gradient in
// one pass: with q = z²/ν and w = (ν+1)/(ν+z²),
// ∂ln f/∂μ = wz/σ, ∂ln f/∂ln σ = −1 + wz², and
// ∂ln f/∂ν = tDFScore(ν) − ln(1+q)/2 + (ν+1)q/(2ν(1+q)).
func studentTNLL(x []float64) exactNLL {
	return func(theta, g []float64) float64 {
		mu, ls, lnu := theta[0], theta[1], theta[2]
		s, nu := math.Exp(ls), math.Exp(lnu)
		if !(nu > 0) || math.IsInf(nu, 1) {
			return math.Inf(1)
		}
		var sl, swz, swz2, sqq float64
		for _, v := range x {
			z := (v - mu) / s
			z2 := z * z
			q := z2 / nu
			sl += math.Log1p(q)
			w := (nu + 1) / (nu + z2)
			swz += w * z
			swz2 += w * z2
			sqq += z2 / (nu + z2)
		}
		n := float64(len(x))
		if g != nil {
			g[0] = -swz / s
			g[1] = n - swz2
			g[2] = -nu * (n*tDFScore(nu) - 0.5*sl + 0.5*(nu+1)/nu*sqq)
		}
		return n*(ls-tLogConst(nu)) + 0.5*(nu+1)*sl
	}
}

// studentTStarts returns (μ, ln σ, ln ν) starts: median and MAD with ν = 1,
// 4 and 30, and a moment start with ν = 4 + 6/excess kurtosis.
func studentTStarts(values []float64) [][]float64 {
	s := sortedStartSample(values)
	n := len(s)
	med := 0.5 * (s[(n-1)/2] + s[n/2])
	dev := make([]float64, n)
	for i, v := range s {
		dev[i] = math.Abs(v - med)
	}
	dev = sortedStartSample(dev)
	mad := 1.4826 * 0.5 * (dev[(n-1)/2] + dev[n/2])
	mean, v := meanVar(values)
	sd := math.Sqrt(v)
	if !(mad > 0) {
		mad = sd
	}
	var starts [][]float64
	for _, nu := range []float64{1, 4, 30} {
		starts = append(starts, []float64{med, math.Log(mad), math.Log(nu)})
	}
	var m4 float64
	for _, x := range values {
		d := (x - mean) / sd
		m4 += d * d * d * d
	}
	if k := m4/float64(len(values)) - 3; k > 0.01 {
		nu := 4 + 6/k
		starts = append(starts, []float64{mean, math.Log(sd * math.Sqrt((nu-2)/nu)), math.Log(nu)})
	} else {
		starts = append(starts, []float64{mean, math.Log(sd), math.Log(1000)})
	}
	return starts
}

func (f studentTFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	route := fitStudentTCensored(fit, d, opt)
	// The normal limit (df → ∞) is the supremum when it is at least as
	// likely as the best finite df found.
	nfit, err := normalFamily{}.Fit(d, Options{Tolerance: opt.Tolerance, MaxIterations: opt.MaxIterations})
	normalOK := err == nil && nfit.Converged
	if !route.solved && !(route.towardsNormal && normalOK && nfit.LogLik >= fit.LogLik) {
		fitStudentTBFGS(fit, d, opt)
		if route.reason != "" {
			censoredNewtonFallback(fit, route.reason)
		}
	}
	if normalOK && (math.IsNaN(fit.LogLik) || nfit.LogLik >= fit.LogLik) {
		fit.Estimates = []float64{nfit.Estimates[0], nfit.Estimates[1], math.Inf(1)}
		fit.LogLik = nfit.LogLik
		fit.Convergence.Converged = true
		fit.Convergence.Reason = ""
		fit.Convergence.Iterations += nfit.Iterations
		fit.Convergence.Evaluations += nfit.Evaluations
		fit.Convergence.GradientNorm = nfit.GradientNorm
		if route.towardsNormal && strings.HasPrefix(fit.Method, "censored Newton") {
			fit.Convergence.Method += " (" + route.reason + ")"
		}
		fit.Convergence.Method += "; normal limit by " + nfit.Method
		fit.Note = "df → ∞: the likelihood increases towards the normal limit; reported df = +Inf with the normal distribution's maximum log-likelihood"
		return fit, nil
	}
	if fit.Converged && fit.Estimates[2] < 0.01 {
		fit.Converged = false
		fit.Reason = "non-regular likelihood: df → 0 with the scale shrinking onto tied values; no interior maximum"
	}
	return fit, nil
}

// fitStudentTBFGS records in fit the multi-start BFGS maximum (staged on a
// subsample above stageAbove complete values).
func fitStudentTBFGS(fit *Fit, d *Data, opt Options) {
	// Optimise on θ = ((μ − C)/S, ln(σ/S), ln ν), the data's own units.
	ls, starts := standardisedStarts(studentTStarts(d.valuesView()))
	natural := func(t []float64) []float64 {
		u := ls.fromTheta(t)
		return []float64{u[0], math.Exp(u[1]), math.Exp(u[2])}
	}
	dist := func(t []float64) Dist { p := natural(t); return StudentT{p[0], p[1], p[2]} }
	nll := func(x []float64) exactNLL { return ls.wrap(studentTNLL(x)) }
	sub, ratio := stagedSubproblem(d, d.Exact, 3, nll)
	o, staged := minimizeStaged(likelihoodProblem(3, nll(d.Exact), dist, d), sub, ratio, starts, opt)
	var est []float64
	if o.theta != nil {
		est = natural(o.theta)
	}
	fit.setOptimum(o, est, stagedMethod("BFGS on (location, log scale, log df)", staged))
}
