package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Logistic is the logistic distribution with Location μ and Scale s > 0:
//
//	F(x) = 1/(1 + e^(−z)),  f(x) = e^(−z)/(s(1 + e^(−z))²),  z = (x−μ)/s,  x ∈ R.
type Logistic struct{ Location, Scale float64 }

// logisticLogDensity is ln f₀(z) = −|z| − 2 ln(1 + e^(−|z|)) of the
// standard logistic, with its derivatives −tanh(z/2) and −2f₀(z).
func logisticLogDensity(z float64) (g, dg, d2g float64) {
	a := math.Abs(z)
	e := math.Exp(-a)
	// ln(1+e) for e ∈ (0, 1]: its absolute error is an ulp, and |z| dominates
	// g where e is tiny, so the plain (much faster) Log is as accurate here
	// as Log1p.
	g = -a - 2*math.Log(1+e)
	iq := 1 / (1 + e)
	t := (1 - e) * iq // tanh(|z|/2)
	if z < 0 {
		t = -t
	}
	return g, -t, -2 * e * iq * iq
}

// logLogisticCDF is ln F₀(z) = −ln(1 + e^(−z)), stable for every z.
func logLogisticCDF(z float64) float64 {
	if z >= 0 {
		return -math.Log1p(math.Exp(-z))
	}
	return z - math.Log1p(math.Exp(z))
}

func (d Logistic) LogPDF(x float64) float64 {
	g, _, _ := logisticLogDensity((x - d.Location) / d.Scale)
	return g - math.Log(d.Scale)
}

func (d Logistic) LogCDF(x float64) float64 { return logLogisticCDF((x - d.Location) / d.Scale) }

func (d Logistic) LogSurvival(x float64) float64 {
	return logLogisticCDF(-(x - d.Location) / d.Scale)
}

// Quantile is μ + s(ln p − ln(1 − p)), with log1p.
func (d Logistic) Quantile(p float64) float64 {
	return d.Location + d.Scale*(math.Log(p)-math.Log1p(-p))
}

func (d Logistic) Rand(r *rand.Rand) float64 {
	u := r.Float64()
	for u == 0 {
		u = r.Float64()
	}
	return d.Quantile(u)
}

type logisticFamily struct{}

func init() { register(logisticFamily{}) }

func (logisticFamily) Name() string         { return "logistic" }
func (logisticFamily) Parameters() []string { return []string{"location", "scale"} }
func (logisticFamily) Kind() Kind           { return Continuous }
func (logisticFamily) Support() string      { return "real line" }
func (logisticFamily) Route() string {
	return "Newton with step halving (Chebyshev steps near the maximum) on the concave (location/scale, 1/scale) likelihood; censored data: Newton on the concave (μ/σ, 1/σ) likelihood, BFGS on (location, log scale) if it fails"
}

func (logisticFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: logistic takes 2 parameters")
	}
	if !(p[1] > 0) || math.IsInf(p[1], 1) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nil, fmt.Errorf("logistic: need finite location and scale > 0, got location=%v scale=%v", p[0], p[1])
	}
	return Logistic{p[0], p[1]}, nil
}

func (f logisticFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	l := dist.(Logistic)
	var ll float64
	for _, x := range d.Exact {
		g, _, _ := logisticLogDensity((x - l.Location) / l.Scale)
		ll += g
	}
	ll -= float64(len(d.Exact)) * math.Log(l.Scale)
	return ll + censoredLogLik(l, d, false)
}

func (f logisticFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 2)
}

// logisticMLE maximises the logistic likelihood of complete data by
// locScaleNewton on the standardized values (x − x̄)/sd, starting from the
// moment estimates μ₀ = x̄, s₀ = sd·√3/π.
func logisticMLE(x []float64, opt Options) (location, scale, ll float64, conv Convergence) {
	return logisticMLEInto(nil, x, opt)
}

// logisticMLEInto is logisticMLE standardizing x into z (see
// locScaleMLEInto; z may be x itself).
func logisticMLEInto(z, x []float64, opt Options) (location, scale, ll float64, conv Convergence) {
	return locScaleMLEInto(z, x, logisticSums, math.Pi/math.Sqrt(3), locScaleBounds{c3: logisticG3Bound, c4: logisticG4Bound}, opt)
}

