package fitters

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// paretoCensoredSample holds what the censored Pareto Newton route needs
// from a dataset, gathered in one pass. U is paretoBound (the largest scale
// with a finite likelihood) and every value is kept as ℓ = ln(x/U): the
// exact values through their count and Σ ℓ (a running product, one
// logarithm per few values), the censored ones tallied by distinct value
// and logged once.
type paretoCensoredSample struct {
	bound, lnBound float64
	n, sumL        float64 // number of exact values, Σ ln(x/U) over them
	atBound        bool    // U is an exact value and no non-detect or interval ends there
	left, right    tally
	lnLeft, lnRght []float64 // ln(x/U) of the tallied values
	lower, width   []float64 // intervals: ln(l/U) and ln(u/l), l > 0
	inCount        []float64
	corners        []paretoCorner // by increasing angle
}

// paretoCorner is a scale x_m = value below the bound U at which the
// likelihood has a corner: an interval's lower end l (ln(F(u) − F(l))
// rises in x_m below l and falls above it) or a suspension t (ln S(t)
// rises below t and is 0 above it). In (α, h) it is the ray h = α·angle,
// angle = ln(U/value) > 0, along which E(value) = 0.
type paretoCorner struct {
	angle, value float64
	interval     bool // an interval's lower end (else only suspensions)
}

// newParetoCensoredSample gathers d's statistics; false when an
// observation has no place in the route (a non-positive exact value or
// non-detect limit, a NaN, an empty interval, no finite bound).
func newParetoCensoredSample(d *Data) (paretoCensoredSample, bool) {
	s := paretoCensoredSample{bound: paretoBound(d), n: float64(len(d.Exact))}
	u := s.bound
	if !(u > 0) || math.IsInf(u, 1) {
		return s, false
	}
	s.lnBound = math.Log(u)
	acc := newLogAccumulator()
	lo := math.Inf(1)
	for _, x := range d.Exact {
		if !(x >= u) || math.IsInf(x, 1) {
			return s, false
		}
		lo = min(lo, x)
		acc.mul(x / u)
	}
	s.sumL = acc.sum()
	s.atBound = lo == u
	for _, x := range d.Left {
		if !(x >= u) || math.IsInf(x, 1) {
			return s, false
		}
		s.left.add(x)
	}
	for _, x := range d.Right {
		switch {
		case math.IsNaN(x) || math.IsInf(x, 1):
			return s, false
		case x > 0:
			s.right.add(x)
		}
	}
	var pairs intervalNumbers
	for i, l := range d.Lower {
		up := d.Upper[i]
		switch {
		case math.IsNaN(l) || math.IsNaN(up) || !(l < up) || math.IsInf(l, 1) || math.IsInf(up, -1):
			return s, false
		case l <= 0 && math.IsInf(up, 1):
			// probability one
		case math.IsInf(up, 1):
			s.right.add(l)
		case l <= 0:
			s.left.add(up)
		default:
			if j, fresh := pairs.number(l, up, len(s.lower)); !fresh {
				s.inCount[j]++
				continue
			}
			if up == u {
				s.atBound = false // ln(F(U) − F(l)) = −∞ at scale U
			}
			s.lower = append(s.lower, lnRatio(l, u))
			s.width = append(s.width, lnRatio(up, l))
			s.inCount = append(s.inCount, 1)
		}
	}
	for _, x := range s.left.u {
		l := lnRatio(x, u)
		if l == 0 {
			s.atBound = false // ln F(U) = −∞ at scale U
		}
		s.lnLeft = append(s.lnLeft, l)
	}
	for _, x := range s.right.u {
		s.lnRght = append(s.lnRght, lnRatio(x, u))
	}
	s.corners = paretoCorners(&s, d)
	return s, true
}

