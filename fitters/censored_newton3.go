package fitters

import (
	"fmt"
	"math"
)

// newton3Point is a three-parameter log-likelihood ℓ(θ) with its score g
// and observed Hessian h (symmetric, every entry filled).
type newton3Point struct {
	ll float64
	g  [3]float64
	h  [3][3]float64
}

// finiteDerivatives reports whether the score and the Hessian are finite.
func (p *newton3Point) finiteDerivatives() bool {
	for i := 0; i < 3; i++ {
		if !finite(p.g[i]) {
			return false
		}
		for j := 0; j < 3; j++ {
			if !finite(p.h[i][j]) {
				return false
			}
		}
	}
	return true
}

// newton3Result is the outcome of censoredNewton3.
type newton3Result struct {
	theta       [3]float64
	logLik      float64
	iterations  int
	evaluations int
	gradNorm    float64 // max |score component| at theta
	converged   bool
	escaped     bool // the iterates left the region the caller allowed
	reason      string
}

// convergence is the record of a converged run by the named method.
func (r newton3Result) convergence(method string) Convergence {
	return Convergence{Method: method, Iterations: r.iterations, Evaluations: r.evaluations, GradientNorm: r.gradNorm, Converged: true}
}

// cholesky3 factors a symmetric 3×3 matrix a = LLᵀ, reporting false when a
// is not positive definite.
func cholesky3(a [3][3]float64) (l [3][3]float64, ok bool) {
	for j := 0; j < 3; j++ {
		d := a[j][j]
		for k := 0; k < j; k++ {
			d -= l[j][k] * l[j][k]
		}
		if !(d > 0) {
			return l, false
		}
		l[j][j] = math.Sqrt(d)
		for i := j + 1; i < 3; i++ {
			s := a[i][j]
			for k := 0; k < j; k++ {
				s -= l[i][k] * l[j][k]
			}
			l[i][j] = s / l[j][j]
		}
	}
	return l, true
}

// solveCholesky3 solves LLᵀx = b.
func solveCholesky3(l [3][3]float64, b [3]float64) (x [3]float64) {
	var y [3]float64
	for i := 0; i < 3; i++ {
		s := b[i]
		for k := 0; k < i; k++ {
			s -= l[i][k] * y[k]
		}
		y[i] = s / l[i][i]
	}
	for i := 2; i >= 0; i-- {
		s := y[i]
		for k := i + 1; k < 3; k++ {
			s -= l[k][i] * x[k]
		}
		x[i] = s / l[i][i]
	}
	return x
}

// newton3Direction returns Δ = (−H + τI)⁻¹∇ℓ with τ = 0 when −H is
// positive definite (pd = true); otherwise τ starts at 10⁻³ of the largest
// diagonal magnitude of −H and grows tenfold until −H + τI factors (a
// modified Newton step, Nocedal & Wright, 2006, §3.4), so Δ is an ascent
// direction.
func newton3Direction(p *newton3Point) (d [3]float64, decrement float64, pd bool, ok bool) {
	var a [3][3]float64
	big := 0.0
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			a[i][j] = -p.h[i][j]
		}
		big = math.Max(big, math.Abs(a[i][i]))
	}
	l, pd := cholesky3(a)
	if !pd {
		tau := 1e-3 * math.Max(big, 1)
		for k := 0; k < 40; k++ {
			b := a
			for i := 0; i < 3; i++ {
				b[i][i] += tau
			}
			if l, ok = cholesky3(b); ok {
				break
			}
			tau *= 10
		}
		if !ok {
			return d, 0, false, false
		}
	}
	d = solveCholesky3(l, p.g)
	decrement = d[0]*p.g[0] + d[1]*p.g[1] + d[2]*p.g[2]
	return d, decrement, pd, true
}

