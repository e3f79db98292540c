package fitters

import (
	"fmt"
	"math"
)

// thresholdLocScale says how a threshold family X = γ + Y is a
// location–scale law of w = ln(x − γ): the weibull3 the smallest extreme
// value law with σ = 1/shape and μ = ln scale, the lognormal3 the normal
// law (Meeker & Escobar, 1998, §4.8), for the censored Newton route.
type thresholdLocScale struct {
	std stdLocScale
	// fromStart maps a start's (θ0, θ1) of thresholdModel to (μ, ln σ).
	fromStart func(t0, t1 float64) (mu, lnSigma float64)
	// toNatural maps (μ, σ) to the family's first two parameters.
	toNatural func(mu, sigma float64) (a, b float64)
}

// thresholdTermSums accumulates ℓ with its score and Hessian in
// θ = (μ, t, τ), σ = e^t, γ = m − e^τ, from terms φ(z) of z = (w − μ)/σ,
// w = ln(x − γ). With y = x − γ and v = e^τ/y:
//
//	∇z = (−1/σ, −z, v/σ),
//	∇²z = [0, 1/σ, 0; 1/σ, z, −v/σ; 0, −v/σ, (v − v²)/σ],
//
// and a term adds φ′∇z to the score and φ″∇z∇zᵀ + φ′∇²z to the Hessian.
type thresholdTermSums struct {
	p newton3Point
}

// thresholdGradZ returns ∇z at z and v for σ.
func thresholdGradZ(z, v, sigma float64) [3]float64 {
	return [3]float64{-1 / sigma, -z, v / sigma}
}

// addCurvature adds c·∇²z at (z, v).
func (s *thresholdTermSums) addCurvature(c, z, v, sigma float64) {
	is := 1 / sigma
	s.p.h[0][1] += c * is
	s.p.h[1][0] += c * is
	s.p.h[1][1] += c * z
	s.p.h[1][2] -= c * v * is
	s.p.h[2][1] -= c * v * is
	s.p.h[2][2] += c * (v - v*v) * is
}

// addOuter adds c·a bᵀ to the Hessian.
func (s *thresholdTermSums) addOuter(c float64, a, b [3]float64) {
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			s.p.h[i][j] += c * a[i] * b[j]
		}
	}
}

// add adds count copies of a term φ(z) with φ′ = d1, φ″ = d2.
func (s *thresholdTermSums) add(count, phi, d1, d2, z, v, sigma float64) {
	gz := thresholdGradZ(z, v, sigma)
	s.p.ll += count * phi
	for i := 0; i < 3; i++ {
		s.p.g[i] += count * d1 * gz[i]
	}
	s.addOuter(count*d2, gz, gz)
	s.addCurvature(count*d1, z, v, sigma)
}

// thresholdSample is a censored dataset for the threshold route: the exact
// values as x − m (m the threshold's floor), the distinct censored values
// tallied as x − m.
type thresholdSample struct {
	floor float64
	exact []float64 // x − m, read in place from a borrowed buffer
	cs    locScaleShapeSample
}

