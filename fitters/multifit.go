package fitters

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mathext"
)

// exactNLL returns −Σ ln f(x) over the exact observations at the transformed
// parameters θ and, when g is not nil, fills g with its gradient with respect
// to θ, sharing the per-observation terms between the two in a single pass.
// It returns +Inf where θ is invalid or an observation lies outside the support.
type exactNLL func(theta, g []float64) float64

// likelihoodProblem builds the optimiser's problem for a family fitted on a
// transformed scale θ: the exact observations through the family's own
// one-pass value-and-gradient function, and the censored ones (left, right,
// interval) through the generic censoredLogLik of dist(θ), differentiated by
// central differences. The last value and gradient are cached, so the
// optimiser's Func and Grad calls at one point cost one pass over the data.
func likelihoodProblem(dim int, exact exactNLL, dist func(theta []float64) Dist, d *Data) problem {
	censored := d.NCensored() > 0
	censoredNLL := func(theta []float64) float64 {
		dd := dist(theta)
		if dd == nil {
			return math.Inf(1)
		}
		return -censoredLogLik(dd, d, false)
	}
	var (
		lastTheta = make([]float64, dim)
		lastG     = make([]float64, dim)
		lastF     float64
		have      bool
	)
	eval := func(theta []float64) float64 {
		f := exact(theta, lastG)
		if math.IsInf(f, 1) || math.IsNaN(f) {
			// Outside the support: no gradient (the exact functions
			// return before writing it).
			for i := range lastG {
				lastG[i] = 0
			}
		} else if censored {
			f += censoredNLL(theta)
		}
		copy(lastTheta, theta)
		lastF, have = f, true
		return f
	}
	value := func(theta []float64) float64 {
		if have && slices.Equal(theta, lastTheta) {
			return lastF
		}
		return eval(theta)
	}
	grad := func(g, theta []float64) {
		if !(have && slices.Equal(theta, lastTheta)) {
			eval(theta)
		}
		copy(g, lastG)
		if censored {
			addCentralDiff(g, censoredNLL, theta)
		}
	}
	return problem{dim: dim, negLogLik: value, grad: grad}
}

// addCentralDiff adds to g the central-difference gradient of f at x, with a
// step of 1e-5·max(1, |x_i|) in each coordinate (truncation error O(h²) ≈
// 1e-10 relative, rounding error ≈ 1e-11 relative to f's magnitude).
func addCentralDiff(g []float64, f func([]float64) float64, x []float64) {
	xx := append([]float64(nil), x...)
	for i := range x {
		h := 1e-5 * math.Max(1, math.Abs(x[i]))
		xx[i] = x[i] + h
		fp := f(xx)
		xx[i] = x[i] - h
		fm := f(xx)
		xx[i] = x[i]
		g[i] += (fp - fm) / (2 * h)
	}
}

// boxLog returns y = ln(1 + ξz)/ξ, the generalised-extreme-value (and
// generalised-Pareto) transform of a standardised value z (y = z at ξ = 0),
// and its derivative ∂y/∂ξ. Where |ξz| < 0.01 both come from the series
// ln(1+u)/ξ = z Σ (−u)^j/(j+1) and ∂y/∂ξ = z² Σ (j+1)(−u)^j/(j+2)·(−1), u = ξz,
// which avoids the cancellation of log1p(u)/ξ and (u/(1+u) − log1p(u))/ξ²
// near ξ = 0 (terms up to u^11: error below 1e-22 relative). The caller
// ensures 1 + ξz > 0.
func boxLog(xi, z float64) (y, dyDxi float64) {
	u := xi * z
	if math.Abs(u) < 0.01 {
		// Horner in u for Σ_{j=0}^{11} (−u)^j/(j+1) and Σ_{j=0}^{11} (j+1)(−u)^j/(j+2).
		var s, t float64
		for j := 11; j >= 0; j-- {
			s = s*(-u) + 1/float64(j+1)
			t = t*(-u) + float64(j+1)/float64(j+2)
		}
		return z * s, -z * z * t
	}
	l := math.Log1p(u)
	return l / xi, (u/(1+u) - l) / (xi * xi)
}