// censoredNewton3 maximises a smooth three-parameter log-likelihood by the
// modified Newton method of censoredNewton2, extended to three
// coordinates: the direction from newton3Direction, each coordinate's move
// bounded by maxStep[i] (a trust region for a far-off start), the step
// halved until ℓ increases (ℓ = −∞ outside the parameter space, so halving
// also keeps the step inside it). It stops when the Newton decrement
// λ² = ∇ℓᵀ(−H)⁻¹∇ℓ falls below tol²·max(1, |ℓ|) at a point where −H is
// positive definite — a certified local maximum. Near it, once the
// decrement is below 10⁻¹² of |ℓ|, full steps are taken without the
// increase test (rounding hides the last gains), at most five times; the
// point then counts as converged only if the decrement has fallen below
// 10⁻¹⁶·max(1, |ℓ|). Every failure is reported with its reason. When
// escaped is not nil and reports true at an accepted point, the run stops
// there (res.escaped): the caller's sign that the iterates are heading for
// a limit of the parameter space (Student's df → ∞, say).
func censoredNewton3(eval func(theta [3]float64) newton3Point, theta [3]float64, maxStep [3]float64, tol float64, maxIter int, escaped func(theta [3]float64) bool) newton3Result {
	res := newton3Result{theta: theta}
	p := eval(theta)
	res.evaluations = 1
	if !finite(p.ll) {
		res.reason = "the starting point has no finite log-likelihood"
		res.logLik = p.ll
		return res
	}
	eps := tol * tol
	quiet := 0
	for it := 1; it <= maxIter; it++ {
		res.iterations = it
		if !p.finiteDerivatives() {
			res.reason = "the score or Hessian is not finite"
			break
		}
		d, decrement, pd, ok := newton3Direction(&p)
		if !ok {
			res.reason = "no positive definite modification of the Hessian"
			break
		}
		done, fullStep, converged, reason := newtonStopTest(pd, decrement, p.ll, eps, &quiet)
		if done {
			res.converged, res.reason = converged, reason
			break
		}
		if fullStep {
			next := addScaled(theta, d, 1)
			np := eval(next)
			res.evaluations++
			if !finite(np.ll) {
				res.reason = "a full Newton step near the maximum left the parameter space"
				break
			}
			theta, p = next, np
			continue
		}
		step := 1.0
		for i := 0; i < 3; i++ {
			if m := math.Abs(d[i]) * step; m > maxStep[i] {
				step = maxStep[i] / math.Abs(d[i])
			}
		}
		accepted := false
		for h := 0; h < 60; h++ {
			next := addScaled(theta, d, step)
			np := eval(next)
			res.evaluations++
			if np.ll > p.ll {
				theta, p = next, np
				accepted = true
				break
			}
			step /= 2
		}
		if !accepted {
			res.reason = fmt.Sprintf("step halving found no increase (Newton decrement %.3g)", decrement)
			break
		}
		if escaped != nil && escaped(theta) {
			res.escaped = true
			res.reason = "the iterates left the region of interior maxima"
			break
		}
	}
	if !res.converged && res.reason == "" {
		res.reason = fmt.Sprintf("iteration limit %d reached", maxIter)
	}
	res.theta, res.logLik = theta, p.ll
	res.gradNorm = math.Max(math.Abs(p.g[0]), math.Max(math.Abs(p.g[1]), math.Abs(p.g[2])))
	return res
}

func addScaled(x, d [3]float64, s float64) [3]float64 {
	return [3]float64{x[0] + s*d[0], x[1] + s*d[1], x[2] + s*d[2]}
}

// shapeTermSums accumulates terms φ of a location–scale–shape
// log-likelihood, each a function of a standardised value z = (x − μ)/σ
// (or two, for an interval) and of a shape coordinate κ, into the score and
// Hessian in θ = (a, t, κ) with μ = C + S·a, σ = S·e^t. With s = e^t
// (σ in units of S), ∂z/∂a = −1/s, ∂z/∂t = −z, ∂²z/∂a∂t = 1/s,
// ∂²z/∂t² = z, ∂²z/∂a² = 0, so for one z
//
//	g_a = −φ_z/s, g_t = −φ_z z, g_κ = φ_κ,
//	H_aa = φ_zz/s², H_at = (φ_zz z + φ_z)/s, H_tt = φ_zz z² + φ_z z,
//	H_aκ = −φ_zκ/s, H_tκ = −φ_zκ z, H_κκ = φ_κκ.
//
// The sums over terms are kept unscaled and turned into the point once.
type shapeTermSums struct {
	ll                 float64
	z1, z1z            float64 // Σ φ_z, Σ φ_z z
	zz, zzz, zzzz      float64 // Σ φ_zz, Σ φ_zz z, Σ φ_zz z²
	zk, zkz            float64 // Σ φ_zκ, Σ φ_zκ z
	k1, kk             float64 // Σ φ_κ, Σ φ_κκ
	mixZ, mixZZ, mixZ2 float64 // interval cross terms: Σ φ_lu, Σ φ_lu(z_l + z_u), Σ φ_lu z_l z_u
}

