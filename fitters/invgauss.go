package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"gonum.org/v1/gonum/mathext"
)

// InvGauss is the inverse Gaussian distribution with Mean μ > 0 and Shape
// λ > 0:
//
//	f(x) = √(λ/(2πx³)) exp(−λ(x−μ)²/(2μ²x)),  x > 0,
//	F(x) = Φ(a) + e^(2λ/μ) Φ(−b),  a = √(λ/x)(x/μ − 1),  b = √(λ/x)(x/μ + 1)
//
// (Chhikara & Folks, 1989).
type InvGauss struct{ Mean, Shape float64 }

func (d InvGauss) LogPDF(x float64) float64 {
	if !(x > 0) {
		return math.Inf(-1)
	}
	r := (x - d.Mean) / d.Mean
	return 0.5*math.Log(d.Shape) - lnSqrt2Pi - 1.5*math.Log(x) - 0.5*d.Shape*r*(r/x)
}

// ab returns the normal arguments a and b of F.
func (d InvGauss) ab(x float64) (a, b float64) {
	s := math.Sqrt(d.Shape / x)
	r := x / d.Mean
	return s * (r - 1), s * (r + 1)
}

// logSecond is ln(e^(2λ/μ) Φ(−b)), written as ln φ(a) + ln R(b) (R the
// Mills ratio, φ(b)e^(2λ/μ) = φ(a)) so that e^(2λ/μ) never overflows.
func logSecond(a, b float64) float64 { return -0.5*a*a - lnSqrt2Pi + logMills(b) }

// LogCDF is ln(Φ(a) + e^(2λ/μ)Φ(−b)), a sum of two positive terms in log space.
func (d InvGauss) LogCDF(x float64) float64 {
	if !(x > 0) {
		return math.Inf(-1)
	}
	if math.IsInf(x, 1) {
		return 0
	}
	a, b := d.ab(x)
	return logAddExpPair(logNormalCDF(a), logSecond(a, b))
}

// LogSurvival is ln(Φ(−a) − e^(2λ/μ)Φ(−b)). Below the median it is
// ln(1 − F), accurate there. Above it the difference is written as
// φ(a)(R(a) − R(b)) with R(a) − R(b) = ∫_a^b (1 − tR(t)) dt summed by
// quadrature (logMillsDifference) wherever the two terms are close, which
// is the whole far upper tail; elsewhere the log-space difference is safe.
func (d InvGauss) LogSurvival(x float64) float64 {
	if !(x > 0) {
		return 0
	}
	if math.IsInf(x, 1) {
		return math.Inf(-1)
	}
	a, b := d.ab(x)
	second := logSecond(a, b)
	lnF := logAddExpPair(logNormalCDF(a), second)
	if lnF < -math.Ln2 {
		return log1mExp(lnF)
	}
	if a > -1 && b-a <= math.Max(1, a) {
		return -0.5*a*a - lnSqrt2Pi + logMillsDifference(a, b)
	}
	return logDiffExp(logNormalCDF(-a), second)
}

// Quantile solves F(x) = p on ln F (p ≤ 1/2) or on ln S (p > 1/2)
// (positiveQuantile), so both tails keep their digits.
func (d InvGauss) Quantile(p float64) float64 {
	return positiveQuantile(d, p, d.lognormalQuantile(p))
}

// lognormalQuantile is the p-quantile of the lognormal with the inverse
// Gaussian's mean and variance (σ² = ln(1 + μ/λ)), Quantile's first guess;
// the mean where that is not finite.
func (d InvGauss) lognormalQuantile(p float64) float64 {
	s2 := math.Log1p(d.Mean / d.Shape)
	x := d.Mean * math.Exp(math.Sqrt(s2)*mathext.NormalQuantile(p)-s2/2)
	if !(x > 0) || math.IsInf(x, 0) {
		return d.Mean
	}
	return x
}

