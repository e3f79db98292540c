package fitters

import (
	"math"
	"slices"
)

// LogLikFunc returns θ ↦ fam.LogLik(θ, d), for evaluating one dataset's
// log-likelihood many times (a profile likelihood maximises over the other
// parameters at each of some dozen points, a few hundred evaluations per
// interval). For the families below the terms that depend on the data
// alone are computed once, here, so that an evaluation of the exact
// values' part costs a few operations, or one exponential per value,
// instead of logarithms and exponentials per value:
//
//   - exponential, gamma (shape < 30), normal, lognormal, inverse Gaussian:
//     Σ x, Σ ln x, and sums of squares about the sample mean (of x or of
//     ln x) or, for the inverse Gaussian, Σ (x − x̄)²/x, Σ (x − x̄)/x and
//     Σ 1/x, from which every evaluation is O(1);
//   - weibull, gumbel, gev: ln x (or x) cached, one exponential per value (for
//     the weibull the right-censored values too, whose ln S is −(x/λ)^k;
//     the exponential's are in its Σ x);
//   - logistic, loglogistic: x (or ln x) cached and standardised, and
//     logisticSums' ℓ (one exponential per value, one logarithm per 512
//     values; logisticLogLikSum).
//
// Logarithms are taken about a reference value (logsAbout, lnRatio) and
// squares about the sample mean, so data clustered far from zero keep
// their digits as in LogLik. Censored observations are added as LogLik
// adds them. The values agree with LogLik to rounding
// (TestLogLikFuncMatchesLogLik). Left- and right-censored values, when
// there are many, go through the families' batch tail routines
// (censoredPart). Other families, data with values outside a
// family's support, and more than 2²⁰ exact values for the cached forms
// (whose copies would cost memory in proportion to n) get LogLik itself.
// The returned function is for one goroutine at a time.
func LogLikFunc(fam Family, d *Data) func(p []float64) float64 {
	inner := fam
	if c, ok := fam.(checkedFamily); ok {
		inner = c.Family
	}
	if pf, ok := inner.(logLikPreparer); ok && len(d.Exact) > 0 && d.Trials == nil {
		if f := pf.prepareLogLik(d); f != nil {
			return f
		}
	}
	return func(p []float64) float64 { return fam.LogLik(p, d) }
}

// logLikPreparer is a family with a faster LogLik for repeated evaluation
// on one dataset; prepareLogLik returns nil where the data need LogLik.
type logLikPreparer interface {
	prepareLogLik(d *Data) func(p []float64) float64
}

// maxCachedValues bounds the data that LogLikFunc copies (8 MB of float64).
const maxCachedValues = 1 << 20

// preparedLogLik is θ ↦ exact(dist) plus the terms of the censored
// observations of d (its exact values are exact's), dist = f.New(θ) of
// type D; −Inf where θ is not valid.
func preparedLogLik[D Dist](f Family, d *Data, exact func(D) float64) func(p []float64) float64 {
	cens := newCensoredPart(d)
	return func(p []float64) float64 {
		dist, err := f.New(p)
		if err != nil {
			return math.Inf(-1)
		}
		x := dist.(D)
		return exact(x) + cens.logLik(x)
	}
}

// censoredBatchMin is the number of left- or right-censored values from
// which censoredPart sums their terms through CDFTailsBatch.
const censoredBatchMin = 16

// censoredPart is censoredLogLik(dist, d, false) for repeated evaluation:
// with censoredBatchMin or more left- or right-censored values, their
// ln F and ln S come a block at a time from CDFTailsBatch (the families'
// batch routines, as accurate as CDFTails) over sorted copies of them;
// interval-censored values term by term as in censoredLogLik.
type censoredPart struct {
	d               *Data
	left, right     []float64 // sorted copies, nil when batching does not pay
	cdf, lcdf, lsur []float64
}

