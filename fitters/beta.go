package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// Beta is the beta distribution of a proportion with shapes Alpha = α > 0
// and Beta = β > 0:
//
//	f(x) = x^(α−1) (1−x)^(β−1) / B(α, β),  0 < x < 1,
//
// F(x) = I_x(α, β), the regularised incomplete beta function, and
// S(x) = I_(1−x)(β, α) by symmetry, so the upper tail keeps its digits.
type Beta struct{ Alpha, Beta float64 }

func (d Beta) LogPDF(x float64) float64 {
	if !(x > 0 && x < 1) {
		return math.Inf(-1)
	}
	if d.Alpha+d.Beta >= incBetaLargeFrom {
		// α ln x + β ln(1−x) − ln B without its cancellation (lnBetaPower).
		y := 1 - x
		return lnBetaPower(d.Alpha, d.Beta, x, y) - math.Log(x) - math.Log1p(-x)
	}
	return (d.Alpha-1)*math.Log(x) + (d.Beta-1)*math.Log1p(-x) - mathext.Lbeta(d.Alpha, d.Beta)
}

func (d Beta) LogCDF(x float64) float64 {
	switch {
	case x <= 0:
		return math.Inf(-1)
	case x >= 1:
		return 0
	}
	return betaLogRegIncBeta(d.Alpha, d.Beta, x, 1-x)
}

func (d Beta) LogSurvival(x float64) float64 {
	switch {
	case x <= 0:
		return 0
	case x >= 1:
		return math.Inf(-1)
	}
	return betaLogRegIncBeta(d.Beta, d.Alpha, 1-x, x)
}

// Quantile inverts I_x(α, β) = p: gonum's inverse (through the upper
// tail's I_(1−x)(β, α) = 1 − p above p = 1/2) gives the start, and Newton
// steps on the tail's logarithm polish it (polishQuantile with
// betaNearerEndStep): the start can miss p by a relative 1e-6 at shapes
// near 1e9 and be far off (0.9375 for 1 − 1.1e-5) at α ~ 1e6, β < 1.
func (d Beta) Quantile(p float64) float64 {
	switch {
	case p < 0 || p > 1 || math.IsNaN(p):
		return math.NaN()
	case p == 0:
		return 0
	case p == 1:
		return 1
	case p > 0.5:
		return polishQuantile(d, p, 1-mathext.InvRegIncBeta(d.Beta, d.Alpha, 1-p), betaNearerEndStep)
	}
	return polishQuantile(d, p, mathext.InvRegIncBeta(d.Alpha, d.Beta, p), betaNearerEndStep)
}

// betaNearerEndStep is beta's Newton step for polishQuantile, taken in
// u = ln z, z = min(x, 1 − x) the distance to the nearer end, so that a
// quantile near 0 or 1 keeps its relative digits and a far start moves z
// by about a factor e per step: z ← z·exp(−g/(dg/du)), dg/du = (dg/dx)·
// (dx/du), dx/du = z (x = z) or −z (x = 1 − z).
func betaNearerEndStep(x, g, dgdx float64) float64 {
	if x > 0.5 {
		z := 1 - x
		return 1 - z*math.Exp(g/(dgdx*z))
	}
	return x * math.Exp(-g/(dgdx*x))
}

func (d Beta) Rand(r *rand.Rand) float64 {
	return distuv.Beta{Alpha: d.Alpha, Beta: d.Beta, Src: r}.Rand()
}

type betaFamily struct{}

func init() { register(betaFamily{}) }

func (betaFamily) Name() string         { return "beta" }
func (betaFamily) Parameters() []string { return []string{"alpha", "beta"} }
func (betaFamily) Kind() Kind           { return Continuous }
func (betaFamily) Support() string      { return "0 < x < 1" }
func (betaFamily) Route() string {
	return "BFGS on (log alpha, log beta) with analytic score from the sufficient statistics Σ ln x and Σ ln(1−x) (one pass), from moment and spread starts; censored data: Newton on (log alpha, log beta) from the sufficient statistics, the censored terms' derivatives by differences in the shapes, BFGS if it fails"
}

func (betaFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: beta takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("beta: need alpha > 0 and beta > 0, got alpha=%v beta=%v", p[0], p[1])
	}
	return Beta{p[0], p[1]}, nil
}

func (f betaFamily) LogLik(p []float64, d *Data) float64 { return logLikOf(f, p, d) }

func (f betaFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	// Exact values and censoring limits lie strictly inside (0, 1); an
	// interval may end at 0 or 1 (binned proportions (0, 0.1] … (0.9, 1]),
	// where F is 0 or 1.
	for _, v := range [][]float64{d.Exact, d.Left, d.Right} {
		for _, x := range v {
			if !(x > 0 && x < 1) {
				return inapplicable(f.Name(), "needs proportions strictly between 0 and 1, the data have %v", x)
			}
		}
	}
	for i, l := range d.Lower {
		u := d.Upper[i]
		if !(math.IsInf(l, -1) || l >= 0 && l < 1) || !(math.IsInf(u, 1) || u > 0 && u <= 1) {
			return inapplicable(f.Name(), "needs intervals within [0, 1], the data have (%v, %v]", l, u)
		}
	}
	return needDistinct(f.Name(), d, 2)
}

