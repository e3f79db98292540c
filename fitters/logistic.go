package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Logistic is the logistic distribution with Location μ and Scale s > 0:
//
//	F(x) = 1/(1 + e^(−z)),  f(x) = e^(−z)/(s(1 + e^(−z))²),  z = (x−μ)/s,  x ∈ R.
type Logistic struct{ Location, Scale float64 }

// logisticLogDensity is ln f₀(z) = −|z| − 2 ln(1 + e^(−|z|)) of the
// standard logistic, with its derivatives −tanh(z/2) and −2f₀(z).
func logisticLogDensity(z float64) (g, dg, d2g float64) {
	a := math.Abs(z)
	e := math.Exp(-a)
	// ln(1+e) for e ∈ (0, 1]: its absolute error is an ulp, and |z| dominates
	// g where e is tiny, so the plain (much faster) Log is as accurate here
	// as Log1p.
	g = -a - 2*math.Log(1+e)
	iq := 1 / (1 + e)
	t := (1 - e) * iq // tanh(|z|/2)
	if z < 0 {
		t = -t
	}
	return g, -t, -2 * e * iq * iq
}

// logLogisticCDF is ln F₀(z) = −ln(1 + e^(−z)), stable for every z.
func logLogisticCDF(z float64) float64 {
	if z >= 0 {
		return -math.Log1p(math.Exp(-z))
	}
	return z - math.Log1p(math.Exp(z))
}

func (d Logistic) LogPDF(x float64) float64 {
	g, _, _ := logisticLogDensity((x - d.Location) / d.Scale)
	return g - math.Log(d.Scale)
}

func (d Logistic) LogCDF(x float64) float64 { return logLogisticCDF((x - d.Location) / d.Scale) }

func (d Logistic) LogSurvival(x float64) float64 {
	return logLogisticCDF(-(x - d.Location) / d.Scale)
}

// Quantile is μ + s(ln p − ln(1 − p)), with log1p.
func (d Logistic) Quantile(p float64) float64 {
	return d.Location + d.Scale*(math.Log(p)-math.Log1p(-p))
}

func (d Logistic) Rand(r *rand.Rand) float64 {
	u := r.Float64()
	for u == 0 {
		u = r.Float64()
	}
	return d.Quantile(u)
}

type logisticFamily struct{}

func init() { register(logisticFamily{}) }

func (logisticFamily) Name() string         { return "logistic" }
func (logisticFamily) Parameters() []string { return []string{"location", "scale"} }
func (logisticFamily) Kind() Kind           { return Continuous }
func (logisticFamily) Support() string      { return "real line" }
func (logisticFamily) Route() string {
	return "Newton with step halving on the concave (location/scale, 1/scale) likelihood; censored data: BFGS on (location, log scale)"
}

func (logisticFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: logistic takes 2 parameters")
	}
	if !(p[1] > 0) || math.IsInf(p[1], 1) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nil, fmt.Errorf("logistic: need finite location and scale > 0, got location=%v scale=%v", p[0], p[1])
	}
	return Logistic{p[0], p[1]}, nil
}

func (f logisticFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	l := dist.(Logistic)
	var ll float64
	for _, x := range d.Exact {
		g, _, _ := logisticLogDensity((x - l.Location) / l.Scale)
		ll += g
	}
	ll -= float64(len(d.Exact)) * math.Log(l.Scale)
	return ll + censoredLogLik(l, d, false)
}

func (f logisticFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 2)
}

// logisticMLE maximises the logistic likelihood of complete data by
// locScaleNewton on the standardized values (x − x̄)/sd, starting from the
// moment estimates μ₀ = x̄, s₀ = sd·√3/π.
func logisticMLE(x []float64, opt Options) (location, scale, ll float64, conv Convergence) {
	return locScaleMLE(x, logisticLogDensity, math.Pi/math.Sqrt(3), opt)
}

// locScaleMLE runs locScaleNewton for a log-concave location-scale family on
// complete data, standardizing x first and mapping the result back; b0 is
// the starting 1/scale on the standardized data.
func locScaleMLE(x []float64, g logConcaveTerm, b0 float64, opt Options) (location, scale, ll float64, conv Convergence) {
	if xs, f := powerOfTwoScale(x); f != 1 {
		location, scale, ll, conv = locScaleMLE(xs, g, b0, opt)
		return location / f, scale / f, ll + float64(len(x))*math.Log(f), conv
	}
	m, v := meanVar(x)
	sd := math.Sqrt(v)
	conv = Convergence{Method: "Newton with step halving"}
	if !(sd > 0) || math.IsInf(sd, 0) {
		conv.Reason = fmt.Sprintf("the data's spread is %v: the scale has no finite estimate", sd)
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	z := make([]float64, len(x))
	for i, xi := range x {
		z[i] = (xi - m) / sd
	}
	r := locScaleNewton(z, g, 0, b0, opt.tolerance(), opt.maxIterations())
	conv.Iterations, conv.Evaluations = r.iterations, r.evaluations
	conv.GradientNorm, conv.Converged, conv.Reason = r.gradNorm, r.converged, r.reason
	location, scale = m+sd*r.location, sd*r.scale
	ll = r.logLik - float64(len(x))*math.Log(sd)
	return location, scale, ll, conv
}

func (f logisticFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	if d.IsComplete() {
		fit.setSolved(logisticMLE(d.Exact, opt))
		return fit, nil
	}
	m0, s0 := locScaleStart(startSample(d, 2, false), math.Sqrt(3)/math.Pi)
	if x := startSample(d, 2, false); len(x) >= 2 {
		if m, s, _, c := logisticMLE(x, opt); c.Converged {
			m0, s0 = m, s
		}
	}
	starts := [][]float64{{0, 0}, {0, math.Log(3)}}
	toNatural := func(t []float64) []float64 { return []float64{m0 + s0*t[0], s0 * math.Exp(t[1])} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (location, log scale)")
	return fit, nil
}