// paretoCorners lists the distinct corners of s below its bound, by
// increasing angle: the lower ends l of the bounded intervals and the
// suspensions, each with ln(l/U) < 0. The angle is −ln(l/U) as stored in
// s, so that on the ray E(l) = α·ln(l/U) + α·angle is exactly 0.
func paretoCorners(s *paretoCensoredSample, d *Data) []paretoCorner {
	var cs []paretoCorner
	for i, l := range d.Lower {
		if up := d.Upper[i]; l > 0 && l < s.bound && !math.IsInf(up, 1) {
			cs = append(cs, paretoCorner{angle: -lnRatio(l, s.bound), value: l, interval: true})
		}
	}
	for i, t := range s.right.u {
		if t > 0 && s.lnRght[i] < 0 {
			cs = append(cs, paretoCorner{angle: -s.lnRght[i], value: t})
		}
	}
	slices.SortFunc(cs, func(a, b paretoCorner) int {
		if c := cmp.Compare(a.angle, b.angle); c != 0 {
			return c
		}
		return cmp.Compare(a.value, b.value)
	})
	out := cs[:0]
	for _, c := range cs {
		if n := len(out); n > 0 && out[n-1].angle == c.angle {
			out[n-1].interval = out[n-1].interval || c.interval
			continue
		}
		out = append(out, c)
	}
	return out
}

// paretoNatural is ℓ(α, h) with its score and Hessian in (α, h), the
// Pareto log-likelihood in shape α and h = α·ln(U/x_m) = −ln S(U) ≥ 0 (the
// cumulative hazard at the bound U; x_m = U·e^(−h/α)). Each value x enters
// through E(x) = α·ln(x/x_m) = αℓ + h, linear in (α, h), with E ~ Exp(1):
//
//	exact:      ln α − ln x − E,        E ≥ 0
//	non-detect: ln(1 − e^(−E))          (ln F)
//	suspension: −max(E, 0)              (ln S)
//	interval:   ln(e^(−max(E_l, 0)) − e^(−E_u)),
//
// each the logarithm of an integral of the log-concave Exp(1) density
// over an interval whose ends are linear in (α, h), hence concave in
// (α, h) (Prékopa, 1973; as Burridge, 1981, for location–scale laws): the
// censored Pareto likelihood has at most one maximum over the convex
// domain h ≥ 0. With q = 1/(e^E − 1), ln(1 − e^(−E)) has derivative q and
// second derivative −q(1 + q) in E; the interval with E_l > 0 is
// −E_l + ln(1 − e^(−αw)), w = ln(u/l). A suspension or interval end at
// E = 0 takes the derivative on the side of increasing h.
func paretoNatural(s *paretoCensoredSample, alpha, h float64) (p newton2Point) {
	if !(alpha > 0) || !(h >= 0) || math.IsInf(alpha, 1) || math.IsInf(h, 1) {
		p.ll = math.Inf(-1)
		return p
	}
	// ℓ in p.ll, ∂α in g0, ∂h in g1, ∂αα in h00, ∂αh in h01, ∂hh in h11.
	if s.n > 0 {
		p.ll = s.n*math.Log(alpha) - (s.sumL + s.n*s.lnBound) - alpha*s.sumL - s.n*h
		p.g0 = s.n/alpha - s.sumL
		p.g1 = -s.n
		p.h00 = -s.n / (alpha * alpha)
	}
	// E = α·l + h is rounded as written (float64(α·l) + h, never fused
	// into one multiply-add, which arm64 would do): on a corner's ray,
	// h = α·angle with l = −angle, E must be exactly 0 so that the corner's
	// side is the same on every processor.
	lnF := func(c, l float64) {
		e := float64(alpha*l) + h
		if !(e > 0) {
			p.ll = math.Inf(-1)
			return
		}
		em1 := math.Expm1(e)
		q := 1 / em1
		curv := -q * (1 + q)
		p.ll += c * log1mExp(-e)
		p.g0 += c * q * l
		p.g1 += c * q
		p.h00 += c * curv * l * l
		p.h01 += c * curv * l
		p.h11 += c * curv
	}
	for i, l := range s.lnLeft {
		lnF(s.left.n[i], l)
	}
	for i, l := range s.lnRght {
		if e := float64(alpha*l) + h; e >= 0 {
			c := s.right.n[i]
			p.ll -= c * e
			p.g0 -= c * l
			p.g1 -= c
		}
	}
	for i, l := range s.lower {
		c, w := s.inCount[i], s.width[i]
		if float64(alpha*l)+h < 0 {
			lnF(c, l+w)
			continue
		}
		dw := alpha * w
		q := 1 / math.Expm1(dw)
		p.ll += c * (log1mExp(-dw) - (float64(alpha*l) + h))
		p.g0 += c * (q*w - l)
		p.g1 -= c
		p.h00 -= c * q * (1 + q) * w * w
	}
	if math.IsNaN(p.ll) {
		p.ll = math.Inf(-1)
	}
	return p
}

