package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// The batch functions libLogs and libExps run vector kernels
// (mathlib_vec_amd64.s) where the processor has them; these tests hold
// every kernel set this processor can run (availableLibKernels: AVX-512,
// AVX2 and the pure-Go loops on amd64, the pure-Go loops elsewhere or with
// the purego tag) to the bits of the standard library's math.Log and
// math.Exp.

// eachLibKernel runs f once under every kernel set of libLogs and libExps
// this processor can run.
func eachLibKernel(t *testing.T, f func(t *testing.T)) {
	for _, k := range availableLibKernels() {
		t.Run(k.String(), func(t *testing.T) {
			defer useLibKernel(k)()
			f(t)
		})
	}
}

// libLogInputs are the values the log kernels stop at (zero, subnormal,
// negative, infinite, NaN) and the ordinary ones at their edges: the
// smallest normal, 1 and its neighbours, the switch at √2/2, the largest.
var libLogInputs = []float64{
	0, math.Copysign(0, -1), 5e-324, -5e-324, 0x1p-1022 - 5e-324, 0x1p-1022, -0x1p-1022,
	math.Nextafter(0x1p-1022, 1), 1e-310, -1, -2.5, math.Inf(1), math.Inf(-1), math.NaN(),
	math.Float64frombits(0x7ff0000000000001), math.Float64frombits(0xfff8000000000001),
	math.MaxFloat64, -math.MaxFloat64, 1, math.Nextafter(1, 0), math.Nextafter(1, 2),
	math.Sqrt2 / 2, math.Nextafter(math.Sqrt2/2, 0), math.Nextafter(math.Sqrt2/2, 1),
	math.Sqrt2, math.Nextafter(math.Sqrt2, 0), math.Nextafter(math.Sqrt2, 2), 2, 0.5, 3,
}

// libExpInputs are the values the exp kernels stop at (|x| > 700, NaN,
// the infinities, math.Exp's overflow and underflow ranges) and the
// ordinary ones at their edges: ±700, zeros, the tiniest, halfway points
// of k·ln2 where log2e·x rounds to an even or odd k.
var libExpInputs = []float64{
	0, math.Copysign(0, -1), 5e-324, -5e-324, 0x1p-1022, 1e-300, -1e-300, 700, -700,
	math.Nextafter(700, 0), math.Nextafter(700, 800), math.Nextafter(-700, 0), math.Nextafter(-700, -800),
	708, -708, 709.78271289338397, 709.782712893384, 709.79, -745.13321910194111, -745.1332191019412,
	-746, 1e300, -1e300, math.Inf(1), math.Inf(-1), math.NaN(),
	math.Float64frombits(0x7ff0000000000001), math.Float64frombits(0xfff8000000000001),
	0.5 * math.Ln2, 1.5 * math.Ln2, -0.5 * math.Ln2, -2.5 * math.Ln2, 1, -1, 0.0625,
}

// sameLibBits reports whether a and b are the same float64, bit for bit.
func sameLibBits(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }

// checkLibBatch runs libLogs and libExps on xs (into a separate slice and
// in place) and compares every value with math.Log and math.Exp.
func checkLibBatch(t *testing.T, xs []float64) {
	t.Helper()
	got := make([]float64, len(xs))
	for _, fn := range []struct {
		name  string
		batch func(dst, x []float64)
		ref   func(float64) float64
	}{{"libLogs", libLogs, math.Log}, {"libExps", libExps, math.Exp}} {
		fn.batch(got, xs)
		for i, x := range xs {
			if w := fn.ref(x); !sameLibBits(got[i], w) {
				t.Fatalf("%s: value %d of %d, x = %v (%#016x): got %v (%#016x), math %v (%#016x)",
					fn.name, i, len(xs), x, math.Float64bits(x), got[i], math.Float64bits(got[i]), w, math.Float64bits(w))
			}
		}
		inPlace := append([]float64(nil), xs...)
		fn.batch(inPlace, inPlace)
		for i := range xs {
			if !sameLibBits(inPlace[i], got[i]) {
				t.Fatalf("%s in place: value %d of %d, x = %v: %v, into a separate slice %v",
					fn.name, i, len(xs), xs[i], inPlace[i], got[i])
			}
		}
	}
}

