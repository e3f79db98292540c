package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
)

// Normal is the normal distribution with mean Mu and standard deviation
// Sigma > 0:
//
//	f(x) = exp(−(x−μ)²/(2σ²)) / (σ√(2π)),  x ∈ R.
type Normal struct{ Mu, Sigma float64 }

func (d Normal) LogPDF(x float64) float64 {
	z := (x - d.Mu) / d.Sigma
	return -0.5*z*z - math.Log(d.Sigma) - lnSqrt2Pi
}

func (d Normal) LogCDF(x float64) float64      { return logNormalCDF((x - d.Mu) / d.Sigma) }
func (d Normal) LogSurvival(x float64) float64 { return logNormalSurvival((x - d.Mu) / d.Sigma) }
func (d Normal) Quantile(p float64) float64    { return d.Mu + d.Sigma*mathext.NormalQuantile(p) }
func (d Normal) Rand(r *rand.Rand) float64     { return d.Mu + d.Sigma*r.NormFloat64() }

type normalFamily struct{}

func init() { register(normalFamily{}) }

func (normalFamily) Name() string         { return "normal" }
func (normalFamily) Parameters() []string { return []string{"mu", "sigma"} }
func (normalFamily) Kind() Kind           { return Continuous }
func (normalFamily) Support() string      { return "real line" }
func (normalFamily) Route() string {
	return "closed form (mean, ML standard deviation); censored data: Newton on the concave (μ/σ, 1/σ) likelihood, BFGS on (mu, log sigma) if it fails"
}

func (normalFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: normal takes 2 parameters")
	}
	if !(p[1] > 0) || math.IsInf(p[1], 1) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nil, fmt.Errorf("normal: need finite mu and sigma > 0, got mu=%v sigma=%v", p[0], p[1])
	}
	return Normal{p[0], p[1]}, nil
}

func (f normalFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	nd := dist.(Normal)
	// Σ ln f(x) = −n ln σ − n ln√(2π) − Σ zᵢ²/2, zᵢ = (xᵢ−μ)/σ (standardised
	// before squaring, so data near 1e300 do not overflow)
	var ss float64
	inv := 1 / nd.Sigma
	for _, x := range d.Exact {
		z := (x - nd.Mu) * inv
		ss += z * z
	}
	n := float64(len(d.Exact))
	ll := -n*(math.Log(nd.Sigma)+lnSqrt2Pi) - 0.5*ss
	return ll + censoredLogLik(nd, d, false)
}

func (f normalFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 2)
}

func (f normalFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if d.IsComplete() && len(opt.Fixed) == 0 && len(d.Exact) >= 2 {
		// Complete data: Applicable's checks (no fixed parameter, n ≥ 2,
		// not all equal) come out of the same two passes as the estimates.
		if mu, sd, ok := meanSDQuick(d.Exact); ok && sd > 0 && !math.IsInf(sd, 0) {
			fit := newFitOpt(f, d, opt)
			fit.Estimates[0], fit.Estimates[1] = mu, sd
			// At the maximum Σ((x − μ̂)/σ̂)² = n: ℓ = −n(ln σ̂ + ln√(2π)) − n/2.
			n := float64(len(d.Exact))
			fit.LogLik = -n*(math.Log(sd)+lnSqrt2Pi) - 0.5*n
			fit.Convergence = closedForm()
			return fit, nil
		}
	}
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	if d.IsComplete() {
		mu, sd := meanSD(d.Exact)
		fit.Estimates[0], fit.Estimates[1] = mu, sd
		fit.LogLik = f.LogLik(fit.Estimates, d)
		fit.Convergence = closedForm()
		return fit, nil
	}
	// Censored: the censored Newton route, else BFGS on the standardised scale ((mu − m)/s, log(sigma/s)),
	// m and s the mean and spread of every recorded value, so that the
	// convergence test does not depend on the data's units or offset.
	m, sd := meanSD(d.Values())
	s := math.Max(sd, 1e-3*math.Max(1, math.Abs(m)))
	// First the censored Newton route (concave in (μ/σ, 1/σ)); BFGS only
	// when it does not converge.
	if fitCensoredLocScale(fit, f, d, opt, []float64{m, s}) {
		return fit, nil
	}
	natural := func(t []float64) []float64 { return []float64{m + s*t[0], s * math.Exp(t[1])} }
	prob := problem{dim: 2, scale: float64(d.N()), negLogLik: func(t []float64) float64 {
		return -f.LogLik(natural(t), d)
	}}
	starts := [][]float64{{0, 0}, {0, math.Log(3)}}
	o := minimize(prob, starts, opt)
	var est []float64
	if o.theta != nil {
		est = natural(o.theta)
	}
	fit.setOptimum(o, est, "BFGS on (mu, log sigma)")
	return fit, nil
}
