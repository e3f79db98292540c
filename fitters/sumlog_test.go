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
// per-value log-density summed one math.Log at a time, its score and
// Hessian against logisticLogDensity's derivatives, and its third
// derivatives against central differences of the Hessian.
func TestLogisticSumsMatchesPerValueLogs(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 2))
	for _, n := range []int{1, 7, 512, 513, 2000} {
		v := make([]float64, n)
		for i := range v {
			v[i] = Logistic{0.3, 0.7}.Rand(r)
		}
		for _, ab := range [][2]float64{{0, 1.8}, {-0.4, 0.5}, {2, 6}} {
			a, b := ab[0], ab[1]
			pt := logisticSums(v, make([]float64, len(v)), a, b)
			ll, ga, gb, haa, hab, hbb := pt.ll, pt.ga, pt.gb, pt.haa, pt.hab, pt.hbb
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
			// Third derivatives against central differences of the Hessian.
			const hs = 1e-5
			pa, ma := logisticSums(v, make([]float64, len(v)), a+hs, b), logisticSums(v, make([]float64, len(v)), a-hs, b)
			pb, mb := logisticSums(v, make([]float64, len(v)), a, b+hs), logisticSums(v, make([]float64, len(v)), a, b-hs)
			for _, c := range []struct {
				name      string
				got, want float64
			}{
				{"taaa", pt.taaa, (pa.haa - ma.haa) / (2 * hs)},
				{"taab", pt.taab, (pb.haa - mb.haa) / (2 * hs)},
				{"taab'", pt.taab, (pa.hab - ma.hab) / (2 * hs)},
				{"tabb", pt.tabb, (pb.hab - mb.hab) / (2 * hs)},
				{"tabb'", pt.tabb, (pa.hbb - ma.hbb) / (2 * hs)},
				{"tbbb", pt.tbbb, (pb.hbb - mb.hbb) / (2 * hs)},
			} {
				if d := math.Abs(c.got - c.want); d > 1e-5*math.Max(fn, math.Abs(c.want)) {
					t.Errorf("n=%d a=%v b=%v %s = %.10g, central difference %.10g", n, a, b, c.name, c.got, c.want)
				}
			}
		}
	}
}

func minOf(x []float64) float64 { lo, _ := minMax(x); return lo }
func maxOf(x []float64) float64 { _, hi := minMax(x); return hi }
func plainSum(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v
	}
	return s
}

// TestSumLogsAccuracy checks Σ ln xᵢ through logAccumulator (products with
// their binary exponents moved out; used for the Σ ln x of the inverse
// Gaussian and gamma fits) against the 4096-bit reference, beside one
// math.Log per value added in order: over 300 samples of sizes up to 3000
// and scales from 1e-60 to 1e60 (some clustered, some spread over many
// decades), scanLogs4 gives sumLogs's sum (with minMax's extremes and Σ x),
// and the largest error is within (n + 2)·2⁻⁵³ + 2 ulp of the sum
// and, relative to max(1, |Σ|), no larger than the plain sum's largest.
// Values beyond 2^±250 are logged one by one, so for data made only of
// them the result is the plain sum itself.
func TestSumLogsAccuracy(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 5))
	var worstAcc, worstPlain float64
	for trial := 0; trial < 300; trial++ {
		n := 1 + r.IntN(3000)
		x := make([]float64, n)
		scale := math.Pow(10, 120*r.Float64()-60)
		spread := []float64{1e-6, 0.3, 3, 40}[trial%4]
		for i := range x {
			x[i] = scale * math.Exp(spread*r.NormFloat64())
		}
		ref := refSumLog(x)
		var plain float64
		for _, v := range x {
			plain += math.Log(v)
		}
		got := sumLogs(x)
		if lo, hi, sum, sl := scanLogs4(x); sl != got || lo != minOf(x) || hi != maxOf(x) || math.Abs(sum-plainSum(x)) > 1e-12*plainSum(x) {
			t.Fatalf("trial %d: scanLogs4 = (%v, %v, %v, %v), want (%v, %v, %v, %v)", trial, lo, hi, sum, sl, minOf(x), maxOf(x), plainSum(x), got)
		}
		errAcc, errPlain := math.Abs(got-ref), math.Abs(plain-ref)
		worstAcc = math.Max(worstAcc, errAcc/math.Max(1, math.Abs(ref)))
		worstPlain = math.Max(worstPlain, errPlain/math.Max(1, math.Abs(ref)))
		ulp := math.Abs(math.Nextafter(ref, math.Inf(1)) - ref)
		if bound := float64(n+2)*0x1p-53 + 2*ulp; errAcc > bound {
			t.Fatalf("trial %d n=%d scale %.3g: error %.3g exceeds (n+2)·2⁻⁵³ + 2 ulp = %.3g (plain sum error %.3g)", trial, n, scale, errAcc, bound, errPlain)
		}
	}
	for _, scale := range []float64{1e-200, 1e200} {
		x := []float64{scale, 2 * scale, 3 * scale}
		if got, plain := sumLogs(x), math.Log(x[0])+math.Log(x[1])+math.Log(x[2]); got != plain {
			t.Errorf("values near %g: %.17g, plain sum %.17g", scale, got, plain)
		}
	}
	t.Logf("largest relative error: accumulated products %.3g, one log per value %.3g", worstAcc, worstPlain)
	if worstAcc > worstPlain {
		t.Errorf("accumulated products less accurate than one log per value: %.3g > %.3g", worstAcc, worstPlain)
	}
}

func BenchmarkSumLogs(b *testing.B) {
	x := coreBenchSample(b, "lognormal", []float64{1.2, 0.6}, 1000)
	for i := 0; i < b.N; i++ {
		coreLogFloorSink = sumLogs(x)
	}
}
