package fitters

import "math"

// Analytic scores: the gradient ∂ℓ/∂θ of each family's full log-likelihood
// LogLik, in Parameters() order and on the natural scale of the parameters.
// The exact observations contribute in closed form, in one pass over the
// data; the formulas are the first derivatives of the log-densities given in
// each family's file (Lawless, 2003, ch. 4–5, for the location-scale and
// Weibull cases; Johnson, Kotz & Balakrishnan, 1994, for the gamma and the
// inverse Gaussian). Censored observations (non-detects, suspensions,
// intervals) contribute by central finite differences of their part of the
// log-likelihood only (censoredScore). Invalid parameters give a vector of
// NaN.

// nanScore is the score returned at invalid parameters.
func nanScore(k int) []float64 {
	g := make([]float64, k)
	for i := range g {
		g[i] = math.NaN()
	}
	return g
}

// censoredScore adds to g the gradient of the censored part of the
// log-likelihood, Σ ln F(l) + Σ ln S(r) + Σ ln(F(u) − F(l)), by the
// five-point central difference
//
//	∂ℓ_c/∂θᵢ ≈ (−ℓ_c(θ+2heᵢ) + 8ℓ_c(θ+heᵢ) − 8ℓ_c(θ−heᵢ) + ℓ_c(θ−2heᵢ)) / (12h),
//
// whose truncation error is O(h⁴) (Abramowitz & Stegun 25.3.6), with
// h = 5e-4·unitᵢ: unitᵢ is the parameter's magnitude, or for a location the
// given scale (unit[i] > 0 overrides |θᵢ|). Complete data leave g unchanged.
func censoredScore(newDist func([]float64) (Dist, error), p []float64, d *Data, unit []float64, g []float64) {
	if d.IsComplete() {
		return
	}
	th := append([]float64(nil), p...)
	at := func(i int, v float64) float64 {
		th[i] = v
		dist, err := newDist(th)
		th[i] = p[i]
		if err != nil {
			return math.NaN()
		}
		return censoredLogLik(dist, d, false)
	}
	for i := range p {
		u := math.Abs(p[i])
		if unit[i] > 0 {
			u = unit[i]
		}
		if !(u > 0) {
			u = 1
		}
		h := 5e-4 * u
		g[i] += (-at(i, p[i]+2*h) + 8*at(i, p[i]+h) - 8*at(i, p[i]-h) + at(i, p[i]-2*h)) / (12 * h)
	}
}

// Score of the normal (μ, σ), with zᵢ = (xᵢ − μ)/σ:
//
//	∂ℓ/∂μ = Σz/σ,  ∂ℓ/∂σ = (Σz² − n)/σ.
func (f normalFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 2 || !(p[1] > 0) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nanScore(2)
	}
	mu, sigma := p[0], p[1]
	var sz, szz float64
	for _, x := range d.Exact {
		z := (x - mu) / sigma
		sz += z
		szz += z * z
	}
	n := float64(len(d.Exact))
	g := []float64{sz / sigma, (szz - n) / sigma}
	censoredScore(f.New, p, d, []float64{sigma, 0}, g)
	return g
}

// Score of the lognormal (μ, σ), with wᵢ = ln xᵢ − μ (the Jacobian −Σ ln x
// does not depend on the parameters):
//
//	∂ℓ/∂μ = Σw/σ²,  ∂ℓ/∂σ = −n/σ + Σw²/σ³.
func (f lognormalFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 2 || !(p[1] > 0) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nanScore(2)
	}
	mu, sigma := p[0], p[1]
	m := math.Exp(mu)
	var sw, sww float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return nanScore(2)
		}
		var w float64
		if x > 0.5*m && x < 2*m {
			w = math.Log1p((x - m) / m) // ln x − μ without cancellation
		} else {
			w = math.Log(x) - mu
		}
		sw += w
		sww += w * w
	}
	n := float64(len(d.Exact))
	s2 := sigma * sigma
	g := []float64{sw / s2, -n/sigma + sww/(s2*sigma)}
	censoredScore(f.New, p, d, []float64{sigma, 0}, g)
	return g
}

// Score of the exponential (rate λ): ∂ℓ/∂λ = n/λ − Σx.
func (f exponentialFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 1 || !(p[0] > 0) || math.IsInf(p[0], 1) {
		return nanScore(1)
	}
	var s float64
	for _, x := range d.Exact {
		s += x
	}
	g := []float64{float64(len(d.Exact))/p[0] - s}
	censoredScore(f.New, p, d, []float64{0}, g)
	return g
}

// Score of the gamma (shape k, rate β):
//
//	∂ℓ/∂k = n ln β − nψ(k) + Σ ln x = n(ln k − ψ(k)) + Σ ln(x/m),  m = k/β,
//	∂ℓ/∂β = nk/β − Σx.
//
// The second form of ∂ℓ/∂k avoids the cancellation of n ln β − nψ(k) against
// Σ ln x at a large shape; ln k − ψ(k) comes from logMinusDigamma (full
// precision, unlike gonum's Digamma).
func (f gammaFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 2 || !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nanScore(2)
	}
	k, beta := p[0], p[1]
	m := k / beta
	var slr, sx float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return nanScore(2)
		}
		slr += lnRatio(x, m)
		sx += x
	}
	n := float64(len(d.Exact))
	lmd, _ := logMinusDigamma(k)
	g := []float64{n*lmd + slr, n*k/beta - sx}
	censoredScore(f.New, p, d, []float64{0, 0}, g)
	return g
}