func newCensoredPart(d *Data) *censoredPart {
	c := &censoredPart{d: d}
	if len(d.Left)+len(d.Right) < censoredBatchMin || len(d.Left)+len(d.Right) > maxCachedValues {
		return c
	}
	c.left = append([]float64(nil), d.Left...)
	c.right = append([]float64(nil), d.Right...)
	slices.Sort(c.left)
	slices.Sort(c.right)
	m := min(max(len(c.left), len(c.right)), CDFTailsBlock)
	c.cdf, c.lcdf, c.lsur = make([]float64, m), make([]float64, m), make([]float64, m)
	return c
}

// logLik is Σ ln F(left) + Σ ln S(right) + Σ ln(F(u) − F(l)); −Inf for NaN.
func (c *censoredPart) logLik(dist Dist) float64 {
	if c.left == nil && c.right == nil {
		return censoredLogLik(dist, c.d, false)
	}
	var s float64
	for _, side := range [2]struct {
		x    []float64
		left bool
	}{{c.left, true}, {c.right, false}} {
		for start := 0; start < len(side.x); start += len(c.cdf) {
			xb := side.x[start:min(start+len(c.cdf), len(side.x))]
			CDFTailsBatch(dist, xb, c.cdf, c.lcdf, c.lsur)
			terms := c.lsur[:len(xb)]
			if side.left {
				terms = c.lcdf[:len(xb)]
			}
			for _, v := range terms {
				s += v
			}
		}
	}
	for i := range c.d.Lower {
		s += logIntervalProb(dist, c.d.Lower[i], c.d.Upper[i])
	}
	if math.IsNaN(s) {
		return math.Inf(-1)
	}
	return s
}

// positiveFinite reports whether every value is > 0 and finite.
func positiveFinite(x []float64) bool {
	for _, v := range x {
		if !(v > 0) || math.IsInf(v, 1) {
			return false
		}
	}
	return true
}

// centredSquares returns the mean of vᵢ = value(i), i < n, and
// Σ (vᵢ − mean)², by two passes with the compensating correction (Chan,
// Golub & LeVeque, 1983), taking each value twice instead of storing it.
func centredSquares(n int, value func(i int) float64) (mean, ss float64) {
	for i := range n {
		mean += value(i)
	}
	mean /= float64(n)
	var s, c float64
	for i := range n {
		d := value(i) - mean
		s += d * d
		c += d
	}
	return mean, s - c*c/float64(n)
}

func (f exponentialFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	var s float64
	for _, x := range d.Exact {
		if !(x >= 0) {
			return nil
		}
		s += x
	}
	if math.IsInf(s, 1) {
		return nil
	}
	var sr float64
	for _, x := range d.Right {
		if !(x >= 0) {
			return nil
		}
		sr += x
	}
	if math.IsInf(s+sr, 1) {
		return nil
	}
	n := float64(len(d.Exact))
	// Σ ln f(exact) + Σ ln S(right) = n ln λ − λ(Σ exact + Σ right); the
	// rest of the censored terms as usual.
	rest := &Data{Left: d.Left, Lower: d.Lower, Upper: d.Upper}
	return preparedLogLik(f, rest, func(e Exponential) float64 { return n*math.Log(e.Rate) - e.Rate*(s+sr) })
}

func (f gammaFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	if !positiveFinite(d.Exact) {
		return nil
	}
	var slx, sx float64
	for _, x := range d.Exact {
		slx += math.Log(x)
		sx += x
	}
	if math.IsInf(sx, 1) {
		return nil
	}
	n := float64(len(d.Exact))
	// Σ ln f(x) = n(k ln β − ln Γ(k)) + (k−1) Σ ln x − β Σ x; for k ≥ 30
	// LogLik's form that keeps the digits of the large terms.
	return preparedLogLik(f, d, func(g Gamma) float64 {
		if g.Shape >= 30 {
			return gammaExactLargeShape(g, d.Exact, slx)
		}
		lg, _ := math.Lgamma(g.Shape)
		return n*(g.Shape*math.Log(g.Rate)-lg) + (g.Shape-1)*slx - g.Rate*sx
	})
}

