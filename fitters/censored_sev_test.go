package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSEVExactTermsMatchGenericLoop: the smallest extreme value law's
// exact and suspension terms taken a block at a time through libExps give
// censoredLocScalePoint the sums of the generic loop over sevLogDensity,
// bit for bit, under every kernel set, for samples around the block size
// and values far in both tails (e^z overflowing, underflowing).
func TestSEVExactTermsMatchGenericLoop(t *testing.T) {
	generic := stdSEV
	generic.exactTerms, generic.rightTerms = nil, nil
	eachLibKernel(t, func(t *testing.T) {
		r := rand.New(rand.NewPCG(4, 2))
		for _, n := range []int{0, 1, 7, 255, 256, 257, 1000} {
			d := &Data{}
			for i := range n {
				x := Weibull{Shape: 1.7, Scale: 90}.Rand(r)
				if i%4 == 3 {
					d.Right = append(d.Right, x)
				} else {
					d.Exact = append(d.Exact, x)
				}
			}
			if n == 7 {
				d.Exact = append(d.Exact, 1e-300, 1e300) // e^z under- and overflows
				d.Right = append(d.Right, 1e-300, 1e300, 5, 5)
			}
			cs, ok := standardizeCensored(d, true, 4.5, 0.6)
			if !ok {
				t.Fatal("standardizeCensored refused the sample")
			}
			for _, ab := range [][2]float64{{0, 1}, {0.3, 1.7}, {-2, 0.2}, {40, 9}} {
				got := censoredLocScalePoint(stdSEV, &cs, ab[0], ab[1])
				want := censoredLocScalePoint(generic, &cs, ab[0], ab[1])
				for i, pair := range [][2]float64{{got.ll, want.ll}, {got.ga, want.ga}, {got.gb, want.gb}, {got.haa, want.haa}, {got.hab, want.hab}, {got.hbb, want.hbb}} {
					if math.Float64bits(pair[0]) != math.Float64bits(pair[1]) && !(math.IsNaN(pair[0]) && math.IsNaN(pair[1])) {
						t.Errorf("n = %d, (a, b) = %v: term %d is %v, the generic loop's %v", n, ab, i, pair[0], pair[1])
					}
				}
			}
		}
	})
}
