package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestRandFillSorted checks the samples drawn in order: ascending; the
// i-th value's mean over many samples equal to that order statistic's
// expectation, which for standard exponentials is the harmonic difference
// E[E₍ᵢ₎] = Σ_{j=n−i+1}^{n} 1/j (a textbook identity, recalled: the
// spacings are independent exponentials of rates n, n − 1, …); the values
// pooled over samples distributed as the model (Kolmogorov–Smirnov
// distance within the 0.1 % critical value 1.95/√N, a standard table value
// recalled from memory); and for weibull the powers as math.Pow gives them,
// under every kernel set, with shapes on the special exponents too.
func TestRandFillSorted(t *testing.T) {
	eachLibKernel(t, func(t *testing.T) {
		for _, d := range []SortedRandFiller{
			Exponential{Rate: 1}, Exponential{Rate: 0.02}, Weibull{1.8, 120}, Weibull{1, 3}, Weibull{2, 3},
			Weibull{0.5, 3}, Weibull{0.3, 1e-200}, Weibull{1e6, 1},
			Pareto{Scale: 2, Shape: 3}, GPD{Threshold: 30, Scale: 8, Shape: 0.2}, GPD{Threshold: 0, Scale: 1, Shape: -0.4},
			GPD{Threshold: 5, Scale: 2, Shape: 0}, LogLogistic{Scale: 20, Shape: 3}, Logistic{Location: -4, Scale: 1.5},
			Gumbel{Location: 10, Scale: 3}, GEV{Location: 10, Scale: 3, Shape: 0.15}, GEV{Location: 0, Scale: 1, Shape: -0.3},
		} {
			dist := d.(Dist)
			t.Run(fmt.Sprintf("%T%v", d, d), func(t *testing.T) {
				for _, n := range []int{0, 1, 7, 256, 257, 1000} {
					x := make([]float64, n)
					d.RandFillSorted(rand.New(rand.NewPCG(9, uint64(n))), x)
					if !slices.IsSorted(x) {
						t.Fatalf("n = %d: not ascending", n)
					}
					for _, v := range x {
						if math.IsNaN(v) || math.IsInf(v, 0) || math.IsInf(dist.LogPDF(v), -1) {
							t.Fatalf("n = %d: value %v outside the support", n, v)
						}
					}
					// The same exponential order statistics, mapped one
					// value at a time with math.Pow: the same bits.
					e := make([]float64, n)
					exponentialOrderStatistics(rand.New(rand.NewPCG(9, uint64(n))), e)
					for i, v := range e {
						switch m := d.(type) {
						case Weibull:
							e[i] = m.Scale * math.Pow(v, 1/m.Shape)
						case Exponential:
							e[i] = v / m.Rate
						default:
							e[i] = x[i] // the map's bits are checked by the law below
						}
					}
					slices.Sort(e)
					for i := range x {
						if math.Float64bits(x[i]) != math.Float64bits(e[i]) {
							t.Fatalf("n = %d: value %d is %v, want %v", n, i, x[i], e[i])
						}
					}
				}
				// Pooled values: the model's law.
				const n, samples = 50, 400
				r := rand.New(rand.NewPCG(10, 11))
				pooled := make([]float64, 0, n*samples)
				x := make([]float64, n)
				for range samples {
					d.RandFillSorted(r, x)
					pooled = append(pooled, x...)
				}
				slices.Sort(pooled)
				dmax := 0.0
				for i, v := range pooled {
					f := math.Exp(dist.LogCDF(v))
					dmax = max(dmax, math.Abs(f-float64(i)/float64(len(pooled))), math.Abs(float64(i+1)/float64(len(pooled))-f))
				}
				if crit := 1.95 / math.Sqrt(float64(len(pooled))); dmax > crit {
					t.Errorf("pooled values: KS distance %.4f > %.4f", dmax, crit)
				}
			})
		}
	})
	// The order statistics' means, for standard exponentials: each within
	// four standard errors of H_n − H_(n−i).
	const n, samples = 20, 20000
	r := rand.New(rand.NewPCG(12, 13))
	sum := make([]float64, n)
	sumSq := make([]float64, n)
	x := make([]float64, n)
	for range samples {
		Exponential{Rate: 1}.RandFillSorted(r, x)
		for i, v := range x {
			sum[i] += v
			sumSq[i] += v * v
		}
	}
	for i := range n {
		want := 0.0
		for j := n - i; j <= n; j++ {
			want += 1 / float64(j)
		}
		mean := sum[i] / samples
		se := math.Sqrt((sumSq[i]/samples - mean*mean) / samples)
		if math.Abs(mean-want) > 4*se {
			t.Errorf("E₍%d₎ of %d: mean %.5f, want %.5f (± %.5f)", i+1, n, mean, want, 4*se)
		}
	}
}

// TestAscend: ascend sorts what an increasing map evaluated within an ulp
// may leave out of order, and leaves sorted input as it is.
func TestAscend(t *testing.T) {
	for _, tc := range [][]float64{nil, {1}, {1, 2, 3}, {1, 3, 2, 4}, {2, 1}, {1, 1, 0.5, 2, 2, 1.5}} {
		x := slices.Clone(tc)
		ascend(x)
		if want := slices.Sorted(slices.Values(tc)); !slices.Equal(x, want) {
			t.Errorf("ascend(%v) = %v, want %v", tc, x, want)
		}
	}
}
