package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Weibull is the two-parameter Weibull distribution with Shape k > 0 and
// Scale λ > 0:
//
//	f(x) = (k/λ)(x/λ)^(k−1) exp(−(x/λ)^k),  x ≥ 0.
type Weibull struct{ Shape, Scale float64 }

// power returns (x/λ)^k computed as exp(k ln(x/λ)), finite for huge x.
func (d Weibull) power(x float64) float64 { return math.Exp(d.Shape * lnRatio(x, d.Scale)) }

func (d Weibull) LogPDF(x float64) float64 {
	if x < 0 || math.IsNaN(x) {
		return math.Inf(-1)
	}
	if x == 0 {
		switch {
		case d.Shape < 1:
			return math.Inf(1)
		case d.Shape == 1:
			return -math.Log(d.Scale)
		default:
			return math.Inf(-1)
		}
	}
	lz := lnRatio(x, d.Scale)
	return math.Log(d.Shape/d.Scale) + (d.Shape-1)*lz - math.Exp(d.Shape*lz)
}

// LogCDF is ln(1 − exp(−(x/λ)^k)) through log1mExp.
func (d Weibull) LogCDF(x float64) float64 {
	if !(x > 0) {
		return math.Inf(-1)
	}
	if lz := d.Shape * lnRatio(x, d.Scale); lz < -700 {
		return lz // ln(1 − e^(−w)) = ln w − w/2 + … with w = e^(lz) negligible
	}
	return log1mExp(-d.power(x))
}

func (d Weibull) LogSurvival(x float64) float64 {
	if !(x > 0) {
		return 0
	}
	return -d.power(x)
}

// Quantile is λ(−ln(1−p))^(1/k), with log1p for small p.
func (d Weibull) Quantile(p float64) float64 {
	return d.Scale * math.Pow(-math.Log1p(-p), 1/d.Shape)
}

func (d Weibull) Rand(r *rand.Rand) float64 {
	return d.Scale * math.Pow(r.ExpFloat64(), 1/d.Shape)
}

type weibullFamily struct{}

func init() { register(weibullFamily{}) }

func (weibullFamily) Name() string         { return "weibull" }
func (weibullFamily) Parameters() []string { return []string{"shape", "scale"} }
func (weibullFamily) Kind() Kind           { return Continuous }
func (weibullFamily) Support() string      { return "x ≥ 0" }
func (weibullFamily) Route() string {
	return "profile score equation in the shape (safeguarded Newton on x/max x), scale in closed form; censored data: Newton on the concave (μ/σ, 1/σ) smallest-extreme-value likelihood of ln x, BFGS on (log shape, log scale) if it fails"
}

func (weibullFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: weibull takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("weibull: need shape > 0 and scale > 0, got shape=%v scale=%v", p[0], p[1])
	}
	return Weibull{p[0], p[1]}, nil
}

func (f weibullFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	w := dist.(Weibull)
	var ll float64
	for _, x := range d.Exact {
		ll += w.LogPDF(x)
	}
	return ll + censoredLogLik(w, d, false)
}

func (f weibullFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	// Zero is in the support, but an exact 0 makes the likelihood
	// unbounded (k < 1) or zero (k > 1): it has no maximum.
	if err := needPositive(f.Name(), d, true); err != nil {
		return err
	}
	for _, x := range d.Exact {
		if x == 0 {
			return inapplicable(f.Name(), "an exact value of 0 makes the likelihood unbounded as the shape falls below 1; record it as a non-detect or use the gamma or exponential family")
		}
	}
	return needDistinct(f.Name(), d, 2)
}

