package infer

import (
	"fmt"
	"math"

	"fitseal/fitters"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/stat/distuv"
)

// Quantity names a derived quantity, as written in derived.csv.
type Quantity string

const (
	// Quantile at lower-tail probability p (a percentile; B10 life is p = 0.1).
	Quantile Quantity = "quantile"
	// ReturnLevel for return period T: the quantile at 1 − 1/T.
	ReturnLevel Quantity = "return_level"
	// Exceedance probability P(X > t) at threshold t.
	Exceedance Quantity = "exceedance"
)

// DerivedValue is one row of derived.csv.
type DerivedValue struct {
	Quantity Quantity
	Argument float64
	Estimate float64
	// StdError is the delta-method standard error (NaN when unavailable).
	StdError             float64
	Lower, Upper         float64
	LowerOpen, UpperOpen bool
	Method               string
	Note                 string
	// AboveFit is true when the profile found a log-likelihood above the
	// fit's: the fit is a local maximum, not the maximum.
	AboveFit bool
	// Positive is true when the quantity is positive by the family's
	// support (a positive quantile of a family with no mass at or below
	// 0: the delta method's log scale), so that a model average may take
	// its interval on the log scale too.
	Positive bool
}

// probability is the lower-tail probability of the quantile that q at
// arg is: arg for a quantile, 1 − 1/T for the return level of period T;
// NaN for an exceedance probability.
func (q Quantity) probability(arg float64) float64 {
	switch q {
	case Quantile:
		return arg
	case ReturnLevel:
		return 1 - 1/arg
	}
	return math.NaN()
}

// quantityFunc returns ψ(θ) for q at arg, checking arg.
func quantityFunc(fam fitters.Family, q Quantity, arg float64) (func(theta []float64) float64, error) {
	p := q.probability(arg)
	switch q {
	case Quantile:
		if !(arg > 0 && arg < 1) {
			return nil, fmt.Errorf("quantile probability must lie strictly between 0 and 1, got %v", arg)
		}
	case ReturnLevel:
		if !(arg > 1) || math.IsInf(arg, 1) {
			return nil, fmt.Errorf("return period must be a finite number above 1, got %v", arg)
		}
	case Exceedance:
		if math.IsNaN(arg) || math.IsInf(arg, 0) {
			return nil, fmt.Errorf("exceedance threshold must be a finite number, got %v", arg)
		}
		return func(theta []float64) float64 {
			d, err := fam.New(theta)
			if err != nil {
				return math.NaN()
			}
			return math.Exp(d.LogSurvival(arg))
		}, nil
	default:
		return nil, fmt.Errorf("unknown derived quantity %q: use quantile, return_level or exceedance", q)
	}
	continuous := fam.Kind() == fitters.Continuous
	return func(theta []float64) float64 {
		d, err := fam.New(theta)
		if err != nil {
			return math.NaN()
		}
		x := d.Quantile(p)
		if continuous && checkQuantile(d, p, x) != nil {
			return math.NaN()
		}
		return x
	}, nil
}

// quantileTolerance is how far ln F(x) (ln S(x) from p = ½ on) may lie
// from ln p (ln(1 − p)) at a reported p-quantile x: the tail probability
// within a relative 1e-6.
const quantileTolerance = 1e-6

// checkQuantile returns an error when x, a continuous distribution's
// computed p-quantile, does not give back p: when ln F(x) − ln p (below
// p = ½; ln(1 − p) − ln S(x) above) exceeds quantileTolerance in size and
// p's tail does not change sides within 64 ulps of x either (where the
// distribution is so narrow that neighbouring floats differ in F by more
// than the tolerance). A quantile that is ±Inf or NaN is left to the caller.
func checkQuantile(d fitters.Dist, p, x float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	gap := func(x float64) float64 {
		if p < 0.5 {
			return d.LogCDF(x) - math.Log(p)
		}
		return math.Log1p(-p) - d.LogSurvival(x)
	}
	g := gap(x)
	if math.Abs(g) <= quantileTolerance {
		return nil
	}
	h := 64 * 0x1p-52 * math.Max(math.Abs(x), 0x1p-1022)
	if gap(x-h) <= 0 && gap(x+h) >= 0 {
		return nil
	}
	f := math.Exp(d.LogCDF(x))
	return fmt.Errorf("the computed %v-quantile %v does not invert the CDF (F there is %.6g): the inversion failed, so no value is given", p, x, f)
}

