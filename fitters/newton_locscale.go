package fitters

import (
	"fmt"
	"math"
)

// logConcaveTerm gives, for a standardized density f₀ with log-concave
// density, g(z) = ln f₀(z) and its first two derivatives.
type logConcaveTerm func(z float64) (g, dg, d2g float64)

// locScaleResult is the outcome of locScaleNewton on standardized data.
type locScaleResult struct {
	location, scale float64 // μ and σ of the standardized data
	logLik          float64 // of the standardized data
	iterations      int
	evaluations     int
	gradNorm        float64
	converged       bool
	reason          string
}

// locScaleNewton maximises ℓ(a, b) = n ln b + Σ g(b·x_i − a) for data x
// already centred and scaled (mean 0, spread 1), where f(x) = f₀((x−μ)/σ)/σ
// with a = μ/σ and b = 1/σ. For a log-concave f₀ this log-likelihood is
// concave in (a, b) (Burridge, 1981), so Newton's method with step halving
// from any start climbs to the unique maximum. It stops when the Newton
// decrement λ² = −∇ℓᵀ H⁻¹ ∇ℓ, twice the predicted remaining gain, falls
// below tol²·max(1, |ℓ|) — a point where the estimates are exact to
// rounding — or after five full Newton steps taken once the decrement is
// below ℓ's rounding level (1e-12·|ℓ|), and reports failure otherwise.
func locScaleNewton(x []float64, g logConcaveTerm, a, b, tol float64, maxIter int) locScaleResult {
	n := float64(len(x))
	eval := func(a, b float64) (ll, ga, gb, haa, hab, hbb float64) {
		var sg, s1, s1x, s2, s2x, s2xx float64
		for _, v := range x {
			z := b*v - a
			g0, g1, g2 := g(z)
			sg += g0
			s1 += g1
			s1x += g1 * v
			s2 += g2
			s2x += g2 * v
			s2xx += g2 * v * v
		}
		ll = n*math.Log(b) + sg
		ga = -s1
		gb = n/b + s1x
		haa = s2
		hab = -s2x
		hbb = -n/(b*b) + s2xx
		return
	}
	res := locScaleResult{}
	ll, ga, gb, haa, hab, hbb := eval(a, b)
	res.evaluations = 1
	if math.IsNaN(ll) || math.IsInf(ll, 0) {
		res.reason = "the starting point has no finite log-likelihood"
		return res
	}
	eps := tol * tol
	quiet := 0
	for it := 1; it <= maxIter; it++ {
		res.iterations = it
		det := haa*hbb - hab*hab
		var da, db float64
		newton := haa < 0 && det > 0
		if newton {
			// Δ = −H⁻¹∇ for the 2×2 Hessian.
			da = -(hbb*ga - hab*gb) / det
			db = -(-hab*ga + haa*gb) / det
		} else {
			// Not negative definite in floating point: a gradient step
			// scaled by the diagonal curvature.
			da = ga / math.Max(math.Abs(haa), 1)
			db = gb / math.Max(math.Abs(hbb), n/(b*b))
		}
		decrement := ga*da + gb*db
		scale := math.Max(1, math.Abs(ll))
		if newton && decrement <= eps*scale {
			res.converged = true
			break
		}
		if newton && decrement <= 1e-12*scale {
			// The predicted gain is below what ℓ's rounding can show, and
			// Newton's method converges quadratically here: take the full
			// step without the increase test, a few times at most.
			quiet++
			if quiet > 5 {
				res.converged = true // at rounding level
				break
			}
			a, b = a+da, b+db
			ll, ga, gb, haa, hab, hbb = eval(a, b)
			res.evaluations++
			continue
		}
		step := 1.0
		accepted := false
		for h := 0; h < 60; h++ {
			na, nb := a+step*da, b+step*db
			if nb > 0 {
				nll, nga, ngb, nhaa, nhab, nhbb := eval(na, nb)
				res.evaluations++
				if nll > ll || (nll == ll && step == 1) {
					a, b = na, nb
					ll, ga, gb, haa, hab, hbb = nll, nga, ngb, nhaa, nhab, nhbb
					accepted = true
					break
				}
			}
			step /= 2
		}
		if !accepted {
			res.reason = fmt.Sprintf("step halving found no increase (Newton decrement %.3g)", decrement)
			break
		}
	}
	if !res.converged && res.reason == "" {
		res.reason = fmt.Sprintf("iteration limit %d reached", maxIter)
	}
	res.location, res.scale, res.logLik = a/b, 1/b, ll
	// Gradient on the (a, b) scale of the standardized problem.
	res.gradNorm = math.Max(math.Abs(ga), math.Abs(gb))
	return res
}
