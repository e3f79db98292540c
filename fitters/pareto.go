package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
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
	return "closed form (scale = sample minimum, a boundary estimate; shape = n/Σ ln(x/scale)); right-censored: closed form; other censoring: BFGS on (scale below the minimum, log shape)"
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
	if len(d.Exact)+len(d.Right) == 0 {
		return inapplicable(f.Name(), "needs at least one exact or right-censored value to place the scale")
	}
	return nil
}

// paretoBoundaryNote says why the scale is reported at its boundary.
const paretoBoundaryNote = "scale at the smallest observation, where the likelihood (increasing in the scale) stops: a boundary estimate, not a stationary point, so score-based intervals do not apply to it"

// paretoMLE is the closed form for exact values x and right-censored
// values r (Johnson, Kotz & Balakrishnan, 1994, §20.3; Epstein & Sobel,
// 1953, for the censoring): the likelihood increases in x_m up to the
// smallest value, so x̂_m = min, and with it α̂ = (number exact) / Σ ln(t/x̂_m)
// over every value t. ln(t/x̂_m) is taken with logsAbout, exact near x̂_m.
func paretoMLE(exact, right []float64) (scale, shape, ll float64, ok bool) {
	all := append(append(make([]float64, 0, len(exact)+len(right)), exact...), right...)
	lo, _ := minMax(all)
	lnRef, y := logsAbout(all, lo)
	var sExact float64
	for _, v := range y[:len(exact)] {
		sExact += v
	}
	total := sumOf(y)
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

func (f paretoFamily) Fit(d *Data, opt Options) (*Fit, error) {
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
	// Non-detects or intervals: the scale must stay below every exact and
	// right-censored value; scale = U·exp(−e^θ₀), U their minimum.
	upper, _ := minMax(append(append([]float64(nil), d.Exact...), d.Right...))
	a0 := 1.0
	if _, a, _, ok := paretoMLE(d.Exact, d.Right); ok {
		a0 = a
	}
	starts := [][]float64{{-3, 0}, {0, 0}}
	toNatural := func(t []float64) []float64 {
		return []float64{upper * math.Exp(-math.Exp(t[0])), a0 * math.Exp(t[1])}
	}
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (ln(−ln(scale/min)), log shape)")
	return fit, nil
}