// paretoCensoredPoint is paretoNatural in the route's coordinates
// (ln α, ln h): ∂/∂ln α = α∂/∂α, ∂²/∂(ln α)² = α²∂²/∂α² + α∂/∂α, and the
// same for h.
func paretoCensoredPoint(s *paretoCensoredSample, la, lh float64) newton2Point {
	a, h := math.Exp(la), math.Exp(lh)
	p := paretoNatural(s, a, h)
	if !(h > 0) {
		p.ll = math.Inf(-1)
	}
	p.h00 = a*a*p.h00 + a*p.g0
	p.h01 *= a * h
	p.h11 = h*h*p.h11 + h*p.g1
	p.g0 *= a
	p.g1 *= h
	return p
}

// paretoRayShape maximises ℓ(α, α·angle) — the scale fixed at
// U·e^(−angle): the bound itself at angle 0 (the edge), a corner's value
// otherwise — over t = ln α by Newton's method with step halving. ℓ is
// concave along the ray in t: with the scale fixed every E of
// paretoNatural is e^t·c for a constant c, and ln α − E, −max(E, 0),
// ln(1 − e^(−E)) and their interval form are each concave in t. It stops
// when the Newton decrement g²/(−H) falls below tol²·max(1, |ℓ|). The
// returned point carries ℓ, the score g1 in h (on a corner's ray, that of
// the side h > α·angle, where the scale lies below the corner) and, in g0
// and h00, the derivatives along the ray in t.
func paretoRayShape(s *paretoCensoredSample, angle, t, tol float64, maxIter int) (alpha float64, p newton2Point, iterations, evaluations int, ok bool) {
	at := func(t float64) newton2Point {
		evaluations++
		a := math.Exp(t)
		if angle == 0 {
			q := paretoNatural(s, a, 0)
			q.h00 = a*a*q.h00 + a*q.g0
			q.g0 *= a
			return q
		}
		q := paretoNatural(s, a, a*angle)
		g := q.g0 + angle*q.g1
		q.h00 = a*a*(q.h00+angle*(2*q.h01+angle*q.h11)) + a*g
		q.g0 = a * g
		return q
	}
	p = at(t)
	quiet := 0
	for it := 1; it <= maxIter && finite(p.ll); it++ {
		iterations = it
		if !(p.h00 < 0) || !finite(p.g0) {
			return 0, p, it, evaluations, false
		}
		step := -p.g0 / p.h00
		decrement, scale := p.g0*step, math.Max(1, math.Abs(p.ll))
		if decrement <= tol*tol*scale {
			return math.Exp(t), p, it, evaluations, true
		}
		if decrement <= 1e-12*scale {
			// As censoredNewton2 near the maximum: ℓ's rounding hides the
			// last gains, so full steps without the increase test, at
			// most five, converged if the decrement reaches 10⁻¹⁶·|ℓ|.
			if quiet++; quiet > 5 {
				return math.Exp(t), p, it, evaluations, decrement <= 1e-16*scale
			}
			t, p = t+step, at(t+step)
			continue
		}
		step = max(-maxNewtonStep, min(maxNewtonStep, step))
		moved := false
		for k := 0; k < 60; k++ {
			if np := at(t + step); np.ll > p.ll {
				t, p, moved = t+step, np, true
				break
			}
			step /= 2
		}
		if !moved {
			return 0, p, it, evaluations, false
		}
	}
	return 0, p, iterations, evaluations, false
}