// thresholdCensoredPoint evaluates the censored log-likelihood of a
// threshold family at θ = (μ, t, τ) (thresholdTermSums) with its score and
// Hessian. An exact value adds g(z) − ln σ − w (the density of x: the law
// of w times the Jacobian 1/y, ∂w/∂τ = v, ∂²w/∂τ² = v − v²), a non-detect
// ln F₀(z), a suspension ln S₀(z) (0 at or below the threshold), an
// interval ln(F₀(z_u) − F₀(z_l)) (F₀ = 0 at or below the threshold), the
// censored terms through the reversed hazard and the hazard as in
// censoredLocScalePoint.
func thresholdCensoredPoint(ts *thresholdLocScale, s *thresholdSample, mu, t, tau float64) newton3Point {
	sigma, off := math.Exp(t), math.Exp(tau)
	bad := newton3Point{ll: math.Inf(-1)}
	if !(sigma > 0) || math.IsInf(sigma, 1) || !(off > 0) || math.IsInf(off, 1) || !finite(mu) {
		return bad
	}
	var acc thresholdTermSums
	is := 1 / sigma
	// The exact values' terms through scalar sums (the products of
	// thresholdTermSums.add written out): a = Σφ′, az = Σφ′z, av = Σφ′v,
	// avv = Σφ′v², b = Σφ″, bz = Σφ″z, bzz = Σφ″z², bv = Σφ″v,
	// bzv = Σφ″zv, bvv = Σφ″v²; w by fastLog (within 0.63 ulp).
	var sumG, sumW, sumV, sumV2, a, az, av, avv, b, bz, bzz, bv, bzv, bvv float64
	std := ts.std
	for _, dev := range s.exact {
		y := dev + off
		if !(y > 0) {
			return bad
		}
		w := fastLog(y)
		v := off / y
		z := (w - mu) * is
		g, d1, d2 := std.logDensity(z)
		sumG += g
		sumW += w
		sumV += v
		sumV2 += v * v
		a += d1
		az += d1 * z
		av += d1 * v
		avv += d1 * v * v
		b += d2
		bz += d2 * z
		bzz += d2 * z * z
		bv += d2 * v
		bzv += d2 * z * v
		bvv += d2 * v * v
	}
	n := float64(len(s.exact))
	acc.p.ll = sumG - sumW - n*t
	acc.p.g = [3]float64{-a * is, -az - n, av*is - sumV}
	h01 := (bz + a) * is
	h02 := -bv * is * is
	h12 := -(bzv + av) * is
	acc.p.h = [3][3]float64{
		{b * is * is, h01, h02},
		{h01, bzz + az, h12},
		{h02, h12, bvv*is*is + (av-avv)*is - (sumV - sumV2)},
	}
	at := func(x float64) (z, v float64, inside bool) {
		y := x - s.floor + off
		if !(y > 0) {
			return 0, 0, false
		}
		return (math.Log(y) - mu) * is, off / y, true
	}
	for i, x := range s.cs.left.u {
		z, v, ok := at(x)
		if !ok {
			return bad // F = 0 at or below the threshold
		}
		lf := std.logCDF(z)
		g, dg, _ := std.logDensity(z)
		r := math.Exp(g - lf)
		acc.add(s.cs.left.n[i], lf, r, r*(dg-r), z, v, sigma)
	}
	for i, x := range s.cs.right.u {
		z, v, ok := at(x)
		if !ok {
			continue // S = 1 at or below the threshold
		}
		ls := std.logSurv(z)
		g, dg, _ := std.logDensity(z)
		h := math.Exp(g - ls)
		acc.add(s.cs.right.n[i], ls, -h, -h*(dg+h), z, v, sigma)
	}
	for i, xl := range s.cs.lower {
		cnt := s.cs.inCount[i]
		zu, vu, oku := at(s.cs.upper[i])
		zl, vl, okl := at(xl)
		switch {
		case !oku:
			return bad
		case !okl:
			// F(l) = 0: a non-detect at u.
			lf := std.logCDF(zu)
			g, dg, _ := std.logDensity(zu)
			r := math.Exp(g - lf)
			acc.add(cnt, lf, r, r*(dg-r), zu, vu, sigma)
			continue
		}
		lp := std.logIntervalProb(zl, zu)
		gl, dl, _ := std.logDensity(zl)
		gu, du, _ := std.logDensity(zu)
		wl, wu := math.Exp(gl-lp), math.Exp(gu-lp)
		// φ_l = −w_l, φ_u = w_u, φ_ll = −w_l g′_l − w_l², φ_uu = w_u g′_u − w_u², φ_lu = w_l w_u.
		gzl, gzu := thresholdGradZ(zl, vl, sigma), thresholdGradZ(zu, vu, sigma)
		acc.p.ll += cnt * lp
		for k := 0; k < 3; k++ {
			acc.p.g[k] += cnt * (-wl*gzl[k] + wu*gzu[k])
		}
		acc.addOuter(cnt*(-wl*dl-wl*wl), gzl, gzl)
		acc.addOuter(cnt*(wu*du-wu*wu), gzu, gzu)
		acc.addOuter(cnt*wl*wu, gzl, gzu)
		acc.addOuter(cnt*wl*wu, gzu, gzl)
		acc.addCurvature(-cnt*wl, zl, vl, sigma)
		acc.addCurvature(cnt*wu, zu, vu, sigma)
	}
	if math.IsNaN(acc.p.ll) {
		return bad
	}
	return acc.p
}

