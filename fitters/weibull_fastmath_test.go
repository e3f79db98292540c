package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestWeibullFastMathKeepsMaximum fits seeded Weibull samples (shapes 0.3
// to 30, scales 1e-3 to 1e6, n = 5 to 2000) with fastExp, fastLog and
// fastLog1p and with math.Exp, math.Log and math.Log1p (weibullLibMath,
// the route before), and checks that the fast route's estimates are a
// maximum at least as high: the log-likelihood at them, evaluated by the
// family's LogLik (math.Log and math.Exp, independent of either route), is
// never below the one at the library route's estimates by more than 1e-12
// relative. It logs the largest relative change of the estimates and of
// the reported log-likelihood.
func TestWeibullFastMathKeepsMaximum(t *testing.T) {
	fam := weibullFamily{}
	r := rand.New(rand.NewPCG(1965, 8))
	var worstEst, worstLL, worstDeficit float64
	fits := 0
	for _, shape := range []float64{0.3, 0.8, 1.8, 5, 30} {
		for _, scale := range []float64{1e-3, 1, 120, 1e6} {
			for _, n := range []int{5, 20, 200, 2000} {
				for rep := 0; rep < 3; rep++ {
					x := make([]float64, n)
					FillRand(Weibull{shape, scale}, r, x)
					d := Complete(x)
					weibullLibMath = true
					old, err := fam.Fit(d, Options{})
					weibullLibMath = false
					if err != nil {
						continue // e.g. all values equal in floating point
					}
					fast, err := fam.Fit(d, Options{})
					if err != nil {
						t.Fatal(err)
					}
					if old.Converged != fast.Converged {
						t.Errorf("shape %v scale %v n %d: converged %v with the library, %v with fastmath", shape, scale, n, old.Converged, fast.Converged)
						continue
					}
					if !old.Converged {
						continue
					}
					fits++
					llOld := fam.LogLik(old.Estimates, d)
					llFast := fam.LogLik(fast.Estimates, d)
					deficit := (llOld - llFast) / math.Abs(llOld)
					worstDeficit = math.Max(worstDeficit, deficit)
					if deficit > 1e-12 {
						t.Errorf("shape %v scale %v n %d: logL %v at the fast estimates %v, below %v at the library's %v",
							shape, scale, n, llFast, fast.Estimates, llOld, old.Estimates)
					}
					for i := range old.Estimates {
						worstEst = math.Max(worstEst, math.Abs(fast.Estimates[i]/old.Estimates[i]-1))
					}
					worstLL = math.Max(worstLL, math.Abs(fast.LogLik/old.LogLik-1))
					// The reported maximum is the likelihood at the estimates.
					if e := math.Abs(fast.LogLik-llFast) / math.Abs(llFast); e > 1e-11 {
						t.Errorf("shape %v scale %v n %d: reported logL %v, LogLik at the estimates %v", shape, scale, n, fast.LogLik, llFast)
					}
				}
			}
		}
	}
	if fits < 200 {
		t.Errorf("only %d fits compared", fits)
	}
	t.Logf("%d fits: largest relative change of an estimate %.3g, of the reported logL %.3g; worst relative logL deficit %.3g",
		fits, worstEst, worstLL, worstDeficit)
}

// TestWeibullLogsMatchLibrary checks weibullLogs against logsAboutInto
// (math.Log, math.Log1p), for Weibull samples of every magnitude and for
// data spanning 600 decades: each value within 2 ulp of ln ref plus 2 ulp
// of the value, the sum within 1e-12.
func TestWeibullLogsMatchLibrary(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 3))
	for _, scale := range []float64{1e-300, 1e-3, 1, 1e6, 1e300, 0} {
		x := make([]float64, 999)
		if scale == 0 { // values from 1e-300 to 1e300
			for i := range x {
				x[i] = math.Pow(10, 600*r.Float64()-300)
			}
		} else {
			FillRand(Weibull{1.2, scale}, r, x)
		}
		_, hi := minMax(x)
		want := make([]float64, len(x))
		got := make([]float64, len(x))
		lw, sw := logsAboutInto(want, x, hi)
		lg, sg := weibullLogs(got, x, hi)
		tol := func(v float64) float64 { return 2*ulpOf(lw) + 2*ulpOf(v) }
		if math.Abs(lw-lg) > ulpOf(lw) {
			t.Errorf("scale %v: ln ref %v, library %v", scale, lg, lw)
		}
		for i := range x {
			if math.Abs(got[i]-want[i]) > tol(want[i]) {
				t.Errorf("scale %v: ln(x/ref) of %v is %v, library %v", scale, x[i], got[i], want[i])
				break
			}
		}
		if math.Abs(sg-sw) > 1e-12*math.Max(1, math.Abs(sw)) {
			t.Errorf("scale %v: sum %v, library %v", scale, sg, sw)
		}
	}
}

func ulpOf(v float64) float64 {
	v = math.Abs(v)
	return math.Nextafter(v, math.Inf(1)) - v
}

// TestWeibullSumsMatchFastExp checks weibullSums bit for bit against the
// same sums with fastExp called per value, on arguments from 0 down past
// the subnormal range (k·e < −745, where w = 0) and at the special-case
// threshold −702.
func TestWeibullSumsMatchFastExp(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	e := []float64{0, -1e-300, -702 / 3.0, -701.9999 / 3, -702.0001 / 3, -800 / 3.0, -249, -1}
	for len(e) < 4000 {
		e = append(e, -math.Abs(r.NormFloat64())*math.Pow(10, 4*r.Float64()-3))
	}
	for _, k := range []float64{0.05, 1, 3, 40} {
		me := sumOf(e) / float64(len(e))
		var sw, swc, swcc float64
		for _, v := range e {
			w := fastExp(k * v)
			sw += w
			c := v - me
			wc := w * c
			swc += wc
			swcc += wc * c
		}
		a, b, c := weibullSums(e, k, me)
		if !twinsAgree(a, sw) || !twinsAgree(b, swc) || !twinsAgree(c, swcc) {
			t.Errorf("k = %v: weibullSums gives %v %v %v, fastExp per value %v %v %v", k, a, b, c, sw, swc, swcc)
		}
	}
}

var weibullPassSink float64

// BenchmarkWeibullPass times the two kinds of pass of the complete-data
// Weibull fit over the n = 1000 benchmark sample: the log pass (weibullLogs;
// logsAboutInto with math.Log and math.Log1p before) and one evaluation of
// the profile equation's sums (weibullSums; math.Exp per value before).
func BenchmarkWeibullPass(b *testing.B) {
	x := coreBenchSample(b, "weibull", []float64{1.8, 120}, 1000)
	_, hi := minMax(x)
	e := make([]float64, len(x))
	_, se := logsAboutInto(e, x, hi)
	me := se / float64(len(e))
	const k = 1.8
	b.Run("logs/library", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			_, s := logsAboutInto(e, x, hi)
			weibullPassSink += s
		}
	})
	b.Run("logs/fastmath", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			_, s := weibullLogs(e, x, hi)
			weibullPassSink += s
		}
	})
	b.Run("sums/library", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			var sw, swc, swcc float64
			for _, v := range e {
				w := math.Exp(k * v)
				sw += w
				c := v - me
				wc := w * c
				swc += wc
				swcc += wc * c
			}
			weibullPassSink += sw + swc + swcc
		}
	})
	b.Run("sums/fastmath", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			sw, swc, swcc := weibullSums(e, k, me)
			weibullPassSink += sw + swc + swcc
		}
	})
}
