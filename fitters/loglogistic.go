package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// LogLogistic is the log-logistic distribution with Scale α > 0 (the
// median) and Shape β > 0; ln X is logistic with location ln α and scale 1/β:
//
//	F(x) = 1/(1 + (x/α)^(−β)),  f(x) = (β/α)(x/α)^(β−1)/(1 + (x/α)^β)²,  x > 0.
type LogLogistic struct{ Scale, Shape float64 }

// z is β ln(x/α), the standard logistic variate of x.
func (d LogLogistic) z(x float64) float64 { return d.Shape * lnRatio(x, d.Scale) }

func (d LogLogistic) LogPDF(x float64) float64 {
	if !(x > 0) {
		if x == 0 && d.Shape < 1 {
			return math.Inf(1)
		}
		if x == 0 && d.Shape == 1 {
			return -math.Log(d.Scale)
		}
		return math.Inf(-1)
	}
	g, _, _ := logisticLogDensity(d.z(x))
	return g + math.Log(d.Shape) - math.Log(x)
}

func (d LogLogistic) LogCDF(x float64) float64 {
	if !(x > 0) {
		return math.Inf(-1)
	}
	return logLogisticCDF(d.z(x))
}

func (d LogLogistic) LogSurvival(x float64) float64 {
	if !(x > 0) {
		return 0
	}
	return logLogisticCDF(-d.z(x))
}

// Quantile is α (p/(1−p))^(1/β).
func (d LogLogistic) Quantile(p float64) float64 {
	return d.Scale * math.Exp((math.Log(p)-math.Log1p(-p))/d.Shape)
}

func (d LogLogistic) Rand(r *rand.Rand) float64 {
	u := r.Float64()
	for u == 0 {
		u = r.Float64()
	}
	return d.Quantile(u)
}

type loglogisticFamily struct{}

func init() { register(loglogisticFamily{}) }

func (loglogisticFamily) Name() string         { return "loglogistic" }
func (loglogisticFamily) Parameters() []string { return []string{"scale", "shape"} }
func (loglogisticFamily) Kind() Kind           { return Continuous }
func (loglogisticFamily) Support() string      { return "x > 0" }
func (loglogisticFamily) Route() string {
	return "Newton with step halving (Chebyshev steps near the maximum) on the logistic likelihood of ln x (concave in (ln scale·shape, shape)); censored data: Newton on the concave (μ/σ, 1/σ) likelihood of ln x, BFGS on (log scale, log shape) if it fails"
}

func (loglogisticFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: loglogistic takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("loglogistic: need scale > 0 and shape > 0, got scale=%v shape=%v", p[0], p[1])
	}
	return LogLogistic{p[0], p[1]}, nil
}

func (f loglogisticFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	l := dist.(LogLogistic)
	var ll float64
	for _, x := range d.Exact {
		ll += l.LogPDF(x)
	}
	return ll + censoredLogLik(l, d, false)
}

func (f loglogisticFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needPositive(f.Name(), d, false); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 2)
}

// loglogisticMLE fits the logistic family to y = ln x (taken once, about
// x[0] with logsAbout so clustered data keep their spread) by
// locScaleNewton, and maps back: α = e^μ, β = 1/s, and
// ln L(x) = ln L_logistic(ln x) − Σ ln x.
func loglogisticMLE(x []float64, opt Options) (scale, shape, ll float64, conv Convergence) {
	buf := borrowScratch(len(x))
	defer returnScratch(buf)
	y := *buf
	lnRef, sy := logsAboutInto(y, x, 0)
	m, s, lly, conv := logisticMLEInto(y, y, opt) // y is ours: standardized in place
	if !conv.Converged {
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	n := float64(len(x))
	return math.Exp(lnRef + m), 1 / s, lly - (n*lnRef + sy), conv
}

func (f loglogisticFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if !quickApplicable(d, opt, 2, true) {
		if err := f.Applicable(d, opt.Fixed); err != nil {
			return nil, err
		}
	}
	fit := newFitOpt(f, d, opt)
	if d.IsComplete() {
		fit.setSolved(loglogisticMLE(d.Exact, opt))
		return fit, nil
	}
	a0, b0 := 1.0, 1.0
	if x := startSample(d, 2, true); len(x) >= 2 {
		if a, b, _, c := loglogisticMLE(x, opt); c.Converged {
			a0, b0 = a, b
		} else {
			lm, ls := locScaleStart(x, 1)
			a0, b0 = math.Max(lm, 1e-300), math.Max(lm, 1e-300)/ls
		}
	}
	// θ = (β₀ ln(α/α₀), ln(β/β₀)): a well-scaled problem for any spread.
	starts := [][]float64{{0, 0}, {0, math.Log(1.0 / 3)}}
	toNatural := func(t []float64) []float64 { return []float64{a0 * math.Exp(t[0]/b0), b0 * math.Exp(t[1])} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (log scale, log shape)")
	return fit, nil
}
