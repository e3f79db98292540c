package fitters

import (
	"cmp"
	"math"
	"slices"
)

// gpdCensoredSample holds what the censored GPD Newton route needs: the
// exact excesses y = x − u over the threshold u (the GPD has no sufficient
// statistics, so each evaluation makes one pass over them) and the
// censored excesses, distinct ones tallied.
type gpdCensoredSample struct {
	y       []float64
	n, yMax float64
	tallied censoredPositive
}

// newGPDCensoredSample gathers d's excesses over u; false when an
// observation has no place in the route (a non-detect at or below the
// threshold, where ln F = −∞, a NaN, an empty interval).
func newGPDCensoredSample(d *Data, u float64, y []float64) (gpdCensoredSample, bool) {
	s := gpdCensoredSample{y: y, n: float64(len(y))}
	for _, v := range y {
		if !(v >= 0) || math.IsInf(v, 1) {
			return s, false
		}
		s.yMax = max(s.yMax, v)
	}
	shift := func(v []float64) []float64 {
		out := make([]float64, len(v))
		for i, x := range v {
			out[i] = x - u
		}
		return out
	}
	ex := &Data{Left: shift(d.Left), Right: shift(d.Right), Lower: shift(d.Lower), Upper: shift(d.Upper)}
	return s, s.tallied.add(ex, 1)
}

// gpdW returns the GPD's transformed excess w = ln(1 + ξz)/ξ at z = y/σ
// with its derivatives in θ = (ln σ, ξ): with t = 1 + ξz, ∂w/∂ln σ = −z/t,
// ∂²w/∂(ln σ)² = z/t², ∂²w/∂ln σ∂ξ = z²/t², and in ξ
//
//	w_ξ  = (ξz/t − ln t)/ξ²,
//	w_ξξ = (2 ln t − 2ξz/t − (ξz/t)²)/ξ³,
//
// by the series w = z Σ (−ξz)ʲ/(j+1), w_ξ = −z² Σ (j+1)(−ξz)ʲ/(j+2),
// w_ξξ = z³ Σ (j+1)(j+2)(−ξz)ʲ/(j+3) (12 terms) where |ξz| < 0.01, whose
// closed forms cancel there (w_ξξ keeps about 12 digits at |ξz| = 0.01,
// enough for a Hessian). ok is false where t ≤ 0 (beyond the upper
// endpoint of a negative shape).
func gpdW(xi, z float64) (w, wx, wxx, it float64, ok bool) {
	u := xi * z
	t := 1 + u
	if !(t > 0) {
		return 0, 0, 0, 0, false
	}
	it = 1 / t
	if math.Abs(u) < 0.01 {
		var s0, s1, s2 float64
		for j := 11; j >= 0; j-- {
			jf := float64(j)
			s0 = s0*(-u) + 1/(jf+1)
			s1 = s1*(-u) + (jf+1)/(jf+2)
			s2 = s2*(-u) + (jf+1)*(jf+2)/(jf+3)
		}
		return z * s0, -z * z * s1, z * z * z * s2, it, true
	}
	l := math.Log1p(u)
	r := u * it
	ix := 1 / xi
	return l * ix, (r - l) * ix * ix, (2*l - 2*r - r*r) * ix * ix * ix, it, true
}

