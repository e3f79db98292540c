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

// TestLibExpsWithoutFMA: with exp's route of separate products (processors
// without FMA), every kernel set gives libExp's bits on that route, on
// random values across the range and on the edge values in every lane.
func TestLibExpsWithoutFMA(t *testing.T) {
	defer func(old bool) { libUseFMA = old }(libUseFMA)
	libUseFMA = false
	r := rand.New(rand.NewPCG(21, 22))
	xs := make([]float64, 1<<18)
	for i := range xs {
		switch i % 3 {
		case 0:
			xs[i] = 1400*r.Float64() - 700
		case 1:
			xs[i] = 20 * r.NormFloat64()
		default:
			xs[i] = math.Float64frombits(r.Uint64())
		}
	}
	for i, s := range libExpInputs {
		xs[(i*37)%len(xs)] = s
	}
	eachLibKernel(t, func(t *testing.T) {
		got := make([]float64, len(xs))
		libExps(got, xs)
		for i, x := range xs {
			if w := libExp(x); math.Float64bits(got[i]) != math.Float64bits(w) {
				t.Fatalf("x = %v: libExps without FMA %v, libExp %v", x, got[i], w)
			}
		}
	})
}
