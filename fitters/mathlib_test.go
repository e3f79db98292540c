package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLibLogExpMatchMath: libLog and libExp give math.Log's and math.Exp's
// bits on values of every magnitude, near 1 and √2/2, subnormal, special,
// and on the exponents of the bootstrap's Weibull draws.
func TestLibLogExpMatchMath(t *testing.T) {
	xs := []float64{0, math.Copysign(0, -1), -1, math.Inf(1), math.Inf(-1), math.NaN(),
		math.SmallestNonzeroFloat64, 0x1p-1030, 0x1p-1022, 1, math.Nextafter(1, 0), math.Nextafter(1, 2),
		math.Sqrt2 / 2, math.Nextafter(math.Sqrt2/2, 0), math.Nextafter(math.Sqrt2/2, 1), 2, 0.5,
		700, -700, math.Nextafter(700, 800), 709.7, -708, -745, 1e-300, 1e300, math.MaxFloat64}
	r := rand.New(rand.NewPCG(17, 18))
	for range 200000 {
		xs = append(xs, math.Exp(30*r.NormFloat64()), 20*r.NormFloat64(), r.ExpFloat64(),
			1+1e-6*r.NormFloat64(), math.Float64frombits(r.Uint64()))
	}
	for _, x := range xs {
		if got, want := libLog(x), math.Log(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("libLog(%v) = %v, math.Log %v", x, got, want)
		}
		if got, want := libExp(x), math.Exp(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("libExp(%v) = %v, math.Exp %v", x, got, want)
		}
	}
}