// gpdCensoredPoint evaluates the censored GPD log-likelihood at
// (ln σ, ξ) with its score and observed Hessian. Exact values (one pass):
// ln f = −ln σ − (1 + ξ)w, so
//
//	∂/∂ln σ = −1 + (1+ξ)z/t,   ∂/∂ξ = −w − (1+ξ)w_ξ,
//	∂²/∂(ln σ)² = −(1+ξ)z/t²,  ∂²/∂ln σ∂ξ = z/t − (1+ξ)z²/t²,
//	∂²/∂ξ² = −2w_ξ − (1+ξ)w_ξξ.
//
// Censored values enter through w alone: ln S = −w, ln F = ln(1 − e^(−w))
// (derivative q = 1/(e^w − 1), second −q(1 + q) in w), an interval
// −w_l + ln(1 − e^(−Δ)) with Δ = w_u − w_l; the Hessian of g(w) is
// g′∇²w + g″∇w∇wᵀ. A value beyond the upper endpoint (ξ < 0) has S = 0.
// ξ ≤ −1 is outside the route (the likelihood is non-regular there:
// gpdFamily.Fit's own search handles it), as is any point that puts an
// exact value or a suspension beyond the endpoint.
func gpdCensoredPoint(s *gpdCensoredSample, ls, xi float64) newton2Point {
	var p newton2Point
	sigma := math.Exp(ls)
	if !(xi > -1) || math.IsInf(xi, 1) || !(sigma > 0) || math.IsInf(sigma, 1) {
		p.ll = math.Inf(-1)
		return p
	}
	is := 1 / sigma
	a := 1 + xi
	if xi < 0 && 1+xi*s.yMax*is <= 0 {
		p.ll = math.Inf(-1)
		return p
	}
	// Exact values: gpdW inline with 1/ξ once — one log1p and one
	// division per value; the far branch's sums (ln t, ξz/t − ln t and
	// w_ξξ's numerator) are scaled by powers of 1/ξ at the end.
	var sw, swx, swxx, szt, szt2, sz2t2 float64
	var fl, fr, fq float64
	for _, v := range s.y {
		z := v * is
		u := xi * z
		var it float64
		if math.Abs(u) < 0.01 {
			var w, wx, wxx float64
			w, wx, wxx, it, _ = gpdW(xi, z)
			sw += w
			swx += wx
			swxx += wxx
		} else {
			it = 1 / (1 + u)
			l := math.Log1p(u)
			r := u * it
			fl += l
			fr += r - l
			fq += 2*l - 2*r - r*r
		}
		zt := z * it
		szt += zt
		szt2 += zt * it
		sz2t2 += zt * zt
	}
	if xi != 0 {
		ix := 1 / xi
		sw += fl * ix
		swx += fr * ix * ix
		swxx += fq * ix * ix * ix
	}
	p.ll = -s.n*ls - a*sw
	p.g0 = -s.n + a*szt
	p.g1 = -sw - a*swx
	p.h00 = -a * szt2
	p.h01 = szt - a*sz2t2
	p.h11 = -2*swx - a*swxx
	// at returns w and its gradient and Hessian at excess y; ok false
	// beyond the upper endpoint (w = +∞).
	type wd struct{ w, g0, g1, h00, h01, h11 float64 }
	at := func(y float64) (wd, bool) {
		z := y * is
		w, wx, wxx, it, ok := gpdW(xi, z)
		if !ok {
			return wd{}, false
		}
		zt := z * it
		return wd{w, -zt, wx, zt * it, zt * zt, wxx}, true
	}
	// add adds c·g(w) for g′ = d1, g″ = d2 along the direction of w.
	add := func(c, val, d1, d2 float64, e wd) {
		p.ll += c * val
		p.g0 += c * d1 * e.g0
		p.g1 += c * d1 * e.g1
		p.h00 += c * (d1*e.h00 + d2*e.g0*e.g0)
		p.h01 += c * (d1*e.h01 + d2*e.g0*e.g1)
		p.h11 += c * (d1*e.h11 + d2*e.g1*e.g1)
	}
	lnF := func(c float64, e wd) {
		q := 1 / math.Expm1(e.w)
		add(c, log1mExp(-e.w), q, -q*(1+q), e)
	}
	for i, y := range s.tallied.left.u {
		if e, ok := at(y); ok {
			lnF(s.tallied.left.n[i], e)
		} // beyond the endpoint: F = 1, ln F = 0
	}
	for i, y := range s.tallied.right.u {
		e, ok := at(y)
		if !ok {
			p.ll = math.Inf(-1)
			return p
		}
		add(s.tallied.right.n[i], -e.w, -1, 0, e)
	}
	for i, yl := range s.tallied.lower {
		c := s.tallied.inCount[i]
		el, ok := at(yl)
		if !ok {
			p.ll = math.Inf(-1)
			return p
		}
		eu, ok := at(s.tallied.upper[i])
		if !ok {
			add(c, -el.w, -1, 0, el) // S(u) = 0: ln S(l)
			continue
		}
		// Δ = w_u − w_l, with its own gradient and Hessian.
		dl := wd{eu.w - el.w, eu.g0 - el.g0, eu.g1 - el.g1, eu.h00 - el.h00, eu.h01 - el.h01, eu.h11 - el.h11}
		add(c, -el.w, -1, 0, el)
		lnF(c, dl)
	}
	if math.IsNaN(p.ll) {
		p.ll = math.Inf(-1)
	}
	return p
}

