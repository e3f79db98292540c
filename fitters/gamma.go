package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// Gamma is the gamma distribution with Shape k > 0 and Rate β > 0:
//
//	f(x) = β^k x^(k−1) e^(−βx) / Γ(k),  x > 0.
type Gamma struct{ Shape, Rate float64 }

func (d Gamma) LogPDF(x float64) float64 {
	if x < 0 || math.IsNaN(x) {
		return math.Inf(-1)
	}
	if x == 0 {
		switch {
		case d.Shape < 1:
			return math.Inf(1)
		case d.Shape == 1:
			return math.Log(d.Rate)
		default:
			return math.Inf(-1)
		}
	}
	if d.Shape > incGammaMaxShape {
		// ln f = ln β − ln y + ln(y^k e^(−y)/Γ(k)), y = βx: the prefactor
		// from Stirling's series, where the plain sum cancels terms of
		// size k ln x (whole units at k = 1e20).
		y := d.Rate * x
		return math.Log(d.Rate) - math.Log(y) + logGammaPrefactor(d.Shape, y)
	}
	lg, _ := math.Lgamma(d.Shape)
	return d.Shape*math.Log(d.Rate) + (d.Shape-1)*math.Log(x) - d.Rate*x - lg
}

// LogCDF is ln P(k, βx) (logGammaIncLower: series in log space where P underflows).
func (d Gamma) LogCDF(x float64) float64 { return logGammaIncLower(d.Shape, d.Rate*x) }

// LogSurvival is ln Q(k, βx) (logGammaIncUpper: continued fraction in log
// space where Q underflows), never ln(1 − P).
func (d Gamma) LogSurvival(x float64) float64 { return logGammaIncUpper(d.Shape, d.Rate*x) }

// Quantile starts from gonum's inverse of P (lower half) or of Q (upper
// half) and polishes it on ln F or ln S (positiveQuantile), which also
// rescues the far tails where the inverse underflows. Above
// incGammaMaxShape it starts from Wilson & Hilferty's (1931) cube-root
// normal approximation, k(1 − 1/(9k) + z/(3√k))³ with z = Φ⁻¹(p), and
// brackets the root in steps of a tenth of ln X's spread 1/√k, on the tails
// of incGammaTailsLarge (gonum's evaluator is wrong there from k ≈ 1e16).
func (d Gamma) Quantile(p float64) float64 {
	if d.Shape > incGammaMaxShape {
		return d.quantileLarge(p)
	}
	var x0 float64
	if p > 0.5 {
		x0 = mathext.GammaIncRegCompInv(d.Shape, 1-p) / d.Rate
	} else {
		x0 = mathext.GammaIncRegInv(d.Shape, p) / d.Rate
	}
	if !(x0 > 0) || math.IsInf(x0, 0) {
		x0 = d.Shape / d.Rate
	}
	return positiveQuantile(d, p, x0)
}

// quantileLarge is Quantile for a shape above incGammaMaxShape.
func (d Gamma) quantileLarge(p float64) float64 {
	k := d.Shape
	sk := math.Sqrt(k)
	z := distuv.UnitNormal.Quantile(p)
	x0 := math.NaN()
	if b := 1 - 1/(9*k) + z/(3*sk); b > 0.1 {
		x0 = k * b * b * b / d.Rate
	}
	if !(x0 > 0) || math.IsInf(x0, 0) {
		x0 = k / d.Rate
	}
	return positiveQuantileStep(d, p, x0, math.Min(1e-3, 0.1/sk))
}

func (d Gamma) Rand(r *rand.Rand) float64 {
	return distuv.Gamma{Alpha: d.Shape, Beta: d.Rate, Src: r}.Rand()
}

type gammaFamily struct{}

func init() { register(gammaFamily{}) }

func (gammaFamily) Name() string         { return "gamma" }
func (gammaFamily) Parameters() []string { return []string{"shape", "rate"} }
func (gammaFamily) Kind() Kind           { return Continuous }
func (gammaFamily) Support() string      { return "x > 0" }
func (gammaFamily) Route() string {
	return "profile equation ln k − ψ(k) = ln x̄ − mean ln x (safeguarded Newton), rate = k/x̄; censored data: Newton on (ln shape, ln(rate·c/shape)) from the exact values' sufficient statistics, BFGS on (log shape, log rate) if it fails"
}

