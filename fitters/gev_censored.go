package fitters

import (
	"math"
)

// gevYDerivs holds y = ln(1 + ξz)/ξ (y = z at ξ = 0) and its partial
// derivatives in z and ξ up to the second order.
type gevYDerivs struct {
	y, z, zz, k, zk, kk float64
}

// gevYAt returns y and its derivatives at (z, ξ), and false when 1 + ξz ≤ 0
// (z outside the support). With τ = 1 + ξz:
//
//	y_z = 1/τ, y_zz = −ξ/τ², y_zξ = −z/τ²,
//	y_ξ = (ξz/τ − ln τ)/ξ², y_ξξ = −2z/(ξ²τ) − z²/(ξτ²) + 2 ln τ/ξ³,
//
// the last two from the series in u = ξz where |u| < 0.01 (boxLog's, and
// y_ξξ = z³ Σ_j (j+1)(j+2)(−u)^j/(j+3), terms to u¹¹), free of the
// cancellation near ξ = 0. The logarithm is fastLog1p (within 0.63 ulp,
// fastmath.go), as the exact values' e^(−y) is fastExp: the route's ℓ
// then differs from LogLik's by rounding only.
func gevYAt(z, xi float64) (gevYDerivs, bool) {
	tau := 1 + xi*z
	if !(tau > 0) {
		return gevYDerivs{}, false
	}
	var r gevYDerivs
	it := 1 / tau
	r.z = it
	r.zz = -xi * it * it
	r.zk = -z * it * it
	u := xi * z
	if math.Abs(u) < 0.01 {
		r.y, r.k = boxLog(xi, z)
		var s float64
		for j := 11; j >= 0; j-- {
			fj := float64(j)
			s = s*(-u) + (fj+1)*(fj+2)/(fj+3)
		}
		r.kk = z * z * z * s
		return r, true
	}
	l := fastLog1p(u)
	r.y = l / xi
	r.k = (u*it - l) / (xi * xi)
	r.kk = -2*z*it/(xi*xi) - z*z*it*it/xi + 2*l/(xi*xi*xi)
	return r, true
}

// compose turns a term χ(y) with χ′, χ″ into its derivatives in (z, ξ):
// φ_z = χ′y_z, φ_zz = χ″y_z² + χ′y_zz, φ_ξ = χ′y_ξ, φ_zξ = χ″y_z y_ξ + χ′y_zξ,
// φ_ξξ = χ″y_ξ² + χ′y_ξξ.
func (y gevYDerivs) compose(c1, c2 float64) (pz, pzz, pk, pzk, pkk float64) {
	return c1 * y.z, c2*y.z*y.z + c1*y.zz, c1 * y.k, c2*y.z*y.k + c1*y.zk, c2*y.k*y.k + c1*y.kk
}

// gevSurvivalTerm returns χ = ln S = ln(1 − exp(−E)), E = e^(−y), with
// χ′ = −E/(e^E − 1) and χ″ = E·q′(E), q(E) = E/(e^E − 1): q′ = (e^E − 1 −
// Ee^E)/(e^E − 1)², by its series −1/2 + E/6 − E³/180 below E = 10⁻³
// (no cancellation), 0 beyond E = 700 (where χ′ underflows).
func gevSurvivalTerm(y float64) (chi, c1, c2 float64) {
	e := math.Exp(-y)
	chi = logOneMinusExpExp(y)
	switch {
	case e > 700:
		return chi, 0, 0
	case e < 1e-3:
		qp := -0.5 + e/6 - e*e*e/180
		return chi, -e / math.Expm1(e), e * qp
	}
	em := math.Expm1(e)
	qp := (em - e*(em+1)) / (em * em)
	return chi, -e / em, e * qp
}

