package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// Binomial is the number of successes in Trials independent trials with
// success probability P ∈ [0, 1]:
//
//	P(X = k) = C(n, k) p^k (1 − p)^(n−k),  k = 0 … n.
//
// P(X ≤ k) = I_(1−p)(n−k, k+1), the regularized incomplete beta function
// (Abramowitz & Stegun 26.5.24).
//
// The number of trials differs from one observation to the next in a
// dataset (it comes from the trials column), so it is not a parameter:
// the family's New returns Trials = 0, meaning "set per observation", and
// LogLik takes each observation's trials from Data.Trials. Set Trials on
// the returned value to get the distribution of one observation; with
// Trials = 0 it is the point mass at 0.
type Binomial struct {
	P      float64
	Trials int
}

func (d Binomial) LogPDF(x float64) float64 {
	n := float64(d.Trials)
	if !isCount(x) || x > n {
		return math.Inf(-1)
	}
	return countLnChoose(n, x) + countXLogY(x, d.P) + countXLog1pY(n-x, -d.P)
}

func (d Binomial) LogCDF(x float64) float64 {
	k, n := math.Floor(x), float64(d.Trials)
	switch {
	case k < 0:
		return math.Inf(-1)
	case k >= n || d.P == 0:
		return 0
	case d.P == 1:
		return math.Inf(-1)
	}
	return countLogFromTails(mathext.RegIncBeta(n-k, k+1, 1-d.P), mathext.RegIncBeta(k+1, n-k, d.P),
		func() float64 { return countLogTailSum(d.LogPDF, k, 0, -1) })
}

func (d Binomial) LogSurvival(x float64) float64 {
	k, n := math.Floor(x), float64(d.Trials)
	switch {
	case k < 0:
		return 0
	case k >= n || d.P == 0:
		return math.Inf(-1)
	case d.P == 1:
		return 0
	}
	return countLogFromTails(mathext.RegIncBeta(k+1, n-k, d.P), mathext.RegIncBeta(n-k, k+1, 1-d.P),
		func() float64 { return countLogTailSum(d.LogPDF, k+1, n, 1) })
}

// Quantile returns the smallest integer k with P(X ≤ k) ≥ p.
func (d Binomial) Quantile(p float64) float64 {
	n := float64(d.Trials)
	guess := n * d.P
	return discreteQuantile(d.LogCDF, p, guess, 0, n)
}

func (d Binomial) Rand(r *rand.Rand) float64 {
	if d.Trials == 0 || d.P == 0 {
		return 0
	}
	if d.P == 1 {
		return float64(d.Trials)
	}
	return distuv.Binomial{N: float64(d.Trials), P: d.P, Src: r}.Rand()
}

type binomialFamily struct{}

func init() { register(binomialFamily{}) }

func (binomialFamily) Name() string         { return "binomial" }
func (binomialFamily) Parameters() []string { return []string{"p"} }
func (binomialFamily) Kind() Kind           { return Discrete }
func (binomialFamily) Support() string      { return "0 … trials (needs trials_column)" }
func (binomialFamily) Route() string {
	return "closed form (pooled p = Σ successes / Σ trials)"
}

// New returns the member with success probability p and Trials = 0 (set
// per observation; see [Binomial]).
func (binomialFamily) New(p []float64) (Dist, error) {
	if len(p) != 1 {
		panic("fitters: binomial takes 1 parameter")
	}
	if !(p[0] >= 0 && p[0] <= 1) {
		return nil, fmt.Errorf("binomial: need 0 ≤ p ≤ 1, got p=%v", p[0])
	}
	return Binomial{P: p[0]}, nil
}

// LogLik is Σ[ln C(n_i, x_i) + x_i ln p + (n_i − x_i) ln(1 − p)] with n_i
// from d.Trials; NaN for censored data or missing trials.
func (f binomialFamily) LogLik(p []float64, d *Data) float64 {
	if !d.IsComplete() || len(d.Trials) != len(d.Exact) {
		return math.NaN()
	}
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	b := dist.(Binomial)
	var ll float64
	for i, x := range d.Exact {
		b.Trials = d.Trials[i]
		ll += b.LogPDF(x)
	}
	return ll
}

func (f binomialFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needCounts(f.Name(), d, 1); err != nil {
		return err
	}
	if err := needTrials(f.Name(), d); err != nil {
		return err
	}
	sx, sn := pooledSuccesses(d)
	switch {
	case sn == 0:
		return inapplicable(f.Name(), "every observation has 0 trials: p cannot be estimated")
	case sx == 0:
		return inapplicable(f.Name(), "no successes in %v trials: p's maximum-likelihood estimate is 0, on the boundary of its range", sn)
	case sx == sn:
		return inapplicable(f.Name(), "every one of %v trials is a success: p's maximum-likelihood estimate is 1, on the boundary of its range", sn)
	}
	return nil
}

// pooled returns Σ x_i and Σ n_i.
func pooledSuccesses(d *Data) (sx, sn float64) {
	for i, x := range d.Exact {
		sx += x
		sn += float64(d.Trials[i])
	}
	return sx, sn
}

// Fit returns the pooled p̂ = Σx_i / Σn_i, the closed-form
// maximum-likelihood estimate.
func (f binomialFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	sx, sn := pooledSuccesses(d)
	fit.Estimates = []float64{sx / sn}
	fit.LogLik = f.LogLik(fit.Estimates, d)
	fit.Convergence = closedForm()
	return fit, nil
}
