package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Weibull is the two-parameter Weibull distribution with Shape k > 0 and
// Scale λ > 0:
//
//	f(x) = (k/λ)(x/λ)^(k−1) exp(−(x/λ)^k),  x ≥ 0.
type Weibull struct{ Shape, Scale float64 }

// power returns (x/λ)^k computed as exp(k ln(x/λ)), finite for huge x.
func (d Weibull) power(x float64) float64 { return math.Exp(d.Shape * lnRatio(x, d.Scale)) }

func (d Weibull) LogPDF(x float64) float64 {
	if x < 0 || math.IsNaN(x) {
		return math.Inf(-1)
	}
	if x == 0 {
		switch {
		case d.Shape < 1:
			return math.Inf(1)
		case d.Shape == 1:
			return -math.Log(d.Scale)
		default:
			return math.Inf(-1)
		}
	}
	lz := lnRatio(x, d.Scale)
	return math.Log(d.Shape/d.Scale) + (d.Shape-1)*lz - math.Exp(d.Shape*lz)
}

// LogCDF is ln(1 − exp(−(x/λ)^k)) through log1mExp.
func (d Weibull) LogCDF(x float64) float64 {
	if !(x > 0) {
		return math.Inf(-1)
	}
	return log1mExp(-d.power(x))
}

func (d Weibull) LogSurvival(x float64) float64 {
	if !(x > 0) {
		return 0
	}
	return -d.power(x)
}

// Quantile is λ(−ln(1−p))^(1/k), with log1p for small p.
func (d Weibull) Quantile(p float64) float64 {
	return d.Scale * math.Pow(-math.Log1p(-p), 1/d.Shape)
}

func (d Weibull) Rand(r *rand.Rand) float64 {
	return d.Scale * math.Pow(r.ExpFloat64(), 1/d.Shape)
}

type weibullFamily struct{}

func init() { register(weibullFamily{}) }

func (weibullFamily) Name() string         { return "weibull" }
func (weibullFamily) Parameters() []string { return []string{"shape", "scale"} }
func (weibullFamily) Kind() Kind           { return Continuous }
func (weibullFamily) Support() string      { return "x ≥ 0" }
func (weibullFamily) Route() string {
	return "profile score equation in the shape (safeguarded Newton on x/max x), scale in closed form; censored data: BFGS on (log shape, log scale)"
}

func (weibullFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: weibull takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("weibull: need shape > 0 and scale > 0, got shape=%v scale=%v", p[0], p[1])
	}
	return Weibull{p[0], p[1]}, nil
}

func (f weibullFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	w := dist.(Weibull)
	var ll float64
	for _, x := range d.Exact {
		ll += w.LogPDF(x)
	}
	return ll + censoredLogLik(w, d, false)
}

func (f weibullFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	// Zero is in the support, but an exact 0 makes the likelihood
	// unbounded (k < 1) or zero (k > 1): it has no maximum.
	if err := needPositive(f.Name(), d, true); err != nil {
		return err
	}
	for _, x := range d.Exact {
		if x == 0 {
			return inapplicable(f.Name(), "an exact value of 0 makes the likelihood unbounded as the shape falls below 1; record it as a non-detect or use the gamma or exponential family")
		}
	}
	return needDistinct(f.Name(), d, 2)
}

// weibullMLE solves the profile score equation of the shape for complete
// data x > 0 (Cohen, 1965):
//
//	g(k) = Σ x^k ln x / Σ x^k − 1/k − mean ln x = 0,
//
// which is increasing in k, then λ̂ = (mean x^k)^(1/k). It works with
// e = ln(x/max x) ≤ 0 (so x^k never overflows: w = e^(k·e) ≤ 1) and with
// c = e − mean e, so g(k) = Σ w c / Σ w − 1/k keeps its digits for data
// clustered far from zero; ln x is taken once, before the iteration. The
// safeguarded Newton iteration (newtonMonotone) starts from
// k₀ = π/(√6·sd(ln x)) (the Gumbel moment estimate of ln x).
func weibullMLE(x []float64, opt Options) (shape, scale, ll float64, conv Convergence) {
	_, hi := minMax(x)
	lnRef, e := logsAbout(x, hi)
	n := float64(len(x))
	me, ve := meanVar(e)
	c := make([]float64, len(e))
	for i, v := range e {
		c[i] = v - me
	}
	conv = Convergence{Method: "profile equation (safeguarded Newton)"}
	if !(ve > 0) {
		conv.Reason = "ln x has no spread in floating point: the shape has no finite estimate"
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	var sw float64 // Σ e^(k·e) at the last evaluation
	fdf := func(k float64) (float64, float64) {
		conv.Evaluations++
		var swc, swcc float64
		sw = 0
		for i, v := range e {
			w := math.Exp(k * v)
			sw += w
			wc := w * c[i]
			swc += wc
			swcc += wc * c[i]
		}
		mc := swc / sw
		return mc - 1/k, swcc/sw - mc*mc + 1/(k*k)
	}
	k0 := math.Pi / (math.Sqrt(6) * math.Sqrt(ve))
	k, r, it, err := newtonMonotone(fdf, k0, 1e-14, opt.maxIterations())
	conv.Iterations = it
	if err != nil {
		conv.Reason = "profile equation: " + err.Error()
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	conv.GradientNorm = math.Abs(r)
	conv.Converged = true
	L := math.Log(sw/n) / k // ln(λ/max x)
	shape, scale = k, math.Exp(lnRef+L)
	// ln f(x) = ln k − ln λ + (k−1)(ln x − ln λ) − (x/λ)^k, Σ(x/λ)^k = n,
	// ln x − ln λ = e − L.
	ll = n*math.Log(k) - n*(lnRef+L) + (k-1)*(sumOf(e)-n*L) - n
	return shape, scale, ll, conv
}

func (f weibullFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	if d.IsComplete() {
		fit.setSolved(weibullMLE(d.Exact, opt))
		return fit, nil
	}
	k0, s0 := 1.0, 1.0
	if x := startSample(d, 2, true); len(x) >= 2 {
		if k, s, _, c := weibullMLE(x, opt); c.Converged {
			k0, s0 = k, s
		} else if m := sumOf(x) / float64(len(x)); m > 0 {
			s0 = m
		}
	}
	// θ = (ln(k/k₀), k₀ ln(λ/λ₀)): a well-scaled problem for any spread.
	starts := [][]float64{{0, 0}, {-math.Log(k0), 0}}
	toNatural := func(t []float64) []float64 { return []float64{k0 * math.Exp(t[0]), s0 * math.Exp(t[1]/k0)} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (log shape, log scale)")
	return fit, nil
}