func (f normalFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	// About r = x₀, a value of the data: xᵢ − r and μ − r are exact for
	// data clustered far from zero, where the sample mean would not be.
	r := d.Exact[0]
	dm, ss := centredSquares(len(d.Exact), func(i int) float64 { return d.Exact[i] - r })
	if math.IsNaN(ss) || math.IsInf(ss, 0) || math.IsInf(dm, 0) {
		return nil
	}
	sd := math.Sqrt(ss / float64(len(d.Exact)))
	n := float64(len(d.Exact))
	// Σ zᵢ² = n((sd/σ)² + ((d̄ − (μ − r))/σ)²), zᵢ = (xᵢ − μ)/σ, dᵢ = xᵢ − r,
	// sd the ML standard deviation: each ratio is formed before squaring.
	return preparedLogLik(f, d, func(nd Normal) float64 {
		a, b := sd/nd.Sigma, (dm-(nd.Mu-r))/nd.Sigma
		return -n*(math.Log(nd.Sigma)+lnSqrt2Pi) - 0.5*n*(a*a+b*b)
	})
}

func (f lognormalFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	if !positiveFinite(d.Exact) {
		return nil
	}
	ref := d.Exact[0]
	lnRef := math.Log(ref)
	my, ss := centredSquares(len(d.Exact), func(i int) float64 { return logAbout(d.Exact[i], ref, lnRef) })
	n := float64(len(d.Exact))
	slx := n*lnRef + n*my
	// ln xᵢ − μ = yᵢ − c, yᵢ = ln(xᵢ/ref), c = μ − ln ref = ln(e^μ/ref);
	// Σ (ln xᵢ − μ)² = Σ (yᵢ − ȳ)² + n(ȳ − c)².
	return preparedLogLik(f, d, func(ln LogNormal) float64 {
		c := ln.Mu - lnRef
		if em := math.Exp(ln.Mu); em > 0 && !math.IsInf(em, 1) {
			c = lnRatio(em, ref)
		}
		dm := my - c
		return -slx - n*(math.Log(ln.Sigma)+lnSqrt2Pi) - 0.5*(ss+n*dm*dm)/(ln.Sigma*ln.Sigma)
	})
}

func (f invgaussFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	if !positiveFinite(d.Exact) {
		return nil
	}
	m, _ := meanSD(d.Exact)
	var slx, a, b, c float64
	for _, x := range d.Exact {
		slx += math.Log(x)
		dx := x - m
		a += dx * (dx / x)
		b += dx / x
		c += 1 / x
	}
	if math.IsInf(a, 0) || math.IsInf(c, 0) || math.IsNaN(a+b+c) {
		return nil
	}
	n := float64(len(d.Exact))
	// Σ (x−μ)²/x = A + 2δB + δ²C with δ = x̄ − μ, A = Σ (x−x̄)²/x,
	// B = Σ (x−x̄)/x, C = Σ 1/x; Σ ln f = n(ln λ/2 − ln√(2π)) − 1.5 Σ ln x
	// − λ Σ (x−μ)²/x / (2μ²).
	return preparedLogLik(f, d, func(g InvGauss) float64 {
		dl := m - g.Mean
		sq := (a + dl*(2*b+dl*c)) / g.Mean / g.Mean
		return n*(0.5*math.Log(g.Shape)-lnSqrt2Pi) - 1.5*slx - 0.5*g.Shape*sq
	})
}

// expSumBlock is the length of the exponentials' buffer of the cached
// forms, whole multiples of logProductChunk (32 KiB).
const expSumBlock = 8 * logProductChunk