// gevCensoredPoint evaluates the censored GEV log-likelihood at θ = (a, t, ξ):
// μ = C + S·a, σ = S·e^t, with its score and observed Hessian, all
// analytic. In y (gevYAt), E = e^(−y):
//
//	exact:     ln f = −ln σ + ψ, ψ = −(1+ξ)y − E, ψ_y = E − 1 − ξ, ψ_yy = −E,
//	           ψ_ξ = −y, ψ_yξ = −1 (so φ_ξ = ψ_y y_ξ − y, φ_zξ gains −y_z,
//	           φ_ξξ gains −2y_ξ);
//	non-detect: ln F = −E, χ′ = E, χ″ = −E;
//	suspension: ln S (gevSurvivalTerm);
//	interval:  ln P, P = F(y_u) − F(y_l), dF/dy = F·E, d²F/dy² = F·E(E − 1):
//	           with w = F·E/P at each end, ∂ln P/∂y_u = w_u, ∂/∂y_l = −w_l,
//	           second derivatives w_u(E_u − 1) − w_u², −w_l(E_l − 1) − w_l²,
//	           and w_u·w_l across.
//
// A bound outside the support counts as the distribution does: below the
// lower endpoint (ξ > 0) F = 0, above the upper one (ξ < 0) F = 1; ln 0
// makes ℓ = −∞ (outside the parameter space for Newton's line search).
func gevCensoredPoint(cs *locScaleShapeSample, a, t, xi float64) newton3Point {
	sc := math.Exp(t)
	mu, sigma := cs.c+cs.s*a, cs.s*sc
	bad := newton3Point{ll: math.Inf(-1)}
	if !(sigma > 0) || math.IsInf(sigma, 1) || !finite(mu) || !finite(xi) {
		return bad
	}
	is := 1 / sigma
	var s shapeTermSums
	for _, x := range cs.exact {
		z := (x - mu) * is
		y, ok := gevYAt(z, xi)
		if !ok {
			return bad
		}
		e := fastExp(-y.y)
		c1, c2 := e-1-xi, -e
		pz, pzz, pk, pzk, pkk := y.compose(c1, c2)
		s.add(1, z, -(1+xi)*y.y-e, pz, pzz, pk-y.y, pzk-y.z, pkk-2*y.k)
	}
	for i, x := range cs.left.u {
		z := (x - mu) * is
		y, ok := gevYAt(z, xi)
		if !ok {
			if xi > 0 {
				return bad // below the lower endpoint: F = 0
			}
			continue // above the upper endpoint: ln F = 0
		}
		e := math.Exp(-y.y)
		pz, pzz, pk, pzk, pkk := y.compose(e, -e)
		s.add(cs.left.n[i], z, -e, pz, pzz, pk, pzk, pkk)
	}
	for i, x := range cs.right.u {
		z := (x - mu) * is
		y, ok := gevYAt(z, xi)
		if !ok {
			if xi < 0 {
				return bad // above the upper endpoint: S = 0
			}
			continue // below the lower endpoint: ln S = 0
		}
		chi, c1, c2 := gevSurvivalTerm(y.y)
		pz, pzz, pk, pzk, pkk := y.compose(c1, c2)
		s.add(cs.right.n[i], z, chi, pz, pzz, pk, pzk, pkk)
	}
	for i, xl := range cs.lower {
		if !gevIntervalTerm(&s, cs.inCount[i], (xl-mu)*is, (cs.upper[i]-mu)*is, xi) {
			return bad
		}
	}
	p := s.point(sc)
	n := float64(len(cs.exact))
	p.ll -= n * (math.Log(cs.s) + t)
	p.g[1] -= n
	if math.IsNaN(p.ll) {
		return bad
	}
	return p
}

