package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Gumbel is the Gumbel distribution of largest values (annual maxima) with
// Location μ and Scale β > 0:
//
//	F(x) = exp(−e^(−z)),  f(x) = e^(−z − e^(−z))/β,  z = (x−μ)/β,  x ∈ R.
type Gumbel struct{ Location, Scale float64 }

func (d Gumbel) LogPDF(x float64) float64 {
	z := (x - d.Location) / d.Scale
	return -z - math.Exp(-z) - math.Log(d.Scale)
}

func (d Gumbel) LogCDF(x float64) float64 { return -math.Exp(-(x - d.Location) / d.Scale) }

// LogSurvival is ln(1 − exp(−e^(−z))) through log1mExp, and −z − e^(−z)/2
// far in the upper tail: never ln 0.
func (d Gumbel) LogSurvival(x float64) float64 {
	z := (x - d.Location) / d.Scale
	t := math.Exp(-z)
	if t < 1e-10 {
		// ln(1 − e^(−t)) = ln t − t/2 + O(t²), and e^(−z) may underflow.
		return -z - t/2
	}
	return log1mExp(-t)
}

// Quantile is μ − β ln(−ln p).
func (d Gumbel) Quantile(p float64) float64 { return d.Location - d.Scale*math.Log(-math.Log(p)) }

func (d Gumbel) Rand(r *rand.Rand) float64 {
	return d.Location - d.Scale*math.Log(r.ExpFloat64())
}

type gumbelFamily struct{}

func init() { register(gumbelFamily{}) }

func (gumbelFamily) Name() string         { return "gumbel" }
func (gumbelFamily) Parameters() []string { return []string{"location", "scale"} }
func (gumbelFamily) Kind() Kind           { return Continuous }
func (gumbelFamily) Support() string      { return "real line" }
func (gumbelFamily) Route() string {
	return "profile score equation in the scale (safeguarded Newton), location in closed form; censored data: Newton on the concave (μ/σ, 1/σ) likelihood, BFGS on (location, log scale) if it fails"
}

func (gumbelFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: gumbel takes 2 parameters")
	}
	if !(p[1] > 0) || math.IsInf(p[1], 1) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nil, fmt.Errorf("gumbel: need finite location and scale > 0, got location=%v scale=%v", p[0], p[1])
	}
	return Gumbel{p[0], p[1]}, nil
}

func (f gumbelFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	g := dist.(Gumbel)
	// Σ ln f(x) = −n ln β − Σ z − Σ e^(−z)
	var sz, se float64
	for _, x := range d.Exact {
		z := (x - g.Location) / g.Scale
		sz += z
		se += math.Exp(-z)
	}
	ll := -float64(len(d.Exact))*math.Log(g.Scale) - sz - se
	return ll + censoredLogLik(g, d, false)
}

func (f gumbelFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 2)
}

