package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// GEV is the generalised extreme-value distribution of block maxima with
// location Location, scale Scale > 0 and shape Shape = ξ (ξ > 0 the heavy
// Fréchet tail, ξ = 0 Gumbel, ξ < 0 the bounded Weibull-type tail):
//
//	F(x) = exp(−(1 + ξz)^(−1/ξ)),  z = (x − μ)/σ,  1 + ξz > 0,
//	f(x) = (1/σ)(1 + ξz)^(−1/ξ−1) exp(−(1 + ξz)^(−1/ξ))
//
// (Jenkinson, 1955; Coles, 2001, §3.1.3). Written with y = ln(1+ξz)/ξ
// (y = z at ξ = 0), ln f = −ln σ − (1+ξ)y − e^(−y) and ln F = −e^(−y),
// which stays exact through ξ = 0.
type GEV struct{ Location, Scale, Shape float64 }

// y returns the transformed value and whether x is inside the support.
func (d GEV) y(x float64) (float64, bool) {
	z := (x - d.Location) / d.Scale
	if !(1+d.Shape*z > 0) {
		return 0, false
	}
	y, _ := boxLog(d.Shape, z)
	return y, true
}

func (d GEV) LogPDF(x float64) float64 {
	y, ok := d.y(x)
	if !ok {
		return math.Inf(-1)
	}
	return -math.Log(d.Scale) - (1+d.Shape)*y - math.Exp(-y)
}

func (d GEV) LogCDF(x float64) float64 {
	y, ok := d.y(x)
	if !ok {
		if d.Shape > 0 {
			return math.Inf(-1) // below the lower endpoint
		}
		return 0 // above the upper endpoint
	}
	return -math.Exp(-y)
}

func (d GEV) LogSurvival(x float64) float64 {
	y, ok := d.y(x)
	if !ok {
		if d.Shape > 0 {
			return 0
		}
		return math.Inf(-1)
	}
	return logOneMinusExpExp(y)
}

// logOneMinusExpExp returns ln(1 − exp(−e^(−y))), the log survival of the
// extreme-value families, without underflow: −y when e^(−y) is negligible.
func logOneMinusExpExp(y float64) float64 {
	if y > 700 {
		return -y
	}
	return log1mExp(-math.Exp(-y))
}

// Quantile inverts F: x = μ + σ(e^(ξy) − 1)/ξ with y = −ln(−ln p).
func (d GEV) Quantile(p float64) float64 {
	if p < 0 || p > 1 || math.IsNaN(p) {
		return math.NaN()
	}
	y := -math.Log(-math.Log(p))
	return d.Location + d.Scale*expm1Over(d.Shape, y)
}

// expm1Over returns (e^(ξy) − 1)/ξ, y at ξ = 0.
func expm1Over(xi, y float64) float64 {
	if xi == 0 {
		return y
	}
	if math.IsInf(y, 0) {
		switch {
		case y > 0 && xi < 0, y < 0 && xi > 0:
			return -1 / xi // the finite endpoint
		}
		return y
	}
	return math.Expm1(xi*y) / xi
}

func (d GEV) Rand(r *rand.Rand) float64 { return d.Quantile(uniformOpen01(r)) }

// uniformOpen01 draws a uniform variate strictly inside (0, 1).
func uniformOpen01(r *rand.Rand) float64 {
	return (float64(r.Uint64()>>11) + 0.5) / (1 << 53)
}

type gevFamily struct{}

func init() { register(gevFamily{}) }

func (gevFamily) Name() string         { return "gev" }
func (gevFamily) Parameters() []string { return []string{"location", "scale", "shape"} }
func (gevFamily) Kind() Kind           { return Continuous }

// Support is where 1 + ξ(x − μ)/σ > 0: bounded below for ξ > 0, above for
// ξ < 0, the real line for ξ = 0.
func (gevFamily) Support() string {
	return "1 + shape·(x − location)/scale > 0"
}
func (gevFamily) Route() string {
	return "BFGS on (location, log scale, shape) with analytic score from probability-weighted-moment, Gumbel and spread starts; shape < −1 (unbounded likelihood) is searched for an interior local maximum; above 4000 complete values the starts run on a 2000-value subsample and the best is polished on all values; censored data: Newton on (location, log scale, shape) with analytic score and Hessian from the better of the probability-weighted-moment and Gumbel starts, the BFGS route if it fails or the shape runs to −1"
}

