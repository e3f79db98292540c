package fitters

import (
	"fmt"
	"math"
)

// studentTDFStep is the step in κ = ln ν of the censored terms' five-point
// differences in the degrees of freedom: 2⁻¹⁰ ≈ 10⁻³, as the gamma's shape
// step (gammaShapeStep) — truncation h⁴/30·|φ⁽⁵⁾| and rounding 1.5ε|φ|/h,
// both near 10⁻¹³ of |φ| for the smooth tails ln F_ν(z) (which vary on the
// scale 1 of ln ν).
const studentTDFStep = 0x1p-10

// studentTDFFactors are e^(jh), j = −2, −1, 0, 1, 2: the stencil's degrees
// of freedom are ν·e^(jh).
var studentTDFFactors = [5]float64{
	math.Exp(-2 * studentTDFStep), math.Exp(-studentTDFStep), 1,
	math.Exp(studentTDFStep), math.Exp(2 * studentTDFStep),
}

// stencil5 returns the five-point first and second derivatives of values
// f at κ + jh, j = −2..2 (Abramowitz & Stegun 25.3.6, 25.3.24).
func stencil5(f *[5]float64, h float64) (d1, d2 float64) {
	d1 = (f[0] - 8*f[1] + 8*f[3] - f[4]) / (12 * h)
	d2 = (-f[0] + 16*f[1] - 30*f[2] + 16*f[3] - f[4]) / (12 * h * h)
	return d1, d2
}

// studentTLogDensity returns g = ln f₀(z; ν) of the standard t law and
// g′ = ∂g/∂z = −(ν+1)z/(ν+z²).
func studentTLogDensity(z, nu float64) (g, dg float64) {
	z2 := z * z
	return tLogConst(nu) - 0.5*(nu+1)*math.Log1p(z2/nu), -(nu + 1) * z / (nu + z2)
}

// studentTCensoredPoint evaluates the censored Student t log-likelihood at
// θ = (a, t, κ): μ = C + S·a, σ = S·e^t, ν = e^κ, with its score and
// observed Hessian (shapeTermSums gives the chain rule in z).
//
// An exact value adds ln f = c(ν) − ln σ + φ, φ = −(ν+1)/2·ln(1 + z²/ν),
// c(ν) = tLogConst(ν), with D = ν + z²:
//
//	φ_z = −(ν+1)z/D,  φ_zz = −(ν+1)(ν − z²)/D²,  φ_zν = −z(z² − 1)/D²,
//	φ_ν = −ln(1 + z²/ν)/2 + (ν+1)z²/(2νD),
//	φ_νν = z²/(νD) − (ν+1)z²(D + ν)/(2ν²D²),
//
// and in κ: φ_κ = νφ_ν, φ_κκ = ν²φ_νν + νφ_ν, φ_zκ = νφ_zν; c′(ν) =
// tDFScore, c″(ν) by a central difference of it (a constant per
// evaluation, which only sets the Hessian's precision).
//
// A censored value adds ln F_ν(z) (non-detect), ln S_ν(z) (suspension) or
// ln(F_ν(z_u) − F_ν(z_l)) (interval): the z-derivatives through the
// density (the reversed hazard r = f₀/F₀: (ln F₀)′ = r, (ln F₀)″ = r(g′ −
// r), and the hazard for ln S₀), the κ-derivatives by five-point
// differences in κ (studentTDFStep) — the t tail probability I_x(ν/2, 1/2)
// has no closed-form derivative in ν — and the mixed one by differences of
// the analytic z-derivative. Each distinct censored value is evaluated once.
func studentTCensoredPoint(cs *locScaleShapeSample, a, t, kappa float64) newton3Point {
	nu, sc := math.Exp(kappa), math.Exp(t)
	mu, sigma := cs.c+cs.s*a, cs.s*sc
	if !(nu > 0) || math.IsInf(nu, 1) || !(sigma > 0) || math.IsInf(sigma, 1) || !finite(mu) {
		return newton3Point{ll: math.Inf(-1)}
	}
	var s shapeTermSums
	np1 := nu + 1
	var sL, sZ1, sZ1z, sZZ, sZZz, sZZzz, sZN, sZNz, sN, sNN float64
	is := 1 / sigma
	for _, x := range cs.exact {
		z := (x - mu) * is
		z2 := z * z
		dd := nu + z2
		id := 1 / dd
		l := fastLog1p(z2 / nu) // within 0.63 ulp (fastmath.go)
		pz := -np1 * z * id
		pzz := -np1 * (nu - z2) * id * id
		pzn := -z * (z2 - 1) * id * id
		q := z2 * id / nu // z²/(νD)
		pn := -0.5*l + 0.5*np1*q
		pnn := q - 0.5*np1*q*(dd+nu)*id/nu
		sL += l
		sZ1 += pz
		sZ1z += pz * z
		sZZ += pzz
		sZZz += pzz * z
		sZZzz += pzz * z2
		sZN += pzn
		sZNz += pzn * z
		sN += pn
		sNN += pnn
	}
	s.ll = -0.5 * np1 * sL
	s.z1, s.z1z, s.zz, s.zzz, s.zzzz = sZ1, sZ1z, sZZ, sZZz, sZZzz
	s.zk, s.zkz = nu*sZN, nu*sZNz
	s.k1 = nu * sN
	s.kk = nu*nu*sNN + nu*sN
	if !studentTCensoredTerms(&s, cs, mu, sigma, nu) {
		return newton3Point{ll: math.Inf(-1)}
	}
	p := s.point(sc)
	// Constants of the exact values: n(c(ν) − ln S − t).
	n := float64(len(cs.exact))
	c1 := tDFScore(nu)
	hd := 1e-4 * nu
	c2 := (tDFScore(nu+hd) - tDFScore(nu-hd)) / (2 * hd)
	p.ll += n * (tLogConst(nu) - math.Log(cs.s) - t)
	p.g[1] -= n
	p.g[2] += n * nu * c1
	p.h[2][2] += n * (nu*nu*c2 + nu*c1)
	if math.IsNaN(p.ll) {
		p.ll = math.Inf(-1)
	}
	return p
}

