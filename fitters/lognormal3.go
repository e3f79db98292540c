package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
)

// Lognormal3 is the three-parameter lognormal distribution: ln(X − γ) is
// normal with mean Mu and standard deviation Sigma > 0, Threshold = γ:
//
//	f(x) = exp(−(ln(x−γ) − μ)²/(2σ²)) / ((x−γ)σ√(2π)),  x > γ,
//
// the density of x (not of ln x), with F and S from ln Φ and ln(1 − Φ).
type Lognormal3 struct{ Mu, Sigma, Threshold float64 }

// r returns (ln(x−γ) − μ)/σ, ln(x−γ) and whether x is above the threshold.
func (d Lognormal3) r(x float64) (float64, float64, bool) {
	y := x - d.Threshold
	if !(y > 0) {
		return 0, 0, false
	}
	l := math.Log(y)
	return (l - d.Mu) / d.Sigma, l, true
}

func (d Lognormal3) LogPDF(x float64) float64 {
	r, l, ok := d.r(x)
	if !ok {
		return math.Inf(-1)
	}
	return -l - math.Log(d.Sigma) - lnSqrt2Pi - 0.5*r*r
}

func (d Lognormal3) LogCDF(x float64) float64 {
	r, _, ok := d.r(x)
	if !ok {
		return math.Inf(-1)
	}
	return logNormalCDF(r)
}

func (d Lognormal3) LogSurvival(x float64) float64 {
	r, _, ok := d.r(x)
	if !ok {
		return 0
	}
	return logNormalSurvival(r)
}

// Quantile: γ + exp(μ + σΦ⁻¹(p)).
func (d Lognormal3) Quantile(p float64) float64 {
	if p < 0 || p > 1 || math.IsNaN(p) {
		return math.NaN()
	}
	return d.Threshold + math.Exp(d.Mu+d.Sigma*mathext.NormalQuantile(p))
}

func (d Lognormal3) Rand(r *rand.Rand) float64 {
	return d.Threshold + math.Exp(d.Mu+d.Sigma*r.NormFloat64())
}

type lognormal3Family struct{}

func init() { register(lognormal3Family{}) }

// fixable: a project may fix its threshold, which makes it an excess model with k = 2.
func (lognormal3Family) fixable() (fixable, required []string) {
	return []string{"threshold"}, nil
}

func (lognormal3Family) Name() string         { return "lognormal3" }
func (lognormal3Family) Parameters() []string { return []string{"mu", "sigma", "threshold"} }
func (lognormal3Family) Kind() Kind           { return Continuous }
func (lognormal3Family) Support() string      { return "x > threshold" }
func (lognormal3Family) Route() string {
	return "BFGS on (mu, log sigma, log(min − threshold)) with analytic score, each start (lognormal fits of x − (min − margin) for four margins) run separately; the largest interior local maximum is reported, runaways to the sample minimum never; threshold fixed: closed form on ln(x − threshold), BFGS when censored; above 4000 complete values the starts run on a 2000-value subsample and the best is polished on all values; censored data, threshold free: Newton on (mu, log sigma, log(min − threshold)) with analytic score and Hessian from the best of the starts above, the BFGS runs if it fails or the threshold runs to the minimum or off to −∞"
}

func (lognormal3Family) New(p []float64) (Dist, error) {
	if len(p) != 3 {
		panic("fitters: lognormal3 takes 3 parameters")
	}
	if !finiteParam(p[0]) || !(p[1] > 0) || !finiteParam(p[1]) || !finiteParam(p[2]) {
		return nil, fmt.Errorf("lognormal3: need finite mu, sigma > 0 and a finite threshold, got %v", p)
	}
	return Lognormal3{p[0], p[1], p[2]}, nil
}

func (f lognormal3Family) LogLik(p []float64, d *Data) float64 { return logLikOf(f, p, d) }

func (f lognormal3Family) Applicable(d *Data, fixed Fixed) error {
	return thresholdApplicable(f, d, fixed)
}

// lognormal3NLL is −Σ ln f at θ = (μ, ln σ[, t]) with y = dev + e^t (free
// threshold) or y = dev, and its gradient in one pass: with r = (ln y − μ)/σ,
// ∂ln f/∂μ = r/σ, ∂ln f/∂ln σ = r² − 1, ∂ln f/∂t = −e^t (1 + r/σ)/y.
func lognormal3NLL(dev []float64, free bool) exactNLL {
	return func(theta, g []float64) float64 {
		mu, ls := theta[0], theta[1]
		s := math.Exp(ls)
		var off float64
		if free {
			off = math.Exp(theta[2])
		}
		var sl, sr, sr2, sy float64
		for _, v := range dev {
			y := v + off
			if !(y > 0) {
				return math.Inf(1)
			}
			l := math.Log(y)
			r := (l - mu) / s
			sl += l
			sr += r
			sr2 += r * r
			if free {
				sy += (1 + r/s) / y
			}
		}
		n := float64(len(dev))
		if g != nil {
			g[0] = -sr / s
			g[1] = n - sr2
			if free {
				g[2] = off * sy
			}
		}
		return sl + n*(ls+lnSqrt2Pi) + 0.5*sr2
	}
}

// lognormalStart returns (μ, ln σ) for y > 0: the mean and ML standard
// deviation of ln y, the lognormal's closed-form maximum.
func lognormalStart(y []float64) (float64, float64) {
	ly := make([]float64, len(y))
	for i, v := range y {
		ly[i] = math.Log(v)
	}
	m, v := meanVar(ly)
	if !(v > 0) {
		v = 1
	}
	return m, 0.5 * math.Log(v)
}

func (f lognormal3Family) Fit(d *Data, opt Options) (*Fit, error) {
	if u, ok := opt.Fixed["threshold"]; ok && d.IsComplete() {
		if err := f.Applicable(d, opt.Fixed); err != nil {
			return nil, err
		}
		// Excess model, complete data: the lognormal's closed form on x − u.
		y := make([]float64, len(d.Exact))
		for i, x := range d.Exact {
			y[i] = x - u
		}
		mu, ls := lognormalStart(y)
		fit := newFit(f, d)
		fit.Estimates = []float64{mu, math.Exp(ls), u}
		fit.Fixed[2], fit.K = true, 2
		fit.LogLik = f.LogLik(fit.Estimates, d)
		fit.Convergence = closedForm()
		return fit, nil
	}
	return fitThreshold(f, thresholdModel{
		nll:     lognormal3NLL,
		natural: func(t0, t1 float64) (float64, float64) { return t0, math.Exp(t1) },
		dist:    func(a, b, g float64) Dist { return Lognormal3{a, b, g} },
		start:   lognormalStart,
		limit:   "normal",
		censored: &thresholdLocScale{
			std:       stdNormal,
			fromStart: func(mu, lnSigma float64) (float64, float64) { return mu, lnSigma },
			toNatural: func(mu, sigma float64) (float64, float64) { return mu, sigma },
		},
		note: func(float64, float64) string { return "" },
	}, d, opt)
}
