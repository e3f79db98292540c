package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// TestRandFillMatchesRand checks, bit for bit, that RandFill gives the
// values of successive Rand calls from an identically seeded generator and
// leaves the generator in the same state, for shapes on both sides of
// every branch: math.Pow's special exponents (shape 1 → y = 1, shape 2 →
// y = ½), integer y (weibull shapes ½ and ¼, gamma shape ½: no
// logarithms), yf above and below ½, a large integer part, gamma shapes
// below 0.2, in [0.2, 1) (m = u^(1/a) by the vector kernels), exactly 1
// and above, and lognormals reaching underflow and overflow; under every
// kernel set of libLogs and libExps, and for lengths around the vector
// widths and the block of 256.
func TestRandFillMatchesRand(t *testing.T) {
	if !fillsMatchRand() {
		t.Fatal("the start-up self-check found RandFill differing from Rand on this machine")
	}
	cases := []Dist{
		Weibull{1.8, 120}, Weibull{1, 3}, Weibull{2, 3}, Weibull{0.5, 3}, Weibull{0.25, 2}, Weibull{0.3, 1e-200},
		Weibull{0.02, 1}, Weibull{3.7, 1e300}, Weibull{1e-3, 1}, Weibull{1e6, 1}, Weibull{1.999, 1},
		Weibull{2.0000001, 5}, Weibull{1.0000001, 5}, Weibull{0.9999999, 5}, Weibull{0.7, 1},
		Gamma{2.5, 0.4}, Gamma{0.05, 2}, Gamma{0.2, 1}, Gamma{0.199, 1}, Gamma{0.25, 1}, Gamma{0.5, 2},
		Gamma{0.7, 5}, Gamma{0.9, 0.3}, Gamma{0.9999999, 1}, Gamma{1, 3}, Gamma{30, 1e-3}, Gamma{1e4, 7},
		Gamma{1e-3, 1e3}, LogNormal{1, 0.7}, LogNormal{-300, 40}, LogNormal{0, 1e-9},
	}
	eachLibKernel(t, func(t *testing.T) {
		for _, d := range cases {
			t.Run(fmt.Sprintf("%T%v", d, d), func(t *testing.T) {
				for _, n := range []int{0, 1, 3, 4, 7, 8, 9, 19, 255, 256, 257, 5000} {
					r1 := rand.New(rand.NewPCG(5, uint64(n)))
					r2 := rand.New(rand.NewPCG(5, uint64(n)))
					got := make([]float64, n)
					FillRand(d, r1, got)
					for i, g := range got {
						if w := d.Rand(r2); math.Float64bits(g) != math.Float64bits(w) {
							t.Fatalf("n = %d, value %d: RandFill gave %v, Rand %v", n, i, g, w)
						}
					}
					if a, b := r1.Uint64(), r2.Uint64(); a != b {
						t.Fatalf("n = %d: generator states differ after the draws: %x vs %x", n, a, b)
					}
				}
			})
		}
	})
}

// TestPowFixedMatchesPow compares powFixed with math.Pow, bit for bit, on
// every kind of x: zero, subnormal, the smallest normal, 1 and its
// neighbours, huge, infinite, negative and NaN, for exponents of every
// shape of split.
func TestPowFixedMatchesPow(t *testing.T) {
	xs := []float64{0, math.SmallestNonzeroFloat64, 0x1p-1030, 0x1p-1022, 1e-300, 1e-10, 0.3,
		math.Nextafter(1, 0), 1, math.Nextafter(1, 2), 2, 7.5, 1e10, 1e300, math.MaxFloat64,
		math.Inf(1), -1, math.NaN()}
	r := rand.New(rand.NewPCG(5, 7))
	for range 2000 {
		xs = append(xs, math.Exp(40*r.NormFloat64()), r.ExpFloat64())
	}
	ys := []float64{1 / 1.8, 1 / 0.3, 2, 3, 1 / 3.7, 0.75, 1.25, 1e3, 1e-9, 1 / 0.02, 5000.5, 1 << 40,
		1 / 0.7, 1 / 0.25, 1 / 0.9, 5, 7.3, 15.6, 31, 100.25, 1023.9, 4097, 1e5 + 0.3, 1e15, 3e18}
	for _, y := range ys {
		p, ok := newPowFixed(y)
		if !ok {
			t.Fatalf("newPowFixed(%v) refused an ordinary exponent", y)
		}
		for _, x := range xs {
			if got, want := p.pow(x), math.Pow(x, y); math.Float64bits(got) != math.Float64bits(want) {
				t.Errorf("pow(%v, %v) = %v, math.Pow %v", x, y, got, want)
			}
		}
		eachLibKernel(t, func(t *testing.T) {
			got, tmp := make([]float64, len(xs)), make([]float64, len(xs))
			p.powsInto(got, xs, tmp)
			for i, x := range xs {
				if want := math.Pow(x, y); math.Float64bits(got[i]) != math.Float64bits(want) {
					t.Fatalf("powsInto: x = %v, y = %v: %v, math.Pow %v", x, y, got[i], want)
				}
			}
		})
	}
	for _, y := range []float64{0, -1, 1, 0.5, math.Inf(1), math.NaN(), 1 << 63} {
		if _, ok := newPowFixed(y); ok {
			t.Errorf("newPowFixed(%v) accepted one of math.Pow's special cases", y)
		}
	}
}

// BenchmarkRandFill compares n = 1000 Rand calls with one RandFill
// (cpu-ns/op: the process's CPU time per op, steadier than ns/op on a
// shared machine).
func BenchmarkRandFill(b *testing.B) {
	dst := make([]float64, 1000)
	for _, d := range []Dist{Weibull{1.8, 120}, Weibull{3.5, 1}, Gamma{2.5, 0.4}, Gamma{0.5, 1}, Gamma{0.7, 1}, LogNormal{1, 0.7}} {
		name := fmt.Sprintf("%T%v", d, d)
		b.Run("Rand/"+name, func(b *testing.B) {
			r := rand.New(rand.NewPCG(1, 2))
			cpu := processCPUNanos()
			for b.Loop() {
				for i := range dst {
					dst[i] = d.Rand(r)
				}
			}
			reportCPU(b, cpu)
		})
		b.Run("RandFill/"+name, func(b *testing.B) {
			r := rand.New(rand.NewPCG(1, 2))
			cpu := processCPUNanos()
			for b.Loop() {
				FillRand(d, r, dst)
			}
			reportCPU(b, cpu)
		})
	}
}

// reportCPU reports the process CPU time since cpu (processCPUNanos) per
// op as cpu-ns/op, where it can be read.
func reportCPU(b *testing.B, cpu int64) {
	if cpu >= 0 {
		b.ReportMetric(float64(processCPUNanos()-cpu)/float64(b.N), "cpu-ns/op")
	}
}
