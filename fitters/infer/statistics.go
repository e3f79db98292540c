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
// pass with no buffer. The logarithms come from fitters.CDFTails (the
// family's own CDFTails, computing F, ln F and ln S together, or LogCDF
// below the median and LogSurvival above it), never from ln(1 − F) after
// cancellation, so a point far in a tail gives a large finite term rather
// than ln 0. out
// receives (D, W², A²), a NaN statistic as +Inf.
func edfStatistics(d fitters.Dist, x []float64, out *[3]float64) {
	var s edfSums
	s.n = float64(len(x))
	if t, ok := d.(fitters.CDFTailer); ok {
		for i, v := range x {
			f, lf, ls := t.CDFTails(v)
			s.add(i, f, lf, ls)
		}
	} else {
		// LogCDF until the median, LogSurvival after it: the sample is
		// sorted, so each point costs one tail function.
		upper := false
		for i, v := range x {
			if !upper {
				lf := d.LogCDF(v)
				if lf < -math.Ln2 {
					f := math.Exp(lf) // F itself, also needed for D and W²
					s.add(i, f, lf, math.Log1p(-f))
					continue
				}
				upper = true
			}
			ls := d.LogSurvival(v)
			lf := log1mExp(ls)
			s.add(i, math.Exp(lf), lf, ls)
		}
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

// add takes the point of 0-based rank i (rank i+1 of the formulas) with
// F, ln F and ln S.
func (s *edfSums) add(i int, f, lf, ls float64) {
	fi := float64(i)
	s.ks = math.Max(s.ks, math.Max((fi+1)/s.n-f, f-fi/s.n))
	e := f - (2*fi+1)/(2*s.n)
	s.cvm += e * e
	s.ad += (2*fi+1)*lf + (2*(s.n-fi)-1)*ls
}

// log1mExp returns ln(1 − eᵃ) for a ≤ 0 accurately (Mächler, 2012).
func log1mExp(a float64) float64 {
	if a > -math.Ln2 {
		return math.Log(-math.Expm1(a))
	}
	return math.Log1p(-math.Exp(a))
}