// startSubsample returns at most max values of x taken at an even stride (all of
// x when it is short enough), for starting values that need sorting.
func startSubsample(x []float64, max int) []float64 {
	if len(x) <= max {
		return append([]float64(nil), x...)
	}
	out := make([]float64, 0, max)
	step := float64(len(x)) / float64(max)
	for i := 0; i < max; i++ {
		out = append(out, x[int(float64(i)*step)])
	}
	return out
}

// sortedStartSample returns the values sorted ascending, subsampled to at most 4000
// for starting-value computations (PWM, quantiles).
func sortedStartSample(x []float64) []float64 {
	s := startSubsample(x, 4000)
	slices.Sort(s)
	return s
}

// logRegIncBeta returns ln I_x(a, b), the log of the regularised incomplete
// beta function, given x and its complement y = 1 − x computed without
// cancellation by the caller. Above x = 1/2 it uses the symmetry
// I_x(a,b) = 1 − I_y(b,a) with log1p; where I_x underflows it sums the
// positive series I_x(a,b) = x^a y^b/(a B(a,b)) Σ_n (a+b)_n/(a+1)_n x^n
// (Abramowitz & Stegun 26.5.23 with the hypergeometric series of 15.1.1) in
// logarithms, so that far lower tails keep their digits.
func logRegIncBeta(a, b, x, y float64) float64 {
	switch {
	case x <= 0:
		return math.Inf(-1)
	case y <= 0:
		return 0
	}
	if x > 0.5 {
		c := mathext.RegIncBeta(b, a, y)
		if c < 0.5 {
			return math.Log1p(-c)
		}
	}
	v := mathext.RegIncBeta(a, b, x)
	if v > 1e-250 {
		return math.Log(v)
	}
	// Series, terms t_n = t_{n−1}·(a+b+n−1)/(a+n)·x, all positive.
	sum, term := 1.0, 1.0
	for n := 1; n < 100000; n++ {
		term *= (a + b + float64(n) - 1) / (a + float64(n)) * x
		sum += term
		if term < 1e-17*sum {
			break
		}
	}
	return a*math.Log(x) + b*math.Log(y) - math.Log(a) - mathext.Lbeta(a, b) + math.Log(sum)
}

// locScale standardises a (location, log scale, …) parameter vector on the
// data's own units: θ0 = (μ − C)/S and θ1 = ln σ − ln S, the rest unchanged.
// The optimiser's convergence tests compare gradients with the size of the
// log-likelihood, so without this a fit of the same data in other units
// (x·10⁵ or x·10⁻⁶) would stop at a different point.
type locScale struct{ C, S float64 }

// standardisedStarts takes starts on (μ, ln σ, …) and returns the scale
// θ = ((μ − C)/S, ln(σ/S), …) centred on the first start (C = μ₀, S = σ₀),
// so the optimiser works in the data's own units, with the starts mapped
// onto it.
func standardisedStarts(nat [][]float64) (locScale, [][]float64) {
	ls := locScale{nat[0][0], math.Exp(nat[0][1])}
	starts := make([][]float64, len(nat))
	for i, s := range nat {
		starts[i] = ls.toTheta(s)
	}
	return ls, starts
}

func (l locScale) toTheta(nat []float64) []float64 {
	th := append([]float64(nil), nat...)
	th[0] = (nat[0] - l.C) / l.S
	th[1] = nat[1] - math.Log(l.S)
	return th
}

func (l locScale) fromTheta(th []float64) []float64 {
	nat := append([]float64(nil), th...)
	nat[0] = l.C + l.S*th[0]
	nat[1] = th[1] + math.Log(l.S)
	return nat
}

// wrap turns a value-and-gradient function of (μ, ln σ, …) into one of θ.
func (l locScale) wrap(nll exactNLL) exactNLL {
	return func(th, g []float64) float64 {
		v := nll(l.fromTheta(th), g)
		if g != nil {
			g[0] *= l.S
		}
		return v
	}
}
