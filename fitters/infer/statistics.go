package infer

import (
	"math"

	"fitseal/fitters"
)

// Names of the goodness-of-fit statistics, as written in gof.csv.
const (
	KolmogorovSmirnov = "ks"
	CramerVonMises    = "cvm"
	AndersonDarling   = "ad"
	ChiSquare         = "chisq"
)

// edfStatistics computes, for a sorted complete sample x and a fully
// specified continuous distribution, the three empirical-distribution-
// function statistics (Stephens, 1974; D'Agostino & Stephens, 1986, §4.2),
// with Fᵢ = F(x₍ᵢ₎), Sᵢ = 1 − Fᵢ, i = 1…n:
//
//	KS   D  = max over i of max(i/n − Fᵢ, Fᵢ − (i−1)/n)
//	CvM  W² = 1/(12n) + Σ (Fᵢ − (2i−1)/(2n))²
//	AD   A² = −n − (1/n) Σ (2i−1) [ln Fᵢ + ln S₍ₙ₊₁₋ᵢ₎]
//	        = −n − (1/n) Σ [(2i−1) ln Fᵢ + (2(n−i)+1) ln Sᵢ]
//
// The second form of A² (substitute j = n+1−i in the ln S sum: 2i−1 =
// 2(n−j)+1) needs each point once, so the three sums run in one streaming
// pass with no n-sized buffer. The logarithms come from
// fitters.CDFTailsBatch, a block of fitters.CDFTailsBlock points a call
// (the family's own batch or CDFTails, computing F, ln F and ln S
// together, or LogCDF below the median and LogSurvival above it), never
// from ln(1 − F) after cancellation, so a point far in a tail gives a
// large finite term rather than ln 0. out receives (D, W², A²), a NaN
// statistic as +Inf.
func edfStatistics(d fitters.Dist, x []float64, out *[3]float64) {
	var s edfSums
	s.n = float64(len(x))
	var f, lf, ls [fitters.CDFTailsBlock]float64
	for lo := 0; lo < len(x); lo += fitters.CDFTailsBlock {
		block := x[lo:min(lo+fitters.CDFTailsBlock, len(x))]
		fitters.CDFTailsBatch(d, block, f[:], lf[:], ls[:])
		s.addBlock(lo, f[:len(block)], lf[:len(block)], ls[:len(block)])
	}
	out[0] = s.ks
	out[1] = s.cvm + 1/(12*s.n)
	out[2] = -s.n - s.ad/s.n
	for i, v := range out {
		if math.IsNaN(v) {
			out[i] = math.Inf(1)
		}
	}
}

// edfSums accumulates the sums of edfStatistics over n points.
type edfSums struct{ n, ks, cvm, ad float64 }

// addBlock takes the points of 0-based ranks lo, lo+1, … (ranks lo+1, …
// of the formulas) with their F, ln F and ln S. Each point's i/n is the
// previous point's (i−1+1)/n, carried instead of divided again (the same
// quotient of the same integers). D is kept as four running maxima, point
// j in maximum j mod 4, taken together at the end: the built-in max, exact
// and the same in any order (NaN and ±0 included), is a chain of seven
// instructions per call, and one running maximum made it the loop's
// longest dependency chain. The sums W² and A² keep their order.
func (s *edfSums) addBlock(lo int, f, lf, ls []float64) {
	cvm, ad, n := s.cvm, s.ad, s.n
	ks := [4]float64{s.ks, s.ks, s.ks, s.ks}
	fi := float64(lo)
	below := fi / n // (i−1)/n of the formulas
	for j := range f {
		fj := f[j]
		above := (fi + 1) / n // i/n
		ks[j&3] = max(ks[j&3], above-fj, fj-below)
		e := fj - (2*fi+1)/(2*n)
		cvm += e * e
		ad += (2*fi+1)*lf[j] + (2*(n-fi)-1)*ls[j]
		below = above
		fi++
	}
	s.ks, s.cvm, s.ad = max(ks[0], ks[1], ks[2], ks[3]), cvm, ad
}