// quantityScale is the scale of a derived quantity's Wald interval and
// profile: logit for an exceedance probability strictly between 0 and 1,
// log for a positive quantile of a family without mass at or below 0,
// natural otherwise.
func quantityScale(fam fitters.Family, fit *fitters.Fit, q Quantity, est float64) Scale {
	if q == Exceedance {
		if est > 0 && est < 1 {
			return Logit
		}
		return Natural
	}
	d, err := fam.New(fit.Estimates)
	if err == nil && est > 0 && math.IsInf(d.LogCDF(0), -1) {
		return Log
	}
	return Natural
}

// Derived returns a derived quantity of fit with an interval by method:
//
//   - Wald (delta method): t̂ ± z·se(t̂) with t = the quantity on its scale
//     (logit for a probability, log for a positive quantile),
//     se(t̂)² = ∇tᵀ Σ ∇t, Σ the inverse observed information and ∇t by
//     central finite differences (gonum/diff/fd) (Meeker & Escobar, 1998, §8.4).
//   - Profile likelihood: ℓp(ψ) = max ln L(θ) over the θ with ψ(θ) = ψ,
//     by reparameterisation: for each value of the other free parameters,
//     one free parameter (a location, else a scale, else the one to which ψ
//     is most sensitive; see solveFor) is solved for from ψ(θ) = ψ by
//     bracketed root finding, and the others are maximised over by BFGS
//     (no penalty, no Lagrange multiplier); the interval is
//     {ψ : ℓp(ψ) ≥ ℓ̂ − χ²₁(level)/2} (Coles, 2001, §4.3.3 for return levels).
//   - Bootstrap-t on the same scale as the delta method: the pivots
//     t*ᵣ = (t(ψ*ᵣ) − t̂)/se*ᵣ over the replicates, se*ᵣ the delta-method
//     standard error at replicate r's refit from its own observed
//     information, give t⁻¹(t̂ − t*₍₍₁₊L₎/₂₎·se(t̂), t̂ − t*₍₍₁₋L₎/₂₎·se(t̂))
//     (Efron & Tibshirani, 1993, §12.5; Davison & Hinkley, 1997, §5.2.1);
//     percentiles of ψ over the replicates when the estimate has no
//     standard error (see Intervals).
//
// A quantile of a discrete family is a step function of the parameters,
// so it has no delta-method standard error and gets bootstrap percentile
// intervals only. A fit at a limiting family that the family's New cannot
// take (betabinomial's binomial limit) gives the limit's value with no
// interval (limitDerived); a family of excesses over u (gpd) notes what its
// value is conditional on and how to make it unconditional (excessNote).
func Derived(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, q Quantity, arg float64, method Method, s Settings) (DerivedValue, error) {
	if n, ok := commonTrials(d.Trials); ok {
		// Every observation has the same number of trials: the quantity is
		// that of the member with those trials.
		fam = withCommonTrials{fam, n}
	}
	v, err := derived(fam, fit, d, q, arg, method, s)
	if u, ok := excessThreshold(fam, fit); ok && err == nil && !math.IsNaN(v.Estimate) {
		v.Note = fitters.JoinNote(v.Note, excessNote(fam.Name(), q, arg, u))
	}
	return v, err
}