// studentTCensoredTerms adds the censored terms of cs to s (see
// studentTCensoredPoint); false when one is not finite.
func studentTCensoredTerms(s *shapeTermSums, cs *locScaleShapeSample, mu, sigma, nu float64) bool {
	var nus [5]float64
	for j, f := range studentTDFFactors {
		nus[j] = nu * f
	}
	const h = studentTDFStep
	var f, r [5]float64
	for i, x := range cs.left.u {
		z := (x - mu) / sigma
		var dg float64
		for j, nj := range nus {
			f[j] = StudentT{0, 1, nj}.LogCDF(z)
			gj, dgj := studentTLogDensity(z, nj)
			r[j] = math.Exp(gj - f[j])
			if j == 2 {
				dg = dgj
			}
		}
		pk, pkk := stencil5(&f, h)
		pzk, _ := stencil5(&r, h)
		rc := r[2]
		s.add(cs.left.n[i], z, f[2], rc, rc*(dg-rc), pk, pzk, pkk)
	}
	for i, x := range cs.right.u {
		z := (x - mu) / sigma
		var dg float64
		for j, nj := range nus {
			f[j] = StudentT{0, 1, nj}.LogSurvival(z)
			gj, dgj := studentTLogDensity(z, nj)
			r[j] = -math.Exp(gj - f[j]) // −λ
			if j == 2 {
				dg = dgj
			}
		}
		pk, pkk := stencil5(&f, h)
		pzk, _ := stencil5(&r, h)
		lam := -r[2]
		s.add(cs.right.n[i], z, f[2], -lam, -lam*(dg+lam), pk, pzk, pkk)
	}
	var wl, wu [5]float64
	for i, xl := range cs.lower {
		zl, zu := (xl-mu)/sigma, (cs.upper[i]-mu)/sigma
		var dgl, dgu float64
		for j, nj := range nus {
			f[j] = logIntervalProb(StudentT{0, 1, nj}, zl, zu)
			gl, dl := studentTLogDensity(zl, nj)
			gu, du := studentTLogDensity(zu, nj)
			wl[j], wu[j] = math.Exp(gl-f[j]), math.Exp(gu-f[j])
			if j == 2 {
				dgl, dgu = dl, du
			}
		}
		pk, pkk := stencil5(&f, h)
		dwl, _ := stencil5(&wl, h)
		dwu, _ := stencil5(&wu, h)
		l, u := wl[2], wu[2]
		s.addInterval(cs.inCount[i], zl, zu, f[2], -l, u, -l*dgl-l*l, u*dgu-u*u, l*u, pk, -dwl, dwu, pkk)
	}
	return finite(s.ll) && finite(s.kk) && finite(s.zk)
}

// studentTCensoredRoute is the outcome of fitStudentTCensored.
type studentTCensoredRoute struct {
	solved bool   // a certified local maximum is recorded in fit
	reason string // why not (empty when the route does not apply)
	// towardsNormal: the iterates ran to df beyond studentTDFEscape; fit
	// then holds the last point (not converged), for the comparison with
	// the normal limit.
	towardsNormal bool
}

