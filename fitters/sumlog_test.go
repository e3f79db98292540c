package fitters

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// ln2Digits is ln 2 to 50 digits (mpmath 1.3 at mp.dps = 50, Debian's
// /usr/bin/python3: mpmath.log(2)).
const ln2Digits = "0.69314718055994530941723212145817656807550013436025"

// refSumLog returns Σ ln yᵢ for positive yᵢ to about 3e-16 absolute: the
// product Π yᵢ is formed in 4096-bit arithmetic (exact for up to 77 factors
// of 53 bits, and correct to 2⁻⁴⁰⁰⁰ relative beyond), written as m·2^e with
// m ∈ [½, 1), and ln = e·ln 2 (50 digits) + ln m (m rounded to float64).
func refSumLog(y []float64) float64 {
	p := new(big.Float).SetPrec(4096).SetFloat64(1)
	for _, v := range y {
		p.Mul(p, new(big.Float).SetFloat64(v))
	}
	m := new(big.Float).SetPrec(4096)
	e := p.MantExp(m)
	mf, _ := m.Float64()
	ln2, _ := new(big.Float).SetPrec(256).SetString(ln2Digits)
	eln2 := new(big.Float).SetPrec(256).Mul(ln2, new(big.Float).SetInt64(int64(e)))
	s := new(big.Float).SetPrec(256).Add(eln2, new(big.Float).SetFloat64(math.Log(mf)))
	out, _ := s.Float64()
	return out
}

// TestSumLogSmallAccuracy checks that Σ ln yᵢ for yᵢ ∈ [1, 2] taken as the
// log of products of 512 factors (sumLogSmall, used by the logistic and
// log-logistic fits for Σ ln(1 + e^(−|z|))) is at least as accurate as
// adding one math.Log per value: over 300 random samples of sizes up to
// 3000, drawn to mimic 1 + e^(−|z|) (most values near 1, some near 2), its
// largest error against a 4096-bit reference is no more than that of the
// plain sum, and every error is within n·2⁻⁵³ + 2 ulp of the sum.
func TestSumLogSmallAccuracy(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 1))
	var worstProd, worstPlain float64
	for trial := 0; trial < 300; trial++ {
		n := 1 + r.IntN(3000)
		y := make([]float64, n)
		for i := range y {
			z := math.Abs(Logistic{0, 1}.Rand(r)) * (0.2 + 3*r.Float64())
			y[i] = 1 + math.Exp(-z)
		}
		ref := refSumLog(y)
		var plain float64
		for _, v := range y {
			plain += math.Log(v)
		}
		got := sumLogSmall(y)
		errProd, errPlain := math.Abs(got-ref), math.Abs(plain-ref)
		worstProd = math.Max(worstProd, errProd/math.Max(1, ref))
		worstPlain = math.Max(worstPlain, errPlain/math.Max(1, ref))
		ulp := math.Nextafter(ref, math.Inf(1)) - ref
		if bound := float64(n)*0x1p-53 + 2*ulp; errProd > bound {
			t.Fatalf("n=%d: product route error %.3g exceeds n·2⁻⁵³ + 2 ulp = %.3g (plain sum error %.3g)", n, errProd, bound, errPlain)
		}
	}
	t.Logf("largest relative error: products of 512 %.3g, one log per value %.3g", worstProd, worstPlain)
	if worstProd > worstPlain {
		t.Errorf("products of 512 are less accurate than one log per value: %.3g > %.3g", worstProd, worstPlain)
	}
}

// TestLogisticSumsMatchesPerValueLogs checks logisticSums's ℓ against the
// per-value log-density summed one math.Log at a time, and its score and
// Hessian against logisticLogDensity's derivatives, on standardized data.
func TestLogisticSumsMatchesPerValueLogs(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 2))
	for _, n := range []int{1, 7, 512, 513, 2000} {
		v := make([]float64, n)
		for i := range v {
			v[i] = Logistic{0.3, 0.7}.Rand(r)
		}
		for _, ab := range [][2]float64{{0, 1.8}, {-0.4, 0.5}, {2, 6}} {
			a, b := ab[0], ab[1]
			ll, ga, gb, haa, hab, hbb := logisticSums(v, a, b)
			var wll, wga, wgb, whaa, whab, whbb float64
			for _, x := range v {
				g0, g1, g2 := logisticLogDensity(b*x - a)
				wll += g0
				wga -= g1
				wgb += g1 * x
				whaa += g2
				whab -= g2 * x
				whbb += g2 * x * x
			}
			fn := float64(n)
			wll += fn * math.Log(b)
			wgb += fn / b
			whbb -= fn / (b * b)
			for _, c := range []struct {
				name      string
				got, want float64
			}{{"ll", ll, wll}, {"ga", ga, wga}, {"gb", gb, wgb}, {"haa", haa, whaa}, {"hab", hab, whab}, {"hbb", hbb, whbb}} {
				if d := math.Abs(c.got - c.want); d > 1e-12*math.Max(fn, math.Abs(c.want)) {
					t.Errorf("n=%d a=%v b=%v %s = %.17g, per-value sum %.17g", n, a, b, c.name, c.got, c.want)
				}
			}
		}
	}
}
