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

// locScaleEval returns ℓ(a, b) of locScaleNewton, its gradient (ga, gb)
// and Hessian (haa, hab, hbb), from one pass over the standardized data.
type locScaleEval func(a, b float64) (ll, ga, gb, haa, hab, hbb float64)

// locScaleNewton maximises ℓ(a, b) = n ln b + Σ g(b·x_i − a) for data x
// already centred and scaled (mean 0, spread 1), where f(x) = f₀((x−μ)/σ)/σ
// with a = μ/σ and b = 1/σ. For a log-concave f₀ this log-likelihood is
// concave in (a, b) (Burridge, 1981), so Newton's method with step halving
// from any start climbs to the unique maximum. It stops when the Newton
// decrement λ² = −∇ℓᵀ H⁻¹ ∇ℓ, twice the predicted remaining gain, falls
// below tol²·max(1, |ℓ|) — a point where the estimates are exact to
// rounding — or after five full Newton steps taken once the decrement is
// below ℓ's rounding level (1e-12·|ℓ|), and reports failure otherwise.
// eval computes ℓ and its derivatives from the n standardized values.
//
// A final Newton step is not confirmed by another pass when the data's
// bound makes its outcome certain: with c3 ≥ sup|g‴| and every |x_i| ≤ vmax,
// a step (Δa, Δb) moves each z_i by at most δ = |Δb|·vmax + |Δa|, so by
// Taylor's theorem ℓ at the new point is ℓ + λ²/2 to within
// R = (n/6)(c3·δ³ + 2|Δb|³/b_min³), each score component is at most
// G = (n/2)(c3·δ²·max(1, vmax) + 2Δb²/b_min³), and the Hessian has moved by
// at most (n)(c3·δ·(1+vmax)² + 2|Δb|/b_min³) per entry. When R is below
// one rounding unit of ℓ and the decrement bounded through G and half the
// smallest curvature is below tol²·max(1, |ℓ|), the step is taken and the
// point reported as converged with ℓ + λ²/2 and the score bound G as its
// gradient norm. c3 = 0 turns this off.
func locScaleNewton(eval locScaleEval, a, b, tol float64, maxIter int, n float64, c3, vmax float64) locScaleResult {
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
		if newton && c3 > 0 && decrement <= 1e-6*scale {
			if g, ok := certainStep(n, b, da, db, haa, hab, hbb, ll, decrement, eps, c3, vmax); ok {
				a, b = a+da, b+db
				ll += decrement / 2
				res.converged = true
				res.location, res.scale, res.logLik = a/b, 1/b, ll
				res.gradNorm = g
				return res
			}
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

// certainStep applies locScaleNewton's bounds to the Newton step (da, db)
// from a point with 1/scale b, Hessian (haa, hab, hbb), log-likelihood ll
// and Newton decrement dec: it reports whether the step's end is certainly
// converged, and the bound on its score components.
func certainStep(n, b, da, db, haa, hab, hbb, ll, dec, eps, c3, vmax float64) (float64, bool) {
	bmin := b - math.Abs(db)
	if !(bmin > 0) || !(vmax >= 0) || math.IsInf(vmax, 0) {
		return 0, false
	}
	delta := math.Abs(db)*vmax + math.Abs(da)
	ib3 := 1 / (bmin * bmin * bmin)
	adb := math.Abs(db)
	scale := math.Max(1, math.Abs(ll+dec/2))
	remainder := n / 6 * (c3*delta*delta*delta + 2*adb*adb*adb*ib3)
	if !(remainder <= 0x1p-52*scale) {
		return 0, false
	}
	// Smallest eigenvalue of −H: det/μmax, μmax the largest.
	tr := -haa - hbb
	det := haa*hbb - hab*hab
	muMax := tr/2 + math.Sqrt(math.Max(0, tr*tr/4-det))
	muMin := det / muMax
	drift := n * (c3*delta*(1+vmax)*(1+vmax) + 2*adb*ib3)
	if !(muMin > 0) || !(2*drift <= muMin) {
		return 0, false
	}
	g := n / 2 * (c3*delta*delta*math.Max(1, vmax) + 2*adb*adb*ib3)
	// Decrement at the new point ≤ |score|²/(smallest curvature there),
	// which is at least muMin − drift ≥ muMin/2.
	if !(2*g*g/(muMin/2) <= eps*scale) {
		return 0, false
	}
	return g, true
}
