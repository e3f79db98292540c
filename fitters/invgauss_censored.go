package fitters

import (
	"math"
)

// invgaussCensoredSample holds what the censored inverse Gaussian Newton
// route needs from a dataset, gathered in two passes: the exact values'
// sufficient statistics about a centre c > 0 (d = (x − c)/c: Σ d,
// Σ d²/(1 + d) and Σ ln x, equivalent to Σ x, Σ 1/x and Σ ln x but free of
// their cancellation) and the censored values as t = x/c, distinct ones
// tallied.
type invgaussCensoredSample struct {
	n, c              float64
	sumD, sumQ, sumLn float64 // Σ d, Σ d²/(1+d), Σ ln x
	distinct          bool
	tallied           censoredPositive
}

// newInvgaussCensoredSample gathers d's statistics about centre c; false
// when an observation has no place in the route (see
// newGammaCensoredSample).
func newInvgaussCensoredSample(d *Data, c float64) (invgaussCensoredSample, bool) {
	s := invgaussCensoredSample{n: float64(len(d.Exact)), c: c}
	if !(c > 0) || math.IsInf(c, 0) {
		return s, false
	}
	ic := 1 / c
	if len(d.Exact) > 0 {
		lo, hi, _, sumLn := scanLogs4(d.Exact)
		if !(lo > 0) || math.IsInf(hi, 1) {
			return s, false
		}
		s.distinct = lo < hi
		s.sumLn = sumLn
		for _, x := range d.Exact {
			dv := (x - c) * ic
			s.sumD += dv
			s.sumQ += dv * dv / (1 + dv)
		}
	}
	return s, s.tallied.add(d, ic)
}

// invgaussCensoredPoint evaluates the censored inverse Gaussian
// log-likelihood at q = c/μ and σ = ln(λ/c), w = e^σ, with its score and
// observed Hessian in (q, σ).
//
// Exact values (t = x/c = 1 + d): Σ ln f(x) = n(½ ln(wc) − ln√(2π)) −
// 1.5 Σ ln x − (w/2)·G(q) with
//
//	G(q) = Σ (qt − 1)²/t = (q−1)²(n − Σd + Q) + 2q(q−1)(Σd − Q) + q²Q,
//
// Q = Σ d²/(1 + d) ≥ 0 (Σ 1/t = n − Σd + Q, Σ d/t = Σd − Q), so G′(q) =
// 2(q−1)(n − Σd + Q) + 2(2q−1)(Σd − Q) + 2qQ and G″ = 2(n + Σd).
//
// A censored observation adds ln D with D = F(t_L), S(t_R) = 1 − F(t_R) or
// F(t_u) − F(t_l), where F = Φ(a) + E, E = e^(2λ/μ)Φ(−b) = φ(a)R(b) (R the
// Mills ratio), a = √(w/t)(qt − 1), b = √(w/t)(qt + 1) (Chhikara & Folks,
// 1989). Its derivatives are analytic (from ∂F/∂μ = −(2λ/μ²)E and
// ∂F/∂λ = −φ(a)/√(λx) + (2/μ)E, with φ(b)e^(2λ/μ) = φ(a)):
//
//	F_q  = 2wE
//	F_σ  = −√(w/t)φ(a) + 2wqE
//	F_qq = 2w(2wE − √(wt)φ(a))
//	F_qσ = 2wE + 4w²qE − wbφ(a)
//	F_σσ = ½√(w/t)(a² − 1)φ(a) + 2wqE + 4w²q²E − wqbφ(a),
//
// each divided by D through e^(ln φ(a) − ln D) and e^(ln E − ln D), so the
// far tails stay finite; ∇² ln D = ∇²D/D − (∇D/D)(∇D/D)ᵀ.
func invgaussCensoredPoint(s *invgaussCensoredSample, q, sigma float64) newton2Point {
	var p newton2Point
	w := math.Exp(sigma)
	if !(q > 0) || math.IsInf(q, 0) || !(w > 0) || math.IsInf(w, 0) {
		p.ll = math.Inf(-1)
		return p
	}
	if s.n > 0 {
		e := q - 1
		inv := s.n - s.sumD + s.sumQ // Σ 1/t
		mid := s.sumD - s.sumQ       // Σ d/t
		g := e*e*inv + 2*q*e*mid + q*q*s.sumQ
		dg := 2*e*inv + 2*(2*q-1)*mid + 2*q*s.sumQ
		d2g := 2 * (s.n + s.sumD)
		p.ll = s.n*(0.5*(sigma+math.Log(s.c))-lnSqrt2Pi) - 1.5*s.sumLn - 0.5*w*g
		p.g0 = -0.5 * w * dg
		p.g1 = 0.5*s.n - 0.5*w*g
		p.h00 = -0.5 * w * d2g
		p.h01 = -0.5 * w * dg
		p.h11 = -0.5 * w * g
	}
	dist := InvGauss{Mean: s.c / q, Shape: w * s.c}
	sw := math.Sqrt(w)
	// end adds σ_j × (∇F/D, ∇²F/D) at t to the accumulators.
	var fq, fs, fqq, fqs, fss float64
	end := func(t, sign, lnD float64) {
		st := math.Sqrt(t)
		rt := sw / st // √(w/t)
		a, b := rt*(q*t-1), rt*(q*t+1)
		lphi := -0.5*a*a - lnSqrt2Pi
		A := sign * math.Exp(lphi-lnD)
		B := sign * math.Exp(lphi+logMills(b)-lnD)
		fq += 2 * w * B
		fs += -rt*A + 2*w*q*B
		fqq += 2 * w * (2*w*B - sw*st*A)
		fqs += 2*w*B + 4*w*w*q*B - w*b*A
		fss += 0.5*rt*(a*a-1)*A + 2*w*q*B + 4*w*w*q*q*B - w*q*b*A
	}
	add := func(count, lnD float64) {
		p.ll += count * lnD
		p.g0 += count * fq
		p.g1 += count * fs
		p.h00 += count * (fqq - fq*fq)
		p.h01 += count * (fqs - fq*fs)
		p.h11 += count * (fss - fs*fs)
		fq, fs, fqq, fqs, fss = 0, 0, 0, 0, 0
	}
	for i, t := range s.tallied.left.u {
		_, lf, _ := dist.CDFTails(t * s.c)
		end(t, 1, lf)
		add(s.tallied.left.n[i], lf)
	}
	for i, t := range s.tallied.right.u {
		_, _, ls := dist.CDFTails(t * s.c)
		end(t, -1, ls)
		add(s.tallied.right.n[i], ls)
	}
	for i, tl := range s.tallied.lower {
		tu := s.tallied.upper[i]
		_, lfl, lsl := dist.CDFTails(tl * s.c)
		_, lfu, lsu := dist.CDFTails(tu * s.c)
		var lnD float64
		if lfl > -math.Ln2 {
			lnD = logDiffExp(lsl, lsu)
		} else {
			lnD = logDiffExp(lfu, lfl)
		}
		end(tu, 1, lnD)
		end(tl, -1, lnD)
		add(s.tallied.inCount[i], lnD)
	}
	if math.IsNaN(p.ll) {
		p.ll = math.Inf(-1)
	}
	return p
}