func (gevFamily) New(p []float64) (Dist, error) {
	if len(p) != 3 {
		panic("fitters: gev takes 3 parameters")
	}
	if !finiteParam(p[0]) || !(p[1] > 0) || !finiteParam(p[1]) || !finiteParam(p[2]) {
		return nil, fmt.Errorf("gev: need finite location, scale > 0 and finite shape, got %v", p)
	}
	return GEV{p[0], p[1], p[2]}, nil
}

func finiteParam(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func (f gevFamily) LogLik(p []float64, d *Data) float64 { return logLikOf(f, p, d) }

func (f gevFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 3)
}

// gevNLL is −Σ ln f over x at θ = (μ, ln σ, ξ) and its gradient, in one pass:
// with y as in [GEV], a = ∂ln f/∂z = (e^(−y) − 1 − ξ)/(1 + ξz),
// ∂ln f/∂μ = −a/σ, ∂ln f/∂ln σ = −1 − a z, ∂ln f/∂ξ = −y + (e^(−y) − 1 − ξ)∂y/∂ξ.
func gevNLL(x []float64) exactNLL {
	return func(theta, g []float64) float64 {
		mu, ls, xi := theta[0], theta[1], theta[2]
		s := math.Exp(ls)
		var sum, gmu, gls, gxi float64
		for _, v := range x {
			z := (v - mu) / s
			t := 1 + xi*z
			if !(t > 0) {
				return math.Inf(1)
			}
			y, dy := boxLog(xi, z)
			e := math.Exp(-y)
			sum += (1+xi)*y + e
			dl := e - 1 - xi
			a := dl / t
			gmu += a
			gls += a * z
			gxi += dl*dy - y
		}
		n := float64(len(x))
		if g != nil {
			g[0] = gmu / s
			g[1] = n + gls
			g[2] = -gxi
		}
		return n*ls + sum
	}
}

// gevStarts returns starting values (μ, ln σ, ξ): Hosking, Wallis & Wood's
// (1985) probability-weighted-moment estimator, the Gumbel moment fit, and
// the latter with shapes ±0.2 and 0.5.
func gevStarts(values []float64) [][]float64 {
	x := sortedStartSample(values)
	n := float64(len(x))
	mean, v := meanVar(x)
	sd := math.Max(math.Sqrt(v), 1e-300)
	var starts [][]float64
	if len(x) >= 3 {
		var b0, b1, b2 float64
		for i, xi := range x {
			fi := float64(i)
			b0 += xi
			b1 += fi / (n - 1) * xi
			b2 += fi * (fi - 1) / ((n - 1) * (n - 2)) * xi
		}
		b0, b1, b2 = b0/n, b1/n, b2/n
		c := (2*b1-b0)/(3*b2-b0) - math.Ln2/math.Log(3)
		k := 7.8590*c + 2.9554*c*c // Hosking's k = −ξ
		k = math.Max(-0.9, math.Min(0.9, k))
		if math.Abs(k) < 1e-6 {
			k = 1e-6
		}
		g, _ := math.Lgamma(1 + k)
		gk := math.Exp(g)
		sigma := (2*b1 - b0) * k / (gk * -math.Expm1(-k*math.Ln2))
		if sigma > 0 && finiteParam(sigma) {
			mu := b0 + sigma*(gk-1)/k
			starts = append(starts, []float64{mu, math.Log(sigma), -k})
		}
	}
	sigma := sd * math.Sqrt(6) / math.Pi
	mu := mean - 0.5772156649015329*sigma
	for _, xi := range []float64{0, 0.2, -0.2, 0.5} {
		starts = append(starts, []float64{mu, math.Log(sigma), xi})
	}
	return starts
}

// gevShapeBelowHalfNote cautions about a maximum with −1 < ξ < −0.5.
const gevShapeBelowHalfNote = "shape < −0.5: the maximum is a regular local maximum, but the usual asymptotic standard errors do not hold (Smith, 1985)"

func (f gevFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	solved, reason := fitGEVCensored(fit, d, opt)
	if solved {
		return fit, nil
	}
	fitGEVBFGS(fit, d, opt)
	if reason != "" {
		censoredNewtonFallback(fit, reason)
	}
	return fit, nil
}