// gpdShapeScale multiplies the shape in the route's coordinates
// (ln σ, gpdShapeScale·ξ), so that censoredNewton2's step bound
// (maxNewtonStep in each coordinate) lets ξ move by at most 0.5 per step:
// heavily censored samples have ridges along which a longer step jumps
// into the basin of the edge ξ → −1.
const gpdShapeScale = 4

// gpdShapeNote is gpdFamily.Fit's note for a regular local maximum with
// shape below −0.5 (TestGPDCensoredFallbackNoteAndDeterminism checks the
// two agree).
const gpdShapeNote = "shape < −0.5: a regular local maximum, but the usual asymptotic standard errors do not hold (Smith, 1985)"

// fitGPDCensored fits the GPD over the fixed threshold u to censored data
// by censoredNewton2 on (ln σ, ξ), from the censored exponential fit and,
// if that fails, from the family's starts (gpdStarts: moments,
// probability-weighted moments, exponential, spread shapes) best first by
// the censored log-likelihood. y are the exact excesses. The
// route keeps to ξ > −1: where the iterates run to ξ → −1 it declines and
// the family's own search of the non-regular region takes over. It
// reports as fitGammaCensored does.
func fitGPDCensored(fit *Fit, d *Data, u float64, y []float64, starts [][]float64, opt Options) (ok bool, reason string) {
	if genericCensoredOnly || len(opt.Fixed) != 1 || d.IsComplete() {
		return false, ""
	}
	s, ok := newGPDCensoredSample(d, u, y)
	if !ok {
		return false, "an observation the route cannot take (a non-detect at the threshold, NaN or an empty interval)"
	}
	eval := func(ls, v float64) newton2Point {
		p := gpdCensoredPoint(&s, ls, v/gpdShapeScale)
		p.g1 /= gpdShapeScale
		p.h01 /= gpdShapeScale
		p.h11 /= gpdShapeScale * gpdShapeScale
		return p
	}
	run := func(ls, v float64) newton2Result {
		return censoredNewton2(eval, ls, v, opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter))
	}
	// First from the censored exponential fit (ξ = 0), which heeds the
	// censoring; where that fails, from the family's starts in order of
	// their log-likelihood, highest first: a start in the basin of the
	// edge ξ → −1 (a moment estimate clamped at −0.9 by heavily censored
	// data looks bounded) is followed by the next.
	var res newton2Result
	iterations, evaluations := 0, 0
	if sigma := gpdExponentialScale(&s); sigma > 0 && !math.IsInf(sigma, 1) {
		res = run(math.Log(sigma), 0)
		iterations, evaluations = res.iterations, res.evaluations
	}
	if !res.converged {
		type ranked struct {
			ll     float64
			ls, xi float64
		}
		var order []ranked
		for _, st := range starts {
			if ll := gpdCensoredLogLik(&s, st[0], st[1]); finite(ll) {
				order = append(order, ranked{ll, st[0], gpdShapeScale * st[1]})
			}
		}
		evaluations += len(starts)
		slices.SortStableFunc(order, func(a, b ranked) int { return cmp.Compare(b.ll, a.ll) })
		if len(order) == 0 && iterations == 0 {
			return false, "no start with a finite log-likelihood"
		}
		for _, st := range order {
			res = run(st.ls, st.xi)
			iterations += res.iterations
			evaluations += res.evaluations
			if res.converged || res.t1 > -0.9*gpdShapeScale {
				break // converged, or failed away from the edge ξ = −1
			}
		}
	}
	if !res.converged {
		if res.t1 < -0.9*gpdShapeScale {
			return false, "from every start the shape ran towards −1, where the likelihood is non-regular (" + res.reason + ")"
		}
		return false, res.reason
	}
	sigma := math.Exp(res.t0)
	if !(sigma > 0) || math.IsInf(sigma, 1) || !finite(res.logLik) {
		return false, "the maximum lies where the parameters are not finite"
	}
	fit.Convergence = Convergence{
		Method:       "censored Newton on (log scale, shape)",
		Iterations:   iterations,
		Evaluations:  evaluations,
		GradientNorm: res.gradNorm,
		Converged:    true,
	}
	fit.Estimates[0], fit.Estimates[1] = sigma, res.t1/gpdShapeScale
	fit.LogLik = res.logLik
	if fit.Estimates[1] < -0.5 {
		fit.Note = gpdShapeNote
	}
	return true, ""
}

