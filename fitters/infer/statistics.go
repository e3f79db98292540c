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
// with Fᵢ = F(x₍ᵢ₎):
//
//	KS   D  = max over i of max(i/n − Fᵢ, Fᵢ − (i−1)/n)
//	CvM  W² = 1/(12n) + Σ (Fᵢ − (2i−1)/(2n))²
//	AD   A² = −n − (1/n) Σ (2i−1) [ln Fᵢ + ln(1 − F₍ₙ₊₁₋ᵢ₎)]
//
// The logarithms of A² come from LogCDF and LogSurvival, never from
// ln(1 − F), so a point far in a tail gives a large finite term rather
// than ln 0. Each point costs one tail function: LogCDF while F < ½, where
// ln S = ln(1 − F) is accurate by log1p, and LogSurvival beyond (the sample
// is sorted, so the switch happens once), where ln F = ln(1 − S) is.
// logF and logS are scratch of len(x); out receives (D, W², A²).
func edfStatistics(d fitters.Dist, x, logF, logS []float64, out *[3]float64) {
	n := len(x)
	nf := float64(n)
	var ks, cvm float64
	upper := false
	for i, v := range x {
		var lf, ls, f float64
		if !upper {
			lf = d.LogCDF(v)
			if lf < -math.Ln2 {
				f = math.Exp(lf) // F itself, also needed for D and W²
				ls = math.Log1p(-f)
			} else {
				upper = true
			}
		}
		if upper {
			ls = d.LogSurvival(v)
			lf = log1mExp(ls)
			f = math.Exp(lf)
		}
		logS[i] = ls
		fi := float64(i)
		ks = math.Max(ks, math.Max((fi+1)/nf-f, f-fi/nf))
		e := f - (2*fi+1)/(2*nf)
		cvm += e * e
		logF[i] = lf
	}
	var ad float64
	for i := 0; i < n; i++ {
		ad += (2*float64(i) + 1) * (logF[i] + logS[n-1-i])
	}
	out[0] = ks
	out[1] = cvm + 1/(12*nf)
	out[2] = -nf - ad/nf
	for i, v := range out {
		if math.IsNaN(v) {
			out[i] = math.Inf(1)
		}
	}
}

// log1mExp returns ln(1 − eᵃ) for a ≤ 0 accurately (Mächler, 2012).
func log1mExp(a float64) float64 {
	if a > -math.Ln2 {
		return math.Log(-math.Expm1(a))
	}
	return math.Log1p(-math.Exp(a))
}
