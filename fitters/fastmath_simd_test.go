package fitters

import (
	"math"
	"testing"
)

// sameFloatBits reports whether a and b are the same float64, any NaN matching
// any NaN (fastLog and fastExp return their NaN argument or math.NaN()).
func sameFloatBits(a, b float64) bool {
	return math.Float64bits(a) == math.Float64bits(b) || (a != a && b != b)
}

// TestFastExpsKernelsBits: fastExps writes fastExp of every value, bit for
// bit, specials included, in place too.
func TestFastExpsKernelsBits(t *testing.T) {
	x := expTestInputs(5, 4099)
	for i := 0; i < len(x); i += 89 {
		x[i] = []float64{0, math.Copysign(0, -1), math.NaN(), math.Inf(1), math.Inf(-1), 702, -702, 709.8, -745.2}[i%9]
	}
	dst := make([]float64, len(x))
	fastExps(dst, x)
	for i, v := range x {
		if want := fastExp(v); !sameFloatBits(dst[i], want) {
			t.Fatalf("fastExps[%d] = %v, fastExp(%v) = %v", i, dst[i], v, want)
		}
	}
	y := append([]float64(nil), x...)
	fastExps(y, y)
	for i := range y {
		if !sameFloatBits(y[i], dst[i]) {
			t.Fatalf("in place: fastExps[%d] = %v, want %v", i, y[i], dst[i])
		}
	}
}