func (gammaFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: gamma takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("gamma: need shape > 0 and rate > 0, got shape=%v rate=%v", p[0], p[1])
	}
	return Gamma{p[0], p[1]}, nil
}

func (f gammaFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	g := dist.(Gamma)
	if g.Shape >= 30 {
		return gammaLogLikLargeShape(g, d)
	}
	// Σ ln f(x) = n(k ln β − ln Γ(k)) + (k−1) Σ ln x − Σ βx
	var slx, sbx float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return math.Inf(-1)
		}
		slx += math.Log(x)
		sbx += g.Rate * x
	}
	lg, _ := math.Lgamma(g.Shape)
	n := float64(len(d.Exact))
	ll := n*(g.Shape*math.Log(g.Rate)-lg) + (g.Shape-1)*slx - sbx
	return ll + censoredLogLik(g, d, false)
}

// gammaLogLikLargeShape sums ln f(x) = c(k) + k·(ln(1+u) − u) − ln x, with
// u = βx/k − 1 = (x − m)/m, m = k/β, and c(k) = k ln k − k − ln Γ(k) = ½ ln k − ln√(2π) − r(k),
// r(k) = 1/(12k) − 1/(360k³) + 1/(1260k⁵) − 1/(1680k⁷) the remainder of
// Stirling's series (Abramowitz & Stegun 6.1.41). For a large shape the
// plain sum cancels terms of size k ln x; this form keeps the digits.
func gammaLogLikLargeShape(g Gamma, d *Data) float64 {
	var slx float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return math.Inf(-1)
		}
		slx += math.Log(x)
	}
	return gammaExactLargeShape(g, d.Exact, slx) + censoredLogLik(g, d, false)
}

// gammaExactLargeShape is gammaLogLikLargeShape's sum over the exact values
// x (all > 0) given slx = Σ ln x, which LogLikFunc takes once.
func gammaExactLargeShape(g Gamma, x []float64, slx float64) float64 {
	k := g.Shape
	c := gammaStirlingC(k)
	m := k / g.Rate // the mean: u = (x − m)/m has only the quotient's rounding
	var s1 float64
	for _, v := range x {
		s1 += log1pmx((v - m) / m)
	}
	return float64(len(x))*c + k*s1 - slx
}

// gammaStirlingC returns c(k) = k ln k − k − ln Γ(k), for k ≥ 30 (where the
// direct form cancels) as ½ ln k − ln √(2π) − δ(k) with Stirling's
// remainder δ (stirlingDelta), and directly below.
func gammaStirlingC(k float64) float64 {
	if k >= 30 {
		return 0.5*math.Log(k) - lnSqrt2Pi - stirlingDelta(k)
	}
	lg, _ := math.Lgamma(k)
	return k*math.Log(k) - k - lg
}

func (f gammaFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needPositive(f.Name(), d, false); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 2)
}

// gammaMLE solves the gamma profile equation for complete data x > 0:
//
//	ln k − ψ(k) = s,  s = ln x̄ − mean ln x = −mean ln(x/x̄) ≥ 0,
//
// then β̂ = k̂/x̄ (Choi & Wette, 1969). s is summed from the non-negative
// terms −log1pmx((x − x̄)/x̄), exact even for data clustered far from zero
// (where ln x̄ − mean ln x cancels to nothing); ln k − ψ(k)
// uses its asymptotic series for large k (logMinusDigamma). The Newton
// iteration starts from Minka's (2002) approximation
// k₀ = (3 − s + √((s−3)² + 24s))/(12s) inside a bracket of the root.
func gammaMLE(x []float64, opt Options) (shape, rate, ll float64, conv Convergence) {
	return gammaMLESum(x, sumOf(x), opt)
}