// excessNote says what a derived quantity of a family of excesses over u
// (gpd: X − u given X > u) is conditional on, and what would make it
// unconditional. With ζ = P(X > u), the chance of exceeding u, which the
// values above u alone do not give:
//
//   - exceedance: P(X > t) = ζ·P(X > t | X > u) for t ≥ u; below u the
//     conditional probability is 1 and says nothing of P(X > t).
//   - quantile: P(X > x) = ζ·P(X > x | X > u) = 1 − p gives the
//     unconditional p-quantile as the conditional quantile at
//     1 − (1 − p)/ζ, for p > 1 − ζ (a lower quantile lies below u).
//   - return level: the conditional quantile at 1 − 1/T is the level
//     exceeded on average once in T values above u, not once in T years;
//     with λ values above u a year on average (the rate of exceedances),
//     the level exceeded on average once in T years is the conditional
//     quantile at 1 − 1/(λT), the return level for period λT
//     (Coles, 2001, §4.3.3).
func excessNote(family string, q Quantity, arg, u float64) string {
	models := fmt.Sprintf("%s models the excesses over its threshold %v", family, u)
	switch q {
	case Exceedance:
		if arg < u {
			return fmt.Sprintf("P(X > %v | X > %v), which is 1: %s, and %v lies below it, so it says nothing of P(X > %v) unconditionally", arg, u, models, arg, arg)
		}
		return fmt.Sprintf("P(X > %v | X > %v): %s, so the unconditional P(X > %v) is this times P(X > %v), the chance of exceeding %v", arg, u, models, arg, u, u)
	case Quantile:
		return fmt.Sprintf("of X given X > %v: %s, so the unconditional %v-quantile is this family's quantile at 1 − (1 − %v)/ζ, ζ = P(X > %v) being the chance of exceeding %v (for %v above 1 − ζ: a lower quantile lies below %v, where %s says nothing)", u, models, arg, arg, u, u, arg, u, family)
	case ReturnLevel:
		return fmt.Sprintf("of X given X > %v: %s, so this is the level exceeded on average once in %v values above %v, not once in %v years: with λ values above %v a year on average (the rate of exceedances), the %v-year return level is this family's return level for period λ·%v, its quantile at 1 − 1/(λ·%v)", u, models, arg, u, arg, u, arg, arg, arg)
	}
	return "of X given X > " + fmt.Sprint(u) + ": " + models
}

// excessThreshold is the threshold u whose excesses fit models
// (fitters.ModelsExcesses: gpd, or weibull3 and lognormal3 with the
// threshold fixed), so that its quantities are conditional on X > u.
func excessThreshold(fam fitters.Family, fit *fitters.Fit) (float64, bool) {
	for i, name := range fit.Parameters {
		if name == "threshold" {
			fixed := i < len(fit.Fixed) && fit.Fixed[i]
			return fit.Estimates[i], fitters.ModelsExcesses(fam.Name(), fixed)
		}
	}
	return 0, false
}

// commonTrials is the number of trials every observation shares, when
// there are trials and they are all equal.
func commonTrials(t []int) (int, bool) {
	if len(t) == 0 {
		return 0, false
	}
	for _, n := range t[1:] {
		if n != t[0] {
			return 0, false
		}
	}
	return t[0], true
}

// withCommonTrials is a binomial-type family whose members (New) have n
// trials, so that a quantile or exceedance probability is that of the
// observations' common number of trials.
type withCommonTrials struct {
	fitters.Family
	n int
}

func (f withCommonTrials) New(theta []float64) (fitters.Dist, error) {
	d, err := f.Family.New(theta)
	if err != nil {
		return nil, err
	}
	if dn, ok := withTrials(d, f.n); ok {
		return dn, nil
	}
	return d, nil
}

// limitMember is the distribution of one observation under a fit that
// reached its limiting family where fam.New cannot take the infinite
// estimates (fitters.LimitDist: betabinomial's α, β → ∞ with α/(α+β) = p̂
// is the binomial with p̂ = Σk/Σn), with the observations' common number
// of trials; false for any other fit, or without a common number of trials.
func limitMember(fam fitters.Family, fit *fitters.Fit, d *fitters.Data) (fitters.Dist, bool) {
	common, ok := fam.(withCommonTrials)
	if !ok {
		return nil, false
	}
	lim, ok := fitters.LimitDist(common.Family, fit, d)
	if !ok {
		return nil, false
	}
	return withTrials(lim, common.n)
}

// limitDerived sets out's estimate to the quantity of lim, the limiting
// family a fit reached: its quantile at q's probability (the smallest k
// with P(X ≤ k) ≥ p for a count), or P(X > arg). Its intervals are left
// empty, and the note says why: at the limit the likelihood has no
// curvature or profile in the original parameters, and an interval of
// the limit alone (the binomial's p with no overdispersion) would take the
// limit as known and leave out the chance of overdispersion, which the
// data do not rule out by being at the limit.
func limitDerived(out *DerivedValue, lim fitters.Dist, fit *fitters.Fit, q Quantity, arg float64) {
	if q == Exceedance {
		out.Estimate = math.Exp(lim.LogSurvival(arg))
	} else {
		out.Estimate = lim.Quantile(q.probability(arg))
	}
	what := "the limit's"
	if b, ok := lim.(fitters.Binomial); ok {
		what = fmt.Sprintf("the binomial's with p = alpha/(alpha+beta) = %v and %d trials", b.P, b.Trials)
	}
	out.Note = fmt.Sprintf("%s: the fit is at its limiting family, so the value is %s; no interval: the likelihood has no curvature or profile at the limit, "+
		"and an interval of the limit alone would take it as known and leave out the chance of overdispersion", limitParameter(fit), what)
}