func (f weibullFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	nAll := len(d.Exact) + len(d.Right)
	if nAll > maxCachedValues || !positiveFinite(d.Exact) || !positiveFinite(d.Right) {
		return nil
	}
	// The logs of the exact values, then of the right-censored ones, whose
	// ln S = −(x/λ)^k is the exact values' last term alone.
	y := make([]float64, nAll)
	ref := d.Exact[0]
	_, sy := logsAboutInto(y[:len(d.Exact)], d.Exact, ref)
	if len(d.Right) > 0 {
		logsAboutInto(y[len(d.Exact):], d.Right, ref)
	}
	work := make([]float64, min(nAll, expSumBlock))
	n := float64(len(d.Exact))
	// ln(xᵢ/λ) = yᵢ − c, c = ln(λ/ref): Σ ln f(exact) + Σ ln S(right)
	// = n ln(k/λ) + (k−1)(Σ_exact y − nc) − Σ_(exact, right) e^(k(yᵢ − c));
	// the rest of the censored terms as usual.
	rest := &Data{Left: d.Left, Lower: d.Lower, Upper: d.Upper}
	return preparedLogLik(f, rest, func(w Weibull) float64 {
		c := lnRatio(w.Scale, ref)
		k := w.Shape
		var se float64
		for start := 0; start < len(y); start += len(work) {
			yb := y[start:min(start+len(work), len(y))]
			wb := work[:len(yb)]
			for i, v := range yb {
				wb[i] = k * (v - c)
			}
			fastExps(wb, wb)
			for _, e := range wb {
				se += e
			}
		}
		return n*(math.Log(k)-math.Log(w.Scale)) + (k-1)*(sy-n*c) - se
	})
}

func (f gumbelFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	if len(d.Exact) > maxCachedValues {
		return nil
	}
	m, sd := meanSD(d.Exact)
	if !(sd > 0) || math.IsInf(sd, 0) || math.IsInf(m, 0) || math.IsNaN(m) {
		return nil
	}
	v := make([]float64, len(d.Exact))
	var sv float64
	for i, x := range d.Exact {
		v[i] = (x - m) / sd
		sv += v[i]
	}
	work := make([]float64, min(len(v), expSumBlock))
	n := float64(len(d.Exact))
	// zᵢ = (xᵢ − μ)/β = r·vᵢ − t with r = sd/β, t = (μ − x̄)/β:
	// Σ ln f = −n ln β − (r Σv − n t) − Σ e^(t − r vᵢ).
	return preparedLogLik(f, d, func(g Gumbel) float64 {
		r, t := sd/g.Scale, (g.Location-m)/g.Scale
		var se float64
		for start := 0; start < len(v); start += len(work) {
			vb := v[start:min(start+len(work), len(v))]
			wb := work[:len(vb)]
			for i, x := range vb {
				wb[i] = t - r*x
			}
			fastExps(wb, wb)
			for _, e := range wb {
				se += e
			}
		}
		return -n*math.Log(g.Scale) - (r*sv - n*t) - se
	})
}

// logisticPrepared is Σ g(zᵢ) − n ln s for zᵢ = (xᵢ − μ)/s over the
// standardised values v = (x − x̄)/sd: logisticSums at b = sd/s,
// a = (μ − x̄)/s gives n ln b + Σ g(b·v − a).
type logisticPrepared struct {
	v, work []float64
	m, sd   float64
}

func newLogisticPrepared(x []float64) *logisticPrepared {
	m, sd := meanSD(x)
	if !(sd > 0) || math.IsInf(sd, 0) || math.IsInf(m, 0) || math.IsNaN(m) {
		return nil
	}
	v := make([]float64, len(x))
	for i, xi := range x {
		v[i] = (xi - m) / sd
	}
	return &logisticPrepared{v: v, work: make([]float64, min(len(v), expSumBlock)), m: m, sd: sd}
}

// logLik is the exact values' Σ ln f for location mu and scale s.
func (l *logisticPrepared) logLik(mu, s float64) float64 {
	return logisticLogLikSum(l.v, l.work, (mu-l.m)/s, l.sd/s) - float64(len(l.v))*math.Log(l.sd)
}