// add adds count copies of a term in one z.
func (s *shapeTermSums) add(count, z, phi, pz, pzz, pk, pzk, pkk float64) {
	s.ll += count * phi
	s.z1 += count * pz
	s.z1z += count * pz * z
	s.zz += count * pzz
	s.zzz += count * pzz * z
	s.zzzz += count * pzz * z * z
	s.zk += count * pzk
	s.zkz += count * pzk * z
	s.k1 += count * pk
	s.kk += count * pkk
}

// addInterval adds count copies of an interval term φ(z_l, z_u, κ) given
// its partial derivatives: the one-z parts through add (with φ_κ, φ_κκ
// once) and the cross derivative φ_lu.
func (s *shapeTermSums) addInterval(count, zl, zu, phi, pl, pu, pll, puu, plu, pk, plk, puk, pkk float64) {
	s.add(count, zl, phi, pl, pll, pk, plk, pkk)
	s.add(count, zu, 0, pu, puu, 0, puk, 0)
	s.mixZ += count * plu
	s.mixZZ += count * plu * (zl + zu)
	s.mixZ2 += count * plu * zl * zu
}

// point turns the sums into ℓ, score and Hessian in (a, t, κ) at s = e^t.
func (s *shapeTermSums) point(sc float64) newton3Point {
	var p newton3Point
	p.ll = s.ll
	p.g[0] = -s.z1 / sc
	p.g[1] = -s.z1z
	p.g[2] = s.k1
	haa := (s.zz + 2*s.mixZ) / (sc * sc)
	hat := (s.zzz + s.mixZZ + s.z1) / sc
	htt := s.zzzz + 2*s.mixZ2 + s.z1z
	hak := -s.zk / sc
	htk := -s.zkz
	p.h = [3][3]float64{{haa, hat, hak}, {hat, htt, htk}, {hak, htk, s.kk}}
	return p
}

// locScaleShapeSample is a censored dataset as the three-parameter Newton
// routes read it: the exact values in place, the distinct non-detect
// limits and suspensions with their counts, and the distinct two-sided
// intervals with theirs (an interval open below is a non-detect at its
// upper end, one open above a suspension at its lower end), together with
// the centre C and unit S of θ's location and scale (μ = C + S·a, σ = S·e^t).
type locScaleShapeSample struct {
	exact []float64
	c, s  float64
	censoredTallies
}

// newLocScaleShapeSample tallies d's censored values. It reports false when
// one has no place in a likelihood on the real line (a NaN, an infinite
// non-detect limit or suspension, an empty interval).
func newLocScaleShapeSample(d *Data, c, s float64) (locScaleShapeSample, bool) {
	cs := locScaleShapeSample{exact: d.Exact, c: c, s: s}
	for _, x := range d.Exact {
		if !finite(x) {
			return cs, false
		}
	}
	for _, x := range d.Left {
		if !finite(x) {
			return cs, false
		}
		cs.left.add(x)
	}
	for _, x := range d.Right {
		if !finite(x) {
			return cs, false
		}
		cs.right.add(x)
	}
	for i, l := range d.Lower {
		u := d.Upper[i]
		switch {
		case math.IsNaN(l) || math.IsNaN(u) || !(l < u) || math.IsInf(l, 1) || math.IsInf(u, -1):
			return cs, false
		case math.IsInf(l, -1) && math.IsInf(u, 1):
			// probability one
		case math.IsInf(l, -1):
			cs.left.add(u)
		case math.IsInf(u, 1):
			cs.right.add(l)
		default:
			cs.addInterval(l, u)
		}
	}
	return cs, true
}
