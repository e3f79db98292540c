package fitters

import (
	"math"
	"math/rand/v2"
	"sync"
)

// RandFiller is implemented by the distributions whose Rand costs more per
// value than its arithmetic needs (a general math.Pow, set-up repeated on
// every call, a call through an interface around a short body): weibull,
// gamma and lognormal. The loglogistic has none: its Rand is its Quantile,
// two logs and an exponential per value with nothing to share between
// values, and filling directly measured no faster. RandFill(r, dst) stores in dst exactly the values that
// len(dst) successive calls of Rand(r) would return, bit for bit and in
// the same order, and leaves r in the same state: a bootstrap that fills
// its replicates this way gives the same p-values and intervals.
type RandFiller interface {
	RandFill(r *rand.Rand, dst []float64)
}

// FillRand fills dst with len(dst) draws of d from r: through RandFill
// where d has it, else one Rand call per value (the same values either way).
func FillRand(d Dist, r *rand.Rand, dst []float64) {
	if f, ok := d.(RandFiller); ok {
		f.RandFill(r, dst)
		return
	}
	for i := range dst {
		dst[i] = d.Rand(r)
	}
}

// RandFill draws Scale·E^(1/Shape), E standard exponential, as Rand does,
// with math.Pow's work for the fixed exponent y = 1/Shape done once:
// math.Pow(x, y) for finite x > 0, x ≠ 1 and a y that is none of its
// special cases computes, with y = yi + yf (yi an integer, |yf| ≤ ½),
// e^(yf·ln x) times x^yi by repeated squaring of Frexp(x) (Go's math/pow.go).
// powFixed repeats those steps, operation for operation, so the results are
// identical (TestRandFillMatchesRand); the special cases go to math.Pow.
// The factors e^(yf·ln x) are taken 256 at a time by the vector kernels
// libLogs and libExps, which give math.Log's and math.Exp's bits.
func (d Weibull) RandFill(r *rand.Rand, dst []float64) {
	if !fillsMatchRand() || !d.fill(r, dst) {
		for i := range dst {
			dst[i] = d.Rand(r)
		}
	}
}

// fill is RandFill without the check; false (nothing drawn) when 1/Shape
// is one of math.Pow's special cases.
func (d Weibull) fill(r *rand.Rand, dst []float64) bool {
	p, ok := newPowFixed(1 / d.Shape)
	if !ok {
		return false
	}
	// The exponential variates first, in order (the generator's stream is
	// the same), then the powers, independent of one another, a block at a
	// time through the vector kernels.
	for i := range dst {
		dst[i] = r.ExpFloat64()
	}
	p.scaledPowsInPlace(dst, d.Scale)
	return true
}

// scaledPowsInPlace sets x[i] = scale·math.Pow(x[i], p.y) for every i, a
// block of powBlock values at a time through powsInto.
func (p powFixed) scaledPowsInPlace(x []float64, scale float64) {
	var scratch [powBlock]float64
	for len(x) > 0 {
		n := min(len(x), powBlock)
		block := x[:n]
		p.powsInto(block, block, scratch[:n])
		for i, v := range block {
			block[i] = scale * v
		}
		x = x[n:]
	}
}

// powBlock is the number of powers powsInto's callers work out at a time,
// with scratch arrays of that many values on the stack.
const powBlock = 256

// powFixed evaluates math.Pow(x, y) for one exponent y > 0.
type powFixed struct {
	y, yf float64
	yi    int64
}

// newPowFixed splits y as math.Pow does; false when y is one of math.Pow's
// special cases (y ≤ 0, 1, ½, infinite or NaN, or |y| ≥ 2^63), which the
// caller leaves to math.Pow itself.
func newPowFixed(y float64) (powFixed, bool) {
	if !(y > 0) || y == 1 || y == 0.5 || math.IsInf(y, 0) || y >= 1<<63 {
		return powFixed{}, false
	}
	yi, yf := math.Modf(y)
	if yf != 0 && yf > 0.5 {
		yf--
		yi++
	}
	return powFixed{y: y, yf: yf, yi: int64(yi)}, true
}

// pow is math.Pow(x, p.y), for any x.
func (p powFixed) pow(x float64) float64 {
	if !p.ordinary(x) {
		return math.Pow(x, p.y) // 0, subnormal, 1, negative, infinite or NaN
	}
	a1 := 1.0
	if p.yf != 0 {
		a1 = libExp(p.yf * libLog(x)) // math.Exp and math.Log, inlined
	}
	return p.finish(x, a1)
}

