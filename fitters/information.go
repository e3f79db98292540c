package fitters

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Observed information in closed form, −∂² ln L/∂θᵢ∂θⱼ at the given
// parameters, for complete data. Each method implements infer's
// AnalyticInformation hook: it fills h (k×k, the family's parameter order)
// and reports false — so that infer falls back on finite differences —
// when the data are censored, the parameters invalid or a term not finite.
// One pass over the data replaces the dozens of likelihood passes of a
// finite-difference Hessian; the formulas are the second derivatives of the
// log-densities given in each family's doc (e.g. Lawless, 2003, ch. 4–5 for
// the location-scale and Weibull cases; Johnson, Kotz & Balakrishnan, 1994,
// for the gamma and inverse Gaussian).

// setInfo2 fills the 2×2 information and checks it is finite.
func setInfo2(h *mat.SymDense, i00, i01, i11 float64) bool {
	if h.SymmetricDim() != 2 || !finite(i00) || !finite(i01) || !finite(i11) {
		return false
	}
	h.SetSym(0, 0, i00)
	h.SetSym(0, 1, i01)
	h.SetSym(1, 1, i11)
	return true
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// locScaleInformation is the information of ℓ(μ, σ) = −n ln σ + Σ g(z),
// z = (y − μ)/σ, for a log-density g with derivatives g′, g″:
//
//	I_μμ = −Σg″/σ²,  I_μσ = −Σ(g″z + g′)/σ²,  I_σσ = −n/σ² − Σ(g″z² + 2g′z)/σ².
//
// Only g′ and g″ enter, so g is given by its derivatives alone (no ln per
// point where g itself would need one, as the logistic's does).
func locScaleInformation(y []float64, g scoreTerms, mu, sigma float64, h *mat.SymDense) bool {
	if !(sigma > 0) || !finite(mu) || !finite(sigma) || len(y) == 0 {
		return false
	}
	var s2, s2z1, s2zz2 float64
	for _, v := range y {
		z := (v - mu) / sigma
		g1, g2 := g(z)
		s2 += g2
		s2z1 += g2*z + g1
		s2zz2 += g2*z*z + 2*g1*z
	}
	n := float64(len(y))
	v := sigma * sigma
	return setInfo2(h, -s2/v, -s2z1/v, (-n-s2zz2)/v)
}

// scoreTerms gives g′(z) and g″(z) of a standardized log-density g.
type scoreTerms func(z float64) (dg, d2g float64)

// normalScoreTerms: g = −z²/2 (ln φ up to a constant), g′ = −z, g″ = −1.
func normalScoreTerms(z float64) (dg, d2g float64) { return -z, -1 }

// gumbelScoreTerms: g = −z − e^(−z) (standard Gumbel, largest values),
// g′ = e^(−z) − 1, g″ = −e^(−z).
func gumbelScoreTerms(z float64) (dg, d2g float64) {
	e := math.Exp(-z)
	return e - 1, -e
}

// logisticScoreTerms: g = −z − 2 ln(1 + e^(−z)) (standard logistic),
// g′ = −tanh(z/2), g″ = −2e^(−|z|)/(1 + e^(−|z|))²; the derivatives of
// logisticLogDensity without its logarithm (one exp per point).
func logisticScoreTerms(z float64) (dg, d2g float64) {
	e := math.Exp(-math.Abs(z))
	iq := 1 / (1 + e)
	t := (1 - e) * iq // tanh(|z|/2)
	if z < 0 {
		t = -t
	}
	return -t, -2 * e * iq * iq
}

func (normalFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 2 || !d.IsComplete() {
		return false
	}
	return locScaleInformation(d.Exact, normalScoreTerms, p[0], p[1], h)
}

func (logisticFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 2 || !d.IsComplete() {
		return false
	}
	return locScaleInformation(d.Exact, logisticScoreTerms, p[0], p[1], h)
}

func (gumbelFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 2 || !d.IsComplete() {
		return false
	}
	return locScaleInformation(d.Exact, gumbelScoreTerms, p[0], p[1], h)
}

// ObservedInformation of the lognormal is the normal one of ln x (the
// Jacobian −Σ ln x does not depend on μ, σ).
func (lognormalFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 2 || !d.IsComplete() || !(p[1] > 0) {
		return false
	}
	mu, sigma := p[0], p[1]
	var s1, s2 float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return false
		}
		z := (math.Log(x) - mu) / sigma
		s1 += z
		s2 += z * z
	}
	n := float64(len(d.Exact))
	v := sigma * sigma
	return setInfo2(h, n/v, 2*s1/v, (3*s2-n)/v)
}

// ObservedInformation of the exponential is n/λ².
func (exponentialFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 1 || !d.IsComplete() || !(p[0] > 0) || h.SymmetricDim() != 1 {
		return false
	}
	v := float64(len(d.Exact)) / (p[0] * p[0])
	if !finite(v) {
		return false
	}
	h.SetSym(0, 0, v)
	return true
}

// ObservedInformation of the gamma (shape α, rate β) does not depend on the
// data beyond n: I_αα = nψ′(α), I_αβ = −n/β, I_ββ = nα/β².
func (gammaFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 2 || !d.IsComplete() || !(p[0] > 0) || !(p[1] > 0) {
		return false
	}
	n := float64(len(d.Exact))
	a, b := p[0], p[1]
	return setInfo2(h, n*trigammaFn(a), -n/b, n*a/(b*b))
}