// logisticBounds are the standard logistic's derivative bounds: with
// F = F₀(z), f₀ = F(1−F), g‴ = −2f₀′ = 2F(1−F)(2F−1) has maximum modulus
// 1/(3√3) ≈ 0.19245 at F = ½ ± 1/(2√3), and g⁗ = −2f₀″ =
// −2F(1−F)(1 − 6F + 6F²) has maximum modulus ¼ at F = ½.
const (
	logisticG3Bound = 0.1925
	logisticG4Bound = 0.25
)

// logisticSums is locScaleNewton's ℓ(a, b) = n ln b + Σ g(z), z = b·v − a,
// g(z) = −|z| − 2 ln(1 + e^(−|z|)), with its gradient, Hessian and third
// derivatives, from one exponential per value: with e = e^(−|z|),
// q = 1/(1 + e), t = sign(z)(1 − e)q = tanh(z/2) and h = eq² = f₀(z),
// g′ = −t, g″ = −2h and g‴ = 2ht. Σ ln(1 + e) is summed as the log of
// products of up to 512 factors (as sumLogSmall, in four interleaved
// products: productOnePlus), not as a log per value.
// work holds the exponentials of one block of v: its length is a whole
// multiple of logProductChunk, or at least len(v).
func logisticSums(v, work []float64, a, b float64) locScalePoint {
	// The exponentials first, into work, one block at a time: a loop of
	// independent calls that the processor overlaps, then the sums, whose
	// divisions overlap too (one fused loop waits on each division in turn).
	// Blocks are whole multiples of logProductChunk, so the sums run in the
	// same order whatever the block size.
	var saz, st, stx, sh, shx, shxx, su, sux, suxx, suxxx, slog float64
	for block := 0; block < len(v); block += len(work) {
		vb := v[block:min(block+len(work), len(v))]
		wb := work[:len(vb)]
		for i, x := range vb {
			wb[i] = -math.Abs(b*x - a)
		}
		fastExps(wb, wb)
		for start := 0; start < len(vb); start += logProductChunk {
			end := min(start+logProductChunk, len(vb))
			es := wb[start:end]
			slog += math.Log(productOnePlus(es))
			for i, x := range vb[start:end] {
				e := es[i]
				z := b*x - a
				y := 1 + e
				q := 1 / y
				t := math.Copysign((1-e)*q, z)
				h := e * q * q
				saz += math.Abs(z)
				st += t
				stx += t * x
				sh += h
				hx := h * x
				shx += hx
				hxx := hx * x
				shxx += hxx
				su += h * t
				sux += hx * t
				suxx += hxx * t
				suxxx += hxx * x * t
			}
		}
	}
	n := float64(len(v))
	return locScalePoint{
		ll:    n*math.Log(b) - saz - 2*slog,
		ga:    st,
		gb:    n/b - stx,
		haa:   -2 * sh,
		hab:   2 * shx,
		hbb:   -n/(b*b) - 2*shxx,
		taaa:  -2 * su,
		taab:  2 * sux,
		tabb:  -2 * suxx,
		tbbb:  2*suxxx + 2*n/(b*b*b),
		cubic: true,
	}
}

// locScaleBlock is the length of the exponentials' buffer that
// locScaleMLE lends to sums: a whole multiple of logProductChunk, small
// enough (32 KiB) to stay in cache, so that only the standardized values
// take memory in proportion to n.
const locScaleBlock = 8 * logProductChunk

// locScaleMLE runs locScaleNewton for a log-concave location-scale family on
// complete data, standardizing x first (into a borrowed buffer) and mapping
// the result back; sums evaluates the family's ℓ on the standardized values,
// b0 is the starting 1/scale on them and bounds has the family's bounds on
// |g‴| and |g⁗| (vmax is set here).
func locScaleMLE(x []float64, sums func(v, work []float64, a, b float64) locScalePoint, b0 float64, bounds locScaleBounds, opt Options) (location, scale, ll float64, conv Convergence) {
	return locScaleMLEInto(nil, x, sums, b0, bounds, opt)
}

