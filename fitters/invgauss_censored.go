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
// log-likelihood at ln q and σ, q = c/μ, σ = ln(λ/c), w = e^σ, with its
// score and observed Hessian in (ln q, σ): the derivatives below in q are
// mapped by ∂/∂ln q = q∂/∂q, ∂²/∂(ln q)² = q²∂²/∂q² + q∂/∂q.
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
// F(t_u) − F(t_l), where F = Φ(a) + e^(2λ/μ)Φ(−b) = Φ(a) + φ(a)R(b) (R the
// Mills ratio; φ(b)e^(2λ/μ) = φ(a)), a = √(w/t)(qt − 1), b = √(w/t)(qt + 1)
// (Chhikara & Folks, 1989). Its derivatives are analytic. With δ = b − a =
// 2√(w/t), u = √(wt) = ∂a/∂q = ∂b/∂q, ∂a/∂σ = a/2, ∂b/∂σ = b/2, and the
// positive remainders m₁ = 1 − bR(b) = −R′(b) and R₂ = R″(b) = (1 + b²)R − b,
// the chain rule through F_a = φ(a)(m₁ + δR), F_b = −φ(a)m₁,
// F_aa = −φ(a)(a(m₁ + δR) + R), F_ab = aφ(a)m₁, F_bb = φ(a)R₂ gives
//
//	F_q  = uδ R φ(a)                    (= 2wE, E = e^(2λ/μ)Φ(−b))
//	F_σ  = ½δ(aR − m₁) φ(a)
//	F_qq = −u²δ(m₁ + aR) φ(a)
//	F_qσ = ½uδ((1 − a²)R + R₂) φ(a)
//	F_σσ = ¼δ((a² − 1)(m₁ − aR) + (a + b)R₂) φ(a),
//
// forms without the cancellation of the textbook ones (∂F/∂λ = −φ(a)/√(λx)
// + (2/μ)E and its derivatives lose a factor b² to b³ when λ/μ is large,
// b ≈ 2√(λ/μ)); millsTriple gives R, m₁ and R₂ from Laplace's continued
// fraction where b ≥ 5. Each is divided by D through e^(ln φ(a) − ln D), so
// the far tails stay finite; ∇² ln D = ∇²D/D − (∇D/D)(∇D/D)ᵀ.
func invgaussCensoredPoint(s *invgaussCensoredSample, lq, sigma float64) newton2Point {
	var p newton2Point
	q, w := math.Exp(lq), math.Exp(sigma)
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
		u := sw * st  // √(wt) = ∂a/∂q = ∂b/∂q
		a, b := rt*(q*t-1), rt*(q*t+1)
		delta := 2 * rt // b − a
		r, m1, r2 := millsTriple(b)
		A := sign * math.Exp(-0.5*a*a-lnSqrt2Pi-lnD) // σ_j φ(a)/D
		ar := a * r
		fq += u * delta * r * A
		fs += 0.5 * delta * (ar - m1) * A
		fqq -= u * u * delta * (m1 + ar) * A
		fqs += 0.5 * u * delta * ((1-a*a)*r + r2) * A
		fss += 0.25 * delta * ((a*a-1)*(m1-ar) + (a+b)*r2) * A
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
	gq := p.g0
	p.g0 = q * gq
	p.h00 = q*q*p.h00 + q*gq
	p.h01 *= q
	return p
}

// invgaussCensoredStart returns the starting (ln q, σ) = (ln(c/μ),
// ln(λ/c)): of two candidates, the one with the higher censored
// log-likelihood. One is the closed form on the exact values when there
// are two distinct ones (μ = x̄, so q = 1/(1 + mean d), and w = n/G(q));
// it ignores the censored values and is far off when they are many and on
// one side. The other is the moment estimate of every recorded value
// (positiveMoments: μ = mean, 1/λ = mean(1/x) − 1/mean).
func invgaussCensoredStart(s *invgaussCensoredSample, d *Data) (lq0, sigma0 float64) {
	best := math.Inf(-1)
	try := func(q, w float64) {
		if !(q > 0) || !(w > 0) || math.IsInf(q, 0) || math.IsInf(w, 0) {
			return
		}
		if ll := invgaussCensoredPoint(s, math.Log(q), math.Log(w)).ll; ll > best {
			best, lq0, sigma0 = ll, math.Log(q), math.Log(w)
		}
	}
	if s.n >= 2 && s.distinct {
		q := 1 / (1 + s.sumD/s.n)
		e := q - 1
		g := e*e*(s.n-s.sumD+s.sumQ) + 2*q*e*(s.sumD-s.sumQ) + q*q*s.sumQ
		try(q, s.n/g)
	}
	if m, _, minv := positiveMoments(d); m > 0 {
		l := m // a fallback shape where the moment one is not positive
		if v := minv - 1/m; v > 0 {
			l = 1 / v
		}
		try(s.c/m, l/s.c)
	}
	if math.IsInf(best, -1) {
		return 0, 0 // μ = λ = c
	}
	return lq0, sigma0
}

