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

// locScalePoint is ℓ(a, b) of locScaleNewton with its gradient (ga, gb),
// Hessian (haa, hab, hbb) and, when cubic is set, its third derivatives
// (taaa, taab, tabb, tbbb).
type locScalePoint struct {
	ll, ga, gb, haa, hab, hbb float64
	taaa, taab, tabb, tbbb    float64
	cubic                     bool
}

// locScaleEval evaluates locScalePoint from one pass over the standardized data.
type locScaleEval func(a, b float64) locScalePoint

// locScaleBounds are the family's bounds that let locScaleNewton take its
// last step without a confirming pass: c3 ≥ sup|g‴|, c4 ≥ sup|g⁗| (0 when
// unknown) and every standardized |x_i| ≤ vmax.
type locScaleBounds struct{ c3, c4, vmax float64 }

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
// Near the maximum (λ² ≤ 10⁻³·max(1, |ℓ|)), when eval gives third
// derivatives T, the step is Chebyshev's: Δ = Δ₁ − ½H⁻¹T[Δ₁, Δ₁], Δ₁ the
// Newton step, which converges cubically (Traub, 1964), under the same
// step-halving safeguard.
//
// The last step is not confirmed by another pass when the bounds make its
// outcome certain (certainStep): a step (Δa, Δb) moves each z_i by at most
// δ = |Δb|·vmax + |Δa|, so by Taylor's theorem ℓ, the score and the Hessian
// at the new point are known from the current pass to within explicit
// remainders. When the remainder of ℓ is below one rounding unit of ℓ and
// the decrement bounded through the score bound and half the smallest
// curvature is below tol²·max(1, |ℓ|), the step is taken and the point
// reported as converged, with the Taylor value of ℓ and the score bound as
// its gradient norm.
func locScaleNewton(eval locScaleEval, a, b, tol float64, maxIter int, n float64, bounds locScaleBounds) locScaleResult {
	res := locScaleResult{}
	p := eval(a, b)
	res.evaluations = 1
	if math.IsNaN(p.ll) || math.IsInf(p.ll, 0) {
		res.reason = "the starting point has no finite log-likelihood"
		return res
	}
	eps := tol * tol
	quiet := 0
	for it := 1; it <= maxIter; it++ {
		res.iterations = it
		det := p.haa*p.hbb - p.hab*p.hab
		var da, db float64
		newton := p.haa < 0 && det > 0
		if newton {
			// Δ = −H⁻¹∇ for the 2×2 Hessian.
			da = -(p.hbb*p.ga - p.hab*p.gb) / det
			db = -(-p.hab*p.ga + p.haa*p.gb) / det
		} else {
			// Not negative definite in floating point: a gradient step
			// scaled by the diagonal curvature.
			da = p.ga / math.Max(math.Abs(p.haa), 1)
			db = p.gb / math.Max(math.Abs(p.hbb), n/(b*b))
		}
		decrement := p.ga*da + p.gb*db
		scale := math.Max(1, math.Abs(p.ll))
		if newton && decrement <= eps*scale {
			res.converged = true
			break
		}
		if newton && p.cubic && decrement <= 1e-3*scale {
			// Chebyshev's correction −½H⁻¹T[Δ₁, Δ₁].
			ua, ub := p.third(da, db)
			da += -0.5 * (p.hbb*ua - p.hab*ub) / det
			db += -0.5 * (-p.hab*ua + p.haa*ub) / det
		}
		if newton && bounds.c3 > 0 && decrement <= 1e-3*scale {
			if ll, g, ok := certainStep(p, n, b, da, db, eps, bounds); ok {
				a, b = a+da, b+db
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
			p = eval(a, b)
			res.evaluations++
			continue
		}
		step := 1.0
		accepted := false
		for h := 0; h < 60; h++ {
			na, nb := a+step*da, b+step*db
			if nb > 0 {
				np := eval(na, nb)
				res.evaluations++
				if np.ll > p.ll || (np.ll == p.ll && step == 1) {
					a, b = na, nb
					p = np
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
	res.location, res.scale, res.logLik = a/b, 1/b, p.ll
	// Gradient on the (a, b) scale of the standardized problem.
	res.gradNorm = math.Max(math.Abs(p.ga), math.Abs(p.gb))
	return res
}

// third returns T[Δ, Δ] = (Σ T_aij ΔiΔj, Σ T_bij ΔiΔj) for Δ = (da, db).
func (p locScalePoint) third(da, db float64) (ua, ub float64) {
	ua = p.taaa*da*da + 2*p.taab*da*db + p.tabb*db*db
	ub = p.taab*da*da + 2*p.tabb*da*db + p.tbbb*db*db
	return ua, ub
}

// certainStep applies locScaleNewton's Taylor bounds to the step (da, db)
// from point p with 1/scale b: it reports whether the step's end is
// certainly converged, with ℓ there and the bound on its score components.
//
// Without third derivatives (order 2): ℓ(new) = ℓ + ∇ᵀΔ + ½ΔᵀHΔ to within
// (n/6)(c3·δ³ + 2|Δb|³/b_min³), the score is ∇ + HΔ to within
// (n/2)(c3·δ²·max(1, vmax) + 2Δb²/b_min³). With them (order 3): ℓ(new)
// adds ⅙T[Δ, Δ, Δ], within (n/24)(c4·δ⁴ + 6Δb⁴/b_min⁴), and the score adds
// ½T[Δ, Δ], within (n/6)(c4·δ³·max(1, vmax) + 6|Δb|³/b_min⁴). The terms in
// b_min are those of n ln b. The Hessian moves by at most
// n(c3·δ·(1+vmax)² + 2|Δb|/b_min³) per entry, which must stay below half
// the smallest curvature μ_min of −H; the decrement at the new point is
// then at most 2|score|²/(μ_min/2).
func certainStep(p locScalePoint, n, b, da, db, eps float64, bd locScaleBounds) (ll, gNorm float64, ok bool) {
	bmin := b - math.Abs(db)
	if !(bmin > 0) || !(bd.vmax >= 0) || math.IsInf(bd.vmax, 0) {
		return 0, 0, false
	}
	delta := math.Abs(db)*bd.vmax + math.Abs(da)
	adb := math.Abs(db)
	ib := 1 / bmin
	// Score and ℓ at the new point by Taylor, with the remainders' bounds.
	ga := p.ga + p.haa*da + p.hab*db
	gb := p.gb + p.hab*da + p.hbb*db
	ll = p.ll + p.ga*da + p.gb*db + 0.5*(p.haa*da*da+2*p.hab*da*db+p.hbb*db*db)
	var rll, rg float64
	if p.cubic && bd.c4 > 0 {
		ua, ub := p.third(da, db)
		ga += 0.5 * ua
		gb += 0.5 * ub
		ll += (ua*da + ub*db) / 6
		d3 := delta * delta * delta
		rll = n / 24 * (bd.c4*d3*delta + 6*adb*adb*adb*adb*ib*ib*ib*ib)
		rg = n / 6 * (bd.c4*d3*math.Max(1, bd.vmax) + 6*adb*adb*adb*ib*ib*ib*ib)
	} else {
		rll = n / 6 * (bd.c3*delta*delta*delta + 2*adb*adb*adb*ib*ib*ib)
		rg = n / 2 * (bd.c3*delta*delta*math.Max(1, bd.vmax) + 2*adb*adb*ib*ib*ib)
	}
	scale := math.Max(1, math.Abs(ll))
	if !(rll <= 0x1p-52*scale) {
		return 0, 0, false
	}
	// Smallest eigenvalue of −H: det/μmax, μmax the largest.
	tr := -p.haa - p.hbb
	det := p.haa*p.hbb - p.hab*p.hab
	muMax := tr/2 + math.Sqrt(math.Max(0, tr*tr/4-det))
	muMin := det / muMax
	drift := n * (bd.c3*delta*(1+bd.vmax)*(1+bd.vmax) + 2*adb*ib*ib*ib)
	if !(muMin > 0) || !(2*drift <= muMin) {
		return 0, 0, false
	}
	g := math.Max(math.Abs(ga), math.Abs(gb)) + rg
	if !(2*g*g/(muMin/2) <= eps*scale) {
		return 0, 0, false
	}
	return ll, g, true
}
