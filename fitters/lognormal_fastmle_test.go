package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLognormalFastMLEAgrees: the fastLogs route and the route about x[0]
// (lognormalMLE, math.Log and math.Log1p) give the same estimates to within
// the bound proved at lognormalFastMLE (|Δσ̂| ≤ 2⁻⁴⁷σ̂, |Δμ̂| ≤ 2⁻⁵²·32σ̂ plus
// the older route's own rounding), on seeded samples over a wide range of μ,
// σ and n; it logs the largest relative changes (the figure reported when
// printed lognormal estimates move in their last digits).
func TestLognormalFastMLEAgrees(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	var worstMu, worstSigma, worstLL float64
	fast := 0
	for k := 0; k < 600; k++ {
		mu := []float64{0, 1.2, -3, 8, 40, -200}[k%6]
		sigma := []float64{0.6, 0.05, 2, 10, 0.3}[k%5]
		n := []int{2, 3, 10, 100, 1000, 1003}[k%6]
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Exp(mu + sigma*r.NormFloat64())
		}
		m1, s1, l1 := lognormalMLE(x)
		m2, s2, l2, ok := lognormalFastMLE(x)
		if !ok {
			if s1 > 0 && math.Hypot(m1, s1) < 30*s1 {
				t.Errorf("μ=%v σ=%v n=%d: fast route declined (μ̂=%v σ̂=%v)", mu, sigma, n, m1, s1)
			}
			continue
		}
		fast++
		dm := math.Abs(m2-m1) / math.Max(math.Abs(m1), s1)
		ds := math.Abs(s2-s1) / s1
		dl := math.Abs(l2-l1) / math.Max(math.Abs(l1), 1)
		worstMu, worstSigma, worstLL = math.Max(worstMu, dm), math.Max(worstSigma, ds), math.Max(worstLL, dl)
		if ds > 0x1p-44 || dm > 0x1p-44 || dl > 1e-13 {
			t.Errorf("μ=%v σ=%v n=%d: fast (%v, %v, %v), about x[0] (%v, %v, %v)", mu, sigma, n, m2, s2, l2, m1, s1, l1)
		}
	}
	t.Logf("%d of 600 samples by fastLogs; largest relative change μ̂ %.3g, σ̂ %.3g, logL %.3g", fast, worstMu, worstSigma, worstLL)
	if fast < 400 {
		t.Errorf("only %d of 600 samples took the fast route", fast)
	}
}

// TestLognormalFastMLEDeclines: data the fast route must leave to
// lognormalMLE — clustered far from 1 (NIST NumAcc-like, 1e7 ± 0.1),
// non-positive, infinite or NaN values, all equal.
func TestLognormalFastMLEDeclines(t *testing.T) {
	for _, x := range [][]float64{
		{10000000.2, 10000000.1, 10000000.3, 10000000.1, 10000000.3, 10000000.1, 10000000.3, 10000000.1, 10000000.3},
		{1, 2, 0},
		{1, 2, -1},
		{1, 2, math.Inf(1)},
		{1, 2, math.NaN()},
		{3, 3, 3},
	} {
		if m, s, l, ok := lognormalFastMLE(x); ok {
			t.Errorf("%v: fast route took it: (%v, %v, %v)", x, m, s, l)
		}
	}
}
