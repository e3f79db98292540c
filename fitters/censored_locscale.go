package fitters

import (
	"math"
)

// stdLocScale is a standardized density f₀ of a location-scale family as
// the censored Newton route needs it: g = ln f₀ with g′ and g″, and the
// tail logarithms ln F₀ and ln S₀, accurate far out (never ln of a
// difference that has cancelled).
type stdLocScale struct {
	logDensity func(z float64) (g, dg, d2g float64)
	logCDF     func(z float64) float64
	logSurv    func(z float64) float64
	// exactTerms, when set, adds Σ g(b·u − a) and its derivatives over the
	// exact values to p faster than logDensity one by one would.
	exactTerms func(p *locScalePoint, exact []float64, a, b float64)
	// rightTerms, when set, adds the suspensions' terms (the tally t) to p
	// as censoredLocScalePoint's loop would, bit for bit, but faster.
	rightTerms func(p *locScalePoint, t *tally, a, b float64)
}

// logIntervalProb is ln(F₀(zu) − F₀(zl)) for zl < zu, by the survival
// form S₀(zl) − S₀(zu) where F₀(zl) > 1/2 so that the difference never
// cancels (logIntervalProb in loglik.go gives the rule for any Dist).
func (s stdLocScale) logIntervalProb(zl, zu float64) float64 {
	if lcl := s.logCDF(zl); lcl <= -math.Ln2 {
		return logDiffExp(s.logCDF(zu), lcl)
	}
	return logDiffExp(s.logSurv(zl), s.logSurv(zu))
}

var (
	// stdNormal: g = −z²/2 − ln√(2π); tails through erfc and, far out, the
	// Mills ratio (logNormalCDF).
	stdNormal = stdLocScale{
		logDensity: func(z float64) (float64, float64, float64) { return -0.5*z*z - lnSqrt2Pi, -z, -1 },
		logCDF:     logNormalCDF,
		logSurv:    logNormalSurvival,
	}
	// stdLogistic: F₀ = 1/(1 + e^(−z)).
	stdLogistic = stdLocScale{
		logDensity: logisticLogDensity,
		logCDF:     logLogisticCDF,
		logSurv:    func(z float64) float64 { return logLogisticCDF(-z) },
		exactTerms: logisticExactTerms,
	}
	// stdSEV is the smallest extreme value law of ln X for a Weibull X:
	// f₀ = exp(z − e^z), S₀ = exp(−e^z) (Meeker & Escobar, 1998, §4.8).
	stdSEV = stdLocScale{
		logDensity: sevLogDensity,
		logCDF:     func(z float64) float64 { return log1mExp(-math.Exp(z)) },
		logSurv:    func(z float64) float64 { return -math.Exp(z) },
		exactTerms: sevExactTerms,
		rightTerms: sevRightTerms,
	}
	// stdGumbel is the largest extreme value law: F₀ = exp(−e^(−z)).
	stdGumbel = stdLocScale{
		logDensity: func(z float64) (float64, float64, float64) {
			e := math.Exp(-z)
			return -z - e, e - 1, -e
		},
		logCDF:  func(z float64) float64 { return -math.Exp(-z) },
		logSurv: func(z float64) float64 { return Gumbel{0, 1}.LogSurvival(z) },
	}
)

// add adds to p one term's score and Hessian in (a, b) at z = b·u − a,
// given h1 = ∂/∂z and h2 = ∂²/∂z² of the term: ∂/∂a = −h1, ∂/∂b = u·h1,
// and the second derivatives h2, −u·h2, u²·h2.
func (p *locScalePoint) add(u, h1, h2 float64) {
	p.ga -= h1
	p.gb += u * h1
	p.haa += h2
	p.hab -= u * h2
	p.hbb += u * u * h2
}

// sevLogDensity is the smallest extreme value law's g = z − e^z, with
// g′ = 1 − e^z and g″ = −e^z.
func sevLogDensity(z float64) (g, dg, d2g float64) {
	e := math.Exp(z)
	return z - e, 1 - e, -e
}