// weibullMLE solves the profile score equation of the shape for complete
// data x > 0 (Cohen, 1965):
//
//	g(k) = Σ x^k ln x / Σ x^k − 1/k − mean ln x = 0,
//
// which is increasing in k, then λ̂ = (mean x^k)^(1/k). It works with
// e = ln(x/max x) ≤ 0 (so x^k never overflows: w = e^(k·e) ≤ 1) and with
// c = e − mean e, so g(k) = Σ w c / Σ w − 1/k keeps its digits for data
// clustered far from zero; ln x is taken once, before the iteration, into a
// borrowed buffer (no allocation once the pool is warm, as in bootstrap
// refits; fastLog and fastLog1p, within 0.63 ulp, weibullLogs). The
// safeguarded Newton iteration (newtonMonotone) starts from
// k₀ = π/(√6·sd(ln x)) (the Gumbel moment estimate of ln x), one
// exponential per value per pass (fastExp, within 0.62 ulp, half of
// math.Exp's cost); the last Newton step is taken without a
// confirming pass when Taylor bounds make its outcome certain (certain
// below, tiltedS0).
func weibullMLE(x []float64, opt Options) (shape, scale, ll float64, conv Convergence) {
	conv = Convergence{Method: "profile equation (safeguarded Newton)"}
	if len(x) == 0 {
		conv.Reason = "no values"
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	_, hi := minMax(x)
	buf := borrowScratch(len(x))
	defer returnScratch(buf)
	e := *buf
	var lnRef, se float64
	if weibullLibMath {
		lnRef, se = logsAboutInto(e, x, hi)
	} else {
		lnRef, se = weibullLogs(e, x, hi)
	}
	n := float64(len(x))
	// Mean and variance of e as meanVar's two passes (with its correction).
	me := se / n
	var ss, corr float64
	emin := 0.0
	for _, v := range e {
		d := v - me
		ss += d * d
		corr += d
		if v < emin {
			emin = v
		}
	}
	ve := (ss - corr*corr/n) / n
	me += corr / n
	if !(ve > 0) {
		conv.Reason = "ln x has no spread in floating point: the shape has no finite estimate"
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	// Every |e − mean e| ≤ cmax (e ≤ 0; a hair above, for rounding).
	cmax := math.Max(me-emin, -me) * (1 + 1e-12)
	var sw, swc, swcc, dgLast float64 // sums at the last evaluation
	fdf := func(k float64) (float64, float64) {
		conv.Evaluations++
		sw, swc, swcc = 0, 0, 0
		if weibullLibMath {
			for _, v := range e {
				w := math.Exp(k * v)
				sw += w
				c := v - me
				wc := w * c
				swc += wc
				swcc += wc * c
			}
		} else {
			sw, swc, swcc = weibullSums(e, k, me)
		}
		mc := swc / sw
		dgLast = swcc/sw - mc*mc + 1/(k*k)
		return mc - 1/k, dgLast
	}
	const xtol = 1e-14
	// certain takes the last Newton step k → next without a pass when
	// tiltedS0 carries Σ e^(k·e) there to rounding and the root is certain:
	// g(k) = mc(k) − 1/k has g′ = variance + 1/k² and
	// |g″| ≤ M = (2cmax)³ + 2/k³ between k and next, so
	// |g(next)| ≤ M(next − k)²/2 and g′ ≥ g′(k) − M|next − k| ≥ g′(k)/2.
	certain := func(k, next float64) (float64, bool) {
		s := next - k
		kmin := math.Min(k, next)
		m := 8*cmax*cmax*cmax + 2/(kmin*kmin*kmin)
		if !(math.Abs(s)*m <= dgLast/2) {
			return 0, false
		}
		gb := m * s * s / 2
		if !(gb/(dgLast/2) <= xtol*next) {
			return 0, false
		}
		s0, ok := tiltedS0(sw, swc, swcc, me, cmax, s)
		if !ok {
			return 0, false
		}
		sw = s0
		return gb, true
	}
	k0 := math.Pi / (math.Sqrt(6) * math.Sqrt(ve))
	k, r, it, err := newtonMonotone(fdf, k0, xtol, opt.maxIterations(), certainOrNil(certain))
	conv.Iterations = it
	if err != nil {
		conv.Reason = "profile equation: " + err.Error()
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	conv.GradientNorm = math.Abs(r)
	conv.Converged = true
	L := math.Log(sw/n) / k // ln(λ/max x)
	shape, scale = k, math.Exp(lnRef+L)
	// ln f(x) = ln k − ln λ + (k−1)(ln x − ln λ) − (x/λ)^k, Σ(x/λ)^k = n,
	// ln x − ln λ = e − L.
	ll = n*math.Log(k) - n*(lnRef+L) + (k-1)*(se-n*L) - n
	return shape, scale, ll, conv
}

// weibullLibMath makes weibullMLE take math.Exp, math.Log and math.Log1p
// instead of fastExp, fastLog and fastLog1p: the route before the fast
// functions, which TestWeibullFastMathKeepsMaximum compares with.
var weibullLibMath = false

func (f weibullFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if !quickApplicable(d, opt, 2, true) {
		if err := f.Applicable(d, opt.Fixed); err != nil {
			return nil, err
		}
	}
	fit := newFitOpt(f, d, opt)
	if d.IsComplete() {
		fit.setSolved(weibullMLE(d.Exact, opt))
		return fit, nil
	}
	k0, s0 := 1.0, 1.0
	if x := startSample(d, 2, true); len(x) >= 2 {
		if k, s, _, c := weibullMLE(x, opt); c.Converged {
			k0, s0 = k, s
		} else if m := sumOf(x) / float64(len(x)); m > 0 {
			s0 = m
		}
	}
	// θ = (ln(k/k₀), k₀ ln(λ/λ₀)): a well-scaled problem for any spread.
	starts := [][]float64{{0, 0}, {-math.Log(k0), 0}}
	toNatural := func(t []float64) []float64 { return []float64{k0 * math.Exp(t[0]), s0 * math.Exp(t[1]/k0)} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (log shape, log scale)")
	return fit, nil
}

// weibullLogs writes eᵢ = ln(xᵢ/ref) into dst (len(dst) = len(x), x > 0,
// ref > 0) and returns ln ref and Σ eᵢ, as logsAboutInto does but with
// fastLog and fastLog1p (within 0.63 ulp of the exact value, against
// math.Log's and math.Log1p's 1 ulp, at about half their cost): for
// xᵢ ∈ (ref/2, 3ref/2), eᵢ = ln(1 + (xᵢ − ref)/ref), which keeps the
// relative accuracy of eᵢ near 0; elsewhere ln xᵢ − ln ref.
func weibullLogs(dst, x []float64, ref float64) (lnRef, sum float64) {
	lnRef = fastLog(ref)
	lo, hi := 0.5*ref, 1.5*ref
	dst = dst[:len(x)]
	var s0, s1 float64
	i := 0
	for ; i+2 <= len(x); i += 2 {
		a, b := x[i], x[i+1]
		var ya, yb float64
		if a > lo && a < hi {
			ya = fastLog1p((a - ref) / ref)
		} else {
			ya = fastLog(a) - lnRef
		}
		if b > lo && b < hi {
			yb = fastLog1p((b - ref) / ref)
		} else {
			yb = fastLog(b) - lnRef
		}
		dst[i], dst[i+1] = ya, yb
		s0 += ya
		s1 += yb
	}
	for ; i < len(x); i++ {
		a := x[i]
		var ya float64
		if a > lo && a < hi {
			ya = fastLog1p((a - ref) / ref)
		} else {
			ya = fastLog(a) - lnRef
		}
		dst[i] = ya
		s0 += ya
	}
	return lnRef, s0 + s1
}

// weibullSums returns Σ w, Σ w·c and Σ w·c² over e, with w = e^(k·eᵢ) and
// c = eᵢ − me, summed in order: the profile equation's pass. Each w is
// exactly fastExp(k·eᵢ) (TestWeibullSumsMatchFastExp, bit for bit), with
// expCore's body written out in the loop, as fastLogs does for fastLog:
// fastExp and expCore are too large to inline, and two calls per value
// cost about as much as the exponential itself.
func weibullSums(e []float64, k, me float64) (sw, swc, swcc float64) {
	for _, v := range e {
		x := k * v
		var w float64
		if math.Float64bits(x)&^(1<<63) >= 0x4085f00000000000 { // |x| ≥ 702, Inf or NaN
			w = fastExp(x)
		} else {
			// expCore(x, 0)
			kd := float64(float64(x*invLn2N)+expShift) - expShift
			ki := int64(kd)
			r := (x - float64(kd*ln2NHi)) - float64(kd*ln2NLo)
			t := &expTable[ki&127]
			sc := math.Float64frombits(math.Float64bits(t.hi) + uint64(ki>>7)<<52)
			r2 := float64(r * r)
			p := (expC2 + float64(r*expC3)) + float64(r2*(expC4+float64(r*expC5)))
			tmp := (t.tail + r) + float64(r2*p)
			w = sc + float64(sc*tmp)
		}
		sw += w
		c := v - me
		wc := w * c
		swc += wc
		swcc += wc * c
	}
	return sw, swc, swcc
}
