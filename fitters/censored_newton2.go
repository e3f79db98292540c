package fitters

import (
	"fmt"
	"math"
)

// newton2Point is a two-parameter log-likelihood ℓ(θ₀, θ₁) with its score
// (g0, g1) and observed Hessian (h00, h01, h11).
type newton2Point struct {
	ll, g0, g1, h00, h01, h11 float64
}

// newton2Eval evaluates ℓ and its derivatives at (θ₀, θ₁); ℓ = −∞ outside
// the parameter space.
type newton2Eval func(t0, t1 float64) newton2Point

// newton2Result is the outcome of censoredNewton2.
type newton2Result struct {
	t0, t1      float64
	logLik      float64
	iterations  int
	evaluations int
	gradNorm    float64 // max |score component| at (t0, t1)
	converged   bool
	reason      string
}

// convergence is the record of a converged run by the named method.
func (r newton2Result) convergence(method string) Convergence {
	return Convergence{Method: method, Iterations: r.iterations, Evaluations: r.evaluations, GradientNorm: r.gradNorm, Converged: true}
}

// maxNewtonStep bounds each coordinate's change in one step of
// censoredNewton2: both routes work on logarithms of the parameters, so a
// factor e² at most.
const maxNewtonStep = 2

// censoredNewton2 maximises a smooth two-parameter log-likelihood that need
// not be concave (the censored gamma and inverse Gaussian) by a modified
// Newton method with a backtracking line search (Nocedal & Wright, 2006,
// §3.4): the direction is Δ = (−H + τI)⁻¹∇ℓ, τ = 0 where −H is positive
// definite, otherwise τ lifts the smallest eigenvalue of −H to 10⁻³ of the
// largest (so Δ is an ascent direction); the step is shortened so that no
// coordinate moves by more than maxNewtonStep, then halved until ℓ
// increases. It stops when the Newton decrement λ² = ∇ℓᵀ(−H)⁻¹∇ℓ (twice
// the gain the quadratic model still predicts) falls below
// tol²·max(1, |ℓ|) at a point where −H is positive definite.
//
// Near the maximum ℓ's rounding can hide the last gains: once the
// decrement is below 10⁻¹² of |ℓ| the full Newton step is taken without
// the increase test, at most five times; if the decrement has then fallen
// below 10⁻¹⁶·max(1, |ℓ|) the point is reported as converged at rounding
// level (the decrement is the squared distance to the maximum in standard
// errors: within 3·10⁻⁷ of them at |ℓ| = 1000), otherwise the run fails. Any failure is reported with its reason, and the caller
// falls back to the generic route.
func censoredNewton2(eval newton2Eval, t0, t1, tol float64, maxIter int) newton2Result {
	res := newton2Result{t0: t0, t1: t1}
	p := eval(t0, t1)
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
		if !finite(p.g0) || !finite(p.g1) || !finite(p.h00) || !finite(p.h01) || !finite(p.h11) {
			res.reason = "the score or Hessian is not finite"
			break
		}
		// A = −H, a symmetric 2×2 matrix.
		a00, a01, a11 := -p.h00, -p.h01, -p.h11
		det := a00*a11 - a01*a01
		pd := a00 > 0 && a11 > 0 && det > 0
		if !pd {
			half := 0.5 * (a00 + a11)
			root := math.Hypot(0.5*(a00-a11), a01)
			lmin, lmax := half-root, half+root
			tau := -lmin + 1e-3*math.Max(math.Abs(lmax), 1)
			a00 += tau
			a11 += tau
			det = a00*a11 - a01*a01
		}
		d0 := (a11*p.g0 - a01*p.g1) / det
		d1 := (a00*p.g1 - a01*p.g0) / det
		decrement := p.g0*d0 + p.g1*d1
		done, fullStep, converged, reason := newtonStopTest(pd, decrement, p.ll, eps, &quiet)
		if done {
			res.converged, res.reason = converged, reason
			break
		}
		if fullStep {
			np := eval(t0+d0, t1+d1)
			res.evaluations++
			if !finite(np.ll) {
				res.reason = "a full Newton step near the maximum left the parameter space"
				break
			}
			t0, t1, p = t0+d0, t1+d1, np
			continue
		}
		// A step may move each (logarithmic) coordinate by at most
		// maxNewtonStep: a trust region for the far-off start.
		step := 1.0
		if big := math.Max(math.Abs(d0), math.Abs(d1)); big > maxNewtonStep {
			step = maxNewtonStep / big
		}
		accepted := false
		for h := 0; h < 60; h++ {
			n0, n1 := t0+step*d0, t1+step*d1
			np := eval(n0, n1)
			res.evaluations++
			if np.ll > p.ll {
				t0, t1, p = n0, n1, np
				accepted = true
				break
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
	res.t0, res.t1, res.logLik = t0, t1, p.ll
	res.gradNorm = math.Max(math.Abs(p.g0), math.Abs(p.g1))
	return res
}

// censoredNewtonFallback records in fit's method that the dedicated
// censored Newton route was tried first and why it was left, after the
// generic route has filled in fit.
func censoredNewtonFallback(fit *Fit, reason string) {
	fit.Convergence.Method += "; the censored Newton route did not converge first (" + reason + ")"
}

// censoredPositive holds the censored values of data on x > 0, scaled to
// t = x/c: distinct non-detect limits and suspensions with their counts,
// and distinct two-sided intervals with theirs (an interval open at or
// below 0 is a non-detect at its upper end, one open above a suspension at
// its lower end; a suspension at or below 0 adds ln S = 0 and is dropped).
type censoredPositive struct {
	censoredTallies
}

// add tallies d's censored values scaled by ic = 1/c. It reports false when
// one has no place in a likelihood on x > 0 that the Newton routes take: a
// non-detect limit ≤ 0 (ln F = −∞) or infinite, a NaN, an empty interval.
func (s *censoredPositive) add(d *Data, ic float64) bool {
	to := func(x float64) float64 { return x * ic }
	for _, x := range d.Left {
		if !(x > 0) || math.IsInf(x, 1) {
			return false
		}
		s.left.add(to(x))
	}
	for _, x := range d.Right {
		switch {
		case math.IsNaN(x) || math.IsInf(x, 1):
			return false
		case x > 0:
			s.right.add(to(x))
		}
	}
	first := len(s.lower)
	for i, l := range d.Lower {
		u := d.Upper[i]
		switch {
		case math.IsNaN(l) || math.IsNaN(u) || !(l < u) || math.IsInf(l, 1) || math.IsInf(u, -1):
			return false
		case l <= 0 && math.IsInf(u, 1):
			// probability one
		case l <= 0:
			s.left.add(to(u))
		case math.IsInf(u, 1):
			s.right.add(to(l))
		default:
			s.addInterval(l, u)
		}
	}
	// The intervals are told apart as given and kept scaled.
	for i := first; i < len(s.lower); i++ {
		s.lower[i], s.upper[i] = to(s.lower[i]), to(s.upper[i])
	}
	return true
}

// censoredCentre returns the centre c of the Newton routes' statistics: the
// mean of the exact values, or of every recorded positive value when there
// are none (0 when there is nothing positive).
func censoredCentre(d *Data) float64 {
	c := 0.0
	if len(d.Exact) > 0 {
		c = sumOf(d.Exact) / float64(len(d.Exact))
	}
	if !(c > 0) || math.IsInf(c, 0) {
		if x := startSample(d, 1, true); len(x) > 0 {
			c = sumOf(x) / float64(len(x))
		}
	}
	return c
}

// intervalNumbers numbers distinct two-sided intervals (l, u] in order of
// first appearance, for the censored routes' tallies of interval data.
type intervalNumbers map[[2]float64]int

// number returns the interval's number, and fresh = true when it had none
// (it then gets next, the count of intervals already numbered).
func (m *intervalNumbers) number(l, u float64, next int) (j int, fresh bool) {
	k := [2]float64{l, u}
	if j, ok := (*m)[k]; ok {
		return j, false
	}
	if *m == nil {
		*m = make(intervalNumbers)
	}
	(*m)[k] = next
	return next, true
}

// censoredTallies holds a sample's censored values as the Newton routes
// sum them: non-detect limits (left) and suspension times (right) by
// distinct value, two-sided intervals (lower[j], upper[j]] by distinct pair
// with their counts, each in order of first appearance.
type censoredTallies struct {
	left, right  tally
	lower, upper []float64
	inCount      []float64
	pairs        intervalNumbers
}

// addInterval counts the interval (l, u].
func (c *censoredTallies) addInterval(l, u float64) {
	if j, fresh := c.pairs.number(l, u, len(c.lower)); !fresh {
		c.inCount[j]++
		return
	}
	c.lower = append(c.lower, l)
	c.upper = append(c.upper, u)
	c.inCount = append(c.inCount, 1)
}

// tally holds distinct values in order of first appearance with their
// counts (the order keeps every sum deterministic). It looks a value up by
// a linear scan while there are at most 16 distinct ones (field data have
// a few detection limits and suspension times: no hashing per value), by a
// map beyond.
type tally struct {
	u, n  []float64
	index map[float64]int
}

func (t *tally) add(u float64) {
	if t.index == nil {
		for i := len(t.u) - 1; i >= 0; i-- {
			if t.u[i] == u {
				t.n[i]++
				return
			}
		}
		t.u = append(t.u, u)
		t.n = append(t.n, 1)
		if len(t.u) > 16 {
			t.index = make(map[float64]int, 2*len(t.u))
			for i, v := range t.u {
				t.index[v] = i
			}
		}
		return
	}
	if i, ok := t.index[u]; ok {
		t.n[i]++
		return
	}
	t.index[u] = len(t.u)
	t.u = append(t.u, u)
	t.n = append(t.n, 1)
}

// positiveMoments returns the mean, variance and mean reciprocal of every
// positive finite value recorded in d: exact values, non-detect limits,
// suspension times, and each interval's midpoint (or its one finite
// positive end). These are crude moments of the law — censored values sit
// at their limits — meant only for a starting point. Zeros when there is
// no such value.
func positiveMoments(d *Data) (mean, variance, meanInv float64) {
	var n, sum, sumSq, sumInv float64
	add := func(x float64) {
		if x > 0 && !math.IsInf(x, 1) {
			n++
			sum += x
			sumSq += x * x
			sumInv += 1 / x
		}
	}
	for _, v := range [][]float64{d.Exact, d.Left, d.Right} {
		for _, x := range v {
			add(x)
		}
	}
	for i, l := range d.Lower {
		u := d.Upper[i]
		switch {
		case l > 0 && !math.IsInf(u, 1):
			add(0.5 * (l + u))
		case l > 0:
			add(l)
		default:
			add(u)
		}
	}
	if n == 0 {
		return 0, 0, 0
	}
	mean = sum / n
	return mean, math.Max(0, sumSq/n-mean*mean), sumInv / n
}

// newtonStopTest is the stopping rule of the modified Newton methods
// (censoredNewton2, censoredNewton3) at an iterate with log-likelihood ll,
// Newton decrement λ² = ∇ℓᵀ(−H)⁻¹∇ℓ and pd telling whether −H itself was
// positive definite: done, converged, when λ² ≤ eps·max(1, |ℓ|) with pd
// (a certified local maximum); near it, once λ² ≤ 10⁻¹²·max(1, |ℓ|),
// fullStep asks for a full step without the increase test (rounding hides
// the last gains), at most five times (counted in quiet), after which it
// is done, converged only if λ² ≤ 10⁻¹⁶·max(1, |ℓ|), else with the reason.
func newtonStopTest(pd bool, decrement, ll, eps float64, quiet *int) (done, fullStep, converged bool, reason string) {
	scale := math.Max(1, math.Abs(ll))
	switch {
	case !pd || decrement > 1e-12*scale && decrement > eps*scale:
		return false, false, false, ""
	case decrement <= eps*scale:
		return true, false, true, ""
	}
	*quiet++
	if *quiet <= 5 {
		return false, true, false, ""
	}
	if decrement <= 1e-16*scale {
		return true, false, true, ""
	}
	return true, false, false, fmt.Sprintf("the Newton decrement stalled at %.3g (rounding of the log-likelihood)", decrement)
}