// ObservedInformation of the inverse Gaussian (mean μ, shape λ), from
// ℓ = (n/2) ln λ − (λ/2) Σ (x − μ)²/(μ²x) + const:
//
//	I_μμ = λ(3Σx/μ⁴ − 2n/μ³),  I_μλ = n/μ² − Σx/μ³,  I_λλ = n/(2λ²).
func (invgaussFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 2 || !d.IsComplete() || !(p[0] > 0) || !(p[1] > 0) {
		return false
	}
	mu, lam := p[0], p[1]
	var sx float64 // Σ x/μ, kept near n
	for _, x := range d.Exact {
		sx += x / mu
	}
	n := float64(len(d.Exact))
	m2 := mu * mu
	return setInfo2(h, lam*(3*sx-2*n)/(m2*mu), (n-sx)/m2, n/(2*lam*lam))
}

// ObservedInformation of the Weibull (shape k, scale λ), with y = ln(x/λ)
// and t = (x/λ)^k, from ℓ = n ln k − nk ln λ + (k−1)Σ ln x − Σt:
//
//	I_kk = n/k² + Σty²,  I_kλ = n/λ − Σt(ky + 1)/λ,  I_λλ = (k(k+1)Σt − nk)/λ².
func (weibullFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 2 || !d.IsComplete() || !(p[0] > 0) || !(p[1] > 0) {
		return false
	}
	k, lam := p[0], p[1]
	st, sty, styy, ok := weibullInfoSums(d.Exact, k, lam)
	if !ok {
		return false
	}
	n := float64(len(d.Exact))
	return setInfo2(h, n/(k*k)+styy, (n-k*sty-st)/lam, (k*(k+1)*st-n*k)/(lam*lam))
}

// ObservedInformation of the log-logistic (scale α, shape β): ln x is
// logistic with location m = ln α and scale 1/β, so with z = β(ln x − m)
// and g the standard logistic log-density (ℓ = n ln β + Σg(z) + const),
//
//	−∂²ℓ/∂β² = n/β² − Σg″z²/β²,  −∂²ℓ/∂β∂m = Σ(g″z + g′),  −∂²ℓ/∂m² = −β²Σg″,
//
// and by the chain rule through m = ln α (the gradient term kept, so the
// result is exact away from the maximum too)
//
//	I_αα = (−∂²ℓ/∂m² + ∂ℓ/∂m)/α²,  I_αβ = (−∂²ℓ/∂β∂m)/α,  with ∂ℓ/∂m = −βΣg′.
func (loglogisticFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if len(p) != 2 || !d.IsComplete() || !(p[0] > 0) || !(p[1] > 0) {
		return false
	}
	alpha, beta := p[0], p[1]
	s1, s2, s2z1, s2zz, ok := loglogisticInfoSums(d.Exact, alpha, beta)
	if !ok {
		return false
	}
	n := float64(len(d.Exact))
	imm := -beta * beta * s2
	dm := -beta * s1
	return setInfo2(h, (imm+dm)/(alpha*alpha), s2z1/alpha, (n-s2zz)/(beta*beta))
}

// observedInformer is infer's AnalyticInformation hook.
type observedInformer interface {
	ObservedInformation(params []float64, d *Data, h *mat.SymDense) bool
}

// ObservedInformation forwards to the wrapped family's closed form, and
// reports false (finite differences) for a family without one.
func (c checkedFamily) ObservedInformation(p []float64, d *Data, h *mat.SymDense) bool {
	if a, ok := c.Family.(observedInformer); ok {
		return a.ObservedInformation(p, d, h)
	}
	return false
}

// cornerer is implemented by a family whose log-likelihood can have its
// maximum at a corner (pareto's scale at an interval's lower end).
type cornerer interface {
	CornerAt(params []float64, d *Data) string
}

// CornerAt reports why f's log-likelihood has no second derivative at
// params for d, where the family knows of a corner there (its slope in a
// parameter jumps), and "" otherwise. A finite-difference Hessian taken
// across a corner is finite but measures nothing, so infer gives no
// standard errors there, as where the Hessian is not finite.
func CornerAt(f Family, params []float64, d *Data) string {
	if c, ok := f.(checkedFamily); ok {
		f = c.Family
	}
	if c, ok := f.(cornerer); ok {
		return c.CornerAt(params, d)
	}
	return ""
}

// edger is implemented by a family whose maximum can sit on an edge the
// data set (pareto's scale at the smallest observation that bounds it, or
// at a corner below it).
type edger interface {
	DataEdge(params []float64, d *Data) (param int, why string)
}

// DataEdge returns the parameter of f whose estimate params sits on an
// edge the data set, and why, or −1 and "". There the estimate is a data
// value (pareto's scale at the sample minimum), so a bootstrap
// replicate's estimate can only fall on one side of it (a replicate's
// minimum is never below the sample's, in the limit) and bootstrap
// intervals of it are not valid (Bickel & Freedman, 1981, on the
// bootstrap of extremes); a profile likelihood, which the data bound on
// that side, still is.
func DataEdge(f Family, params []float64, d *Data) (int, string) {
	if c, ok := f.(checkedFamily); ok {
		f = c.Family
	}
	if e, ok := f.(edger); ok {
		return e.DataEdge(params, d)
	}
	return -1, ""
}