// sevExactTerms adds the exact values' terms of the smallest extreme value
// law as sevLogDensity and censoredLocScalePoint's loop give them, in the
// same order, with the exponentials e^z taken sevBlock at a time by
// libExps (math.Exp's bits): the same sums, bit for bit.
func sevExactTerms(p *locScalePoint, exact []float64, a, b float64) {
	var zs, es [sevBlock]float64
	for len(exact) > 0 {
		n := min(len(exact), sevBlock)
		for i, u := range exact[:n] {
			zs[i] = b*u - a
		}
		libExps(es[:n], zs[:n])
		for i, u := range exact[:n] {
			z, e := zs[i], es[i]
			p.ll += z - e
			p.add(u, 1-e, -e)
		}
		exact = exact[n:]
	}
}

// sevRightTerms adds the suspensions' terms of the smallest extreme value
// law as censoredLocScalePoint's loop gives them — ln S₀ = −e^z, g and g′
// from sevLogDensity, the hazard exp(g − ln S₀) — with e^z taken once for
// both (the same exponential, so the same bits) and the exponentials
// sevBlock at a time by libExps.
func sevRightTerms(p *locScalePoint, t *tally, a, b float64) {
	var zs, es, hs [sevBlock]float64
	us, ns := t.u, t.n
	for len(us) > 0 {
		n := min(len(us), sevBlock)
		for i, u := range us[:n] {
			zs[i] = b*u - a
		}
		libExps(es[:n], zs[:n])
		for i := range n {
			z, e := zs[i], es[i]
			hs[i] = (z - e) - (-e) // g − ln S₀
		}
		libExps(hs[:n], hs[:n])
		for i, u := range us[:n] {
			w, e, h := ns[i], es[i], hs[i]
			dg := 1 - e
			p.ll += w * -e
			p.add(u, -w*h, -w*h*(dg+h))
		}
		us, ns = us[n:], ns[n:]
	}
}

// sevBlock is how many exponentials sevExactTerms takes at a time.
const sevBlock = 256

// logisticExactTerms adds the exact values' terms of the logistic law,
// g(z) = −|z| − 2 ln(1 + e^(−|z|)), g′ = −tanh(z/2), g″ = −2e^(−|z|)/(1 +
// e^(−|z|))², as logisticLogDensity gives them, but with Σ ln(1 + e^(−|z|))
// taken as the logarithm of the running product of the factors, one
// logarithm per logProductChunk values (factors in (1, 2]: see sumLogSmall
// for the rounding bound).
func logisticExactTerms(p *locScalePoint, exact []float64, a, b float64) {
	var sa, sl float64
	for start := 0; start < len(exact); start += logProductChunk {
		prod := 1.0
		for _, u := range exact[start:min(start+logProductChunk, len(exact))] {
			z := b*u - a
			abs := math.Abs(z)
			e := math.Exp(-abs)
			q := 1 + e
			prod *= q
			sa += abs
			iq := 1 / q
			t := (1 - e) * iq
			if z < 0 {
				t = -t
			}
			h2 := -2 * e * iq * iq
			p.ga += t
			p.gb -= u * t
			p.haa += h2
			p.hab -= u * h2
			p.hbb += u * u * h2
		}
		sl += math.Log(prod)
	}
	p.ll += -sa - 2*sl
}

// censoredLocScaleFamily says how a family maps onto a location-scale law
// of y = x (or y = ln x when logScale): which standardized law, and how
// (μ, σ) of y turn into the family's parameters and back.
type censoredLocScaleFamily struct {
	std      stdLocScale
	logScale bool
	// toParams maps (μ, σ) of y to the family's parameters; fromParams
	// maps them back.
	toParams   func(mu, sigma float64) []float64
	fromParams func(p []float64) (mu, sigma float64)
}