// powsInto sets dst[i] = math.Pow(xs[i], p.y), bit for bit, for every i,
// with tmp (len(tmp) ≥ len(xs)) as scratch; dst may be xs. The factors
// e^(yf·ln x) come from the vector kernels libLogs and libExps (the same
// bits as libLog and libExp one at a time); values that are not ordinary
// go to math.Pow.
func (p powFixed) powsInto(dst, xs, tmp []float64) {
	dst, tmp = dst[:len(xs)], tmp[:len(xs)]
	if p.yf == 0 {
		for i, x := range xs {
			dst[i] = p.pow(x)
		}
		return
	}
	libLogs(tmp, xs)
	for i, l := range tmp {
		tmp[i] = p.yf * l
	}
	libExps(tmp, tmp)
	if p.yi == 1 {
		// finish with yi = 1 written out: Frexp(x) = x1·2^xe, then
		// fl(a1·x1)·2^xe, a product by a power of two, where fl(a1·x1)
		// and the result are normal numbers; other cases as below. (The
		// test repeats finish's last lines on purpose: as a function of its
		// own it would not be inlined, and a call per value cost ~5 %.)
		for i, x := range xs {
			if !p.ordinary(x) {
				dst[i] = math.Pow(x, p.y)
				continue
			}
			b := math.Float64bits(x)
			a := tmp[i] * math.Float64frombits(b&^(0x7ff<<52)|1022<<52)
			ea, xe := int(math.Float64bits(a)>>52&0x7ff), int(b>>52)-1022
			if ea != 0 && ea != 0x7ff && xe <= 1023 && ea+xe >= 1 && ea+xe <= 0x7fe {
				dst[i] = a * math.Float64frombits(uint64(xe+1023)<<52)
				continue
			}
			dst[i] = p.finish(x, tmp[i])
		}
		return
	}
	for i, x := range xs {
		if p.ordinary(x) {
			dst[i] = p.finish(x, tmp[i])
		} else {
			dst[i] = math.Pow(x, p.y)
		}
	}
}

// ordinary says x is none of math.Pow's special cases for x: a normal
// number > 0 other than 1 (pow takes its general steps).
func (powFixed) ordinary(x float64) bool {
	const smallestNormal = 0x1p-1022
	return x >= smallestNormal && x != 1 && x <= math.MaxFloat64
}

// finish is pow(x) for an ordinary x given a1 = e^(yf·ln x) (1 where
// yf = 0): a1 times x^yi by repeated squaring, as math.Pow.
func (p powFixed) finish(x, a1 float64) float64 {
	ae := 0
	if p.yi == 0 {
		return a1 // math.Ldexp(a1, 0) is a1 itself
	}
	// Frexp of a normal x: the mantissa in [½, 1) and the exponent.
	b := math.Float64bits(x)
	x1 := math.Float64frombits(b&^(0x7ff<<52) | 1022<<52)
	xe := int(b>>52&0x7ff) - 1022
	for i := p.yi; ; {
		if xe < -1<<12 || 1<<12 < xe {
			ae += xe
			break
		}
		if i&1 == 1 {
			a1 *= x1
			ae += xe
		}
		if i >>= 1; i == 0 {
			break // math.Pow squares x1 once more, for nothing
		}
		// x1 *= x1, then, where x1 < ½, x1 += x1 and xe--: the square of
		// a number in [½, 1) lies in [¼, 1), so x1 < ½ exactly where its
		// exponent field is 1021, and the doubling (exact) adds 1 to that
		// field; without a branch that would be mispredicted half the time.
		x1 *= x1
		xe <<= 1
		sb := math.Float64bits(x1)
		below := 1022 - int(sb>>52) // 1 where x1 < ½, else 0
		x1 = math.Float64frombits(sb + uint64(below)<<52)
		xe -= below
	}
	// math.Ldexp(a1, ae), as a product by 2^ae where a1, 2^ae and the
	// result are normal numbers (a product by a power of two is then exact).
	if ea := int(math.Float64bits(a1) >> 52 & 0x7ff); ea != 0 && ea != 0x7ff &&
		ae >= -1022 && ae <= 1023 && ea+ae >= 1 && ea+ae <= 0x7fe {
		return a1 * math.Float64frombits(uint64(ae+1023)<<52)
	}
	return math.Ldexp(a1, ae)
}

// RandFill draws e^(μ + σZ) as Rand does; the gain is only the direct,
// inlined call per value instead of a call through the Dist interface
// (about a fifth of the time at n = 1000, BenchmarkRandFill).
func (d LogNormal) RandFill(r *rand.Rand, dst []float64) {
	if !fillsMatchRand() {
		for i := range dst {
			dst[i] = d.Rand(r)
		}
		return
	}
	d.fill(r, dst)
}

func (d LogNormal) fill(r *rand.Rand, dst []float64) bool {
	for i := range dst {
		dst[i] = math.Exp(d.Mu + d.Sigma*r.NormFloat64())
	}
	return true
}

