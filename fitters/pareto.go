package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
)

// Pareto is the Pareto (type I) distribution with Scale x_m > 0 and Shape
// α > 0:
//
//	f(x) = α x_m^α / x^(α+1),  S(x) = (x_m/x)^α,  x ≥ x_m.
type Pareto struct{ Scale, Shape float64 }

// lnExcess returns ln(x/x_m) ≥ 0, by log1p near x_m.
func (d Pareto) lnExcess(x float64) float64 {
	if x < 1.5*d.Scale {
		return math.Log1p((x - d.Scale) / d.Scale)
	}
	return lnRatio(x, d.Scale)
}

func (d Pareto) LogPDF(x float64) float64 {
	if !(x >= d.Scale) {
		return math.Inf(-1)
	}
	return math.Log(d.Shape) - math.Log(x) - d.Shape*d.lnExcess(x)
}

// LogCDF is ln(1 − (x_m/x)^α) through log1mExp.
func (d Pareto) LogCDF(x float64) float64 {
	if !(x > d.Scale) {
		return math.Inf(-1)
	}
	return log1mExp(-d.Shape * d.lnExcess(x))
}

func (d Pareto) LogSurvival(x float64) float64 {
	if !(x > d.Scale) {
		return 0
	}
	return -d.Shape * d.lnExcess(x)
}

// Quantile is x_m (1 − p)^(−1/α), with log1p.
func (d Pareto) Quantile(p float64) float64 {
	return d.Scale * math.Exp(-math.Log1p(-p)/d.Shape)
}

func (d Pareto) Rand(r *rand.Rand) float64 {
	return d.Scale * math.Exp(r.ExpFloat64()/d.Shape)
}

type paretoFamily struct{}

func init() { register(paretoFamily{}) }

func (paretoFamily) Name() string         { return "pareto" }
func (paretoFamily) Parameters() []string { return []string{"scale", "shape"} }
func (paretoFamily) Kind() Kind           { return Continuous }
func (paretoFamily) Support() string      { return "x ≥ scale" }
func (paretoFamily) Route() string {
	return "closed form (scale = sample minimum, a boundary estimate; shape = n/Σ ln(x/scale)); right-censored: closed form; non-detects or intervals: Newton on (ln shape, ln(−ln S(bound))), where the log-likelihood is concave in (shape, −ln S(bound)), scale at the smallest exact value when the score there points outward, or at a corner (an interval's lower end or a suspension, found by bisection over the corners; with narrow bins the smallest lower end) when the scores on its two sides have opposite signs, otherwise Newton between the two neighbouring corners; BFGS on (scale below the bound, log shape) if it fails"
}

func (paretoFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: pareto takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("pareto: need scale > 0 and shape > 0, got scale=%v shape=%v", p[0], p[1])
	}
	return Pareto{p[0], p[1]}, nil
}

func (f paretoFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	pd := dist.(Pareto)
	var ll float64
	for _, x := range d.Exact {
		ll += pd.LogPDF(x)
	}
	if math.IsInf(ll, -1) {
		return ll
	}
	return ll + censoredLogLik(pd, d, false)
}

func (f paretoFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needPositive(f.Name(), d, false); err != nil {
		return err
	}
	if err := needDistinct(f.Name(), d, 2); err != nil {
		return err
	}
	if math.IsInf(paretoBound(d), 1) {
		return inapplicable(f.Name(), "needs an exact value, a non-detect limit or a finite interval end to place the scale")
	}
	return nil
}

// paretoBound is the largest scale with a finite likelihood: every exact
// value must be ≥ the scale and every non-detect limit and interval upper
// end above it. Suspensions below the scale carry no information (S = 1)
// and do not bound it.
func paretoBound(d *Data) float64 {
	b := math.Inf(1)
	for _, v := range d.Exact {
		b = math.Min(b, v)
	}
	for _, v := range d.Left {
		b = math.Min(b, v)
	}
	for _, v := range d.Upper {
		b = math.Min(b, v)
	}
	return b
}

// paretoBoundaryNote says why the scale is reported at its boundary.
const paretoBoundaryNote = "scale at the smallest observation, where the likelihood (increasing in the scale) stops: a boundary estimate, not a stationary point, so score-based intervals do not apply to it"

// CornerAt reports why the log-likelihood has no second derivative at p
// when the scale sits on a corner below the bound (an interval's lower
// end or a suspension; see paretoCorner), "" otherwise. At the bound itself
// (the smallest exact value) the likelihood is −∞ just above the scale,
// which a finite-difference Hessian finds by itself.
func (paretoFamily) CornerAt(p []float64, d *Data) string {
	if len(p) != 2 || !(p[0] > 0 && p[0] < paretoBound(d)) {
		return ""
	}
	c := paretoCorner{value: p[0]}
	found := slices.Contains(d.Right, p[0])
	for i, l := range d.Lower {
		if l == p[0] {
			found = true
			c.interval = c.interval || !math.IsInf(d.Upper[i], 1)
		}
	}
	if !found {
		return ""
	}
	return fmt.Sprintf("the log-likelihood has a corner at the estimate: the scale at %v, %s, where its slope in the scale jumps, so that its curvature there is infinite", c.value, c.what())
}

