package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// TestInfoSumsAgree: the batch route of the Weibull and log-logistic
// information sums (fastLog and fastExp through logsInto and expsInto)
// agrees with the per-value route (lnRatio with log1p near the scale,
// math.Exp) to 1e-13 of the sums of the terms' magnitudes, on seeded
// samples across shapes and sizes (tails shorter than a block included);
// values ≤ 0 make both routes refuse, and ratios beyond the floating-point
// range are left to the per-value route.
func TestInfoSumsAgree(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 17))
	for _, k := range []float64{0.3, 1.7, 8} {
		for _, n := range []int{1, 7, 512, 1000, 1537} {
			x := make([]float64, n)
			for i := range x {
				x[i] = Weibull{Shape: k, Scale: 30}.Rand(r)
			}
			for _, at := range []float64{1, 1.05} { // at the data's scale and off it
				lam, beta := 30*at, k*at
				a1, a2, a3, ok := weibullInfoSums(x, k, lam)
				b1, b2, b3, okp := weibullInfoSumsPerValue(x, k, lam)
				if !ok || !okp {
					t.Fatalf("k=%v n=%d: refused positive data", k, n)
				}
				var mag float64 // Σ t(1 + |y| + y²)
				for _, v := range x {
					y := math.Log(v / lam)
					mag += math.Exp(k*y) * (1 + math.Abs(y) + y*y)
				}
				for i, p := range [][2]float64{{a1, b1}, {a2, b2}, {a3, b3}} {
					if math.Abs(p[0]-p[1]) > 1e-13*mag {
						t.Errorf("weibull k=%v λ=%v n=%d: sum %d batch %v, per value %v", k, lam, n, i, p[0], p[1])
					}
				}
				c1, c2, c3, c4, ok := loglogisticInfoSums(x, lam, beta)
				d1, d2, d3, d4, okp := loglogisticInfoSumsPerValue(x, lam, beta)
				if !ok || !okp {
					t.Fatalf("β=%v n=%d: refused positive data", beta, n)
				}
				var lmag float64 // Σ (1 + |z| + z²)
				for _, v := range x {
					z := beta * math.Log(v/lam)
					lmag += 1 + math.Abs(z) + z*z
				}
				for i, p := range [][2]float64{{c1, d1}, {c2, d2}, {c3, d3}, {c4, d4}} {
					if math.Abs(p[0]-p[1]) > 1e-13*lmag {
						t.Errorf("loglogistic α=%v β=%v n=%d: sum %d batch %v, per value %v", lam, beta, n, i, p[0], p[1])
					}
				}
			}
		}
	}
	for _, bad := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		x := []float64{1, 2, bad, 3}
		if _, _, _, ok := weibullInfoSums(x, 1.5, 2); ok && !(bad > 0) {
			t.Errorf("weibull took %v", bad)
		}
		if _, _, _, _, ok := loglogisticInfoSums(x, 2, 1.5); ok && !(bad > 0) {
			t.Errorf("loglogistic took %v", bad)
		}
	}
	// x/λ overflows: the batch route's sums are not finite; the per-value
	// route (ln x − ln λ) decides.
	x := []float64{1e300, 2e300, 3e300}
	a1, a2, a3, ok := weibullInfoSums(x, 0.01, 1e-10)
	b1, b2, b3, _ := weibullInfoSumsPerValue(x, 0.01, 1e-10)
	if !ok || a1 != b1 || a2 != b2 || a3 != b3 {
		t.Errorf("ratios beyond the range: (%v %v %v %v), per value (%v %v %v)", a1, a2, a3, ok, b1, b2, b3)
	}
}

var infoSink float64

// BenchmarkInfoSums: the Weibull and log-logistic information sums at
// n = 1000, batch route against per-value route.
func BenchmarkInfoSums(b *testing.B) {
	r := rand.New(rand.NewPCG(5, 18))
	x := make([]float64, 1000)
	for i := range x {
		x[i] = Weibull{Shape: 1.7, Scale: 120}.Rand(r)
	}
	for _, c := range []struct {
		name string
		f    func() float64
	}{
		{"weibull/batch", func() float64 { s, _, _, _ := weibullInfoSums(x, 1.7, 120); return s }},
		{"weibull/per-value", func() float64 { s, _, _, _ := weibullInfoSumsPerValue(x, 1.7, 120); return s }},
		{"loglogistic/batch", func() float64 { s, _, _, _, _ := loglogisticInfoSums(x, 120, 3.5); return s }},
		{"loglogistic/per-value", func() float64 { s, _, _, _, _ := loglogisticInfoSumsPerValue(x, 120, 3.5); return s }},
	} {
		b.Run(fmt.Sprint(c.name), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				infoSink = c.f()
			}
		})
	}
}