// gumbelMLE solves the profile score equation of the scale for complete
// data (Johnson, Kotz & Balakrishnan, 1995, §22.7):
//
//	g(β) = x̄ − Σ x e^(−x/β) / Σ e^(−x/β) − β = 0,
//
// which decreases in β, then μ̂ = −β̂ ln(mean e^(−x/β̂)). The data enter as
// e = (x − min x)/sd (so the weights e^(−e/β) ≤ 1 never overflow and data far
// from zero keep their spread) and as c = e − mean e, so that the
// difference of means is summed directly. Safeguarded Newton from the
// moment estimate β₀ = sd·√6/π, one exponential per value per pass
// (fastExps, within 0.51 ulp); the
// last Newton step is taken without a confirming pass when Taylor bounds
// make its outcome certain (see certain below and tiltedS0).
func gumbelMLE(x []float64, opt Options) (location, scale, ll float64, conv Convergence) {
	conv = Convergence{Method: "profile equation (safeguarded Newton)"}
	if len(x) == 0 {
		conv.Reason = "no values"
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	lo, hi, _, sd := spreadOf(x)
	if outsideUnitRange(lo, hi) {
		if xs, f := powerOfTwoScale(x); f != 1 {
			location, scale, ll, conv = gumbelMLE(xs, opt)
			return location / f, scale / f, ll + float64(len(x))*math.Log(f), conv
		}
	}
	n := float64(len(x))
	if !(sd > 0) || math.IsInf(sd, 0) {
		conv.Reason = fmt.Sprintf("the data's spread is %v: the scale has no finite estimate", sd)
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	buf := borrowScratch(len(x))
	defer returnScratch(buf)
	e := *buf
	var se float64
	for i, xi := range x {
		v := (xi - lo) / sd
		e[i] = v
		se += v
	}
	// mean e, with one correcting pass (as meanSD).
	me := se / n
	var corr float64
	for _, v := range e {
		corr += v - me
	}
	me += corr / n
	// Every |e − mean e| ≤ cmax (a hair above, for rounding).
	cmax := math.Max(me, (hi-lo)/sd-me) * (1 + 1e-12)
	// The weights of a block of e at a time, by the batch kernel
	// (fastExps), into a small buffer that stays in cache.
	wbuf := borrowScratch(min(len(x), locScaleBlock))
	defer returnScratch(wbuf)
	work := *wbuf
	var sw, swc, swcc, dgLast float64 // sums at the last evaluation
	// newtonMonotone wants an increasing function: −g.
	fdf := func(b float64) (float64, float64) {
		conv.Evaluations++
		sw, swc, swcc = 0, 0, 0
		ib := -1 / b
		for start := 0; start < len(e); start += len(work) {
			eb := e[start:min(start+len(work), len(e))]
			wb := work[:len(eb)]
			for i, v := range eb {
				wb[i] = v * ib
			}
			fastExps(wb, wb)
			a, b, c := blockTiltedSums(eb, wb, me)
			sw += a
			swc += b
			swcc += c
		}
		mc := swc / sw
		dgLast = (swcc/sw-mc*mc)/(b*b) + 1
		return mc + b, dgLast
	}
	const xtol = 1e-14
	// certain takes the last Newton step b → next without a pass when
	// tiltedS0 carries Σ e^(−e/β) there to rounding and the root is certain:
	// with t = −1/β, mc(t) = Σwc/Σw has mc′ = variance ≤ cmax² and
	// |mc″| = |third central moment| ≤ (2cmax)³, so the profile function
	// h(β) = mc + β has |h″| ≤ M = 8cmax³/β⁴ + 2cmax²/β³ between b and next,
	// |h(next)| ≤ M(next − b)²/2, and h′ ≥ dh(b) − M|next − b| ≥ dh(b)/2.
	certain := func(b, next float64) (float64, bool) {
		s := next - b
		bmin := math.Min(b, next)
		m := 8*cmax*cmax*cmax/(bmin*bmin*bmin*bmin) + 2*cmax*cmax/(bmin*bmin*bmin)
		if !(math.Abs(s)*m <= dgLast/2) {
			return 0, false
		}
		hb := m * s * s / 2
		if !(hb/(dgLast/2) <= xtol*next) {
			return 0, false
		}
		s0, ok := tiltedS0(sw, swc, swcc, me, cmax, s/(b*next))
		if !ok {
			return 0, false
		}
		sw = s0
		return hb, true
	}
	b0 := math.Sqrt(6) / math.Pi
	b, r, it, err := newtonMonotone(fdf, b0, xtol, opt.maxIterations(), certainOrNil(certain))
	conv.Iterations = it
	if err != nil {
		conv.Reason = "profile equation: " + err.Error()
		return math.NaN(), math.NaN(), math.NaN(), conv
	}
	conv.GradientNorm = math.Abs(r)
	conv.Converged = true
	mu := -b * math.Log(sw/n) // location on the e scale
	location, scale = lo+sd*mu, sd*b
	// ll = −n ln β − Σz − Σe^(−z) with Σe^(−z) = n and Σz = n(mean e − μ)/b.
	ll = -n*math.Log(scale) - n*(me-mu)/b - n
	return location, scale, ll, conv
}

func (f gumbelFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if !quickApplicable(d, opt, 2, false) {
		if err := f.Applicable(d, opt.Fixed); err != nil {
			return nil, err
		}
	}
	fit := newFitOpt(f, d, opt)
	if d.IsComplete() {
		fit.setSolved(gumbelMLE(d.Exact, opt))
		return fit, nil
	}
	m0, s0 := locScaleStart(startSample(d, 2, false), math.Sqrt(6)/math.Pi)
	if x := startSample(d, 2, false); len(x) >= 2 {
		if m, s, _, c := gumbelMLE(x, opt); c.Converged {
			m0, s0 = m, s
		}
	}
	// θ = ((μ − m0)/s0, ln(β/s0)): a well-scaled problem even far from zero.
	starts := [][]float64{{0, 0}, {0, math.Log(3)}}
	toNatural := func(t []float64) []float64 { return []float64{m0 + s0*t[0], s0 * math.Exp(t[1])} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (location, log scale)")
	return fit, nil
}

// blockTiltedSums returns Σw, Σwc and Σwc² over a block, c = e − me, in
// four interleaved partial sums each (the additions of one sum overlap
// instead of waiting on each other), added as ((s₀+s₁)+(s₂+s₃)).
func blockTiltedSums(e, w []float64, me float64) (sw, swc, swcc float64) {
	var a0, a1, a2, a3, b0, b1, b2, b3, c0, c1, c2, c3 float64
	w = w[:len(e)]
	i := 0
	for ; i+4 <= len(e); i += 4 {
		ev, wv := e[i:i+4:i+4], w[i:i+4:i+4]
		d0, d1, d2, d3 := ev[0]-me, ev[1]-me, ev[2]-me, ev[3]-me
		q0, q1, q2, q3 := wv[0]*d0, wv[1]*d1, wv[2]*d2, wv[3]*d3
		a0 += wv[0]
		a1 += wv[1]
		a2 += wv[2]
		a3 += wv[3]
		b0 += q0
		b1 += q1
		b2 += q2
		b3 += q3
		c0 += q0 * d0
		c1 += q1 * d1
		c2 += q2 * d2
		c3 += q3 * d3
	}
	for ; i < len(e); i++ {
		d := e[i] - me
		q := w[i] * d
		a0 += w[i]
		b0 += q
		c0 += q * d
	}
	return (a0 + a1) + (a2 + a3), (b0 + b1) + (b2 + b3), (c0 + c1) + (c2 + c3)
}