// DataEdge reports that the scale sits on an edge the data set: at the
// smallest observation that bounds it (the complete-data and closed-form
// estimate, x_m = the sample minimum), or at a corner below it (CornerAt).
func (f paretoFamily) DataEdge(p []float64, d *Data) (int, string) {
	if len(p) != 2 {
		return -1, ""
	}
	if why := f.CornerAt(p, d); why != "" {
		return 0, why
	}
	if p[0] >= paretoBound(d) {
		return 0, "the scale sits at the smallest observation, where the likelihood, rising in the scale, stops"
	}
	return -1, ""
}

// paretoMLE is the closed form for exact values x and right-censored
// values r (Johnson, Kotz & Balakrishnan, 1994, §20.3; Epstein & Sobel,
// 1953, for the censoring): the likelihood increases in x_m up to the
// smallest exact value, so x̂_m = min, and with it
// α̂ = (number exact) / Σ ln(t/x̂_m) over the exact values and the
// suspensions above x̂_m. ln(t/x̂_m) is taken with logsAbout, exact near x̂_m.
func paretoMLE(exact, right []float64) (scale, shape, ll float64, ok bool) {
	lo, _ := minMax(exact)
	if len(exact) == 0 {
		return math.NaN(), math.NaN(), math.NaN(), false
	}
	lnRef, y := logsAbout(exact, lo)
	sExact := sumOf(y)
	total := sExact
	if len(right) > 0 {
		_, yr := logsAbout(right, lo)
		for _, v := range yr {
			total += math.Max(v, 0) // a suspension below the scale adds nothing
		}
	}
	r := float64(len(exact))
	if !(total > 0) || r == 0 {
		return lo, math.NaN(), math.NaN(), false
	}
	shape = r / total
	// Σ ln f = r ln α − Σ ln x − α Σ_exact ln(x/x_m); Σ ln S = −α Σ_right ln(t/x_m);
	// together −α·total = −r.
	ll = r*math.Log(shape) - (r*lnRef + sExact) - r
	return lo, shape, ll, true
}

func (f paretoFamily) Fit(d *Data, opt Options) (out *Fit, err error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	if len(d.Left) == 0 && len(d.Lower) == 0 {
		s, a, ll, ok := paretoMLE(d.Exact, d.Right)
		if !ok {
			fit.Convergence = Convergence{Method: "closed form", Reason: "no exact value above the smallest observation: the shape has no finite estimate"}
			return fit, nil
		}
		fit.Estimates = []float64{s, a}
		fit.LogLik = ll
		fit.Convergence = closedForm()
		fit.Convergence.Note = paretoBoundaryNote
		return fit, nil
	}
	// Non-detects or intervals: the concave censored Newton route first
	// (pareto_censored.go), BFGS if it fails.
	if ok, why := fitParetoCensored(fit, d, opt); ok {
		return fit, nil
	} else if why != "" {
		defer func() { censoredNewtonFallback(out, why) }()
	}
	// The scale stays below the bound U
	// (paretoBound) as scale = U·exp(−e^θ₀): an interior maximum by BFGS.
	upper := paretoBound(d)
	a0 := 1.0
	if _, a, _, ok := paretoMLE(d.Exact, d.Right); ok {
		a0 = a
	} else if x := startSample(d, 2, true); len(x) >= 2 {
		if _, a, _, ok := paretoMLE(x, nil); ok {
			a0 = a
		}
	}
	starts := [][]float64{{-3, 0}, {0, 0}}
	toNatural := func(t []float64) []float64 {
		return []float64{upper * math.Exp(-math.Exp(t[0])), a0 * math.Exp(t[1])}
	}
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (ln(−ln(scale/bound)), log shape)")
	// When the bound is an exact value the maximum may lie on it: maximise
	// the shape there too and keep the better point.
	if lo, _ := minMax(d.Exact); len(d.Exact) > 0 && lo == upper {
		edge := newFit(f, d)
		toEdge := func(t []float64) []float64 { return []float64{upper, a0 * math.Exp(t[0])} }
		fitByMinimize(edge, f, d, opt, toEdge, [][]float64{{0}}, "BFGS on log shape, scale at the smallest exact value")
		if edge.Converged && (!fit.Converged || edge.LogLik >= fit.LogLik) {
			edge.Convergence.Note = paretoBoundaryNote
			return edge, nil
		}
	}
	return fit, nil
}