// invgaussCensoredStart returns the starting q = c/μ and w = λ/c: the
// closed form on the exact values when there are two distinct ones
// (μ = x̄, so q = 1/(1 + mean d), and w = n/G(q)), otherwise the generic
// route's start (invgaussMLE of startSample).
func invgaussCensoredStart(s *invgaussCensoredSample, d *Data) (q0, w0 float64) {
	if s.n >= 2 && s.distinct {
		q := 1 / (1 + s.sumD/s.n)
		e := q - 1
		g := e*e*(s.n-s.sumD+s.sumQ) + 2*q*e*(s.sumD-s.sumQ) + q*q*s.sumQ
		if w := s.n / g; q > 0 && w > 0 && !math.IsInf(w, 0) {
			return q, w
		}
	}
	m0, l0 := s.c, s.c
	if x := startSample(d, 2, true); len(x) >= 2 {
		if m, l, _ := invgaussMLE(x); m > 0 && l > 0 && !math.IsInf(l, 0) {
			m0, l0 = m, l
		} else if m > 0 {
			m0, l0 = m, m
		}
	}
	return s.c / m0, l0 / s.c
}

// fitInvgaussCensored fits the inverse Gaussian distribution to censored
// data by censoredNewton2 on (c/μ, ln(λ/c)), c the mean of the exact values
// (of every recorded value when there are none), from
// invgaussCensoredStart. It reports as fitGammaCensored does.
func fitInvgaussCensored(fit *Fit, d *Data, opt Options) (ok bool, reason string) {
	if genericCensoredOnly || len(opt.Fixed) != 0 || d.IsComplete() {
		return false, "" // not this route's data: no fallback to report
	}
	c := censoredCentre(d)
	s, ok := newInvgaussCensoredSample(d, c)
	if !ok {
		return false, "an observation the route cannot take (a value ≤ 0, NaN or an empty interval)"
	}
	q0, w0 := invgaussCensoredStart(&s, d)
	eval := func(q, sigma float64) newton2Point { return invgaussCensoredPoint(&s, q, sigma) }
	res := censoredNewton2(eval, q0, math.Log(w0), opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter))
	if !res.converged {
		return false, res.reason
	}
	mean, shape := c/res.t0, c*math.Exp(res.t1)
	if !(mean > 0) || !(shape > 0) || math.IsInf(mean, 0) || math.IsInf(shape, 0) || !finite(res.logLik) {
		return false, "the maximum lies where the parameters are not finite"
	}
	fit.Convergence = Convergence{
		Method:       "censored Newton on (c/mean, ln(shape/c))",
		Iterations:   res.iterations,
		Evaluations:  res.evaluations,
		GradientNorm: res.gradNorm,
		Converged:    true,
	}
	fit.Estimates[0], fit.Estimates[1] = mean, shape
	fit.LogLik = res.logLik
	return true, ""
}
