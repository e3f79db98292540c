package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// Poisson is the Poisson distribution with mean Rate = λ ≥ 0:
//
//	P(X = k) = λ^k e^(−λ) / k!,  k = 0, 1, 2, …
//
// Its CDF is the regularized upper incomplete gamma function,
// P(X ≤ k) = Q(k+1, λ), and P(X > k) = P(k+1, λ) (Abramowitz & Stegun 26.4.21).
// Rate 0 is the point mass at 0.
type Poisson struct{ Rate float64 }

func (d Poisson) LogPDF(x float64) float64 {
	if !isCount(x) {
		return math.Inf(-1)
	}
	if d.Rate == 0 {
		if x == 0 {
			return 0
		}
		return math.Inf(-1)
	}
	return x*math.Log(d.Rate) - d.Rate - countLnFactorial(x)
}

func (d Poisson) LogCDF(x float64) float64 {
	k := math.Floor(x)
	if k < 0 {
		return math.Inf(-1)
	}
	if d.Rate == 0 || math.IsInf(k, 1) {
		return 0
	}
	return countLogFromTails(mathext.GammaIncRegComp(k+1, d.Rate), mathext.GammaIncReg(k+1, d.Rate),
		func() float64 { return countLogTailSum(d.LogPDF, k, 0, -1) })
}

func (d Poisson) LogSurvival(x float64) float64 {
	k := math.Floor(x)
	if k < 0 {
		return 0
	}
	if d.Rate == 0 || math.IsInf(k, 1) {
		return math.Inf(-1)
	}
	return countLogFromTails(mathext.GammaIncReg(k+1, d.Rate), mathext.GammaIncRegComp(k+1, d.Rate),
		func() float64 { return countLogTailSum(d.LogPDF, k+1, math.Inf(1), 1) })
}

// Quantile returns the smallest integer k with P(X ≤ k) ≥ p.
func (d Poisson) Quantile(p float64) float64 {
	guess := d.Rate + math.Sqrt(d.Rate)*mathext.NormalQuantile(math.Min(math.Max(p, 1e-300), 1-1e-16))
	return discreteQuantile(d.LogCDF, p, guess, 0, math.Inf(1))
}

func (d Poisson) Rand(r *rand.Rand) float64 {
	if d.Rate == 0 {
		return 0
	}
	return distuv.Poisson{Lambda: d.Rate, Src: r}.Rand()
}

type poissonFamily struct{}

func init() { register(poissonFamily{}) }

func (poissonFamily) Name() string         { return "poisson" }
func (poissonFamily) Parameters() []string { return []string{"rate"} }
func (poissonFamily) Kind() Kind           { return Discrete }
func (poissonFamily) Support() string      { return "0, 1, 2, …" }
func (poissonFamily) Route() string        { return "closed form (rate = sample mean)" }

func (poissonFamily) New(p []float64) (Dist, error) {
	if len(p) != 1 {
		panic("fitters: poisson takes 1 parameter")
	}
	if !(p[0] >= 0) || math.IsInf(p[0], 1) {
		return nil, fmt.Errorf("poisson: need a finite rate ≥ 0, got rate=%v", p[0])
	}
	return Poisson{p[0]}, nil
}

// LogLik is Σx·ln λ − nλ − Σ ln x!; NaN for censored data (see countcommon.go).
func (f poissonFamily) LogLik(p []float64, d *Data) float64 { return countLogLik(f, p, d) }

func (f poissonFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needCounts(f.Name(), d, 1); err != nil {
		return err
	}
	if _, hi := minMax(d.Exact); hi == 0 {
		return inapplicable(f.Name(), "all %d counts are 0: the rate's maximum-likelihood estimate is 0, on the boundary of its range", len(d.Exact))
	}
	return nil
}

// Fit returns λ̂ = x̄, the closed-form maximum-likelihood estimate.
func (f poissonFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	var s float64
	for _, x := range d.Exact {
		s += x
	}
	fit.Estimates = []float64{s / float64(len(d.Exact))}
	fit.LogLik = f.LogLik(fit.Estimates, d)
	fit.Convergence = closedForm()
	return fit, nil
}