// TestLibLogsExpsMatchMath: every kernel set gives math.Log's and
// math.Exp's bits on millions of values spanning both functions' ranges
// (every binade, near 1, near the switches, random bit patterns, the
// exponents of the bootstrap's weibull and gamma draws).
func TestLibLogsExpsMatchMath(t *testing.T) {
	const perGenerator = 1 << 19
	if testing.Short() {
		t.Skip("millions of values")
	}
	gens := []struct {
		name string
		gen  func(r *rand.Rand) float64
	}{
		{"every binade", func(r *rand.Rand) float64 {
			return math.Ldexp(1+r.Float64(), r.IntN(2046)-1022)
		}},
		{"lognormal", func(r *rand.Rand) float64 { return math.Exp(30 * r.NormFloat64()) }},
		{"exponential", func(r *rand.Rand) float64 { return r.ExpFloat64() }},
		{"uniform", func(r *rand.Rand) float64 { return r.Float64() }},
		{"near 1", func(r *rand.Rand) float64 { return 1 + 1e-7*r.NormFloat64() }},
		{"near √2/2", func(r *rand.Rand) float64 {
			return math.Ldexp(math.Sqrt2/2*(1+0x1p-50*r.NormFloat64()), r.IntN(200)-100)
		}},
		{"exp range", func(r *rand.Rand) float64 { return 1400*r.Float64() - 700 }},
		{"exp edges", func(r *rand.Rand) float64 { return math.Copysign(700-1e-3*r.Float64(), r.Float64()-0.5) }},
		{"normal·20", func(r *rand.Rand) float64 { return 20 * r.NormFloat64() }},
		{"tiny", func(r *rand.Rand) float64 { return math.Ldexp(r.Float64()-0.5, -r.IntN(1000)) }},
		{"halfway k", func(r *rand.Rand) float64 {
			return (float64(r.IntN(2000)-1000) + 0.5) * math.Ln2 * (1 + 0x1p-52*float64(r.IntN(9)-4))
		}},
		{"weibull exponents", func(r *rand.Rand) float64 { return (r.Float64() - 0.5) * math.Log(r.ExpFloat64()) }},
		{"random bits", func(r *rand.Rand) float64 { return math.Float64frombits(r.Uint64()) }},
	}
	eachLibKernel(t, func(t *testing.T) {
		xs := make([]float64, perGenerator)
		for gi, g := range gens {
			r := rand.New(rand.NewPCG(uint64(gi), 31))
			for i := range xs {
				xs[i] = g.gen(r)
			}
			t.Run(g.name, func(t *testing.T) { checkLibBatch(t, xs) })
		}
	})
}

// TestLibLogsExpsLanes puts each special and edge value in every lane
// position of slices of every length from 0 to two vectors of 8 and 3
// more, among ordinary values, and checks that nothing past len(x) is
// written.
func TestLibLogsExpsLanes(t *testing.T) {
	specials := append(append([]float64(nil), libLogInputs...), libExpInputs...)
	eachLibKernel(t, func(t *testing.T) {
		r := rand.New(rand.NewPCG(3, 4))
		for n := 0; n <= 2*8+3; n++ {
			base := make([]float64, n)
			for i := range base {
				base[i] = r.ExpFloat64() * 3
			}
			checkLibBatch(t, base)
			for _, s := range specials {
				for pos := range n {
					xs := append([]float64(nil), base...)
					xs[pos] = s
					checkLibBatch(t, xs)
				}
			}
			// Nothing beyond len(x) is written.
			for _, batch := range []func(dst, x []float64){libLogs, libExps} {
				dst := make([]float64, n+9)
				for i := range dst {
					dst[i] = -7
				}
				batch(dst, base)
				for i := n; i < len(dst); i++ {
					if dst[i] != -7 {
						t.Fatalf("length %d: dst[%d] was written (%v)", n, i, dst[i])
					}
				}
			}
		}
	})
}

// BenchmarkLibLogsExps times libLogs and libExps per value (cpu-ns/op is
// per value) on n = 256 values like the bootstrap's: logs of exponential
// variates, exps of a fraction of them; against the scalar loops.
func BenchmarkLibLogsExps(b *testing.B) {
	const n = 256
	r := rand.New(rand.NewPCG(1, 2))
	logIn, expIn, dst := make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range logIn {
		logIn[i] = r.ExpFloat64()
		expIn[i] = 0.3 * math.Log(logIn[i])
	}
	run := func(name string, f func()) {
		b.Run(name, func(b *testing.B) {
			cpu := processCPUNanos()
			for b.Loop() {
				f()
			}
			b.StopTimer()
			if cpu >= 0 {
				b.ReportMetric(float64(processCPUNanos()-cpu)/float64(b.N)/n, "cpu-ns/value")
			}
		})
	}
	run("log/scalar", func() {
		for i, x := range logIn {
			dst[i] = libLog(x)
		}
	})
	run("exp/scalar", func() {
		for i, x := range expIn {
			dst[i] = libExp(x)
		}
	})
	for _, k := range availableLibKernels() {
		restore := useLibKernel(k)
		run("log/"+k.String(), func() { libLogs(dst, logIn) })
		run("exp/"+k.String(), func() { libExps(dst, expIn) })
		restore()
	}
}