// Rand draws by the transformation with multiple roots of Michael, Schucany
// & Haas (1976): with y = χ²₁, the two roots of λ(x−μ)²/(μ²x) = y are
// x₁ = μ + μ²y/(2λ) + (μ/(2λ))√(4μλy + μ²y²) and x₂ = μ²/x₁; x₂ is taken
// with probability μ/(μ + x₂). Computing x₂ as μ²/x₁ avoids cancellation.
func (d InvGauss) Rand(r *rand.Rand) float64 {
	mu, lam := d.Mean, d.Shape
	z := r.NormFloat64()
	y := z * z
	x1 := mu + mu*mu*y/(2*lam) + mu/(2*lam)*math.Sqrt(4*mu*lam*y+mu*mu*y*y)
	x2 := mu * (mu / x1)
	if r.Float64()*(mu+x2) <= mu {
		return x2
	}
	return x1
}

type invgaussFamily struct{}

func init() { register(invgaussFamily{}) }

func (invgaussFamily) Name() string         { return "invgauss" }
func (invgaussFamily) Parameters() []string { return []string{"mean", "shape"} }
func (invgaussFamily) Kind() Kind           { return Continuous }
func (invgaussFamily) Support() string      { return "x > 0" }
func (invgaussFamily) Route() string {
	return "closed form (mean; 1/shape = mean(1/x − 1/x̄)); censored data: Newton on (ln(c/mean), ln(shape/c)) from the exact values' sufficient statistics, BFGS on (log mean, log shape) if it fails"
}

func (invgaussFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: invgauss takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("invgauss: need mean > 0 and shape > 0, got mean=%v shape=%v", p[0], p[1])
	}
	return InvGauss{p[0], p[1]}, nil
}

func (f invgaussFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	g := dist.(InvGauss)
	// Σ ln f(x) = n(ln λ/2 − ln√(2π)) − 1.5 Σ ln x − λ Σ (x−μ)²/(2μ²x)
	var slx, sq float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return math.Inf(-1)
		}
		slx += math.Log(x)
		r := (x - g.Mean) / g.Mean
		sq += r * (r / x)
	}
	n := float64(len(d.Exact))
	ll := n*(0.5*math.Log(g.Shape)-lnSqrt2Pi) - 1.5*slx - 0.5*g.Shape*sq
	return ll + censoredLogLik(g, d, false)
}

func (f invgaussFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needPositive(f.Name(), d, false); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 2)
}

// invgaussMLE is the closed form for complete data x > 0 (Tweedie, 1957):
// μ̂ = x̄ and 1/λ̂ = mean(1/x − 1/x̄) = mean(((x − x̄)/x̄)²/x), the second form
// a sum of non-negative terms without cancellation or overflow.
func invgaussMLE(x []float64) (mean, shape, ll float64) {
	n := float64(len(x))
	m, _ := meanVar(x)
	if math.IsInf(m, 0) || math.IsNaN(m) {
		m = 0
		for _, v := range x {
			m += v / n
		}
	}
	var sq, slx float64
	for _, v := range x {
		r := (v - m) / m
		sq += r * (r / v)
		slx += math.Log(v)
	}
	shape = n / sq
	// At the optimum λ̂ Σ(x−μ̂)²/(μ̂²x) = n.
	ll = n*(0.5*math.Log(shape)-lnSqrt2Pi) - 1.5*slx - 0.5*n
	return m, shape, ll
}

// invgaussFast is the closed form on complete data whose values are
// positive and not all equal (Applicable's conditions), in two passes: the
// extremes, Σ x and Σ ln x (scanLogs4); then 1/λ̂ = mean((x − x̄)²/(x̄²x)),
// as in invgaussMLE, with the mean's correction (as meanSD). ok is false
// when the data need the general route.
func invgaussFast(x []float64) (mean, shape, ll float64, ok bool) {
	lo, hi, sum, slx := scanLogs4(x)
	if !(lo > 0 && lo < hi) || math.IsInf(sum, 0) {
		return 0, 0, 0, false
	}
	n := float64(len(x))
	m := sum / n
	im := 1 / m
	var sq, c float64
	for _, v := range x {
		d := v - m
		c += d
		r := d * im
		sq += r * r / v
	}
	m += c / n // meanSD's correction; sq moves with m only in its last bits
	shape = n / sq
	if !(shape > 0) || math.IsInf(shape, 0) {
		return 0, 0, 0, false
	}
	ll = n*(0.5*math.Log(shape)-lnSqrt2Pi) - 1.5*slx - 0.5*n
	return m, shape, ll, true
}