// paretoCornerJump is how much the score in h falls across the corner's
// ray at shape alpha: paretoNatural gives the score of the side below the
// corner (h > α·angle, each E(value) > 0); on the side above it an
// interval (value, u] enters as ln F(u), with score q = 1/(e^(αw) − 1) in
// h instead of −1, and a suspension at value adds nothing instead of −1.
// The score of the side above is the one below plus the jump (> 0).
func paretoCornerJump(s *paretoCensoredSample, angle, alpha float64) float64 {
	var jump float64
	for i, l := range s.lower {
		if l == -angle {
			jump += s.inCount[i] * (1 + 1/math.Expm1(alpha*s.width[i]))
		}
	}
	for i, l := range s.lnRght {
		if l == -angle {
			jump += s.right.n[i]
		}
	}
	return jump
}

// paretoCornerSearch is the outcome of searchParetoCorners.
type paretoCornerSearch struct {
	found       bool // corner is the maximum, at shape alpha, with point there
	corner      paretoCorner
	alpha       float64
	point       newton2Point
	lo, hi      int     // otherwise the maximum lies strictly between corners lo and hi (−1: angle 0; len: no limit)
	alphaNear   float64 // the shape on the ray of the last corner probed
	iterations  int
	evaluations int
	ok          bool // false: a ray had no maximum, and nothing is known
}

// searchParetoCorners looks for the maximum among the corners of s,
// starting each ray's shape at e^t. The log-likelihood is concave in
// (α, h) and smooth off the corners' rays, so at the shape α̂ that
// maximises it along a corner's ray (paretoRayShape) its
// superdifferential is the segment between the two sides' gradients,
// which differ only across the ray: the corner is the maximum if and only
// if the score in h is ≤ 0 on the side below the corner (the likelihood
// does not rise as the scale falls) and ≥ 0 on the side above (nor as it
// rises) (Rockafellar, 1970, §23 and §27). Otherwise the sign says on which
// side of the ray the maximum lies (a concave function rises from α̂ only
// toward it), so a bisection over the corners by angle finds the corner
// that is the maximum, or the two neighbouring corners between which the
// (smooth) maximum lies, in about log₂(corners) rays.
func searchParetoCorners(s *paretoCensoredSample, t, tol float64, maxIter int) (r paretoCornerSearch) {
	r.lo, r.hi = -1, len(s.corners)
	for r.hi-r.lo > 1 {
		mid := r.lo + (r.hi-r.lo)/2
		c := s.corners[mid]
		a, p, iters, evals, ok := paretoRayShape(s, c.angle, t, tol, maxIter)
		r.iterations += iters
		r.evaluations += evals
		if !ok {
			return r
		}
		below, above := p.g1, p.g1+paretoCornerJump(s, c.angle, a)
		if below <= 0 && above >= 0 {
			r.found, r.corner, r.alpha, r.point, r.ok = true, c, a, p, true
			return r
		}
		if below > 0 {
			r.lo = mid
		} else {
			r.hi = mid
		}
		r.alphaNear, t = a, math.Log(a)
	}
	r.ok = true
	return r
}

// what names the observation that makes the corner.
func (c paretoCorner) what() string {
	if c.interval {
		return "the lower end of an interval"
	}
	return "a suspension"
}

