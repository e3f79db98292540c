package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Weibull3 is the three-parameter Weibull distribution with shape Shape =
// k > 0, scale Scale = λ > 0 and threshold (location) Threshold = γ:
//
//	f(x) = (k/λ) ((x−γ)/λ)^(k−1) exp(−((x−γ)/λ)^k),  x > γ,
//
// S(x) = exp(−((x−γ)/λ)^k) and F = −expm1(−((x−γ)/λ)^k), kept in logs.
type Weibull3 struct{ Shape, Scale, Threshold float64 }

// lz returns ln((x−γ)/λ) and whether x is above the threshold.
func (d Weibull3) lz(x float64) (float64, bool) {
	y := x - d.Threshold
	if !(y > 0) {
		return 0, false
	}
	return math.Log(y) - math.Log(d.Scale), true
}

func (d Weibull3) LogPDF(x float64) float64 {
	s, ok := d.lz(x)
	if !ok {
		return math.Inf(-1)
	}
	return math.Log(d.Shape) - math.Log(d.Scale) + (d.Shape-1)*s - math.Exp(d.Shape*s)
}

func (d Weibull3) LogCDF(x float64) float64 {
	s, ok := d.lz(x)
	if !ok {
		return math.Inf(-1)
	}
	if ks := d.Shape * s; ks < -700 {
		return ks // ln(1 − e^(−w)) = ln w − w/2 + … with w = e^(ks) negligible
	}
	return log1mExp(-math.Exp(d.Shape * s))
}

func (d Weibull3) LogSurvival(x float64) float64 {
	s, ok := d.lz(x)
	if !ok {
		return 0
	}
	return -math.Exp(d.Shape * s)
}

// Quantile: γ + λ(−ln(1−p))^(1/k).
func (d Weibull3) Quantile(p float64) float64 {
	if p < 0 || p > 1 || math.IsNaN(p) {
		return math.NaN()
	}
	return d.Threshold + d.Scale*math.Pow(-math.Log1p(-p), 1/d.Shape)
}

func (d Weibull3) Rand(r *rand.Rand) float64 { return d.Quantile(uniformOpen01(r)) }

type weibull3Family struct{}

func init() { register(weibull3Family{}) }

// fixable: a project may fix its threshold, which makes it an excess model with k = 2.
func (weibull3Family) fixable() (fixable, required []string) {
	return []string{"threshold"}, nil
}

func (weibull3Family) Name() string         { return "weibull3" }
func (weibull3Family) Parameters() []string { return []string{"shape", "scale", "threshold"} }
func (weibull3Family) Kind() Kind           { return Continuous }
func (weibull3Family) Support() string      { return "x > threshold" }
func (weibull3Family) Route() string {
	return "BFGS on (log shape, log scale, log(min − threshold)) with analytic score, each start (Weibull fits of x − (min − margin) for four margins) run separately; the largest interior local maximum is reported, runaways to the sample minimum never; threshold fixed: BFGS on the excesses; above 4000 complete values the starts run on a 2000-value subsample and the best is polished on all values; censored data, threshold free: Newton on (log scale, −log shape, log(min − threshold)) with analytic score and Hessian from the best of the starts above, the BFGS runs if it fails or the threshold runs to the minimum or off to −∞"
}

func (weibull3Family) New(p []float64) (Dist, error) {
	if len(p) != 3 {
		panic("fitters: weibull3 takes 3 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || !finiteParam(p[0]) || !finiteParam(p[1]) || !finiteParam(p[2]) {
		return nil, fmt.Errorf("weibull3: need shape > 0, scale > 0 and a finite threshold, got %v", p)
	}
	return Weibull3{p[0], p[1], p[2]}, nil
}

func (f weibull3Family) LogLik(p []float64, d *Data) float64 { return logLikOf(f, p, d) }

func (f weibull3Family) Applicable(d *Data, fixed Fixed) error {
	return thresholdApplicable(f, d, fixed)
}

// weibull3NLL is −Σ ln f at θ = (ln k, ln λ[, t]) with y = dev + e^t (free
// threshold) or y = dev, and its gradient in one pass: with s = ln(y/λ),
// e = e^(ks): ∂ln f/∂ln k = 1 + ks(1 − e), ∂ln f/∂ln λ = k(e − 1),
// ∂ln f/∂t = e^t (k − 1 − ke)/y.
func weibull3NLL(dev []float64, free bool) exactNLL {
	return func(theta, g []float64) float64 {
		k, ll := math.Exp(theta[0]), theta[1]
		var off float64
		if free {
			off = math.Exp(theta[2])
		}
		if k == 0 || math.IsInf(k, 1) {
			return math.Inf(1)
		}
		var ss, se, sse, sy float64
		for _, v := range dev {
			y := v + off
			if !(y > 0) {
				return math.Inf(1)
			}
			s := math.Log(y) - ll
			e := math.Exp(k * s)
			ss += s
			se += e
			sse += s * e
			if free {
				sy += (k - 1 - k*e) / y
			}
		}
		n := float64(len(dev))
		if g != nil {
			g[0] = -n - k*ss + k*sse
			g[1] = k*n - k*se
			if free {
				g[2] = -off * sy
			}
		}
		return n*(ll-theta[0]) - (k-1)*ss + se
	}
}

// weibullStart returns (ln k, ln λ) for y > 0 from the moments of ln y, which
// follows a smallest-extreme-value law with scale 1/k: k = π/(sd(ln y)√6),
// ln λ = mean(ln y) + γ_E/k (Euler's constant γ_E).
func weibullStart(y []float64) (float64, float64) {
	ly := make([]float64, len(y))
	for i, v := range y {
		ly[i] = math.Log(v)
	}
	m, v := meanVar(ly)
	k := math.Pi / (math.Sqrt(v) * math.Sqrt(6))
	if !(k > 0) || math.IsInf(k, 1) {
		k = 1
	}
	return math.Log(k), m + 0.5772156649015329/k
}

func (f weibull3Family) Fit(d *Data, opt Options) (*Fit, error) {
	return fitThreshold(f, thresholdModel{
		nll:     weibull3NLL,
		natural: func(t0, t1 float64) (float64, float64) { return math.Exp(t0), math.Exp(t1) },
		dist:    func(a, b, g float64) Dist { return Weibull3{a, b, g} },
		start:   weibullStart,
		limit:   "smallest-extreme-value",
		censored: &thresholdLocScale{
			std:       stdSEV,
			fromStart: func(lnK, lnLambda float64) (float64, float64) { return lnLambda, -lnK },
			toNatural: func(mu, sigma float64) (float64, float64) { return 1 / sigma, math.Exp(mu) },
		},
		note: func(k, _ float64) string {
			if k <= 2 {
				return "shape ≤ 2: the usual asymptotic standard errors do not hold for the threshold (Smith, 1985)"
			}
			return ""
		},
	}, d, opt)
}