// censoredLocScaleFamilies are the families fitted to censored data by
// fitCensoredLocScale. The weibull is the smallest extreme value law of
// ln x with σ = 1/shape and μ = ln scale, the loglogistic the logistic law
// of ln x with σ = 1/shape and μ = ln scale (Lawless, 2003, §1.3; Meeker &
// Escobar, 1998, §4.8).
var censoredLocScaleFamilies = map[string]censoredLocScaleFamily{
	"normal":    {std: stdNormal, toParams: identityParams, fromParams: identityFrom},
	"lognormal": {std: stdNormal, logScale: true, toParams: identityParams, fromParams: identityFrom},
	"logistic":  {std: stdLogistic, toParams: identityParams, fromParams: identityFrom},
	"gumbel":    {std: stdGumbel, toParams: identityParams, fromParams: identityFrom},
	"weibull": {std: stdSEV, logScale: true,
		toParams:   func(mu, sigma float64) []float64 { return []float64{1 / sigma, math.Exp(mu)} },
		fromParams: func(p []float64) (float64, float64) { return math.Log(p[1]), 1 / p[0] }},
	"loglogistic": {std: stdLogistic, logScale: true,
		toParams:   func(mu, sigma float64) []float64 { return []float64{math.Exp(mu), 1 / sigma} },
		fromParams: func(p []float64) (float64, float64) { return math.Log(p[0]), 1 / p[1] }},
}

// censoredNewtonMaxIter caps the censored Newton's iterations.
const censoredNewtonMaxIter = 100

// genericCensoredOnly, when set (by tests and benchmarks only), sends every
// censored fit to the generic BFGS route, for comparison.
var genericCensoredOnly bool

func identityParams(mu, sigma float64) []float64  { return []float64{mu, sigma} }
func identityFrom(p []float64) (float64, float64) { return p[0], p[1] }

// censoredSample is a censored dataset on the standardized scale
// u = (y − c)/s: exact values, and the distinct non-detect limits,
// suspensions and two-sided intervals with how often each occurs (open
// intervals have become left or right censored). Field data repeat their
// limits (a few detection limits, suspensions at the end of a test), so
// each censored term is evaluated once per distinct value.
type censoredSample struct {
	exact []float64
	sumY  float64 // Σ (y − centre) over the exact values
	lnRef float64 // on the log scale, the centre: y − centre = ln(x/e^centre)
	censoredTallies
}