// paretoCornerNote says why the scale is reported at a corner.
func paretoCornerNote(c paretoCorner) string {
	return fmt.Sprintf("scale at %v, %s, where the likelihood has a corner (rising in the scale up to it, falling beyond): a boundary estimate set by the data, not a stationary point, so score-based intervals do not apply to it", c.value, c.what())
}

// paretoCensoredStart returns the starting (ln α, ln h): of a few
// candidates, the one with the highest censored log-likelihood (each
// evaluation costs only the distinct censored values). The shapes are
// the closed form on the exact values and suspensions (paretoMLE, which
// ignores the non-detects and intervals), or on every recorded value, or
// the edge shape; h = −ln S(U) ranges from 1/(N+1) to 1. Only points
// whose angle h/α lies strictly inside sector count; when none does, the
// start is on the sector's middle ray (the mean of its ends' angles, or
// half or twice the one finite end) with shape near.
func paretoCensoredStart(s *paretoCensoredSample, d *Data, edge float64, sector [2]float64, near float64) (la0, lh0 float64) {
	var shapes []float64
	if _, a, _, ok := paretoMLE(d.Exact, d.Right); ok {
		shapes = append(shapes, a)
	}
	if len(shapes) == 0 {
		if x := startSample(d, 2, true); len(x) >= 2 {
			if _, a, _, ok := paretoMLE(x, nil); ok {
				shapes = append(shapes, a)
			}
		}
	}
	if edge > 0 {
		shapes = append(shapes, edge)
	}
	if len(shapes) == 0 {
		shapes = append(shapes, 1)
	}
	best := math.Inf(-1)
	la0, lh0 = math.Log(shapes[0]), math.Log(0.1)
	for _, a := range shapes {
		for _, h := range []float64{1 / float64(d.N()+1), 0.01, 0.1, 1} {
			if angle := h / a; !(angle > sector[0] && angle < sector[1]) {
				continue
			}
			if p := paretoNatural(s, a, h); p.ll > best {
				best, la0, lh0 = p.ll, math.Log(a), math.Log(h)
			}
		}
	}
	if math.IsInf(best, -1) && near > 0 {
		var angle float64
		switch {
		case sector[0] == 0:
			angle = sector[1] / 2
		case math.IsInf(sector[1], 1):
			angle = 2 * sector[0]
		default:
			angle = sector[0] + (sector[1]-sector[0])/2
		}
		la0, lh0 = math.Log(near), math.Log(near*angle)
	}
	return la0, lh0
}

