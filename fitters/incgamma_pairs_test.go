package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestGammaPairsEqualSingles: the two-at-a-time series and continued
// fraction give each point the bits of the one-at-a-time routines, for
// shapes from 0.05 to 400 and points on both sides of each route's range,
// so that either lane may finish first and the other run on alone.
func TestGammaPairsEqualSingles(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	var terms gammaSeriesTerms
	for _, a := range []float64{0.05, 0.3, 0.9, 1, 2.5, 7, 40, 400} {
		terms.reset(a)
		below := a + 1 + 0.5*math.Sqrt(a)
		for k := 0; k < 4000; k++ {
			// series points in (0, below), spread over decades near 0
			xa := below * math.Pow(r.Float64(), 1+3*r.Float64())
			xb := below * math.Pow(r.Float64(), 1+3*r.Float64())
			ga, gb := terms.series2(xa, xb)
			wa, wb := terms.series(xa), terms.series(xb)
			if !twinsAgree(ga, wa) || !twinsAgree(gb, wb) {
				t.Fatalf("a = %v: series2(%v, %v) = (%v, %v), series = (%v, %v)", a, xa, xb, ga, gb, wa, wb)
			}
			// continued-fraction points from a + 1 to far beyond
			ca := (a + 1) * (1 + 50*math.Pow(r.Float64(), 3))
			cb := (a + 1) * (1 + 50*math.Pow(r.Float64(), 3))
			ha, hb := gammaContinuedFraction2(a, ca, cb)
			va, vb := gammaContinuedFraction(a, ca), gammaContinuedFraction(a, cb)
			if !twinsAgree(ha, va) || !twinsAgree(hb, vb) {
				t.Fatalf("a = %v: gammaContinuedFraction2(%v, %v) = (%v, %v), singles (%v, %v)", a, ca, cb, ha, hb, va, vb)
			}
		}
	}
}
