package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// GPD is the generalised Pareto distribution of the excesses over a fixed
// Threshold u, with scale Scale = σ > 0 and shape Shape = ξ (as in [GEV]):
//
//	S(x) = (1 + ξ(x − u)/σ)^(−1/ξ),  x ≥ u, 1 + ξ(x − u)/σ > 0,
//	f(x) = (1/σ)(1 + ξ(x − u)/σ)^(−1/ξ−1)
//
// (Pickands, 1975; Davison & Smith, 1990). With w = ln(1 + ξz)/ξ, z = (x−u)/σ
// (w = z at ξ = 0): ln f = −ln σ − (1+ξ)w and ln S = −w, exact through ξ = 0.
type GPD struct{ Scale, Shape, Threshold float64 }

// w returns the transformed excess and where x lies: -1 below the
// threshold, 1 beyond the upper endpoint (ξ < 0), 0 inside the support.
func (d GPD) w(x float64) (float64, int) {
	y := x - d.Threshold
	if y < 0 {
		return 0, -1
	}
	z := y / d.Scale
	if !(1+d.Shape*z > 0) {
		return 0, 1
	}
	w, _ := boxLog(d.Shape, z)
	return w, 0
}

func (d GPD) LogPDF(x float64) float64 {
	w, where := d.w(x)
	if where != 0 {
		return math.Inf(-1)
	}
	return -math.Log(d.Scale) - (1+d.Shape)*w
}

func (d GPD) LogCDF(x float64) float64 {
	w, where := d.w(x)
	switch where {
	case -1:
		return math.Inf(-1)
	case 1:
		return 0
	}
	return log1mExp(-w)
}

func (d GPD) LogSurvival(x float64) float64 {
	w, where := d.w(x)
	switch where {
	case -1:
		return 0
	case 1:
		return math.Inf(-1)
	}
	return -w
}

// Quantile: x = u + σ(e^(ξw) − 1)/ξ with w = −ln(1 − p).
func (d GPD) Quantile(p float64) float64 {
	if p < 0 || p > 1 || math.IsNaN(p) {
		return math.NaN()
	}
	return d.Threshold + d.Scale*expm1Over(d.Shape, -math.Log1p(-p))
}

func (d GPD) Rand(r *rand.Rand) float64 { return d.Quantile(uniformOpen01(r)) }

type gpdFamily struct{}

func init() { register(gpdFamily{}) }

// fixable: a project must fix its threshold: gpd models the excesses over it.
func (gpdFamily) fixable() (fixable, required []string) {
	return []string{"threshold"}, []string{"threshold"}
}

func (gpdFamily) Name() string         { return "gpd" }
func (gpdFamily) Parameters() []string { return []string{"scale", "shape", "threshold"} }
func (gpdFamily) Kind() Kind           { return Continuous }

// Support is x ≥ threshold, and x ≤ threshold − σ/ξ as well for ξ < 0.
func (gpdFamily) Support() string {
	return "x ≥ threshold (fixed)"
}
func (gpdFamily) Route() string {
	return "BFGS on (log scale, shape) of the excesses over the fixed threshold, analytic score, from moment, probability-weighted-moment, exponential and spread starts; shape ≤ −1 (unbounded likelihood) is searched for an interior local maximum; above 4000 complete values the starts run on a 2000-value subsample and the best is polished on all values; censored data: Newton on (log scale, shape) with analytic score and Hessian from the censored exponential fit (the starts above, best first, if that fails), the BFGS route if it fails or the shape runs to −1"
}

func (gpdFamily) New(p []float64) (Dist, error) {
	if len(p) != 3 {
		panic("fitters: gpd takes 3 parameters (scale, shape, threshold)")
	}
	if !(p[0] > 0) || !finiteParam(p[0]) || !finiteParam(p[1]) || !finiteParam(p[2]) {
		return nil, fmt.Errorf("gpd: need scale > 0, finite shape and threshold, got %v", p)
	}
	return GPD{p[0], p[1], p[2]}, nil
}

func (f gpdFamily) LogLik(p []float64, d *Data) float64 { return logLikOf(f, p, d) }

func (f gpdFamily) Applicable(d *Data, fixed Fixed) error {
	if err := checkFixedNames(f, fixed, "threshold"); err != nil {
		return err
	}
	u, ok := fixed["threshold"]
	if !ok {
		return inapplicable(f.Name(), "needs its threshold fixed (fixed = { gpd = { threshold = … } }): it models the excesses over it")
	}
	for _, v := range d.valuesView() {
		if v < u {
			return inapplicable(f.Name(), "needs every value ≥ the threshold %v, the data have %v", u, v)
		}
	}
	return needDistinct(f.Name(), d, 2)
}

// gpdNLL is −Σ ln f over the excesses y at θ = (ln σ, ξ) with its gradient,
// in one pass: with z = y/σ, t = 1 + ξz and w as in [GPD],
// ∂ln f/∂ln σ = −1 + (1+ξ)z/t and ∂ln f/∂ξ = −w − (1+ξ)∂w/∂ξ.
func gpdNLL(y []float64) exactNLL {
	return func(theta, g []float64) float64 {
		ls, xi := theta[0], theta[1]
		s := math.Exp(ls)
		var sw, szt, sdw float64
		for _, v := range y {
			z := v / s
			t := 1 + xi*z
			if !(t > 0) {
				return math.Inf(1)
			}
			w, dw := boxLog(xi, z)
			sw += w
			szt += z / t
			sdw += dw
		}
		n := float64(len(y))
		if g != nil {
			g[0] = n - (1+xi)*szt
			g[1] = sw + (1+xi)*sdw
		}
		return n*ls + (1+xi)*sw
	}
}

