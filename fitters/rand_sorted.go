package fitters

import (
	"math"
	"math/rand/v2"
	"slices"
)

// SortedRandFiller is implemented by the distributions whose quantile is a
// cheap monotone function of a standard exponential variate: weibull,
// exponential, pareto, gpd, loglogistic and logistic (increasing in
// E = −ln S), gumbel and gev (decreasing in E = −ln F). RandFillSorted(r, dst) stores in dst, in ascending order,
// the order statistics of len(dst) independent draws: a sample whose law is
// that of len(dst) Rand calls, sorted, made without sorting (a bootstrap
// replicate needs its values in order for the EDF statistics). The values
// are not those of Rand's stream.
type SortedRandFiller interface {
	RandFillSorted(r *rand.Rand, dst []float64)
}

// exponentialOrderStatistics sets e, in ascending order, to the order
// statistics of len(e) independent standard exponential variates, by
// Rényi's representation: with Z₁, …, Zₙ independent standard exponentials,
//
//	E₍ᵢ₎ = Σ_{j ≤ i} Z_j / (n − j + 1),
//
// the spacings of exponential order statistics being independent
// exponentials of rates n, n − 1, …, 1 (Rényi 1953). The sums are of
// positive terms in order, so they are non-decreasing as computed.
func exponentialOrderStatistics(r *rand.Rand, e []float64) {
	n := len(e)
	s := 0.0
	for i := range e {
		s += r.ExpFloat64() / float64(n-i)
		e[i] = s
	}
}

// RandFillSorted draws the order statistics of len(dst) exponential
// variates: E₍ᵢ₎/Rate (exponentialOrderStatistics).
func (d Exponential) RandFillSorted(r *rand.Rand, dst []float64) {
	fromExponential(r, dst, false, func(e float64) float64 { return e / d.Rate })
}

// RandFillSorted draws the order statistics of len(dst) weibull variates:
// Scale·E₍ᵢ₎^(1/Shape) (exponentialOrderStatistics), the powers as
// math.Pow's, a block at a time through the vector kernels.
func (d Weibull) RandFillSorted(r *rand.Rand, dst []float64) {
	exponentialOrderStatistics(r, dst)
	p, ok := newPowFixed(1 / d.Shape)
	if !ok {
		for i, e := range dst {
			dst[i] = d.Scale * math.Pow(e, 1/d.Shape)
		}
	} else {
		p.scaledPowsInPlace(dst, d.Scale)
	}
	ascend(dst)
}

// ascend puts x, non-decreasing but for a rounding step (an increasing map
// evaluated within an ulp may turn two nearly equal inputs round), in
// ascending order by insertion: a pass over x when nothing is out of order.
func ascend(x []float64) {
	for i := 1; i < len(x); i++ {
		if v := x[i]; v < x[i-1] {
			j := i
			for ; j > 0 && x[j-1] > v; j-- {
				x[j] = x[j-1]
			}
			x[j] = v
		}
	}
}

// fromExponential sets dst, ascending, to g of the order statistics of
// len(dst) standard exponentials: g(E₍ᵢ₎) for an increasing g, and
// g(E₍ₙ₋₁₋ᵢ₎) for a decreasing one, so that the values come out in order.
func fromExponential(r *rand.Rand, dst []float64, decreasing bool, g func(e float64) float64) {
	exponentialOrderStatistics(r, dst)
	if decreasing {
		slices.Reverse(dst)
	}
	for i, e := range dst {
		dst[i] = g(e)
	}
	ascend(dst)
}

// RandFillSorted draws pareto order statistics: Scale·e^(E/Shape), E = −ln S.
func (d Pareto) RandFillSorted(r *rand.Rand, dst []float64) {
	fromExponential(r, dst, false, func(e float64) float64 { return d.Scale * math.Exp(e/d.Shape) })
}

// RandFillSorted draws gpd order statistics: Threshold + Scale·(e^(ξE) − 1)/ξ,
// E = −ln S (Quantile's form).
func (d GPD) RandFillSorted(r *rand.Rand, dst []float64) {
	fromExponential(r, dst, false, func(e float64) float64 { return d.Threshold + d.Scale*expm1Over(d.Shape, e) })
}

// RandFillSorted draws loglogistic order statistics: Scale·(e^E − 1)^(1/Shape),
// E = −ln S, since the odds F/S are e^E − 1.
func (d LogLogistic) RandFillSorted(r *rand.Rand, dst []float64) {
	fromExponential(r, dst, false, func(e float64) float64 { return d.Scale * math.Exp(math.Log(math.Expm1(e))/d.Shape) })
}

// RandFillSorted draws logistic order statistics: Location + Scale·ln(e^E − 1),
// E = −ln S (the log odds).
func (d Logistic) RandFillSorted(r *rand.Rand, dst []float64) {
	fromExponential(r, dst, false, func(e float64) float64 { return d.Location + d.Scale*math.Log(math.Expm1(e)) })
}

// RandFillSorted draws gumbel order statistics: Location − Scale·ln E,
// E = −ln F, decreasing in E (Rand's form).
func (d Gumbel) RandFillSorted(r *rand.Rand, dst []float64) {
	fromExponential(r, dst, true, func(e float64) float64 { return d.Location - d.Scale*math.Log(e) })
}

// RandFillSorted draws gev order statistics: Location + Scale·(e^(−ξ ln E) − 1)/ξ,
// E = −ln F, decreasing in E (Quantile's form with −ln(−ln p) = −ln E).
func (d GEV) RandFillSorted(r *rand.Rand, dst []float64) {
	fromExponential(r, dst, true, func(e float64) float64 { return d.Location + d.Scale*expm1Over(d.Shape, -math.Log(e)) })
}