// logisticLogLikSum is logisticSums' ℓ alone, n ln b + Σ g(z), z = b·v − a,
// g(z) = −|z| − 2 ln(1 + e^(−|z|)), summed in the same order from the same
// exponentials and products (so with the same bits), without the
// derivatives' sums and the division per value they need.
func logisticLogLikSum(v, work []float64, a, b float64) float64 {
	var saz, slog float64
	for block := 0; block < len(v); block += len(work) {
		vb := v[block:min(block+len(work), len(v))]
		wb := work[:len(vb)]
		for i, x := range vb {
			wb[i] = -math.Abs(b*x - a)
		}
		fastExps(wb, wb)
		for start := 0; start < len(vb); start += logProductChunk {
			end := min(start+logProductChunk, len(vb))
			slog += math.Log(productOnePlus(wb[start:end]))
			for _, x := range vb[start:end] {
				saz += math.Abs(b*x - a)
			}
		}
	}
	return float64(len(v))*math.Log(b) - saz - 2*slog
}

func (f logisticFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	if len(d.Exact) > maxCachedValues {
		return nil
	}
	lp := newLogisticPrepared(d.Exact)
	if lp == nil {
		return nil
	}
	return preparedLogLik(f, d, func(l Logistic) float64 { return lp.logLik(l.Location, l.Scale) })
}

func (f loglogisticFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	if len(d.Exact) > maxCachedValues || !positiveFinite(d.Exact) {
		return nil
	}
	ref := d.Exact[0]
	y := make([]float64, len(d.Exact))
	lnRef, sy := logsAboutInto(y, d.Exact, ref)
	lp := newLogisticPrepared(y)
	if lp == nil {
		return nil
	}
	n := float64(len(d.Exact))
	slx := n*lnRef + sy
	// With y = ln(x/ref), ln x is logistic with location ln(α/ref) + ln ref
	// and scale 1/β: Σ ln f(x) = Σ ln f_logistic(yᵢ; ln(α/ref), 1/β) − Σ ln x.
	return preparedLogLik(f, d, func(l LogLogistic) float64 {
		return lp.logLik(lnRatio(l.Scale, ref), 1/l.Shape) - slx
	})
}

func (f gevFamily) prepareLogLik(d *Data) func(p []float64) float64 {
	if len(d.Exact) > maxCachedValues {
		return nil
	}
	// The values about r = x₀ (exact for data clustered far from zero), so
	// that z = (x − μ)/σ = (x − r)/σ − (μ − r)/σ.
	r := d.Exact[0]
	v := make([]float64, len(d.Exact))
	for i, x := range d.Exact {
		if v[i] = x - r; math.IsNaN(v[i]) || math.IsInf(v[i], 0) {
			return nil
		}
	}
	work := make([]float64, min(len(v), expSumBlock))
	n := float64(len(v))
	// With y = ln(1 + ξz)/ξ (z at ξ = 0; boxLog's series near it):
	// Σ ln f = −n ln σ − (1 + ξ) Σ y − Σ e^(−y); −Inf where 1 + ξz ≤ 0.
	return preparedLogLik(f, d, func(g GEV) float64 {
		a, t, xi := 1/g.Scale, (g.Location-r)/g.Scale, g.Shape
		var sy, se float64
		for start := 0; start < len(v); start += len(work) {
			vb := v[start:min(start+len(work), len(v))]
			wb := work[:len(vb)]
			for i, x := range vb {
				z := x*a - t
				if !(1+xi*z > 0) {
					return math.Inf(-1)
				}
				y := boxLogY(xi, z)
				sy += y
				wb[i] = -y
			}
			fastExps(wb, wb)
			for _, e := range wb {
				se += e
			}
		}
		return -n*math.Log(g.Scale) - (1+xi)*sy - se
	})
}

// boxLogY is boxLog's y alone: ln(1 + ξz)/ξ, by the same series where
// |ξz| < 0.01.
func boxLogY(xi, z float64) float64 {
	u := xi * z
	if math.Abs(u) < 0.01 {
		var s float64
		for j := 11; j >= 0; j-- {
			s = s*(-u) + 1/float64(j+1)
		}
		return z * s
	}
	return math.Log1p(u) / xi
}