func derived(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, q Quantity, arg float64, method Method, s Settings) (DerivedValue, error) {
	level, err := s.level()
	if err != nil {
		return DerivedValue{}, err
	}
	g, err := quantityFunc(fam, q, arg)
	if err != nil {
		return DerivedValue{}, err
	}
	nan := math.NaN()
	out := DerivedValue{Quantity: q, Argument: arg, Estimate: nan, StdError: nan, Lower: nan, Upper: nan}
	switch method {
	case MethodWald:
		out.Method = "delta method"
	case MethodProfile:
		out.Method = "profile likelihood"
	case MethodBootstrap:
		out.Method = "bootstrap-t"
	default:
		return out, fmt.Errorf("unknown interval method %q", method)
	}
	if !fit.Converged {
		out.Note = "the fit did not converge: no estimate"
		return out, nil
	}
	if _, common := fam.(withCommonTrials); d.Trials != nil && !common {
		out.Note = "the observations have different numbers of trials, so the quantity has no single value: not given"
		return out, nil
	}
	if lim, ok := limitMember(fam, fit, d); ok {
		limitDerived(&out, lim, fit, q, arg)
		return out, nil
	}
	out.Estimate = g(fit.Estimates)
	if math.IsNaN(out.Estimate) && q != Exceedance && fam.Kind() == fitters.Continuous {
		// g refused a quantile that does not invert the CDF: say why.
		if dist, err := fam.New(fit.Estimates); err == nil {
			p := q.probability(arg)
			if err := checkQuantile(dist, p, dist.Quantile(p)); err != nil {
				out.Note = err.Error()
				return out, nil
			}
		}
	}
	if math.IsNaN(out.Estimate) {
		out.Note = "the quantity is not defined for this fit"
		return out, nil
	}
	if limit := atLimit(fit); limit != "" && method != MethodBootstrap {
		out.Note = limit
		return out, nil
	}
	if q == Exceedance && (out.Estimate == 0 || out.Estimate == 1) && method != MethodBootstrap {
		out.Note = fmt.Sprintf("P(X > %v) is exactly %v at the estimates: the threshold lies outside the fitted support; no interval", arg, out.Estimate)
		return out, nil
	}
	discreteQuantile := fam.Kind() == fitters.Discrete && q != Exceedance
	sc := quantityScale(fam, fit, q, out.Estimate)
	out.Positive = q != Exceedance && sc == Log
	free := freeIndices(fit)

	// The delta method's gradient and standard error, used by Wald, for the
	// profile's step and the choice of the parameter solved for.
	// A quantile that is itself a numerical inversion is differentiated
	// and profiled through the CDF at its probability.
	viaCDF := solvedViaCDF(fam, q)
	prob := q.probability(arg)
	// gradientAt is ∂t/∂θ at θ where the quantity is psi.
	gradientAt := func(theta []float64, psi float64, info *Information) []float64 {
		if viaCDF {
			if gr := quantileGradient(fam, prob, psi, sc, theta, free, info); gr != nil {
				return gr
			}
		}
		return quantityGradient(g, sc, theta, free, info)
	}
	var grad []float64
	seT := nan
	info, infoErr := s.information(fam, fit, d)
	if !discreteQuantile {
		grad = gradientAt(fit.Estimates, out.Estimate, info)
		if infoErr == nil && info != nil && info.Covariance != nil {
			var v float64
			for a := range free {
				for b := range free {
					v += grad[a] * info.Covariance.At(a, b) * grad[b]
				}
			}
			if v >= 0 {
				seT = math.Sqrt(v)
				out.StdError = seT * math.Abs(sc.Deriv(out.Estimate))
			}
		}
	}
	switch method {
	case MethodWald:
		out.Method = fmt.Sprintf("delta method (%s scale)", sc)
		switch {
		case discreteQuantile:
			out.Note = "a quantile of a discrete family is a step function of the parameters: no delta-method interval"
		case infoErr != nil:
			out.Note = infoErr.Error()
		case math.IsNaN(seT):
			out.Note = "the delta-method variance is not available"
		default:
			z := distuv.UnitNormal.Quantile(0.5 + level/2)
			t := sc.To(out.Estimate)
			out.Lower, out.Upper = sc.From(t-z*seT), sc.From(t+z*seT)
		}
	case MethodProfile:
		if discreteQuantile {
			out.Note = "a quantile of a discrete family is a step function of the parameters: no profile interval"
			break
		}
		if len(free) == 0 {
			out.Note = "no free parameters"
			break
		}
		p, j := quantityProfiler(fam, fit, s.logLik(fam, d), g, quantityGap(fam, q, prob), sc, grad, info)
		guardIrregular(p, fam, fit, d)
		vhat := sc.To(out.Estimate)
		step := seT
		if !(step > 0) || math.IsInf(step, 0) {
			step = 0.1 * math.Max(1, math.Abs(vhat))
		}
		lo, hi := sc.Bounds()
		lb, ub := p.interval(vhat, fit.LogLik, step, chiSquareCut(level), spanOf(sc), sc.From, lo, hi)
		out.Lower, out.LowerOpen = lb.Value, lb.Open
		out.Upper, out.UpperOpen = ub.Value, ub.Open
		out.Method = fmt.Sprintf("profile likelihood (solved for %s)", fit.Parameters[j])
		out.Note = fitters.JoinNote(lowerNote(lb.Note), upperNote(ub.Note))
		out.AboveFit = lb.AboveFit || ub.AboveFit
	case MethodBootstrap:
		rep, err := s.replicates(fam, fit, d)
		if err != nil {
			out.Note = err.Error()
			break
		}
		bootstrapDerived(&out, rep, g, gradientAt, sc, free, seT, infoErr, discreteQuantile, level)
	}
	return out, nil
}

