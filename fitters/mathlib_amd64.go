//go:build amd64

package fitters

import (
	"math"

	"golang.org/x/sys/cpu"
)

// The standard library's math.Log and math.Exp are assembly on amd64
// (GOROOT/src/math/log_amd64.s, exp_amd64.s). libLog and libExp repeat
// those routines instruction for instruction in Go, so they return the same
// bits (TestLibLogExpMatchMath) while being inlined into a loop instead of
// called through an ABI wrapper one value at a time: the parametric
// bootstrap's Weibull draws (powFixed) must be exactly Rand's, which calls
// math.Pow and so these two functions. Every product is rounded on its own
// (an explicit float64(…)), as the assembly's separate MULSD and ADDSD
// round; the fused steps of the assembly's FMA route are math.FMA.

// libUseFMA is math's useFMA on amd64: the route exp_amd64.s takes.
var libUseFMA = cpu.X86.HasAVX && cpu.X86.HasFMA

// libLog is math.Log on amd64 (log_amd64.s, the fdlibm method: f1·2^k
// with f1 in (√2/2, √2], s = f/(2 + f), a polynomial in s²). Zero,
// negative, infinite and NaN x go to math.Log itself.
func libLog(x float64) float64 {
	const (
		hSqrt2 = 7.07106781186547524401e-01
		ln2Hi  = 6.93147180369123816490e-01
		ln2Lo  = 1.90821492927058770002e-10
		l1     = 6.666666666666735130e-01
		l2     = 3.999999999940941908e-01
		l3     = 2.857142874366239149e-01
		l4     = 2.222219843214978396e-01
		l5     = 1.818357216161805012e-01
		l6     = 1.531383769920937332e-01
		l7     = 1.479819860511658591e-01
	)
	b := math.Float64bits(x)
	if b&^(1<<63) == 0 || int64(b) < 0 || b >= 0x7ff0000000000000 {
		return math.Log(x)
	}
	// The exponent and mantissa straight from the bits (a subnormal x
	// keeps its raw exponent field 0, as in the assembly).
	f1 := math.Float64frombits(b&0x000fffffffffffff | 0x3fe0000000000000)
	k := float64(int32(b>>52&0x7ff) - 0x3fe)
	if !(hSqrt2 < f1) { // CMPSD not-less-than
		k--
		f1 *= 2
	}
	f := f1 - 1
	s := f / (2 + f)
	s2 := float64(s * s)
	s4 := float64(s2 * s2)
	t1 := float64(s2 * (l1 + float64(s4*(l3+float64(s4*(l5+float64(s4*l7)))))))
	t2 := float64(s4 * (l2 + float64(s4*(l4+float64(s4*l6)))))
	r := t1 + t2
	hfsq := float64(float64(0.5*f) * f)
	return float64(k*ln2Hi) - ((hfsq - (float64(s*(hfsq+r)) + float64(k*ln2Lo))) - f)
}

// libExp is math.Exp on amd64 (exp_amd64.s, after Shibata, 2010: x =
// k ln2 + r, e^(r/16) by its Taylor polynomial, squared four times as
// (y + 2)·y, then 2^k) for |x| ≤ 700; other x go to math.Exp itself.
func libExp(x float64) float64 {
	const (
		log2e = 1.4426950408889634073599246810018920
		ln2U  = 0.69314718055966295651160180568695068359375
		ln2L  = 0.28235290563031577122588448175013436025525412068e-12
		c2    = 0.5
		c3    = 1.6666666666666666667e-1
		c4    = 4.1666666666666666667e-2
		c5    = 8.3333333333333333333e-3
		c6    = 1.3888888888888888889e-3
		c7    = 1.9841269841269841270e-4
		c8    = 2.4801587301587301587e-5
	)
	if !(math.Abs(x) <= 700) {
		return math.Exp(x)
	}
	// CVTSD2SL: round to nearest, ties to even, as the default MXCSR does.
	k := math.RoundToEven(float64(log2e * x))
	var y float64
	if libUseFMA {
		y = math.FMA(-k, ln2U, x)
		y = math.FMA(-k, ln2L, y)
		y = float64(y * 0.0625)
		p := math.FMA(c8, y, c7)
		p = math.FMA(p, y, c6)
		p = math.FMA(p, y, c5)
		p = math.FMA(p, y, c4)
		p = math.FMA(p, y, c3)
		p = math.FMA(p, y, c2)
		p = math.FMA(p, y, 1)
		y = float64(y * p)
		y = float64(y * (y + 2))
		y = float64(y * (y + 2))
		y = float64(y * (y + 2))
		y = math.FMA(y, y+2, 1)
	} else {
		y = x - float64(ln2U*k)
		y -= float64(ln2L * k)
		y = float64(y * 0.0625)
		p := float64(c8 * y)
		p = float64((p + c7) * y)
		p = float64((p + c6) * y)
		p = float64((p + c5) * y)
		p = float64((p + c4) * y)
		p = float64((p + c3) * y)
		p = float64((p + c2) * y)
		p += 1
		y = float64(y * p)
		y = float64(y * (y + 2))
		y = float64(y * (y + 2))
		y = float64(y * (y + 2))
		y = float64(y * (y + 2))
		y++
	}
	// |x| ≤ 700: 2^k is a normal number.
	return float64(y * math.Float64frombits(uint64(int64(k)+1023)<<52))
}
