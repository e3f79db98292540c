package fitters

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// betaCensoredSample holds what the censored beta Newton route needs from
// a dataset, gathered in one pass: the exact values' sufficient statistics
// Σ ln x and Σ ln(1 − x) (running products, one logarithm per few values)
// and the censored values, distinct ones tallied.
type betaCensoredSample struct {
	n, s1, s2 float64
	censoredTallies
}

// newBetaCensoredSample gathers d's statistics; false when an observation
// has no place in the route (a value outside (0, 1), a NaN, an empty
// interval).
func newBetaCensoredSample(d *Data) (betaCensoredSample, bool) {
	s := betaCensoredSample{n: float64(len(d.Exact))}
	in := func(x float64) bool { return x > 0 && x < 1 }
	a1, a2 := newLogAccumulator(), newLogAccumulator()
	for _, x := range d.Exact {
		if !in(x) {
			return s, false
		}
		a1.mul(x)
		a2.mul(1 - x) // exact for x ≥ ½ (Sterbenz), one rounding below
	}
	s.s1, s.s2 = a1.sum(), a2.sum()
	for _, x := range d.Left {
		if !in(x) {
			return s, false
		}
		s.left.add(x)
	}
	for _, x := range d.Right {
		if !in(x) {
			return s, false
		}
		s.right.add(x)
	}
	for i, l := range d.Lower {
		u := d.Upper[i]
		switch {
		case math.IsNaN(l) || math.IsNaN(u) || !(l < u):
			return s, false
		case l <= 0 && u >= 1:
			// probability one
		case l <= 0:
			s.left.add(u)
		case u >= 1:
			s.right.add(l)
		default:
			s.addInterval(l, u)
		}
	}
	return s, true
}

// betaShapeStep is the step in ln α and ln β of the censored terms' finite
// differences: 2⁻¹⁰ ≈ 10⁻³, as gammaShapeStep (the same error budget: the
// five-point score to about 10⁻¹² of |ln D|; the Hessian, whose mixed
// entry comes from the four corners (error h² ≈ 10⁻⁶ relative), only sets
// the rate of Newton's last steps, not where the score vanishes).
const betaShapeStep = 0x1p-10

// betaCensoredTerm returns ln D at shapes (a, b) for a censored value:
// a non-detect (ln I_x(a, b)), a suspension (ln I_(1−x)(b, a)) or an
// interval (ln(F(u) − F(l)), from the tail that does not cancel).
func betaCensoredTerm(kind int, a, b, x, u float64) float64 {
	switch kind {
	case 0:
		return betaLogRegIncBeta(a, b, x, 1-x)
	case 1:
		return betaLogRegIncBeta(b, a, 1-x, x)
	}
	lfl := betaLogRegIncBeta(a, b, x, 1-x)
	if lfl > -math.Ln2 {
		return logDiffExp(betaLogRegIncBeta(b, a, 1-x, x), betaLogRegIncBeta(b, a, 1-u, u))
	}
	return logDiffExp(betaLogRegIncBeta(a, b, u, 1-u), lfl)
}

// betaStencil are the 13 points (i, j) of the censored terms' differences
// in (ln α, ln β), in steps of betaShapeStep.
var betaStencil = [13][2]float64{
	{0, 0}, {-2, 0}, {-1, 0}, {1, 0}, {2, 0}, {0, -2}, {0, -1}, {0, 1}, {0, 2},
	{1, 1}, {1, -1}, {-1, 1}, {-1, -1},
}

// betaStencilFactors are e^(i·h) for i = −2…2 (index i + 2).
var betaStencilFactors = [5]float64{
	math.Exp(-2 * betaShapeStep), math.Exp(-betaShapeStep), 1,
	math.Exp(betaShapeStep), math.Exp(2 * betaShapeStep),
}

