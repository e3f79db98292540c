package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Geometric is the number of failures before the first success in
// independent trials with success probability P ∈ (0, 1]:
//
//	P(X = k) = p (1 − p)^k,  k = 0, 1, 2, …
//
// so P(X > k) = (1 − p)^(k+1), computed as exp((k+1)·log1p(−p)).
type Geometric struct{ P float64 }

func (d Geometric) LogPDF(x float64) float64 {
	if !isCount(x) {
		return math.Inf(-1)
	}
	return math.Log(d.P) + countXLog1pY(x, -d.P)
}

func (d Geometric) LogCDF(x float64) float64 {
	k := math.Floor(x)
	if k < 0 {
		return math.Inf(-1)
	}
	if d.P == 1 || math.IsInf(k, 1) {
		return 0
	}
	return log1mExp((k + 1) * math.Log1p(-d.P))
}

func (d Geometric) LogSurvival(x float64) float64 {
	k := math.Floor(x)
	if k < 0 {
		return 0
	}
	if d.P == 1 || math.IsInf(k, 1) {
		return math.Inf(-1)
	}
	return (k + 1) * math.Log1p(-d.P)
}

// Quantile returns the smallest integer k with P(X ≤ k) ≥ p, i.e.
// k = ⌈ln(1 − p)/ln(1 − P)⌉ − 1, checked against the CDF.
func (d Geometric) Quantile(p float64) float64 {
	guess := 0.0
	if d.P < 1 && p < 1 {
		guess = math.Ceil(math.Log1p(-p)/math.Log1p(-d.P)) - 1
	}
	return discreteQuantile(d.LogCDF, p, guess, 0, math.Inf(1))
}

// Rand returns ⌊E/(−ln(1 − p))⌋ with E standard exponential, which is
// geometric on 0, 1, 2, … exactly.
func (d Geometric) Rand(r *rand.Rand) float64 {
	if d.P == 1 {
		return 0
	}
	return math.Floor(r.ExpFloat64() / -math.Log1p(-d.P))
}

type geometricFamily struct{}

func init() { register(geometricFamily{}) }

func (geometricFamily) Name() string         { return "geometric" }
func (geometricFamily) Parameters() []string { return []string{"p"} }
func (geometricFamily) Kind() Kind           { return Discrete }
func (geometricFamily) Support() string      { return "0, 1, 2, … (failures before the first success)" }
func (geometricFamily) Route() string        { return "closed form (p = 1/(1 + sample mean))" }

func (geometricFamily) New(p []float64) (Dist, error) {
	if len(p) != 1 {
		panic("fitters: geometric takes 1 parameter")
	}
	if !(p[0] > 0 && p[0] <= 1) {
		return nil, fmt.Errorf("geometric: need 0 < p ≤ 1, got p=%v", p[0])
	}
	return Geometric{p[0]}, nil
}

// LogLik is n·ln p + Σx·ln(1 − p); NaN for censored data.
func (f geometricFamily) LogLik(p []float64, d *Data) float64 { return countLogLik(f, p, d) }

func (f geometricFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needCounts(f.Name(), d, 1); err != nil {
		return err
	}
	if _, hi := minMax(d.Exact); hi == 0 {
		return inapplicable(f.Name(), "all %d counts are 0: p's maximum-likelihood estimate is 1, on the boundary of its range", len(d.Exact))
	}
	return nil
}

// Fit returns p̂ = 1/(1 + x̄), the closed-form maximum-likelihood estimate.
func (f geometricFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	var s float64
	for _, x := range d.Exact {
		s += x
	}
	n := float64(len(d.Exact))
	fit.Estimates = []float64{n / (n + s)}
	fit.LogLik = f.LogLik(fit.Estimates, d)
	fit.Convergence = closedForm()
	return fit, nil
}