// gammaMLESum is gammaMLE given Σ x (from a pass the caller made anyway).
func gammaMLESum(x []float64, sum float64, opt Options) (shape, rate, ll float64, conv Convergence) {
	n := float64(len(x))
	xbar := sum / n
	if math.IsInf(xbar, 0) {
		// Σx overflowed: take the mean of x/n instead.
		xbar = 0
		for _, v := range x {
			xbar += v / n
		}
	}
	// With d = (x − x̄)/x̄: ln(x/x̄) = d + log1pmx(d), and
	// s = −mean log1p(d) + log1p(mean d) = −mean log1pmx(d) + log1pmx(mean d),
	// a sum of non-negative terms (x̄ as computed need not be the exact mean).
	// Where |d| ≥ 0.1, ln(x/x̄) = ln(1+d) is summed through a
	// logAccumulator (the log of the running product of x/x̄), not one log
	// per value; below, log1pmx's series.
	lnRef := math.Log(xbar)
	ixbar := 1 / xbar
	var sumD, sumL, sy, sumDLog float64
	acc := newLogAccumulator()
	for _, v := range x {
		d := (v - xbar) * ixbar
		sumD += d
		if math.Abs(d) < 0.1 {
			// log1pmx's series, with one division.
			r := 1 / (2 + d)
			u := d * r
			u2 := u * u
			l := -d*d*r + 2*u*u2*(1.0/3+u2*(1.0/5+u2*(1.0/7+u2*(1.0/9+u2*(1.0/11+u2*(1.0/13))))))
			sumL += l
			sy += d + l
		} else {
			if ratio := v * ixbar; ratio >= 0x1p-250 && ratio <= 0x1p250 {
				acc.p *= ratio // acc.mul, written out for speed
				if acc.k++; acc.k == 4 {
					acc.renormalise()
				}
			} else {
				acc.mul(ratio)
			}
			sumDLog += d
		}
	}
	sLog := acc.sum() // Σ ln(x/x̄) where |d| ≥ 0.1
	sumL += sLog - sumDLog
	sy += sLog
	s := -sumL/n + log1pmx(sumD/n)
	k, conv := gammaSolveShape(s, opt)
	if !conv.Converged {
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	shape, rate = k, k/xbar
	// ln f(x) = c(k) + k·log1pmx(βx/k − 1) − ln x with βx/k − 1 = d, so
	// ll = n·c(k) + k·Σ log1pmx(d) − n ln x̄ − Σ ln(x/x̄).
	ll = n*gammaStirlingC(k) + k*sumL - n*lnRef - sy
	return shape, rate, ll, conv
}

// gammaSolveShape solves the profile equation ln k − ψ(k) = s (s > 0) by
// a safeguarded Newton iteration from Minka's (2002) approximation
// k₀ = (3 − s + √((s−3)² + 24s))/(12s), inside a bracket of the root.
func gammaSolveShape(s float64, opt Options) (k float64, conv Convergence) {
	conv = Convergence{Method: "profile equation (safeguarded Newton)", Evaluations: 1}
	if !(s > 0) {
		conv.Reason = fmt.Sprintf("mean ln(x/x̄) = %.3g: the data are too concentrated for a finite shape (shape → ∞)", -s)
		return math.NaN(), conv
	}
	k0 := (3 - s + math.Sqrt((s-3)*(s-3)+24*s)) / (12 * s)
	fdf := func(k float64) (float64, float64) {
		conv.Evaluations++
		v, dv := logMinusDigamma(k)
		return v - s, dv
	}
	fv := func(k float64) float64 { v, _ := fdf(k); return v }
	lo, hi, ok := expandBracket(fv, k0*0.9, k0*1.1)
	if !ok {
		conv.Reason = "no bracket for the shape's profile equation"
		return math.NaN(), conv
	}
	k, it, err := solveBracketed(fdf, lo, hi, 1e-15, opt.maxIterations())
	conv.Iterations = it
	if err != nil {
		conv.Reason = "profile equation: " + err.Error()
		return math.NaN(), conv
	}
	r, _ := fdf(k)
	conv.GradientNorm = math.Abs(r)
	conv.Converged = true
	return k, conv
}

// gammaFast is the complete-data fit from one pass over x (positiveScan:
// Σ x and Σ ln x as the log of a running product, with the range test),
// used when every value lies in [2⁻⁶⁴, 2⁶⁴) and the profile statistic
//
//	s = ln x̄ − mean ln x = ((n·e − E)/n)·ln 2 + ln(x̄·2⁻ᵉ) − F/n,
//
// (x̄ = m·2ᵉ with m ∈ [1, 2), Σ ln x = E·ln 2 + F; n·e − E is an exact
// integer, so the large parts of ln x̄ and mean ln x cancel without
// rounding) is known to relative error 2⁻⁴⁰: its absolute error is at
// most (32 + 4s)·2⁻⁵³ (x̄ within 8u, Σ ln x within (n+9)u, and the few
// roundings of the formula), so the route takes s ≥ 2⁻⁸ or so (shapes up
// to about 130). Clustered data (larger shapes, s near 0), where every
// digit of s matters, and all-equal data (s ≈ 0 by rounding) go to
// gammaMLESum's sums about x̄. The log-likelihood at the optimum is
// ll = n·c(k̂) − k̂·n·s − Σ ln x (β̂x̄ = k̂, c as in gammaStirlingC).
func gammaFast(x []float64, opt Options) (shape, rate, ll float64, conv Convergence, ok bool) {
	ps, ok := positiveScan(x)
	if !ok {
		return 0, 0, 0, conv, false
	}
	n := float64(len(x))
	xbar := ps.sum / n
	m, e := math.Frexp(xbar) // xbar = m·2^e, m ∈ [½, 1)
	m, e = 2*m, e-1
	s := float64(len(x)*e-ps.log.exp)/n*math.Ln2 + math.Log(m) - ps.log.frac/n
	if !(s > 0) || (32+4*s)*0x1p-53 > 0x1p-40*s {
		return 0, 0, 0, conv, false
	}
	k, conv := gammaSolveShape(s, opt)
	if !conv.Converged {
		return 0, 0, 0, conv, false
	}
	ll = n*gammaStirlingC(k) - k*n*s - ps.log.value()
	return k, k / xbar, ll, conv, true
}

func (f gammaFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if d.IsComplete() && len(opt.Fixed) == 0 && len(d.Exact) >= 2 {
		// One pass for Σ x, Σ ln x and Applicable's conditions (values
		// > 0; not all equal, since then s ≈ 0 fails gammaFast's test).
		if k, b, ll, conv, ok := gammaFast(d.Exact, opt); ok {
			fit := newFitOpt(f, d, opt)
			fit.setSolved(k, b, ll, conv)
			return fit, nil
		}
		if lo, hi, sum := scan4(d.Exact); lo > 0 && lo < hi {
			fit := newFitOpt(f, d, opt)
			fit.setSolved(gammaMLESum(d.Exact, sum, opt))
			return fit, nil
		}
	}
	if !quickApplicable(d, opt, 2, true) {
		if err := f.Applicable(d, opt.Fixed); err != nil {
			return nil, err
		}
	}
	fit := newFit(f, d)
	if d.IsComplete() {
		fit.setSolved(gammaMLE(d.Exact, opt))
		return fit, nil
	}
	newtonOK, newtonFailed := fitGammaCensored(fit, d, opt)
	if newtonOK {
		return fit, nil
	}
	k0, b0 := gammaRoughStart(d, opt)
	starts := [][]float64{{math.Log(k0), math.Log(b0)}, {0, math.Log(b0 / k0)}}
	toNatural := func(t []float64) []float64 { return []float64{math.Exp(t[0]), math.Exp(t[1])} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (log shape, log rate)")
	if newtonFailed != "" {
		censoredNewtonFallback(fit, newtonFailed)
	}
	return fit, nil
}

// gammaRoughStart is the (shape, rate) start of the censored routes: the
// complete-data fit to the values startSample takes, or shape 1 and the
// reciprocal of their mean where that fit fails, or (1, 1).
func gammaRoughStart(d *Data, opt Options) (k0, b0 float64) {
	k0, b0 = 1, 1
	if x := startSample(d, 2, true); len(x) >= 2 {
		if k, b, _, c := gammaMLE(x, opt); c.Converged && k < 1e6 {
			k0, b0 = k, b
		} else if m := sumOf(x) / float64(len(x)); m > 0 {
			b0 = 1 / m
		}
	}
	return k0, b0
}