// fitInvgaussCensored fits the inverse Gaussian distribution to censored
// data by censoredNewton2 on (ln(c/μ), ln(λ/c)), c the mean of the exact values
// (of every recorded value when there are none), from
// invgaussCensoredStart. It reports as fitGammaCensored does; where the
// iterates run to μ → ∞ (q → 0) with the score still pointing there, or
// stop beyond μ = 10⁶c, the reason says the likelihood has no interior
// maximum (small, heavily
// censored samples of a very skewed law can rise towards the Lévy law,
// the limit as μ → ∞).
func fitInvgaussCensored(fit *Fit, d *Data, opt Options) (ok bool, reason string) {
	if genericCensoredOnly || len(opt.Fixed) != 0 || d.IsComplete() {
		return false, "" // not this route's data: no fallback to report
	}
	c := censoredCentre(d)
	s, ok := newInvgaussCensoredSample(d, c)
	if !ok {
		return false, "an observation the route cannot take (a value ≤ 0, NaN or an empty interval)"
	}
	lq0, sigma0 := invgaussCensoredStart(&s, d)
	eval := func(lq, sigma float64) newton2Point { return invgaussCensoredPoint(&s, lq, sigma) }
	res := censoredNewton2(eval, lq0, sigma0, opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter))
	if !res.converged {
		if p := eval(res.t0, res.t1); res.t0 < lq0-20 && p.g0 < 0 {
			// The iterates ran towards q = c/μ → 0 (by a factor e²⁰
			// from the start) with the score still pointing there.
			return false, "no interior maximum: the likelihood keeps rising as the mean → ∞ (" + res.reason + ")"
		}
		return false, res.reason
	}
	if res.t0 < math.Log(1e-6) {
		// ln(c/μ) → −∞ flattens ℓ: a "maximum" at μ > 10⁶c cannot be told
		// from the edge μ = ∞.
		return false, "no interior maximum: the likelihood is highest at a mean above 10⁶ times the data's centre (mean → ∞)"
	}
	mean, shape := c*math.Exp(-res.t0), c*math.Exp(res.t1)
	if !(mean > 0) || !(shape > 0) || math.IsInf(mean, 0) || math.IsInf(shape, 0) || !finite(res.logLik) {
		return false, "the maximum lies where the parameters are not finite"
	}
	fit.setSolved(mean, shape, res.logLik, res.convergence("censored Newton on (ln(c/mean), ln(shape/c))"))
	return true, ""
}

// millsTriple returns the normal Mills ratio R(b) = Φ(−b)/φ(b) for b > 0
// with m₁ = 1 − bR = −R′ and R₂ = R″ = (1 + b²)R − b, all positive. For
// b ≥ 5 they come from Laplace's continued fraction R = 1/K₀,
// K_j = b + (j+1)/K_(j+1) (Abramowitz & Stegun 26.2.14): m₁ = R/K₁ and
// R₂ = 2R/(K₁K₂), free of the cancellation of 1 − bR ≈ 1/b²
// (oneMinusTMills' form). The fraction has millsRatioShort's number of
// terms by band, each enough for R to half an ulp at the band's start
// (TestMillsTriple checks the three against 120 terms). Below 5, R comes
// from erfc and the remainders from their definitions, losing at most
// about two digits near b = 5.
func millsTriple(b float64) (r, m1, r2 float64) {
	if b < 5 {
		r = 0.5 * math.Erfc(b/sqrt2) * math.Exp(0.5*b*b) / invSqrt2Pi
		m1 = 1 - b*r
		return r, m1, r - b*m1
	}
	var n float64
	switch {
	case b < 7:
		n = 30
	case b < 10:
		n = 21
	case b < 15:
		n = 16
	case b < 25:
		n = 13
	default:
		n = 10
	}
	return millsTripleCF(b, n)
}

// millsTripleCF is millsTriple's continued fraction with n terms.
func millsTripleCF(b, n float64) (r, m1, r2 float64) {
	k := b // K_n
	for j := n; j >= 3; j-- {
		k = b + j/k
	}
	k2 := k            // K₂ = b + 3/K₃
	k1 := b + 2/k2     // K₁
	r = 1 / (b + 1/k1) // 1/K₀
	return r, r / k1, 2 * r / (k1 * k2)
}