// Score of the Weibull (shape k, scale λ), with yᵢ = ln(xᵢ/λ) and
// tᵢ = (xᵢ/λ)^k, from ℓ = n ln k − nk ln λ + (k−1)Σ ln x − Σt:
//
//	∂ℓ/∂k = n/k + Σy − Σty,  ∂ℓ/∂λ = (k/λ)(Σt − n).
func (f weibullFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 2 || !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nanScore(2)
	}
	k, lam := p[0], p[1]
	var sy, st, sty float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return nanScore(2)
		}
		y := lnRatio(x, lam)
		t := math.Exp(k * y)
		sy += y
		st += t
		sty += t * y
	}
	n := float64(len(d.Exact))
	g := []float64{n/k + sy - sty, k / lam * (st - n)}
	censoredScore(f.New, p, d, []float64{0, 0}, g)
	return g
}

// Score of the Gumbel for largest values (location μ, scale β), with
// zᵢ = (xᵢ − μ)/β, from ℓ = −n ln β − Σz − Σe^(−z):
//
//	∂ℓ/∂μ = (n − Σe^(−z))/β,  ∂ℓ/∂β = (Σz − Σz·e^(−z) − n)/β.
func (f gumbelFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 2 || !(p[1] > 0) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nanScore(2)
	}
	mu, beta := p[0], p[1]
	var sz, se, sze float64
	for _, x := range d.Exact {
		z := (x - mu) / beta
		e := math.Exp(-z)
		sz += z
		se += e
		sze += z * e
	}
	n := float64(len(d.Exact))
	g := []float64{(n - se) / beta, (sz - sze - n) / beta}
	censoredScore(f.New, p, d, []float64{beta, 0}, g)
	return g
}

// Score of the logistic (location μ, scale s), with zᵢ = (xᵢ − μ)/s and
// ln f₀(z) = −|z| − 2 ln(1 + e^(−|z|)), whose derivative is −tanh(z/2):
//
//	∂ℓ/∂μ = Σtanh(z/2)/s,  ∂ℓ/∂s = (Σz·tanh(z/2) − n)/s.
func (f logisticFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 2 || !(p[1] > 0) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nanScore(2)
	}
	mu, s := p[0], p[1]
	var st, szt float64
	for _, x := range d.Exact {
		z := (x - mu) / s
		t := halfTanh(z)
		st += t
		szt += z * t
	}
	n := float64(len(d.Exact))
	g := []float64{st / s, (szt - n) / s}
	censoredScore(f.New, p, d, []float64{s, 0}, g)
	return g
}

// halfTanh returns tanh(z/2) = (1 − e^(−|z|))/(1 + e^(−|z|)) with the sign
// of z, without overflow for any z.
func halfTanh(z float64) float64 {
	e := math.Exp(-math.Abs(z))
	t := -math.Expm1(-math.Abs(z)) / (1 + e)
	if z < 0 {
		return -t
	}
	return t
}

// Score of the log-logistic (scale α, shape β): ln x is logistic with
// location ln α and scale 1/β, so with zᵢ = β ln(xᵢ/α),
// ℓ = n ln β − Σ ln x + Σ ln f₀(z) and
//
//	∂ℓ/∂α = (β/α) Σtanh(z/2),  ∂ℓ/∂β = (n − Σz·tanh(z/2))/β.
func (f loglogisticFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 2 || !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nanScore(2)
	}
	alpha, beta := p[0], p[1]
	var st, szt float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return nanScore(2)
		}
		z := beta * lnRatio(x, alpha)
		t := halfTanh(z)
		st += t
		szt += z * t
	}
	n := float64(len(d.Exact))
	g := []float64{beta / alpha * st, (n - szt) / beta}
	censoredScore(f.New, p, d, []float64{0, 0}, g)
	return g
}

// Score of the inverse Gaussian (mean μ, shape λ), from
// ℓ = (n/2) ln λ − (λ/2) Σ (x − μ)²/(μ²x) + const, with rᵢ = (xᵢ − μ)/μ:
//
//	∂ℓ/∂μ = λ Σ(x − μ)/μ³ = (λ/μ²) Σr,  ∂ℓ/∂λ = n/(2λ) − ½ Σ r²/x.
func (f invgaussFamily) Score(p []float64, d *Data) []float64 {
	if len(p) != 2 || !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nanScore(2)
	}
	mu, lam := p[0], p[1]
	var sr, sq float64
	for _, x := range d.Exact {
		if !(x > 0) {
			return nanScore(2)
		}
		r := (x - mu) / mu
		sr += r
		sq += r * (r / x)
	}
	n := float64(len(d.Exact))
	g := []float64{lam / (mu * mu) * sr, 0.5*n/lam - 0.5*sq}
	censoredScore(f.New, p, d, []float64{0, 0}, g)
	return g
}

// scorer is a family with an analytic score.
type scorer interface {
	Score(params []float64, d *Data) []float64
}

// AnalyticScore returns the analytic score of f (∂ LogLik/∂θ in Parameters
// order), seeing through the checks every registered family is wrapped in,
// and false when the family has none. Families from Lookup are wrapped, so a
// type assertion on them never finds a Score method.
func AnalyticScore(f Family) (func(params []float64, d *Data) []float64, bool) {
	if c, ok := f.(checkedFamily); ok {
		f = c.Family
	}
	if s, ok := f.(scorer); ok {
		return s.Score, true
	}
	return nil, false
}