// betaCensoredPoint evaluates the censored beta log-likelihood at
// (κ, λ) = (ln α, ln β) with its score and observed Hessian. Exact values
// (Johnson, Kotz & Balakrishnan, 1995, ch. 25):
//
//	Σ ln f = (α−1)Σ ln x + (β−1)Σ ln(1−x) − n ln B(α, β),
//	∂/∂α = Σ ln x − n(ψ(α) − ψ(α+β)),  ∂²/∂α² = −n(ψ′(α) − ψ′(α+β)),
//	∂²/∂α∂β = nψ′(α+β),
//
// and likewise in β, mapped to logarithms by ∂/∂κ = α∂/∂α,
// ∂²/∂κ² = α²∂²/∂α² + α∂/∂α, ∂²/∂κ∂λ = αβ∂²/∂α∂β. The censored terms ln D
// (D = I_x(α, β) and its complements) have no closed-form derivatives in
// the shapes: five-point central differences of ln D in κ and in λ give
// the score and the diagonal of the Hessian, the four corners (±h, ±h)
// the mixed entry, each distinct censored value once.
func betaCensoredPoint(s *betaCensoredSample, kappa, lambda float64) newton2Point {
	var p newton2Point
	a, b := math.Exp(kappa), math.Exp(lambda)
	if !(a > 0) || !(b > 0) || math.IsInf(a, 0) || math.IsInf(b, 0) {
		p.ll = math.Inf(-1)
		return p
	}
	if s.n > 0 {
		pab := mathext.Digamma(a + b)
		tab := trigammaPositive(a + b)
		da := s.s1 - s.n*(mathext.Digamma(a)-pab)
		db := s.s2 - s.n*(mathext.Digamma(b)-pab)
		p.ll = (a-1)*s.s1 + (b-1)*s.s2 - s.n*lnBeta(a, b)
		p.g0 = a * da
		p.g1 = b * db
		p.h00 = -a*a*s.n*(trigammaPositive(a)-tab) + a*da
		p.h01 = a * b * s.n * tab
		p.h11 = -b*b*s.n*(trigammaPositive(b)-tab) + b*db
	}
	const h = betaShapeStep
	var f [13]float64
	term := func(kind int, count, x, u float64) {
		for k, st := range betaStencil {
			f[k] = betaCensoredTerm(kind, a*betaStencilFactors[int(st[0])+2], b*betaStencilFactors[int(st[1])+2], x, u)
		}
		p.ll += count * f[0]
		p.g0 += count * (f[1] - 8*f[2] + 8*f[3] - f[4]) / (12 * h)
		p.g1 += count * (f[5] - 8*f[6] + 8*f[7] - f[8]) / (12 * h)
		p.h00 += count * (-f[1] + 16*f[2] - 30*f[0] + 16*f[3] - f[4]) / (12 * h * h)
		p.h11 += count * (-f[5] + 16*f[6] - 30*f[0] + 16*f[7] - f[8]) / (12 * h * h)
		p.h01 += count * (f[9] - f[10] - f[11] + f[12]) / (4 * h * h)
	}
	for i, x := range s.left.u {
		term(0, s.left.n[i], x, 0)
	}
	for i, x := range s.right.u {
		term(1, s.right.n[i], x, 0)
	}
	for i, l := range s.lower {
		term(2, s.inCount[i], l, s.upper[i])
	}
	if math.IsNaN(p.ll) || math.IsInf(p.ll, 1) {
		p.ll = math.Inf(-1)
	}
	return p
}

// betaCensoredLogLik is betaCensoredPoint's log-likelihood alone, for
// ranking the starts.
func betaCensoredLogLik(s *betaCensoredSample, a, b float64) float64 {
	if !(a > 0) || !(b > 0) || math.IsInf(a, 0) || math.IsInf(b, 0) {
		return math.Inf(-1)
	}
	var ll float64
	if s.n > 0 {
		ll = (a-1)*s.s1 + (b-1)*s.s2 - s.n*lnBeta(a, b)
	}
	for i, x := range s.left.u {
		ll += s.left.n[i] * betaCensoredTerm(0, a, b, x, 0)
	}
	for i, x := range s.right.u {
		ll += s.right.n[i] * betaCensoredTerm(1, a, b, x, 0)
	}
	for i, l := range s.lower {
		ll += s.inCount[i] * betaCensoredTerm(2, a, b, l, s.upper[i])
	}
	if math.IsNaN(ll) || math.IsInf(ll, 1) {
		return math.Inf(-1)
	}
	return ll
}

// fitBetaCensored fits the beta distribution to censored data by
// censoredNewton2 on (ln α, ln β) from the best, by the censored
// log-likelihood, of the moment estimates of the exact values and of every
// recorded value and the family's spread starts (1, 1), (½, ½),
// (5m, 5(1−m)). It reports as fitGammaCensored does.
func fitBetaCensored(fit *Fit, d *Data, opt Options) (ok bool, reason string) {
	if genericCensoredOnly || len(opt.Fixed) != 0 || d.IsComplete() {
		return false, ""
	}
	s, ok := newBetaCensoredSample(d)
	if !ok {
		return false, "an observation the route cannot take (a value outside (0, 1), NaN or an empty interval)"
	}
	best := math.Inf(-1)
	var k0, l0 float64
	try := func(a, b float64) {
		if ll := betaCensoredLogLik(&s, a, b); ll > best {
			best, k0, l0 = ll, math.Log(a), math.Log(b)
		}
	}
	moments := func(x []float64) {
		if len(x) < 2 {
			return
		}
		m, v := meanVar(x)
		if c := m*(1-m)/v - 1; v > 0 && c > 0 {
			try(m*c, (1-m)*c)
		}
	}
	moments(d.Exact)
	all := d.Values()
	moments(all)
	m, _ := meanVar(all)
	try(1, 1)
	try(0.5, 0.5)
	try(5*m, 5*(1-m))
	if math.IsInf(best, -1) {
		return false, "no start with a finite log-likelihood"
	}
	eval := func(kappa, lambda float64) newton2Point { return betaCensoredPoint(&s, kappa, lambda) }
	res := censoredNewton2(eval, k0, l0, opt.tolerance(), min(opt.maxIterations(), censoredNewtonMaxIter))
	if !res.converged {
		return false, res.reason
	}
	a, b := math.Exp(res.t0), math.Exp(res.t1)
	if !(a > 0) || !(b > 0) || math.IsInf(a, 0) || math.IsInf(b, 0) || !finite(res.logLik) {
		return false, "the maximum lies where the parameters are not finite"
	}
	fit.setSolved(a, b, res.logLik, res.convergence("censored Newton on (log alpha, log beta)"))
	return true, ""
}