// gradientSteps are quantityGradient's steps: 1e-4 standard errors, or
// 1e-6·|θ| without an information matrix.
func gradientSteps(est []float64, free []int, info *Information) []float64 {
	step := make([]float64, len(free))
	for a, i := range free {
		step[a] = 1e-6 * math.Max(math.Abs(est[i]), 1e-3)
		if info != nil {
			if se := info.StdErrors[i]; se > 0 && !math.IsInf(se, 0) {
				step[a] = 1e-4 * se
			}
		}
	}
	return step
}

// quantityGradient returns ∂t/∂θ over the free parameters, t = sc.To(g(θ)),
// by central differences with gradientSteps.
func quantityGradient(g func([]float64) float64, sc Scale, est []float64, free []int, info *Information) []float64 {
	step := gradientSteps(est, free, info)
	theta := append([]float64(nil), est...)
	f := func(u []float64) float64 {
		for a, i := range free {
			theta[i] = est[i] + step[a]*u[a]
		}
		return sc.To(g(theta))
	}
	grad := make([]float64, len(free))
	fd.Gradient(grad, f, make([]float64, len(free)), &fd.Settings{Formula: fd.Central, Step: 1})
	for a := range grad {
		grad[a] /= step[a]
	}
	return grad
}

// quantileGradient is quantityGradient for q = ψ(θ), the p-quantile of a
// family in numericQuantile, by implicit differentiation of F(q(θ); θ) = p:
// ∂q/∂θ = −(∂F/∂θ)/f(q), with ∂F/∂θ = p·∂ln F/∂θ below p = ½ and
// −(1 − p)·∂ln S/∂θ from it on, ln F or ln S at the fixed q by central
// differences with gradientSteps; ∂t/∂θ = (∂q/∂θ)/sc.Deriv(q). It costs
// two tail evaluations per parameter where quantityGradient inverts the
// CDF twice per parameter. nil where a value is not finite (the caller
// then uses quantityGradient).
func quantileGradient(fam fitters.Family, p, q float64, sc Scale, est []float64, free []int, info *Information) []float64 {
	dist, err := fam.New(est)
	if err != nil {
		return nil
	}
	density := math.Exp(dist.LogPDF(q))
	dtdq := 1 / sc.Deriv(q)
	if !(density > 0) || math.IsInf(density, 0) || math.IsNaN(dtdq) || math.IsInf(dtdq, 0) {
		return nil
	}
	tail := func(theta []float64) float64 {
		d, err := fam.New(theta)
		if err != nil {
			return math.NaN()
		}
		if p < 0.5 {
			return d.LogCDF(q)
		}
		return d.LogSurvival(q)
	}
	weight := -p // ∂q/∂θ = weight·∂(ln F or ln S)/∂θ / f(q)
	if p >= 0.5 {
		weight = 1 - p
	}
	step := gradientSteps(est, free, info)
	theta := append([]float64(nil), est...)
	grad := make([]float64, len(free))
	for a, i := range free {
		theta[i] = est[i] + step[a]
		up := tail(theta)
		theta[i] = est[i] - step[a]
		down := tail(theta)
		theta[i] = est[i]
		grad[a] = weight * (up - down) / (2 * step[a]) / density * dtdq
		if math.IsNaN(grad[a]) || math.IsInf(grad[a], 0) {
			return nil
		}
	}
	return grad
}