// studentTDFEscape is the df beyond which the censored Newton route stops
// and lets the normal limit (df = +Inf) compete: at ν = 10⁴ the t and
// normal log-likelihoods of a sample differ by about 10⁻⁴ per value.
const studentTDFEscape = 1e4

// studentTDFFloor is the df below which the route stops and leaves the
// data to BFGS: df → 0 with the scale shrinking onto tied values is the
// non-regular case the generic route reports.
const studentTDFFloor = 0.005

// studentTScaleFloor is the fraction of the starting scale below which the
// route stops for the same reason.
const studentTScaleFloor = 1e-8

// fitStudentTCensored fits Student's t to censored data by censoredNewton3
// on θ = ((μ − C)/S, ln(σ/S), ln ν), C and S the median and MAD start's
// location and scale, from the best (by the censored log-likelihood) of the
// generic route's starts (studentTStarts). It records the fit as solved
// only when the Newton certified a local maximum (small decrement,
// negative definite Hessian) with finite parameters. When the iterates run
// beyond df = studentTDFEscape it records their last point, not converged,
// and says so (towardsNormal). Otherwise fit is untouched and reason says
// why, for the fallback to BFGS (empty when the route does not apply:
// complete data, fixed parameters, genericCensoredOnly). The normal limit
// is compared by the caller.
func fitStudentTCensored(fit *Fit, d *Data, opt Options) studentTCensoredRoute {
	if genericCensoredOnly || len(opt.Fixed) != 0 || d.IsComplete() {
		return studentTCensoredRoute{}
	}
	starts := studentTStarts(d.valuesView())
	c, s := starts[0][0], math.Exp(starts[0][1])
	if !finite(c) || !(s > 0) || math.IsInf(s, 1) {
		return studentTCensoredRoute{reason: "no finite starting location and scale"}
	}
	cs, ok := newLocScaleShapeSample(d, c, s)
	if !ok {
		return studentTCensoredRoute{reason: "an observation the route cannot take (a NaN, an infinite limit or an empty interval)"}
	}
	eval := func(th [3]float64) newton3Point { return studentTCensoredPoint(&cs, th[0], th[1], th[2]) }
	theta0, best := [3]float64{}, math.Inf(-1)
	evals := 0
	for _, st := range starts {
		th := [3]float64{(st[0] - c) / s, st[1] - math.Log(s), st[2]}
		evals++
		if ll := eval(th).ll; ll > best {
			theta0, best = th, ll
		}
	}
	if math.IsInf(best, -1) {
		return studentTCensoredRoute{reason: "no start gave a finite log-likelihood"}
	}
	hi, lo := math.Log(studentTDFEscape), math.Log(studentTDFFloor)
	tiny := math.Log(studentTScaleFloor)
	escaped := func(th [3]float64) bool { return th[2] > hi || th[2] < lo || th[1] < tiny }
	res := censoredNewton3(eval, theta0, [3]float64{2, 2, 2}, opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter), escaped)
	res.evaluations += evals
	mu, sigma, nu := c+s*res.theta[0], s*math.Exp(res.theta[1]), math.Exp(res.theta[2])
	valid := finite(mu) && sigma > 0 && !math.IsInf(sigma, 1) && nu > 0 && !math.IsInf(nu, 1) && finite(res.logLik)
	const method = "censored Newton on (location, log scale, log df)"
	switch {
	case res.escaped && res.theta[2] > hi && valid:
		copy(fit.Estimates, []float64{mu, sigma, nu})
		fit.LogLik = res.logLik
		fit.Convergence = res.convergence(method)
		fit.Converged = false
		fit.Reason = fmt.Sprintf("the iterates ran beyond df = %g, towards the normal limit", studentTDFEscape)
		return studentTCensoredRoute{towardsNormal: true, reason: fit.Reason}
	case res.escaped:
		return studentTCensoredRoute{reason: fmt.Sprintf("the iterates ran below df = %g or scale = %g of the start's (the scale shrinking onto tied values)", studentTDFFloor, studentTScaleFloor)}
	case !res.converged:
		return studentTCensoredRoute{reason: res.reason}
	case !valid:
		return studentTCensoredRoute{reason: "the maximum lies where the parameters are not finite"}
	}
	copy(fit.Estimates, []float64{mu, sigma, nu})
	fit.LogLik = res.logLik
	fit.Convergence = res.convergence(method)
	return studentTCensoredRoute{solved: true}
}