// gevIntervalTerm adds count copies of ln(F(z_u) − F(z_l)) to s (see
// gevCensoredPoint); false when the probability is 0.
func gevIntervalTerm(s *shapeTermSums, count, zl, zu, xi float64) bool {
	yl, okl := gevYAt(zl, xi)
	yu, oku := gevYAt(zu, xi)
	switch {
	case !okl && !oku:
		return false // both ends beyond the same endpoint
	case !okl && xi > 0:
		// F(l) = 0: a non-detect at u.
		e := math.Exp(-yu.y)
		pz, pzz, pk, pzk, pkk := yu.compose(e, -e)
		s.add(count, zu, -e, pz, pzz, pk, pzk, pkk)
		return true
	case !oku && xi < 0:
		// F(u) = 1: a suspension at l.
		chi, c1, c2 := gevSurvivalTerm(yl.y)
		pz, pzz, pk, pzk, pkk := yl.compose(c1, c2)
		s.add(count, zl, chi, pz, pzz, pk, pzk, pkk)
		return true
	case !okl || !oku:
		return false
	}
	el, eu := math.Exp(-yl.y), math.Exp(-yu.y)
	var lp float64
	if -el > -math.Ln2 {
		lp = logDiffExp(logOneMinusExpExp(yl.y), logOneMinusExpExp(yu.y))
	} else {
		lp = logDiffExp(-eu, -el)
	}
	if !finite(lp) {
		return false
	}
	wl, wu := math.Exp(-el-yl.y-lp), math.Exp(-eu-yu.y-lp)
	cl, cu := -wl, wu
	cll, cuu, clu := -wl*(el-1)-wl*wl, wu*(eu-1)-wu*wu, wu*wl
	pl, pu := cl*yl.z, cu*yu.z
	pll := cll*yl.z*yl.z + cl*yl.zz
	puu := cuu*yu.z*yu.z + cu*yu.zz
	plu := clu * yl.z * yu.z
	pk := cl*yl.k + cu*yu.k
	plk := cll*yl.z*yl.k + clu*yl.z*yu.k + cl*yl.zk
	puk := cuu*yu.z*yu.k + clu*yu.z*yl.k + cu*yu.zk
	pkk := cll*yl.k*yl.k + 2*clu*yl.k*yu.k + cuu*yu.k*yu.k + cl*yl.kk + cu*yu.kk
	s.addInterval(count, zl, zu, lp, pl, pu, pll, puu, plu, pk, plk, puk, pkk)
	return true
}

// fitGEVCensored fits the GEV to censored data by censoredNewton3 on
// θ = ((μ − C)/S, ln(σ/S), ξ), C and S the first start's location and
// scale, from the better (by the censored log-likelihood) of the generic
// route's first two starts (gevStarts: probability-weighted moments, and
// Gumbel moments with shape 0). It records the fit and returns true only when the
// Newton certified a local maximum (small decrement, negative definite
// Hessian) with ξ > −1; iterates that run to ξ ≤ −1 (where the likelihood
// is unbounded) stop there and leave the data to the family's BFGS search
// with its rules for that case. Otherwise fit is untouched and reason says
// why (empty when the route does not apply: complete data, fixed
// parameters, genericCensoredOnly).
func fitGEVCensored(fit *Fit, d *Data, opt Options) (ok bool, reason string) {
	if genericCensoredOnly || len(opt.Fixed) != 0 || d.IsComplete() {
		return false, ""
	}
	starts := gevStarts(d.valuesView())
	c, s := starts[0][0], math.Exp(starts[0][1])
	if !finite(c) || !(s > 0) || math.IsInf(s, 1) {
		return false, "no finite starting location and scale"
	}
	cs, ok := newLocScaleShapeSample(d, c, s)
	if !ok {
		return false, "an observation the route cannot take (a NaN, an infinite limit or an empty interval)"
	}
	eval := func(th [3]float64) newton3Point { return gevCensoredPoint(&cs, th[0], th[1], th[2]) }
	theta0, best := [3]float64{}, math.Inf(-1)
	evals := 0
	// The probability-weighted-moment start and the Gumbel one: the other
	// three shapes add a pass each and did not change a maximum reached on
	// the agreement test's datasets.
	for _, st := range starts[:min(2, len(starts))] {
		th := [3]float64{(st[0] - c) / s, st[1] - math.Log(s), st[2]}
		evals++
		if ll := eval(th).ll; ll > best {
			theta0, best = th, ll
		}
	}
	if math.IsInf(best, -1) {
		return false, "no start gave a finite log-likelihood"
	}
	escaped := func(th [3]float64) bool { return th[2] <= -1 }
	res := censoredNewton3(eval, theta0, [3]float64{2, 2, 0.5}, opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter), escaped)
	res.evaluations += evals
	switch {
	case res.escaped:
		return false, "the shape ran to −1 or below"
	case !res.converged:
		return false, res.reason
	}
	mu, sigma, xi := c+s*res.theta[0], s*math.Exp(res.theta[1]), res.theta[2]
	if !finite(mu) || !(sigma > 0) || math.IsInf(sigma, 1) || !finite(xi) || xi <= -1 || !finite(res.logLik) {
		return false, "the maximum lies where the parameters are not finite or the shape ≤ −1"
	}
	copy(fit.Estimates, []float64{mu, sigma, xi})
	fit.LogLik = res.logLik
	fit.Convergence = res.convergence("censored Newton on (location, log scale, shape)")
	if xi < -0.5 {
		fit.Note = gevShapeBelowHalfNote
	}
	return true, ""
}