// standardizeCensored maps every value of d to u = (y − c)/s, y = x or
// y = ln(x/ref) with ln ref = c (so data clustered far from 1 keep their
// spread). On the log scale a bound ≤ 0 is −∞ (an open lower end, or a
// suspension that adds ln S = 0). It reports false when a value has no
// place in the likelihood (an exact value or a non-detect limit ≤ 0 on the
// log scale, a NaN, an empty interval).
func standardizeCensored(d *Data, logScale bool, c, s float64) (censoredSample, bool) {
	ref := math.Exp(c)
	var cs censoredSample
	if logScale {
		cs.lnRef = math.Log(ref) // the centre the values are taken about
	}
	// centred returns y − centre, unscaled.
	centred := func(x float64) float64 {
		if logScale {
			if x <= 0 {
				return math.Inf(-1) // below the support: F = 0
			}
			if math.IsInf(x, 1) {
				return x
			}
			return lnRatio(x, ref)
		}
		return x - c
	}
	to := func(x float64) float64 { return centred(x) / s }
	bad := func(u float64) bool { return math.IsNaN(u) || math.IsInf(u, 0) }
	cs.exact = make([]float64, len(d.Exact))
	for i, x := range d.Exact {
		y := centred(x)
		if cs.exact[i] = y / s; bad(cs.exact[i]) {
			return cs, false
		}
		cs.sumY += y
	}
	for _, x := range d.Left {
		u := to(x)
		if bad(u) {
			return cs, false
		}
		cs.left.add(u)
	}
	for _, x := range d.Right {
		u := to(x)
		if math.IsInf(u, -1) {
			continue // a suspension at or below 0 of a positive law: ln S = 0
		}
		if bad(u) {
			return cs, false
		}
		cs.right.add(u)
	}
	for i := range d.Lower {
		l, u := to(d.Lower[i]), to(d.Upper[i])
		switch {
		case math.IsNaN(l) || math.IsNaN(u) || math.IsInf(l, 1) || math.IsInf(u, -1) || !(l < u):
			return cs, false
		case math.IsInf(l, -1) && math.IsInf(u, 1):
			// (−∞, ∞): probability one, nothing to add.
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

// censoredLocScalePoint evaluates, at a = μ/σ and b = 1/σ of the
// standardized data (z = b·u − a), the censored log-likelihood
//
//	ℓ(a, b) = Σ_exact [ln b + g(z)] + Σ_left ln F₀(z) + Σ_right ln S₀(z)
//	        + Σ_interval ln(F₀(z_u) − F₀(z_l))
//
// with its score and observed Hessian (Lawless, 2003, §5.2; Meeker &
// Escobar, 1998, §8.2). Per observation with h(z) its term, ∂h/∂a = −h′,
// ∂h/∂b = u·h′, and the Hessian is h″·(1, −u; −u, u²). The censored terms
// go through the reversed hazard r = f₀/F₀ and the hazard λ = f₀/S₀:
// (ln F₀)′ = r, (ln F₀)″ = r(g′ − r); (ln S₀)′ = −λ, (ln S₀)″ = −λ(g′ + λ);
// each ratio is exp(g − ln F₀) or exp(g − ln S₀), finite far in the tails.
// An interval term with P = F₀(z_u) − F₀(z_l) and w = f₀(z)/P at each end
// has ∇ln P = ∇P/P and ∇²ln P = ∇²P/P − (∇P/P)(∇P/P)ᵀ, with
// ∇²P/P = w_u g′(z_u)∇z_u∇z_uᵀ − w_l g′(z_l)∇z_l∇z_lᵀ.
func censoredLocScalePoint(std stdLocScale, cs *censoredSample, a, b float64) locScalePoint {
	var p locScalePoint
	if !(b > 0) {
		p.ll = math.Inf(-1)
		return p
	}
	if std.exactTerms != nil {
		std.exactTerms(&p, cs.exact, a, b)
	} else {
		for _, u := range cs.exact {
			g, dg, d2g := std.logDensity(b*u - a)
			p.ll += g
			p.add(u, dg, d2g)
		}
	}
	ne := float64(len(cs.exact))
	p.ll += ne * math.Log(b)
	p.gb += ne / b
	p.hbb -= ne / (b * b)
	for i, u := range cs.left.u {
		w := cs.left.n[i]
		z := b*u - a
		lf := std.logCDF(z)
		g, dg, _ := std.logDensity(z)
		r := math.Exp(g - lf)
		p.ll += w * lf
		p.add(u, w*r, w*r*(dg-r))
	}
	if std.rightTerms != nil {
		std.rightTerms(&p, &cs.right, a, b)
	} else {
		for i, u := range cs.right.u {
			w := cs.right.n[i]
			z := b*u - a
			ls := std.logSurv(z)
			g, dg, _ := std.logDensity(z)
			h := math.Exp(g - ls)
			p.ll += w * ls
			p.add(u, -w*h, -w*h*(dg+h))
		}
	}
	for i, ul := range cs.lower {
		uu, w := cs.upper[i], cs.inCount[i]
		zl, zu := b*ul-a, b*uu-a
		lp := std.logIntervalProb(zl, zu)
		gl, dl, _ := std.logDensity(zl)
		gu, du, _ := std.logDensity(zu)
		wl, wu := math.Exp(gl-lp), math.Exp(gu-lp)
		p.ll += w * lp
		// ∇P/P with ∇z = (−1, u).
		pa := -(wu - wl)
		pb := uu*wu - ul*wl
		p.ga += w * pa
		p.gb += w * pb
		p.haa += w * (wu*du - wl*dl - pa*pa)
		p.hab += w * (-(uu*wu*du - ul*wl*dl) - pa*pb)
		p.hbb += w * (uu*uu*wu*du - ul*ul*wl*dl - pb*pb)
	}
	if math.IsNaN(p.ll) {
		p.ll = math.Inf(-1)
	}
	return p
}

// fitCensoredLocScale fits a location-scale family (or one of ln x) to
// censored data by Newton's method on (a, b) = (μ/σ, 1/σ) of the
// standardized values u = (y − μ₀)/σ₀, (μ₀, σ₀) taken from start, the
// family's own starting point. Every standardized law used here (normal,
// logistic, both extreme value laws) has a log-concave density, so each
// term — ln f₀, ln F₀, ln S₀ and ln(F₀(z_u) − F₀(z_l)) — is concave in
// (a, b) (Burridge, 1981), and locScaleNewton's step-halving Newton climbs
// to the unique maximum from any start; it declares convergence on the
// Newton decrement, a scaled score (see locScaleNewton).
//
// It records the fit and reports true only when the Newton converged to a
// point with a finite log-likelihood; otherwise fit is untouched and the
// caller runs the generic route. The log-likelihood reported is ℓ of the
// last evaluation mapped back to the data's scale (the test checks it
// against the family's own LogLik at the estimates).
func fitCensoredLocScale(fit *Fit, f Family, d *Data, opt Options, start []float64) bool {
	fam, ok := censoredLocScaleFamilies[f.Name()]
	if !ok || genericCensoredOnly || len(opt.Fixed) != 0 || d.IsComplete() || len(start) != 2 {
		return false
	}
	mu0, s0 := fam.fromParams(start)
	if math.IsNaN(mu0) || math.IsInf(mu0, 0) || !(s0 > 0) || math.IsInf(s0, 0) {
		return false
	}
	cs, ok := standardizeCensored(d, fam.logScale, mu0, s0)
	if !ok {
		return false
	}
	eval := func(a, b float64) locScalePoint { return censoredLocScalePoint(fam.std, &cs, a, b) }
	n := math.Max(1, float64(len(cs.exact)))
	// On a concave ℓ Newton's method needs a handful of steps; a run that
	// has not converged in censoredNewtonMaxIter is left to the generic
	// route rather than allowed the generic route's iteration budget.
	res := locScaleNewton(eval, 0, 1, opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter), n, locScaleBounds{})
	if !res.converged {
		return false
	}
	centre := mu0
	if fam.logScale {
		centre = cs.lnRef
	}
	mu, sigma := centre+s0*res.location, s0*res.scale
	est := fam.toParams(mu, sigma)
	if _, err := f.New(est); err != nil {
		return false
	}
	// ℓ of the standardized values u = (y − μ₀)/σ₀ maps back by the
	// Jacobians: ln L(y) = ℓ(u) − n_exact ln σ₀, and on the log scale
	// ln L(x) = ln L(y) − Σ_exact ln x.
	ne := float64(len(cs.exact))
	ll := res.logLik - ne*math.Log(s0)
	if fam.logScale {
		ll -= ne*centre + cs.sumY
	}
	if math.IsNaN(ll) || math.IsInf(ll, 0) {
		return false
	}
	method := "censored Newton on (μ/σ, 1/σ)"
	if fam.logScale {
		method += " of ln x"
	}
	fit.Convergence = Convergence{
		Method:       method,
		Iterations:   res.iterations,
		Evaluations:  res.evaluations,
		GradientNorm: res.gradNorm,
		Converged:    true,
	}
	copy(fit.Estimates, est)
	fit.LogLik = ll
	return true
}