// fitParetoCensored fits the Pareto distribution to data with non-detects
// or intervals (the other cases have the closed form) by Newton's method
// on the concave log-likelihood of paretoNatural, whose maximum may lie at
// a point where it is not differentiable:
//
//   - the edge h = 0 (scale = U), when the bound U is an exact value: the
//     shape is first maximised there (paretoRayShape), and if the score in
//     h at that point is ≤ 0 the edge point is the maximum (concavity: no
//     direction into h > 0 rises), reported with paretoBoundaryNote;
//   - a corner below U (an interval's lower end or a suspension, where the
//     slope in the scale jumps down: with narrow bins, the smallest lower
//     end): searchParetoCorners finds it, reported with paretoCornerNote,
//     or the two corners between which the maximum lies;
//
// otherwise censoredNewton2 on (ln α, ln h), kept between those two
// corners' rays, where the log-likelihood is smooth, finds the interior
// maximum. It reports as fitGammaCensored does.
func fitParetoCensored(fit *Fit, d *Data, opt Options) (ok bool, reason string) {
	if genericCensoredOnly || len(opt.Fixed) != 0 || (len(d.Left) == 0 && len(d.Lower) == 0) {
		return false, ""
	}
	s, ok := newParetoCensoredSample(d)
	if !ok {
		return false, "an observation the route cannot take (a value ≤ 0, NaN or an empty interval)"
	}
	tol, maxIter := opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter)
	// The closed-form shape of the exact values and suspensions starts
	// the rays (one more pass over the data: only where there are rays).
	start := 0.0
	if s.atBound || len(s.corners) > 0 {
		if _, a, _, ok := paretoMLE(d.Exact, d.Right); ok {
			start = math.Log(a)
		} else if !s.atBound {
			if x := startSample(d, 2, true); len(x) >= 2 {
				if _, a, _, ok := paretoMLE(x, nil); ok {
					start = math.Log(a)
				}
			}
		}
	}
	edge := 0.0
	var edgeIters, edgeEvals int
	if s.atBound {
		a, p, iters, evals, ok := paretoRayShape(&s, 0, start, tol, maxIter)
		if !ok {
			return false, fmt.Sprintf("the shape at the scale bound did not converge in %d iterations", iters)
		}
		if p.g1 <= 0 {
			fit.Convergence = Convergence{
				Method:       "censored Newton on ln shape, scale at the smallest exact value (concave likelihood, score into the interior ≤ 0)",
				Iterations:   iters,
				Evaluations:  evals,
				GradientNorm: math.Abs(p.g0),
				Converged:    true,
				Note:         paretoBoundaryNote,
			}
			fit.Estimates[0], fit.Estimates[1] = s.bound, a
			fit.LogLik = p.ll
			return true, ""
		}
		edge, edgeIters, edgeEvals = a, iters, evals
	}
	// The corner search's rays count in the route's iterations and
	// evaluations (the edge's only where the answer is a corner).
	sector, near := [2]float64{0, math.Inf(1)}, edge
	var iters, evals int
	if len(s.corners) > 0 {
		t := start
		if edge > 0 {
			t = math.Log(edge)
		}
		r := searchParetoCorners(&s, t, tol, maxIter)
		iters, evals = r.iterations, r.evaluations
		if r.found {
			fit.Convergence = Convergence{
				Method:       "censored Newton on ln shape, scale at a corner of the likelihood (concave likelihood, scores on the two sides of the corner of opposite signs)",
				Iterations:   edgeIters + iters,
				Evaluations:  edgeEvals + evals,
				GradientNorm: math.Abs(r.point.g0),
				Converged:    true,
				Note:         paretoCornerNote(r.corner),
			}
			fit.Estimates[0], fit.Estimates[1] = r.corner.value, r.alpha
			fit.LogLik = r.point.ll
			return true, ""
		}
		if r.ok {
			// The maximum lies strictly between two neighbouring corners.
			if r.lo >= 0 {
				sector[0] = s.corners[r.lo].angle
			}
			if r.hi < len(s.corners) {
				sector[1] = s.corners[r.hi].angle
			}
			if r.alphaNear > 0 {
				near = r.alphaNear
			}
		}
	}
	la0, lh0 := paretoCensoredStart(&s, d, edge, sector, near)
	eval := func(la, lh float64) newton2Point { return paretoCensoredPoint(&s, la, lh) }
	if sector[0] > 0 || !math.IsInf(sector[1], 1) {
		eval = func(la, lh float64) newton2Point {
			if angle := math.Exp(lh - la); !(angle > sector[0] && angle < sector[1]) {
				return newton2Point{ll: math.Inf(-1)}
			}
			return paretoCensoredPoint(&s, la, lh)
		}
	}
	res := censoredNewton2(eval, la0, lh0, tol, maxIter)
	res.iterations += iters
	res.evaluations += evals
	if !res.converged {
		return false, res.reason
	}
	alpha, h := math.Exp(res.t0), math.Exp(res.t1)
	scale := s.bound * math.Exp(-h/alpha)
	if !(alpha > 0) || !(scale > 0) || math.IsInf(alpha, 0) || !finite(res.logLik) {
		return false, "the maximum lies where the parameters are not finite"
	}
	fit.setSolved(scale, alpha, res.logLik, res.convergence("censored Newton on (ln shape, ln(−ln S(bound))) (concave likelihood)"))
	return true, ""
}
