package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Exponential is the exponential distribution with Rate λ > 0:
//
//	f(x) = λ e^(−λx),  x ≥ 0.
type Exponential struct{ Rate float64 }

func (d Exponential) LogPDF(x float64) float64 {
	if x < 0 || math.IsNaN(x) {
		return math.Inf(-1)
	}
	return math.Log(d.Rate) - d.Rate*x
}

// LogCDF is ln(1 − e^(−λx)), through log1mExp so that small x keep their digits.
func (d Exponential) LogCDF(x float64) float64 {
	if !(x > 0) {
		return math.Inf(-1)
	}
	return log1mExp(-d.Rate * x)
}

func (d Exponential) LogSurvival(x float64) float64 {
	if !(x > 0) {
		return 0
	}
	return -d.Rate * x
}

// Quantile is −ln(1 − p)/λ, with log1p for small p.
func (d Exponential) Quantile(p float64) float64 { return -math.Log1p(-p) / d.Rate }

func (d Exponential) Rand(r *rand.Rand) float64 { return r.ExpFloat64() / d.Rate }

type exponentialFamily struct{}

func init() { register(exponentialFamily{}) }

func (exponentialFamily) Name() string         { return "exponential" }
func (exponentialFamily) Parameters() []string { return []string{"rate"} }
func (exponentialFamily) Kind() Kind           { return Continuous }
func (exponentialFamily) Support() string      { return "x ≥ 0" }
func (exponentialFamily) Route() string {
	return "closed form (n / Σx; right-censored: exact count / total time); other censoring: Newton in the rate on the concave likelihood, BFGS on log rate if it fails"
}

func (exponentialFamily) New(p []float64) (Dist, error) {
	if len(p) != 1 {
		panic("fitters: exponential takes 1 parameter")
	}
	if !(p[0] > 0) || math.IsInf(p[0], 1) {
		return nil, fmt.Errorf("exponential: need rate > 0, got rate=%v", p[0])
	}
	return Exponential{p[0]}, nil
}

func (f exponentialFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	e := dist.(Exponential)
	// Σ ln f(x) = n ln λ − Σ λx (λx per term: Σx alone may overflow)
	var s float64
	for _, x := range d.Exact {
		if x < 0 {
			return math.Inf(-1)
		}
		s += e.Rate * x
	}
	ll := float64(len(d.Exact))*math.Log(e.Rate) - s
	return ll + censoredLogLik(e, d, false)
}

func (f exponentialFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needPositive(f.Name(), d, true); err != nil {
		return err
	}
	if d.N() < 1 {
		return inapplicable(f.Name(), "needs at least 1 observation, the data have 0")
	}
	if len(d.Exact) > 0 && d.IsComplete() {
		if _, hi := minMax(d.Exact); hi == 0 {
			return inapplicable(f.Name(), "all %d observations are 0: the rate has no finite maximum-likelihood estimate", d.N())
		}
	}
	return nil
}

func (f exponentialFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if d.IsComplete() && len(opt.Fixed) == 0 && len(d.Exact) > 0 {
		// Complete data: Applicable's checks (no fixed parameter, values
		// ≥ 0, not all 0) come out of the pass that sums the values: no
		// sign bit set (−0 and negative NaNs go the general way) and a
		// positive finite sum (no NaN).
		total, bits := sumOr4(d.Exact)
		if r := float64(len(d.Exact)); bits>>63 == 0 && total > 0 && !math.IsInf(total, 1) {
			fit := newFitOpt(f, d, opt)
			rate := r / total
			fit.Estimates[0] = rate
			fit.LogLik = r*math.Log(rate) - r // λ̂·Σx = n
			fit.Convergence = closedForm()
			return fit, nil
		}
	}
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	if len(d.Left) == 0 && len(d.Lower) == 0 {
		// Exact and right-censored values: λ̂ = r / (Σ exact + Σ suspended),
		// r the number of exact values (Epstein & Sobel, 1953).
		total := sumOf(d.Exact) + sumOf(d.Right)
		r := float64(len(d.Exact))
		if r == 0 || !(total > 0) {
			fit.Convergence = Convergence{Method: "closed form", Reason: "no failures among the observations: the rate's estimate is 0, on the boundary"}
			return fit, nil
		}
		rate := r / total
		if math.IsInf(total, 1) {
			// Σx overflowed: sum x·2⁻⁶⁰⁰ (an exact scaling) and undo it.
			const f = 0x1p-600
			var s float64
			for _, v := range d.Exact {
				s += v * f
			}
			for _, v := range d.Right {
				s += v * f
			}
			rate = r / s * f
		}
		fit.Estimates[0] = rate
		fit.LogLik = r*math.Log(rate) - r // λ̂·total = r
		fit.Convergence = closedForm()
		return fit, nil
	}
	x := startSample(d, 1, true)
	rate0 := 1.0
	if m := sumOf(x) / float64(len(x)); m > 0 && !math.IsInf(m, 0) {
		rate0 = 1 / m
	}
	if len(opt.Fixed) == 0 {
		// Newton on the concave likelihood in λ; BFGS only if it fails.
		if rate, iters, score, ok := exponentialCensoredNewton(d, rate0); ok {
			fit.Estimates[0] = rate
			if ll := f.LogLik(fit.Estimates, d); !math.IsInf(ll, 0) && !math.IsNaN(ll) {
				fit.LogLik = ll
				fit.Convergence = Convergence{Method: "Newton in the rate (concave censored likelihood)",
					Iterations: iters, Evaluations: iters + 1, GradientNorm: math.Abs(score * rate), Converged: true}
				return fit, nil
			}
		}
	}
	starts := [][]float64{{math.Log(rate0)}, {math.Log(rate0 / 3)}}
	toNatural := func(t []float64) []float64 { return []float64{math.Exp(t[0])} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on log rate")
	return fit, nil
}