// numericQuantile lists the continuous families whose Quantile inverts
// the CDF numerically (some dozens of CDF evaluations): their quantiles'
// profiles solve the constraint through the CDF instead (tailGap).
var numericQuantile = map[string]bool{"gamma": true, "invgauss": true, "beta": true, "studentt": true}

// tailGap returns the constraint "the p-quantile is x" of a continuous
// family through its CDF: ln F(x) − ln p below p = ½, ln(1 − p) − ln S(x)
// from it on (the smaller tail keeps its digits), zero exactly where the
// p-quantile is x, positive where it lies below x. It costs one CDF
// evaluation where the quantile costs a numerical inversion: the family's
// CDFTails where it has one (the routine behind the EDF statistics, with
// the inverse Gaussian's upper tail by the short quadrature: a fifth of
// LogSurvival's cost there), else LogCDF or LogSurvival.
func tailGap(fam fitters.Family, p float64) func(theta []float64, x float64) float64 {
	lp, lq := math.Log(p), math.Log1p(-p)
	return func(theta []float64, x float64) float64 {
		dist, err := fam.New(theta)
		if err != nil {
			return math.NaN()
		}
		if t, ok := dist.(fitters.CDFTailer); ok {
			_, lf, ls := t.CDFTails(x)
			if p < 0.5 {
				return lf - lp
			}
			return lq - ls
		}
		if p < 0.5 {
			return dist.LogCDF(x) - lp
		}
		return lq - dist.LogSurvival(x)
	}
}

// quantityGap is the CDF form of q's constraint (tailGap) for a quantile
// or return level of a family in numericQuantile, nil otherwise (the
// constraint is then ψ(θ) = v itself).
func quantityGap(fam fitters.Family, q Quantity, prob float64) func(theta []float64, x float64) float64 {
	if solvedViaCDF(fam, q) {
		return tailGap(fam, prob)
	}
	return nil
}

// solvedViaCDF reports whether q of fam is differentiated and profiled
// through the CDF at its probability: a quantile or return level of a
// family whose quantile is itself a numerical inversion.
func solvedViaCDF(fam fitters.Family, q Quantity) bool {
	return numericQuantile[fam.Name()] && q != Exceedance
}