// RandFill draws as Rand does (gonum's distuv.Gamma.Rand: Marsaglia &
// Tsang, 2000, for shape ≥ 0.2; Liu, Martin & Syring, 2017, below), with
// the constants of the shape worked out once instead of on every draw and
// the generator called directly instead of through a wrapper. Each
// expression is the one in distuv, operand for operand, and the variates
// are requested in the same order (TestRandFillMatchesRand).
func (d Gamma) RandFill(r *rand.Rand, dst []float64) {
	if !fillsMatchRand() || !d.fill(r, dst) {
		for i := range dst {
			dst[i] = d.Rand(r) // distuv panics with its own message
		}
	}
}

// fill is RandFill without the check; false (nothing drawn) for parameters
// out of range.
func (d Gamma) fill(r *rand.Rand, dst []float64) bool {
	a, b := d.Shape, d.Rate
	if !(a > 0) || !(b > 0) {
		return false
	}
	const smallAlphaThresh = 0.2
	switch {
	case a == 1:
		for i := range dst {
			dst[i] = r.ExpFloat64() / b
		}
	case a < smallAlphaThresh:
		lambda := 1/a - 1
		lr := -math.Log1p(1 / lambda / math.E)
		for i := range dst {
			dst[i] = gammaSmallShape(r, a, b, lambda, lr)
		}
	default:
		d0 := a - 1.0/3
		if a < 1 {
			d0 += 1.0
		}
		c := 1 / (3 * math.Sqrt(d0))
		if a >= 1 {
			for i := range dst {
				v := gammaMarsagliaTsang(r, d0, c)
				dst[i] = d0 * v / b // m·d·v/b with m = 1 (1·d is d exactly)
			}
			break
		}
		// m = u^(1/a) multiplies only the loop's result: every u and every
		// v is drawn first, in Rand's order (u_i, then the loop's draws for
		// value i, then u_{i+1} …), a block at a time, then the powers
		// together through the vector kernels.
		p, ok := newPowFixed(1 / a)
		var us, vs, scratch [powBlock]float64
		for len(dst) > 0 {
			n := min(len(dst), powBlock)
			for i := range n {
				us[i] = r.Float64()
				vs[i] = gammaMarsagliaTsang(r, d0, c)
			}
			if ok {
				p.powsInto(us[:n], us[:n], scratch[:n])
			} else {
				for i, u := range us[:n] {
					us[i] = math.Pow(u, 1/a)
				}
			}
			for i, m := range us[:n] {
				dst[i] = m * d0 * vs[i] / b
			}
			dst = dst[n:]
		}
	}
	return true
}

// gammaMarsagliaTsang is the rejection loop of distuv.Gamma.Rand for shape
// ≥ 0.2, with d and c given; it returns the accepted v, of which Rand
// returns m·d·v/b.
func gammaMarsagliaTsang(r *rand.Rand, d, c float64) float64 {
	for {
		x := r.NormFloat64()
		v := 1 + x*c
		if v <= 0.0 {
			continue
		}
		v = v * v * v
		u := r.Float64()
		if u < 1.0-0.0331*(x*x)*(x*x) {
			return v
		}
		if math.Log(u) < 0.5*x*x+d*(1-v+math.Log(v)) {
			return v
		}
	}
}

// gammaSmallShape is the rejection loop of distuv.Gamma.Rand for shape
// below 0.2, with λ and lr given.
func gammaSmallShape(r *rand.Rand, a, b, lambda, lr float64) float64 {
	for {
		e := r.ExpFloat64()
		var z float64
		if e >= -lr {
			z = e + lr
		} else {
			z = -r.ExpFloat64() / lambda
		}
		eza := math.Exp(-z / a)
		lh := -z - eza
		var lEta float64
		if z >= 0 {
			lEta = -z
		} else {
			lEta = -1 + lambda*z
		}
		if lh-lEta > -r.ExpFloat64() {
			return eza / b
		}
	}
}

// fillsMatchRand checks once, on first use, that the fills give Rand's
// values on this machine (an architecture whose math.Pow is assembly, or
// whose compiler fuses a multiply-add in one place and not in the other,
// could differ); where they do not, RandFill falls back to calling Rand.
var fillsMatchRand = sync.OnceValue(func() bool {
	dists := []interface {
		Dist
		fill(r *rand.Rand, dst []float64) bool
	}{Weibull{1.8, 120}, Weibull{0.4, 2}, Weibull{7, 1e-3},
		Gamma{2.5, 0.4}, Gamma{0.5, 3}, Gamma{0.7, 2}, Gamma{0.1, 1}, Gamma{1, 2}, LogNormal{1, 0.7}}
	var got [64]float64
	for i, d := range dists {
		r1 := rand.New(rand.NewPCG(uint64(i), 99))
		r2 := rand.New(rand.NewPCG(uint64(i), 99))
		d.fill(r1, got[:])
		for _, v := range got {
			if math.Float64bits(v) != math.Float64bits(d.Rand(r2)) {
				return false
			}
		}
	}
	return true
})