// fitThresholdCensored fits a threshold family with a free threshold to
// censored data by censoredNewton3 on θ = (μ, ln σ, ln(m − γ)) of the
// location–scale law of ln(x − γ), from the best (by the censored
// log-likelihood) of fitThreshold's starts. The route records the fit only
// when the Newton certifies a local maximum (small decrement, negative
// definite Hessian) that lies inside: ln(m − γ) between nearBoundary and
// farLimit, as fitThreshold classes its BFGS runs. Iterates that run to the
// sample minimum (where the likelihood may be unbounded) or off to γ → −∞
// stop there and leave the data to fitThreshold's BFGS runs, which report
// those cases; reason says why (empty when the route does not apply).
func fitThresholdCensored(fit *Fit, m thresholdModel, d *Data, opt Options, dev []float64, floor float64, starts [][]float64, farLimit, nearBoundary float64) (ok bool, reason string) {
	ts := m.censored
	if ts == nil || genericCensoredOnly || d.IsComplete() || len(starts) == 0 {
		return false, ""
	}
	cs, ok := newLocScaleShapeSample(d, 0, 1)
	if !ok {
		return false, "an observation the route cannot take (a NaN, an infinite limit or an empty interval)"
	}
	s := thresholdSample{floor: floor, exact: dev, cs: cs}
	eval := func(th [3]float64) newton3Point { return thresholdCensoredPoint(ts, &s, th[0], th[1], th[2]) }
	theta0, best := [3]float64{}, math.Inf(-1)
	evals := 0
	for _, st := range starts {
		mu, ls := ts.fromStart(st[0], st[1])
		th := [3]float64{mu, ls, st[2]}
		evals++
		if ll := eval(th).ll; ll > best {
			theta0, best = th, ll
		}
	}
	if math.IsInf(best, -1) {
		return false, "no start gave a finite log-likelihood"
	}
	escaped := func(th [3]float64) bool { return th[2] < nearBoundary || th[2] > farLimit }
	res := censoredNewton3(eval, theta0, [3]float64{1, 1, 2}, opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter), escaped)
	res.evaluations += evals
	switch {
	case res.escaped && res.theta[2] < nearBoundary:
		return false, "the threshold ran to the sample minimum"
	case res.escaped:
		return false, "the threshold ran off towards −∞"
	case !res.converged:
		return false, res.reason
	}
	a, b := ts.toNatural(res.theta[0], math.Exp(res.theta[1]))
	g := floor - math.Exp(res.theta[2])
	if !finite(a) || !finite(b) || !finite(g) || !finite(res.logLik) {
		return false, "the maximum lies where the parameters are not finite"
	}
	copy(fit.Estimates, []float64{a, b, g})
	fit.LogLik = res.logLik
	fit.Convergence = res.convergence(fmt.Sprintf("censored Newton on (μ, log σ) of ln(x − threshold) and log(min − threshold), from the best of %d starts", len(starts)))
	fit.Note = "the likelihood is unbounded as the threshold approaches the sample minimum; reported the interior local maximum reached from the best start (Smith, 1985)"
	if n := m.note(a, b); n != "" {
		fit.Note += "; " + n
	}
	return true, ""
}