// gpdStarts returns starting values (ln σ, ξ) for excesses y: the method of
// moments, Hosking & Wallis's (1987) probability-weighted moments, the
// exponential (ξ = 0) and spread shapes ±0.3; negative shapes get a scale
// that keeps the largest excess inside the support.
func gpdStarts(y []float64) [][]float64 {
	mean, v := meanVar(y)
	_, ymax := minMax(y)
	var starts [][]float64
	add := func(sigma, xi float64) {
		xi = math.Max(-0.9, math.Min(0.9, xi))
		if xi < 0 && ymax >= sigma/-xi {
			sigma = 1.1 * ymax * -xi
		}
		if sigma > 0 && finiteParam(sigma) {
			starts = append(starts, []float64{math.Log(sigma), xi})
		}
	}
	if v > 0 {
		xi := 0.5 * (1 - mean*mean/v)
		add(mean*(1-xi), xi)
	}
	s := sortedStartSample(y)
	n := float64(len(s))
	var a1 float64
	for i, yi := range s {
		a1 += (1 - (float64(i)+0.65)/n) * yi
	}
	a1 /= n
	if d := mean - 2*a1; d != 0 {
		add(2*mean*a1/d, 2-mean/d)
	}
	add(mean, 0)
	add(mean*0.7, 0.3)
	add(mean*1.3, -0.3)
	return starts
}

func (f gpdFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	u := opt.Fixed["threshold"]
	fit := newFit(f, d)
	fit.Fixed[2], fit.K, fit.Estimates[2] = true, 2, u
	y := make([]float64, len(d.Exact))
	for i, x := range d.Exact {
		y[i] = x - u
	}
	excess := make([]float64, 0, d.N())
	for _, v := range d.valuesView() {
		excess = append(excess, v-u)
	}
	starts := gpdStarts(excess)
	// Censored data: Newton on (log scale, shape) first (gpd_censored.go).
	if ok, why := fitGPDCensored(fit, d, u, y, starts, opt); ok {
		return fit, nil
	} else if why != "" {
		defer censoredNewtonFallback(fit, why)
	}
	dist := func(t []float64) Dist { return GPD{math.Exp(t[0]), t[1], u} }
	sub, ratio := stagedSubproblem(d, y, 2, gpdNLL)
	o, staged := minimizeStaged(likelihoodProblem(2, gpdNLL(y), dist, d), sub, ratio, starts, opt)
	method := stagedMethod("BFGS on (log scale, shape)", staged)
	if o.theta == nil {
		fit.setOptimum(o, nil, method)
		return fit, nil
	}
	if o.theta[1] > -1 {
		fit.setOptimum(o, []float64{math.Exp(o.theta[0]), o.theta[1], u}, method)
		if o.theta[1] < -0.5 {
			fit.Note = "shape < −0.5: a regular local maximum, but the usual asymptotic standard errors do not hold (Smith, 1985)"
		}
		return fit, nil
	}
	// Shape ≤ −1: the likelihood grows without bound (ξ < −1) as the upper
	// endpoint u − σ/ξ reaches the largest value. Search ξ = −1 + e^s.
	inner := gpdNLL(y)
	toShape := func(t []float64) []float64 { return []float64{t[0], -1 + math.Exp(t[1])} }
	cprob := likelihoodProblem(2, func(t, g []float64) float64 {
		v := inner(toShape(t), g)
		if g != nil {
			g[1] *= math.Exp(t[1])
		}
		return v
	}, func(t []float64) Dist { return dist(toShape(t)) }, d)
	var cstarts [][]float64
	for _, s := range starts {
		cstarts = append(cstarts, []float64{s[0], math.Log(s[1] + 1)})
	}
	c := minimizeRestarted(cprob, cstarts, opt)
	const cmethod = "BFGS on (log scale, log(shape + 1))"
	// A converged unconstrained run with shape ≤ −1 whose upper endpoint
	// stays clear of the largest value is itself an interior local maximum.
	if sc, xi := math.Exp(o.theta[0]), o.theta[1]; o.converged && (c.theta == nil || !c.converged || o.negLogLik < c.negLogLik) {
		_, ymax := minMax(excess)
		if 1+xi*ymax/sc > 1e-6 {
			fit.setOptimum(o, []float64{sc, xi, u}, method)
			fit.Note = "shape ≤ −1: an interior local maximum; the likelihood is unbounded as the upper endpoint approaches the largest value, and the usual standard errors do not hold (Smith, 1985)"
			return fit, nil
		}
	}
	if c.theta != nil && c.converged && c.theta[1] > math.Log(1e-6) {
		xi := -1 + math.Exp(c.theta[1])
		fit.setOptimum(c, []float64{math.Exp(c.theta[0]), xi, u}, cmethod)
		fit.Note = "likelihood unbounded for shape < −1 (upper endpoint at the largest value); reported the largest local maximum with shape > −1; usual standard errors do not hold (Smith, 1985)"
		return fit, nil
	}
	fit.Convergence = Convergence{
		Method:      cmethod,
		Iterations:  o.iterations + c.iterations,
		Evaluations: o.evaluations + c.evaluations,
		Reason:      "non-regular likelihood: it grows without bound as shape < −1 and the upper endpoint approaches the largest value, and no local maximum with shape > −1 was found",
	}
	return fit, nil
}