// invgaussOnePass is the closed form from one pass over x
// (positiveScanRecip: Σ x, Σ ln x and Σ 1/x, with the range test), used
// when every value lies in [2⁻⁶⁴, 2⁶⁴) and the difference
//
//	1/λ̂ = mean(1/x) − 1/x̄
//
// cancels at most a factor F = mean(1/x)·λ̂ ≤ 64 (F ≈ 1 + λ/μ for data
// drawn from the family; all-equal data give F = ∞ and fail it). Σ x is
// within 8u relative (u = 2⁻⁵³), Σ 1/x within 16u, so 1/λ̂ is within
// 27F·u < 2⁻⁴² relative; data with a larger λ/μ (tightly clustered
// values) go to invgaussFast's sum of non-negative terms. At the optimum
// ll = n(½ ln λ̂ − ln√(2π)) − 1.5 Σ ln x − n/2.
func invgaussOnePass(x []float64) (mean, shape, ll float64, ok bool) {
	ps, ok := positiveScanRecip(x)
	if !ok {
		return 0, 0, 0, false
	}
	n := float64(len(x))
	m := ps.sum / n
	mr := ps.recip / n
	inv := mr - 1/m // 1/λ̂
	if !(inv > 0) || mr > 64*inv {
		return 0, 0, 0, false
	}
	shape = 1 / inv
	ll = n*(0.5*math.Log(shape)-lnSqrt2Pi) - 1.5*ps.log.value() - 0.5*n
	return m, shape, ll, true
}

func (f invgaussFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if d.IsComplete() && len(opt.Fixed) == 0 && len(d.Exact) >= 2 {
		m, s, ll, ok := invgaussOnePass(d.Exact)
		if !ok {
			m, s, ll, ok = invgaussFast(d.Exact)
		}
		if ok {
			fit := newFitOpt(f, d, opt)
			fit.Estimates[0], fit.Estimates[1] = m, s
			fit.LogLik = ll
			fit.Convergence = closedForm()
			return fit, nil
		}
	}
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	if d.IsComplete() {
		m, s, ll := invgaussMLE(d.Exact)
		if !(s > 0) || math.IsInf(s, 0) {
			fit.Convergence = Convergence{Method: "closed form", Reason: fmt.Sprintf("the shape's estimate is %v: the data have no spread in floating point", s)}
			return fit, nil
		}
		fit.Estimates[0], fit.Estimates[1] = m, s
		fit.LogLik = ll
		fit.Convergence = closedForm()
		return fit, nil
	}
	newtonOK, newtonFailed := fitInvgaussCensored(fit, d, opt)
	if newtonOK {
		return fit, nil
	}
	m0, s0 := 1.0, 1.0
	if x := startSample(d, 2, true); len(x) >= 2 {
		if m, s, _ := invgaussMLE(x); m > 0 && s > 0 && !math.IsInf(s, 0) {
			m0, s0 = m, s
		} else if m > 0 {
			m0, s0 = m, m
		}
	}
	starts := [][]float64{{0, 0}, {0, math.Log(1.0 / 3)}}
	toNatural := func(t []float64) []float64 { return []float64{m0 * math.Exp(t[0]), s0 * math.Exp(t[1])} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (log mean, log shape)")
	if newtonFailed != "" {
		censoredNewtonFallback(fit, newtonFailed)
		markNoInteriorMaximum(fit, d, newtonFailed)
	}
	return fit, nil
}

// markNoInteriorMaximum marks the fallback fit not converged where the
// censored Newton route found the likelihood rising as μ → ∞ and BFGS
// then stopped at a mean above 10⁶ times the data's centre: there the
// likelihood is flat to rounding and has no maximum-likelihood estimate
// (its supremum is the Lévy limit, not an inverse Gaussian), so the
// reported point must not be ranked or weighted as if it were one.
func markNoInteriorMaximum(fit *Fit, d *Data, newtonFailed string) {
	if !fit.Converged || !strings.HasPrefix(newtonFailed, "no interior maximum") {
		return
	}
	c := censoredCentre(d)
	if !(fit.Estimates[0] > 1e6*c) {
		return
	}
	fit.Converged = false
	fit.Reason = fmt.Sprintf("no maximum-likelihood estimate: the likelihood keeps rising as the mean → ∞ (BFGS stopped at mean %.4g, over 10⁶ times the data's centre %.4g); these censored data do not identify a finite-mean inverse Gaussian", fit.Estimates[0], c)
}