// betaNLL is −Σ ln f at θ = (ln α, ln β) from the sufficient statistics
// s1 = Σ ln x and s2 = Σ ln(1−x) of n exact values, with the score
// ∂ℓ/∂ln α = α(s1 − n(ψ(α) − ψ(α+β))) and likewise for β.
func betaNLL(n, s1, s2 float64) exactNLL {
	return func(theta, g []float64) float64 {
		a, b := math.Exp(theta[0]), math.Exp(theta[1])
		if a == 0 || b == 0 || math.IsInf(a, 1) || math.IsInf(b, 1) {
			return math.Inf(1)
		}
		if g != nil && n > 0 {
			pab := mathext.Digamma(a + b)
			g[0] = -a * (s1 - n*(mathext.Digamma(a)-pab))
			g[1] = -b * (s2 - n*(mathext.Digamma(b)-pab))
		} else if g != nil {
			g[0], g[1] = 0, 0
		}
		if n == 0 {
			return 0
		}
		return -((a-1)*s1 + (b-1)*s2 - n*lnBeta(a, b))
	}
}

func (f betaFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	// Censored data: Newton on (log alpha, log beta) first (beta_censored.go).
	if ok, why := fitBetaCensored(fit, d, opt); ok {
		return fit, nil
	} else if why != "" {
		defer censoredNewtonFallback(fit, why)
	}
	var s1, s2 float64
	for _, x := range d.Exact {
		s1 += math.Log(x)
		s2 += math.Log1p(-x)
	}
	m, v := meanVar(d.Values())
	var starts [][]float64
	if c := m*(1-m)/v - 1; v > 0 && c > 0 {
		starts = append(starts, []float64{math.Log(m * c), math.Log((1 - m) * c)})
	}
	starts = append(starts, []float64{0, 0}, []float64{math.Log(0.5), math.Log(0.5)}, []float64{math.Log(5 * m), math.Log(5 * (1 - m))})
	dist := func(t []float64) Dist { return Beta{math.Exp(t[0]), math.Exp(t[1])} }
	n := float64(len(d.Exact))
	prob := likelihoodProblem(2, betaNLL(n, s1, s2), dist, d)
	o := minimizeRestarted(prob, starts, opt)
	if o.theta != nil && !o.converged && d.IsComplete() {
		// The objective is a difference of terms much larger than itself,
		// so BFGS's line search can stall short of the gradient threshold;
		// Newton steps with the exact Hessian reach the root of the score,
		// and minimize judges the result from there.
		if th, ok := betaNewton(n, s1, s2, o.theta); ok {
			r := minimize(prob, [][]float64{th}, opt)
			if r.theta != nil && r.negLogLik <= o.negLogLik+1e-12*math.Abs(o.negLogLik) {
				r.iterations += o.iterations
				r.evaluations += o.evaluations
				r.starts = o.starts
				o = r
			}
		}
	}
	var est []float64
	if o.theta != nil {
		est = []float64{math.Exp(o.theta[0]), math.Exp(o.theta[1])}
	}
	fit.setOptimum(o, est, "BFGS on (log alpha, log beta)")
	return fit, nil
}

// betaNewton refines θ = (ln α, ln β) by up to 8 Newton steps on the score
// of the complete-data log-likelihood, with the exact Hessian
// ∂²(−ℓ)/∂θ0² = g0 + nα²(ψ'(α) − ψ'(α+β)), ∂²(−ℓ)/∂θ0∂θ1 = −nαβψ'(α+β),
// ∂²(−ℓ)/∂θ1² = g1 + nβ²(ψ'(β) − ψ'(α+β)). It reports false when a step
// leaves the Hessian indefinite.
func betaNewton(n, s1, s2 float64, theta []float64) ([]float64, bool) {
	th := append([]float64(nil), theta...)
	nll := betaNLL(n, s1, s2)
	g := make([]float64, 2)
	for it := 0; it < 8; it++ {
		nll(th, g)
		a, b := math.Exp(th[0]), math.Exp(th[1])
		tab := trigammaPositive(a + b)
		h00 := g[0] + n*a*a*(trigammaPositive(a)-tab)
		h11 := g[1] + n*b*b*(trigammaPositive(b)-tab)
		h01 := -n * a * b * tab
		det := h00*h11 - h01*h01
		if !(h00 > 0) || !(det > 0) {
			return nil, false
		}
		d0 := (h11*g[0] - h01*g[1]) / det
		d1 := (h00*g[1] - h01*g[0]) / det
		th[0] -= d0
		th[1] -= d1
		if math.Abs(d0)+math.Abs(d1) < 1e-15 {
			break
		}
	}
	return th, true
}

// trigammaPositive returns ψ'(x) for x > 0: the recurrence
// ψ'(x) = ψ'(x+1) + 1/x² up to x ≥ 20, then the asymptotic series
// 1/x + 1/(2x²) + 1/(6x³) − 1/(30x⁵) + 1/(42x⁷) − 1/(30x⁹) + 5/(66x¹¹)
// (Abramowitz & Stegun 6.4.12; truncation below 1e-17 at x = 20).
func trigammaPositive(x float64) float64 {
	var s float64
	for x < 20 {
		s += 1 / (x * x)
		x++
	}
	x2 := 1 / (x * x)
	return s + 1/x + x2/2 + (1.0/6-(1.0/30-(1.0/42-(1.0/30-5.0/66*x2)*x2)*x2)*x2)*x2/x
}