// quantityProfiler builds the profiler of a derived quantity and returns
// the index of the parameter it solves for. At each point the parameter
// solved for meets the constraint ψ(θ) = v on the quantity's scale, or,
// given gap (a quantile of a family in numericQuantile), the equivalent
// gap(θ, x) = 0 at the quantity's value x = sc.From(v): the two change
// sign together, so the searches find the same root, or fail together
// where none is in reach (an inverse Gaussian's quantile is bounded in its
// mean, say). loglik is fam's log-likelihood on the data (fitters.LogLikFunc).
func quantityProfiler(fam fitters.Family, fit *fitters.Fit, loglik func([]float64) float64, g func([]float64) float64, gap func([]float64, float64) float64, sc Scale, grad []float64, info *Information) (*profiler, int) {
	est := fit.Estimates
	scales := scalesOf(fam, est)
	free := freeIndices(fit)
	// The parameter solved for: a location, else a scale-type parameter
	// (these move a quantile or an exceedance probability over its whole
	// range with the others held), else the one with the largest
	// |∂t/∂θⱼ|·se(θ̂ⱼ).
	bestA := -1
	for _, name := range solveFor(fam.Name()) {
		for a, i := range free {
			if fam.Parameters()[i] == name && grad[a] != 0 && !math.IsNaN(grad[a]) && !math.IsInf(grad[a], 0) && bestA < 0 {
				bestA = a
			}
		}
	}
	preferred := bestA >= 0
	if bestA < 0 {
		best := -1.0
		for a, i := range free {
			w := math.Abs(grad[a])
			if info != nil && info.StdErrors[i] > 0 {
				w *= info.StdErrors[i]
			} else {
				w *= math.Abs(scales[i].Deriv(est[i]))
			}
			if w > best {
				best, bestA = w, a
			}
		}
	}
	bestA = max(bestA, 0)
	j := free[bestA]
	var others []int
	for _, i := range free {
		if i != j {
			others = append(others, i)
		}
	}
	u0 := make([]float64, len(others))
	for a, i := range others {
		u0[a] = scales[i].To(est[i])
	}
	stepJ := 0.1 * math.Max(1, math.Abs(scales[j].To(est[j])))
	if info != nil {
		if se := info.StdErrors[j] / math.Abs(scales[j].Deriv(est[j])); se > 0 && !math.IsInf(se, 0) {
			stepJ = se
		}
	}
	warm := scales[j].To(est[j])
	slope := math.NaN() // dh/dt at the last root, the next solve's first secant
	// Solving for a parameter of the sensitivity rule, the constraint may
	// have a second root (onBranch): keep to the branch through the MLE,
	// where h = ψ − v rises with t as ψ rises with θⱼ (the scales are
	// increasing) and gap falls.
	rising := 0.0
	if gr := grad[bestA]; !preferred && gr != 0 && !math.IsNaN(gr) && !math.IsInf(gr, 0) {
		rising = math.Copysign(1, gr)
	}
	if gap != nil {
		rising = -rising
	}
	probe := 1e-3 * stepJ
	p := &profiler{
		fam: fam, u0: u0, loglik: loglik,
		theta: append([]float64(nil), est...),
	}
	p.build = func(v float64, u, theta []float64) bool {
		fromScales(theta, u, u0, est, others, scales)
		// h is the constraint at v as a function of tⱼ.
		var h func(t float64) float64
		if gap != nil {
			x := sc.From(v)
			h = func(t float64) float64 {
				theta[j] = scales[j].From(t)
				r := gap(theta, x)
				if math.IsInf(r, 0) {
					// A tail that underflows still says on which side
					// of x the quantile lies.
					r = math.Copysign(math.MaxFloat64, r)
				}
				return r
			}
		} else {
			h = func(t float64) float64 {
				theta[j] = scales[j].From(t)
				return sc.To(g(theta)) - v
			}
		}
		tj, s, ok := solveNear(h, warm, stepJ, slope)
		if !ok && p.irregular {
			// An irregular family's constraint may be undefined at the
			// last root with these other parameters (a quantile on the log
			// scale below a threshold moved far down): solve again from
			// the nearest point where it is defined.
			tj, s, ok = solveFromDefined(h, warm, stepJ)
		}
		if !ok || !onBranch(h, tj, probe, rising) {
			return false
		}
		warm, slope = tj, s
		theta[j] = scales[j].From(tj)
		return finite(theta) && regular(fam, theta)
	}
	return p, j
}

// solveFromDefined is solveNear started from the point nearest t0, among
// t0 ± step·2ᵏ (k < 40), where h is finite.
func solveFromDefined(h func(float64) float64, t0, step float64) (float64, float64, bool) {
	for k := range 40 {
		for _, dir := range []float64{1, -1} {
			t := t0 + dir*step*math.Ldexp(1, k)
			if v := h(t); !math.IsNaN(v) && !math.IsInf(v, 0) {
				return solveNear(h, t, step, math.NaN())
			}
		}
	}
	return math.NaN(), math.NaN(), false
}

// onBranch reports whether a root t of h lies on the branch of the
// constraint through the MLE, where h rises with t for rising > 0 and
// falls for rising < 0 (0: no check), judged from h at t ± d. A quantile
// need not be monotone in the parameter solved for when no location or
// scale-type parameter can be (solveFor): an inverse Gaussian's upper
// quantile with its mean held rises as the shape falls, peaks, and falls
// again, so "the 0.99-quantile is x" has a second root at a tiny shape, a
// distribution the data rule out by thousands of log-likelihood units. A
// profile that took that root would fall off a cliff and put a bound
// there. (The secant's own slope is no guide: from a start already at the
// root it is rounding noise.)
func onBranch(h func(float64) float64, t, d, rising float64) bool {
	if rising == 0 {
		return true
	}
	return !((h(t+d)-h(t-d))*rising < 0)
}