// gpdExponentialScale is a start for the scale with ξ = 0 that heeds the
// censoring: the exponential law's censored estimate, total excess over
// the threshold / number of failures (Epstein & Sobel, 1953, for
// suspensions), with a non-detect counted as a failure at half its limit
// and an interval as one at its midpoint (at its lower end when open
// above, then a suspension).
func gpdExponentialScale(s *gpdCensoredSample) float64 {
	total, events := 0.0, s.n
	for _, v := range s.y {
		total += v
	}
	t := &s.tallied
	for i, v := range t.left.u {
		total += 0.5 * v * t.left.n[i]
		events += t.left.n[i]
	}
	for i, v := range t.right.u {
		total += v * t.right.n[i]
	}
	for i, l := range t.lower {
		total += 0.5 * (l + t.upper[i]) * t.inCount[i]
		events += t.inCount[i]
	}
	if !(events > 0) {
		return 0
	}
	return total / events
}

// gpdCensoredLogLik is gpdCensoredPoint's log-likelihood alone (one log1p
// per exact value, no derivatives), for ranking the starts.
func gpdCensoredLogLik(s *gpdCensoredSample, ls, xi float64) float64 {
	sigma := math.Exp(ls)
	if !(xi > -1) || math.IsInf(xi, 1) || !(sigma > 0) || math.IsInf(sigma, 1) {
		return math.Inf(-1)
	}
	is := 1 / sigma
	if xi < 0 && 1+xi*s.yMax*is <= 0 {
		return math.Inf(-1)
	}
	var sw, fl float64
	for _, v := range s.y {
		z := v * is
		if u := xi * z; math.Abs(u) < 0.01 {
			w, _ := boxLog(xi, z)
			sw += w
		} else {
			fl += math.Log1p(u)
		}
	}
	if xi != 0 {
		sw += fl / xi
	}
	ll := -s.n*ls - (1+xi)*sw
	g := GPD{Scale: sigma, Shape: xi}
	t := &s.tallied
	for i, y := range t.left.u {
		ll += t.left.n[i] * g.LogCDF(y)
	}
	for i, y := range t.right.u {
		ll += t.right.n[i] * g.LogSurvival(y)
	}
	for i, l := range t.lower {
		ll += t.inCount[i] * logIntervalProb(g, l, t.upper[i])
	}
	if math.IsNaN(ll) {
		return math.Inf(-1)
	}
	return ll
}
