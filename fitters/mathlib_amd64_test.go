//go:build amd64

package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLibExpWithoutFMA: the route of processors without FMA (whose bits
// this one cannot give as math.Exp) stays within one ulp of math.Exp's
// result here; fillsMatchRand checks the bits on the machine that runs it.
func TestLibExpWithoutFMA(t *testing.T) {
	defer func(old bool) { libUseFMA = old }(libUseFMA)
	libUseFMA = false
	r := rand.New(rand.NewPCG(19, 20))
	for range 100000 {
		x := 30 * r.NormFloat64()
		got, want := libExp(x), math.Exp(x)
		if d := math.Abs(got-want) / (math.Nextafter(want, math.Inf(1)) - want); !(d <= 1) {
			t.Fatalf("libExp(%v) without FMA = %v, math.Exp %v (%.2g ulp)", x, got, want, d)
		}
	}
}