// fitGEVBFGS records in fit the multi-start BFGS search: the best maximum
// with shape > −1, or, where BFGS ends at shape ≤ −1 (the likelihood is
// unbounded there), an interior local maximum or the largest with shape > −1.
func fitGEVBFGS(fit *Fit, d *Data, opt Options) {
	// Optimise on θ = ((μ − C)/S, ln(σ/S), ξ), the data's own units.
	ls, starts := standardisedStarts(gevStarts(d.valuesView()))
	natural := func(t []float64) []float64 {
		u := ls.fromTheta(t)
		return []float64{u[0], math.Exp(u[1]), u[2]}
	}
	dist := func(t []float64) Dist { p := natural(t); return GEV{p[0], p[1], p[2]} }
	nll := func(x []float64) exactNLL { return ls.wrap(gevNLL(x)) }
	prob := likelihoodProblem(3, nll(d.Exact), dist, d)
	sub, ratio := stagedSubproblem(d, d.Exact, 3, nll)
	o, staged := minimizeStaged(prob, sub, ratio, starts, opt)
	method := stagedMethod("BFGS on (location, log scale, shape)", staged)
	if o.theta == nil {
		fit.setOptimum(o, nil, method)
		return
	}
	if est := natural(o.theta); est[2] > -1 {
		fit.setOptimum(o, est, method)
		if est[2] < -0.5 {
			fit.Note = gevShapeBelowHalfNote
		}
		return
	}
	// Shape ≤ −1: the likelihood is unbounded as the upper endpoint
	// μ − σ/ξ approaches the sample maximum. Look for the largest local
	// maximum with shape > −1, on ξ = −1 + e^s.
	constrained := func(t []float64) []float64 { return []float64{t[0], t[1], -1 + math.Exp(t[2])} }
	inner := nll(d.Exact)
	cprob := likelihoodProblem(3, func(t, g []float64) float64 {
		v := inner(constrained(t), g)
		if g != nil {
			g[2] *= math.Exp(t[2])
		}
		return v
	}, func(t []float64) Dist { return dist(constrained(t)) }, d)
	var cstarts [][]float64
	for _, s := range starts {
		if s[2] > -0.95 {
			cstarts = append(cstarts, []float64{s[0], s[1], math.Log(s[2] + 1)})
		}
	}
	c := minimizeRestarted(cprob, cstarts, opt)
	const cmethod = "BFGS on (location, log scale, log(shape + 1))"
	// A converged unconstrained run with shape ≤ −1 whose upper endpoint
	// stays clear of the sample maximum is itself an interior local maximum;
	// it competes with the constrained one.
	if est := natural(o.theta); o.converged && gevEndpointGap(est, d.valuesView()) > 1e-6 &&
		(c.theta == nil || !c.converged || o.negLogLik < c.negLogLik) {
		fit.setOptimum(o, est, method)
		fit.Note = "shape ≤ −1: an interior local maximum; the likelihood is unbounded as the upper endpoint approaches the sample maximum, and the usual standard errors do not hold (Smith, 1985)"
		return
	}
	if c.theta != nil && c.converged && c.theta[2] > math.Log(1e-6) {
		fit.setOptimum(c, natural(constrained(c.theta)), cmethod)
		fit.Note = "likelihood unbounded for shape < −1 (upper endpoint at the sample maximum); reported the largest local maximum with shape > −1; usual standard errors do not hold (Smith, 1985)"
		return
	}
	fit.Convergence = Convergence{
		Method:      cmethod,
		Iterations:  o.iterations + c.iterations,
		Evaluations: o.evaluations + c.evaluations,
		Converged:   false,
		Reason:      "non-regular likelihood: it grows without bound as shape < −1 and the upper endpoint approaches the sample maximum, and no interior local maximum with shape > −1 was found",
	}
}

// gevEndpointGap returns min over the values of 1 + ξ(x − μ)/σ at p =
// (μ, σ, ξ): how far the sample stays inside the support, on the scale of
// the standardised tail variable (0 at an endpoint).
func gevEndpointGap(p []float64, values []float64) float64 {
	gap := math.Inf(1)
	for _, x := range values {
		gap = math.Min(gap, 1+p[2]*(x-p[0])/p[1])
	}
	return gap
}