// locScaleMLEInto is locScaleMLE writing the standardized values into z
// (len(z) = len(x); z may be x itself, which is then overwritten), or into
// a borrowed buffer when z is nil.
func locScaleMLEInto(z, x []float64, sums func(v, work []float64, a, b float64) locScalePoint, b0 float64, bounds locScaleBounds, opt Options) (location, scale, ll float64, conv Convergence) {
	conv = Convergence{Method: "Newton with step halving, Chebyshev steps near the maximum"}
	if len(x) == 0 {
		conv.Reason = "no values"
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	lo, hi, m, sd := spreadOf(x)
	if outsideUnitRange(lo, hi) {
		if xs, f := powerOfTwoScale(x); f != 1 {
			if z != nil {
				z = xs // a fresh copy of ours: standardize it in place
			}
			location, scale, ll, conv = locScaleMLEInto(z, xs, sums, b0, bounds, opt)
			return location / f, scale / f, ll + float64(len(x))*math.Log(f), conv
		}
	}
	if !(sd > 0) || math.IsInf(sd, 0) {
		conv.Reason = fmt.Sprintf("the data's spread is %v: the scale has no finite estimate", sd)
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	if z == nil {
		buf := borrowScratch(len(x))
		defer returnScratch(buf)
		z = *buf
	}
	// Borrowed after z and small, so it never waits on the large-buffer gate.
	wbuf := borrowScratch(min(len(x), locScaleBlock))
	defer returnScratch(wbuf)
	work := *wbuf
	for i, xi := range x {
		z[i] = (xi - m) / sd
	}
	eval := func(a, b float64) locScalePoint { return sums(z, work, a, b) }
	// Every |z_i| ≤ vmax (a hair above, for the rounding of z).
	bounds.vmax = math.Max(hi-m, m-lo) / sd * (1 + 1e-12)
	r := locScaleNewton(eval, 0, b0, opt.tolerance(), opt.maxIterations(), float64(len(x)), bounds)
	conv.Iterations, conv.Evaluations = r.iterations, r.evaluations
	conv.GradientNorm, conv.Converged, conv.Reason = r.gradNorm, r.converged, r.reason
	location, scale = m+sd*r.location, sd*r.scale
	ll = r.logLik - float64(len(x))*math.Log(sd)
	return location, scale, ll, conv
}

func (f logisticFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if !quickApplicable(d, opt, 2, false) {
		if err := f.Applicable(d, opt.Fixed); err != nil {
			return nil, err
		}
	}
	fit := newFitOpt(f, d, opt)
	if d.IsComplete() {
		fit.setSolved(logisticMLE(d.Exact, opt))
		return fit, nil
	}
	m0, s0 := locScaleStart(startSample(d, 2, false), math.Sqrt(3)/math.Pi)
	if x := startSample(d, 2, false); len(x) >= 2 {
		if m, s, _, c := logisticMLE(x, opt); c.Converged {
			m0, s0 = m, s
		}
	}
	starts := [][]float64{{0, 0}, {0, math.Log(3)}}
	toNatural := func(t []float64) []float64 { return []float64{m0 + s0*t[0], s0 * math.Exp(t[1])} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (location, log scale)")
	return fit, nil
}

// productOnePlus returns Π(1 + eᵢ) for eᵢ ∈ [0, 1] (at most
// logProductChunk factors, so the product stays below 2^512), in four
// interleaved partial products, ((p₀p₁)(p₂p₃)): the multiplications of
// one product overlap instead of waiting on each other.
func productOnePlus(e []float64) float64 {
	p0, p1, p2, p3 := 1.0, 1.0, 1.0, 1.0
	i := 0
	for ; i+4 <= len(e); i += 4 {
		v := e[i : i+4 : i+4]
		p0 *= 1 + v[0]
		p1 *= 1 + v[1]
		p2 *= 1 + v[2]
		p3 *= 1 + v[3]
	}
	for ; i < len(e); i++ {
		p0 *= 1 + e[i]
	}
	return (p0 * p1) * (p2 * p3)
}