// solveFor lists, in order of preference, the parameters a derived
// quantity's profile solves for. Pareto's scale sits at the sample minimum,
// so its shape is solved for; an inverse Gaussian's mean alone cannot reach
// every quantile, so it falls to the sensitivity rule.
func solveFor(family string) []string {
	switch family {
	case "pareto":
		return []string{"shape"}
	case "negbinomial":
		return []string{"mean"}
	case "invgauss":
		return nil
	}
	return []string{"location", "mu", "scale", "sigma", "rate"}
}

// solveNear finds a root of h near t0 and returns it with the slope of h
// there (NaN when unknown), given step, the scale of t's uncertainty, and
// slope, h's slope at the previous root (NaN for none).
//
// It first takes secant steps (secantNear): a quantile on its scale is
// linear in a location, or in the log of a scale, so from the previous
// root's slope the first step lands on the root and the second confirms
// it. Should they fail, it widens a search around t0 by doubling steps on
// both sides until h changes sign (at most 60 times), then refines the
// bracket by regula falsi to 1e-14·max(1, |t|).
func solveNear(h func(float64) float64, t0, step, slope float64) (float64, float64, bool) {
	h0 := h(t0)
	if h0 == 0 {
		return t0, slope, true
	}
	if math.IsNaN(h0) || math.IsInf(h0, 0) {
		return math.NaN(), math.NaN(), false
	}
	if t, s, ok := secantNear(h, t0, h0, step, slope); ok {
		return t, s, true
	}
	downOK, upOK := true, true
	for k := 0; k < 60 && (downOK || upOK); k++ {
		delta := step * math.Ldexp(1, k)
		for _, dir := range []float64{-1, 1} {
			if (dir < 0 && !downOK) || (dir > 0 && !upOK) {
				continue
			}
			t := t0 + dir*delta
			ht := h(t)
			if math.IsNaN(ht) || math.IsInf(ht, 0) {
				if dir < 0 {
					downOK = false
				} else {
					upOK = false
				}
				continue
			}
			if (ht > 0) != (h0 > 0) {
				a, ha := t0, h0
				if k > 0 {
					a = t0 + dir*delta/2
					if ha = h(a); (ha > 0) == (ht > 0) {
						a, ha = t0, h0
					}
				}
				r, ok := findRoot(h, a, t, ha, ht, 1e-14, 0, 300)
				return r, math.NaN(), ok
			}
		}
	}
	return math.NaN(), math.NaN(), false
}

// secantTries bounds the secant steps of secantNear (a variable so that a
// test can compare the intervals found with none).
var secantTries = 8

// secantNear takes secant steps from t0 (h0 = h(t0) ≠ 0): the first along
// slope when it is finite and nonzero, else a trial step of step/16 towards
// the root, should h rise with t. It returns the root and h's slope there
// once a step is at most 1e-14·max(1, |t|) — the same resolution as
// solveNear's bracket — and fails (ok false) on a value that is not finite,
// a flat or infinite secant, a root farther than 8 steps from t0 or no
// convergence in secantTries evaluations; solveNear then brackets the root
// instead.
func secantNear(h func(float64) float64, t0, h0, step, slope float64) (float64, float64, bool) {
	ta, ha := t0, h0
	tb := t0 - math.Copysign(step/16, h0)
	if slope != 0 && !math.IsNaN(slope) && !math.IsInf(slope, 0) {
		tb = t0 - h0/slope
	}
	for range secantTries {
		if math.IsNaN(tb) || math.Abs(tb-t0) > 8*step {
			break
		}
		hb := h(tb)
		if math.IsNaN(hb) || math.IsInf(hb, 0) || hb == ha {
			break
		}
		s := (hb - ha) / (tb - ta)
		if math.IsInf(s, 0) {
			break // values near ±MaxFloat64 on both sides: no usable slope
		}
		if hb == 0 {
			return tb, s, true
		}
		tc := tb - hb/s
		if math.Abs(tc-tb) <= 1e-14*math.Max(1, math.Abs(tc)) {
			return tc, s, true
		}
		ta, ha, tb = tb, hb, tc
	}
	return math.NaN(), math.NaN(), false
}
