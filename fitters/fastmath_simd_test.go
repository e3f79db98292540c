package fitters

import (
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"regexp"
	"strconv"
	"testing"
)

// The batch functions fastLogs and fastExps run vector kernels
// (fastmath_amd64.s) where the processor has them; these tests hold every
// kernel set this processor can run (availableKernels: AVX-512, AVX2 and
// the pure-Go loops on amd64, the pure-Go loops elsewhere or with the
// purego tag) to the bits of the scalar fastLog and fastExp.

// sameFloatBits reports whether a and b are the same float64, any NaN
// matching any NaN (the scalar functions return their NaN argument or
// math.NaN()).
func sameFloatBits(a, b float64) bool {
	return math.Float64bits(a) == math.Float64bits(b) || (a != a && b != b)
}

// eachKernel runs f once under every kernel set this processor can run.
func eachKernel(t *testing.T, f func(t *testing.T)) {
	for _, k := range availableKernels() {
		t.Run(k.String(), func(t *testing.T) {
			defer useKernel(k)()
			f(t)
		})
	}
}

// simdSweep is the number of random inputs per generator and kernel:
// 50,000 by default, 2,000,000 with FITSEAL_LONG=1.
func simdSweep() int {
	if os.Getenv("FITSEAL_LONG") == "1" {
		return 2000000
	}
	return 50000
}

// logSpecials are the inputs fastLog treats apart (zero, subnormal,
// negative, infinite, NaN) and the normal numbers at their edges.
var logSpecials = []float64{
	0, math.Copysign(0, -1), 5e-324, -5e-324, 0x1p-1022 - 5e-324, 0x1p-1022, -0x1p-1022,
	math.Nextafter(0x1p-1022, 1), 1e-310, -1, -2.5, math.Inf(1), math.Inf(-1), math.NaN(),
	math.Float64frombits(0x7ff0000000000001), math.Float64frombits(0xfff8000000000001),
	math.MaxFloat64, -math.MaxFloat64, 1, math.Nextafter(1, 0), math.Nextafter(1, 2),
	0.6875, math.Nextafter(0.6875, 0), 1.375, math.Nextafter(1.375, 0), 2, 0.5,
}

// expSpecials are the inputs fastExp treats apart (|x| ≥ 702, infinite,
// NaN) and the values near its thresholds and near zero.
var expSpecials = []float64{
	0, math.Copysign(0, -1), 5e-324, -5e-324, 0x1p-1022, 702, -702, math.Nextafter(702, 0),
	math.Nextafter(-702, 0), 708, -708, 708.4, -708.4, 709.78271289338397, 709.782712893384,
	-745.13321910194111, -745.1332191019412, 745, -745, 746, -746, 1e300, -1e300,
	math.MaxFloat64, -math.MaxFloat64, math.Inf(1), math.Inf(-1), math.NaN(),
	math.Float64frombits(0x7ff0000000000001), math.Float64frombits(0xfff8000000000001),
	0x1p-60, -0x1p-60, 1, -1, ln2NHi * 64, -ln2NHi * 64,
}

// checkLogs compares fastLogs over x (into a fresh buffer and in place)
// and logsInto (the logs without the sum) with fastLog value by value and
// with the in-order sum of fastLog.
func checkLogs(t *testing.T, x []float64) {
	t.Helper()
	dst := make([]float64, len(x))
	sum := fastLogs(dst, x)
	only := make([]float64, len(x))
	logsInto(only, x)
	var want float64
	for i, v := range x {
		y := fastLog(v)
		if !sameFloatBits(dst[i], y) {
			t.Fatalf("fastLogs[%d] = %v (%#016x), fastLog(%v) = %v (%#016x)", i, dst[i], math.Float64bits(dst[i]), v, y, math.Float64bits(y))
		}
		if !sameFloatBits(only[i], y) {
			t.Fatalf("logsInto[%d] = %v, fastLog(%v) = %v", i, only[i], v, y)
		}
		want += y
	}
	if !sameFloatBits(sum, want) {
		t.Fatalf("fastLogs sum %v, in-order sum of fastLog %v (n = %d)", sum, want, len(x))
	}
	in := append([]float64(nil), x...)
	if s := fastLogs(in, in); !sameFloatBits(s, want) {
		t.Fatalf("in-place fastLogs sum %v, want %v", s, want)
	}
	for i := range in {
		if !sameFloatBits(in[i], dst[i]) {
			t.Fatalf("in-place fastLogs[%d] = %v, want %v", i, in[i], dst[i])
		}
	}
}

// checkExps compares fastExps over x (into a fresh buffer and in place)
// with fastExp value by value.
func checkExps(t *testing.T, x []float64) {
	t.Helper()
	dst := make([]float64, len(x))
	fastExps(dst, x)
	for i, v := range x {
		if y := fastExp(v); !sameFloatBits(dst[i], y) {
			t.Fatalf("fastExps[%d] = %v (%#016x), fastExp(%v) = %v (%#016x)", i, dst[i], math.Float64bits(dst[i]), v, y, math.Float64bits(y))
		}
	}
	in := append([]float64(nil), x...)
	fastExps(in, in)
	for i := range in {
		if !sameFloatBits(in[i], dst[i]) {
			t.Fatalf("in-place fastExps[%d] = %v, want %v", i, in[i], dst[i])
		}
	}
}

// checkLog1ps compares fastLog1ps over u (into a fresh buffer and in
// place) with fastLog1p value by value.
func checkLog1ps(t *testing.T, u []float64) {
	t.Helper()
	dst := make([]float64, len(u))
	fastLog1ps(dst, u)
	for i, v := range u {
		if y := fastLog1p(v); !sameFloatBits(dst[i], y) {
			t.Fatalf("fastLog1ps[%d] = %v (%#016x), fastLog1p(%v) = %v (%#016x)", i, dst[i], math.Float64bits(dst[i]), v, y, math.Float64bits(y))
		}
	}
	in := append([]float64(nil), u...)
	fastLog1ps(in, in)
	for i := range in {
		if !sameFloatBits(in[i], dst[i]) {
			t.Fatalf("in-place fastLog1ps[%d] = %v, want %v", i, in[i], dst[i])
		}
	}
}

// log1pSpecials are the inputs fastLog1p treats apart (|u| < 2⁻⁵⁴,
// |u| ≥ 2⁵³, u ≤ −1, NaN) and the values at the edges of its branches.
var log1pSpecials = []float64{
	0, math.Copysign(0, -1), 5e-324, -5e-324, 0x1p-54, -0x1p-54, math.Nextafter(0x1p-54, 0),
	math.Nextafter(-0x1p-54, 0), 0x1p53, -0x1p53, math.Nextafter(0x1p53, 0), math.Nextafter(-0x1p53, 0),
	-1, math.Nextafter(-1, 0), math.Nextafter(-1, -2), -2, math.Inf(1), math.Inf(-1), math.NaN(),
	math.Float64frombits(0x7ff0000000000001), math.MaxFloat64, -math.MaxFloat64,
	-0x1p-9, math.Nextafter(-0x1p-9, 0), math.Nextafter(-0x1p-9, -1), 0x1p-8, math.Nextafter(0x1p-8, 0),
	math.Nextafter(0x1p-8, 1), 1, -0.5, 0.5, -0.3125, 0.375,
}

// log1pRangeInputs are ±2^e·(1 + f) with e uniform over the range where
// fastLog1p computes (2⁻⁵⁴ ≤ |u| < 2⁵³), those at or below −1 replaced
// by values just above −1.
func log1pRangeInputs(r *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		v := math.Ldexp(1+r.Float64(), 52-r.IntN(107))
		if r.IntN(2) == 0 {
			v = -v
		}
		if v <= -1 {
			v = -1 + math.Ldexp(r.Float64(), -r.IntN(53))
		}
		x[i] = v
	}
	return x
}

// TestFastLog1psKernelsBits: fastLog1ps under every kernel set gives
// fastLog1p's bits on random bit patterns, values over its whole range,
// log1pTestInputs (near −1, near powers of two, both branches), values
// near 1 and at the log table's boundaries minus 1, each also with
// specials sprinkled in, and every special in every position for the
// lengths 0..67.
func TestFastLog1psKernelsBits(t *testing.T) {
	n := simdSweep()
	eachKernel(t, func(t *testing.T) {
		r := rand.New(rand.NewPCG(27, 1))
		shift := func(x []float64) []float64 {
			for i := range x {
				x[i]--
			}
			return x
		}
		for _, u := range [][]float64{
			randomBits(r, n), log1pRangeInputs(r, n), log1pTestInputs(28, n),
			shift(nearOneInputs(r, n)), shift(logBoundaryInputs(r, n)), shift(logTestInputs(29, n)),
			sprinkle(r, log1pRangeInputs(r, n), log1pSpecials),
			sprinkle(r, log1pTestInputs(30, n), log1pSpecials),
		} {
			checkLog1ps(t, u)
		}
		for m := 0; m <= 67; m++ {
			checkLog1ps(t, log1pRangeInputs(r, m))
		}
		for m := 1; m <= 67; m += 11 {
			for pos := 0; pos < m; pos++ {
				for _, s := range log1pSpecials {
					u := log1pTestInputs(uint64(31+pos), m)
					u[pos] = s
					checkLog1ps(t, u)
				}
			}
		}
	})
}

// randomBits are n uniformly random bit patterns: every sign, exponent
// (NaN and Inf included, about one in 2048) and significand.
func randomBits(r *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = math.Float64frombits(r.Uint64())
	}
	return x
}

// logBoundaryInputs are values within ±4 ulp of each of the 256 table
// boundaries of fastLog's reduction, z = bits(0.6875) + m·2⁴⁴, in random
// binades from 2⁻¹⁰²⁰ to 2¹⁰²², and of the binade edges.
func logBoundaryInputs(r *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		m := uint64(r.IntN(257))
		e := int64(r.IntN(2043)) - 1021
		bits := int64(logOff+m<<44) + int64(r.IntN(9)) - 4 + e<<52
		if bits < 0x0010000000000000 || bits >= 0x7ff0000000000000 {
			bits = int64(logOff + m<<44)
		}
		x[i] = math.Float64frombits(uint64(bits))
	}
	return x
}

// nearOneInputs are 1 ± d with d from 2⁻⁵² to 2⁻⁴ on a log scale, where
// ln c = 0 and the result comes from r + r²P(r) alone.
func nearOneInputs(r *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		d := math.Ldexp(1+r.Float64(), -4-r.IntN(49))
		if r.IntN(2) == 0 {
			d = -d
		}
		x[i] = 1 + d
	}
	return x
}

// wholeRangeLogInputs are positive values with a uniform exponent over the
// normal and subnormal range (about one in 2048 subnormal).
func wholeRangeLogInputs(r *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = math.Float64frombits(r.Uint64N(0x7ff0000000000000))
	}
	return x
}

// expEdgeInputs are values within 2⁻²⁰ relative of ±702, ±708.4, ±709.78
// and −745.13 (the thresholds of fastExp's special path and of overflow,
// subnormal results and underflow), and at rounding boundaries of k,
// x ≈ (k + ½)·ln2/128 ± 2 ulp over the whole range.
func expEdgeInputs(r *rand.Rand, n int) []float64 {
	edges := []float64{702, 708.3964185322641, 709.782712893384, 745.1332191019411}
	x := make([]float64, n)
	for i := range x {
		if i%2 == 0 {
			v := edges[r.IntN(len(edges))] * (1 + math.Ldexp(2*r.Float64()-1, -20))
			if r.IntN(2) == 0 {
				v = -v
			}
			x[i] = v
			continue
		}
		k := float64(r.IntN(2*95500) - 95500)
		v := float64((k + 0.5) * ln2NHi)
		x[i] = math.Float64frombits(math.Float64bits(v) + uint64(r.IntN(5)) - 2)
	}
	return x
}

// uniformExpInputs are uniform in [−760, 760]: every result class.
func uniformExpInputs(r *rand.Rand, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = -760 + 1520*r.Float64()
	}
	return x
}

// sprinkle puts specials into x at random places (about one value in
// every 64), so that some vectors hold one or two and most hold none.
func sprinkle(r *rand.Rand, x, specials []float64) []float64 {
	for i := range x {
		if r.IntN(64) == 0 {
			x[i] = specials[r.IntN(len(specials))]
		}
	}
	return x
}

// TestFastLogsKernelsBits: fastLogs under every kernel set gives fastLog's
// bits and the in-order sum's bits on random bit patterns, values over the
// whole range, near 1, at table boundaries and data-like values
// (logTestInputs), each also with specials sprinkled in; simdSweep inputs
// per generator.
func TestFastLogsKernelsBits(t *testing.T) {
	n := simdSweep()
	eachKernel(t, func(t *testing.T) {
		r := rand.New(rand.NewPCG(21, 1))
		for _, x := range [][]float64{
			randomBits(r, n), wholeRangeLogInputs(r, n), nearOneInputs(r, n),
			logBoundaryInputs(r, n), logTestInputs(22, n),
			sprinkle(r, wholeRangeLogInputs(r, n), logSpecials),
			sprinkle(r, nearOneInputs(r, n), logSpecials),
		} {
			// Blocks of a few hundred values keep the sums finite and
			// comparable, and run the block loop of fastLogs.
			for len(x) > 0 {
				m := min(len(x), 1000+r.IntN(200))
				checkLogs(t, x[:m])
				x = x[m:]
			}
		}
	})
}

// TestFastExpsKernelsBits: fastExps under every kernel set gives fastExp's
// bits on random bit patterns, uniform values over every result class,
// values at the thresholds and at rounding boundaries of k, and
// expTestInputs, each also with specials sprinkled in.
func TestFastExpsKernelsBits(t *testing.T) {
	n := simdSweep()
	eachKernel(t, func(t *testing.T) {
		r := rand.New(rand.NewPCG(23, 1))
		for _, x := range [][]float64{
			randomBits(r, n), uniformExpInputs(r, n), expEdgeInputs(r, n), expTestInputs(24, n),
			sprinkle(r, uniformExpInputs(r, n), expSpecials),
			sprinkle(r, expTestInputs(25, n), expSpecials),
		} {
			checkExps(t, x)
		}
	})
}

// TestFastmathKernelsSpecialsEverywhere: each special value in each
// position of a vector (and of the tail), alone among ordinary values and
// all together, for every slice length 0..67 and start offset 0..8 in the
// backing array (so that no alignment is assumed).
func TestFastmathKernelsSpecialsEverywhere(t *testing.T) {
	eachKernel(t, func(t *testing.T) {
		r := rand.New(rand.NewPCG(26, 1))
		backing := make([]float64, 80)
		for n := 0; n <= 67; n++ {
			for off := 0; off <= 8; off++ {
				x := backing[off : off+n]
				for i := range x {
					x[i] = math.Ldexp(0.5+r.Float64(), r.IntN(40)-20)
				}
				checkLogs(t, x)
				checkExps(t, x)
			}
		}
		for n := 1; n <= 67; n += 11 {
			for pos := 0; pos < n; pos++ {
				for _, s := range logSpecials {
					x := nearOneInputs(r, n)
					x[pos] = s
					checkLogs(t, x)
				}
				for _, s := range expSpecials {
					x := uniformExpInputs(r, n)
					for i := range x {
						x[i] /= 2
					}
					x[pos] = s
					checkExps(t, x)
				}
			}
		}
		checkLogs(t, append([]float64(nil), logSpecials...))
		checkExps(t, append([]float64(nil), expSpecials...))
	})
}

// floatsOf reads data as little-endian float64s (a trailing partial value
// dropped).
func floatsOf(data []byte) []float64 {
	x := make([]float64, len(data)/8)
	for i := range x {
		x[i] = math.Float64frombits(binary.LittleEndian.Uint64(data[8*i:]))
	}
	return x
}

// bytesOf is the inverse of floatsOf, for the fuzz seeds.
func bytesOf(x []float64) []byte {
	b := make([]byte, 8*len(x))
	for i, v := range x {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
	}
	return b
}

// fuzzSeeds are the edge values in groups of nine (one more than a vector)
// and whole.
func fuzzSeeds(f *testing.F, specials []float64) {
	f.Add(bytesOf(specials))
	for i := 0; i+9 <= len(specials); i += 9 {
		f.Add(bytesOf(specials[i : i+9]))
	}
	f.Add(bytesOf([]float64{1, 2, 3, 4, 5, 6, 7, 8}))
	f.Add([]byte{})
}

// FuzzFastLogsBits: fastLogs of any slice has fastLog's bits and the
// in-order sum under every kernel set.
func FuzzFastLogsBits(f *testing.F) {
	fuzzSeeds(f, logSpecials)
	f.Fuzz(func(t *testing.T, data []byte) {
		x := floatsOf(data)
		eachKernel(t, func(t *testing.T) { checkLogs(t, x) })
	})
}

// FuzzFastLog1psBits: fastLog1ps of any slice has fastLog1p's bits under
// every kernel set.
func FuzzFastLog1psBits(f *testing.F) {
	fuzzSeeds(f, log1pSpecials)
	f.Fuzz(func(t *testing.T, data []byte) {
		u := floatsOf(data)
		eachKernel(t, func(t *testing.T) { checkLog1ps(t, u) })
	})
}

// FuzzFastExpsBits: fastExps of any slice has fastExp's bits under every
// kernel set.
func FuzzFastExpsBits(f *testing.F) {
	fuzzSeeds(f, expSpecials)
	f.Fuzz(func(t *testing.T, data []byte) {
		x := floatsOf(data)
		eachKernel(t, func(t *testing.T) { checkExps(t, x) })
	})
}

// TestFastmathAsmConstants: each constant the assembly kernels spell out
// in hex (fastmath_amd64.s) has the bits of the Go constant it copies.
func TestFastmathAsmConstants(t *testing.T) {
	src, err := os.ReadFile("fastmath_amd64.s")
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]uint64{
		"lgMinNorm": 0x0010000000000000, "lgSpan": 0x7ff0000000000000 - 0x0010000000000000,
		"lgSpanFlip": (0x7ff0000000000000 - 0x0010000000000000 - 1) ^ 1<<63, "lgSign": 1 << 63,
		"lgOff": logOff, "lgExpMask": 0xfff << 52, "lgLow9": ^uint64(0x1ff),
		"lgKBias": 1 << 62, "lgMagic": math.Float64bits(0x1p52), "lgMagicK": math.Float64bits(0x1p52 + 1024),
		"lgOne": math.Float64bits(1), "lgLn2Hi": math.Float64bits(ln2Hi), "lgLn2Lo": math.Float64bits(ln2Lo),
		"lgP0": math.Float64bits(logP0), "lgP1": math.Float64bits(logP1), "lgP2": math.Float64bits(logP2),
		"lgP3": math.Float64bits(logP3), "lgP4": math.Float64bits(logP4),
		"exAbs": 1<<63 - 1, "exBound": 0x4085f00000000000, "exBoundM1": 0x4085f00000000000 - 1,
		"exInvLn2N": math.Float64bits(invLn2N), "exShift": math.Float64bits(expShift),
		"exLn2NHi": math.Float64bits(ln2NHi), "exLn2NLo": math.Float64bits(ln2NLo),
		"exC2": math.Float64bits(expC2), "exC3": math.Float64bits(expC3), "exC4": math.Float64bits(expC4),
		"exC5": math.Float64bits(expC5), "ex127": 127, "exNot127": ^uint64(127),
		"l1Tiny": math.Float64bits(0x1p-54), "l1Span": math.Float64bits(0x1p53) - math.Float64bits(0x1p-54),
		"l1SpanFlip": (math.Float64bits(0x1p53) - math.Float64bits(0x1p-54) - 1) ^ 1<<63,
		"l1NegOne":   math.Float64bits(-1), "l1NegOneFlip": (math.Float64bits(-1) - 1) ^ 1<<63,
		"l1PolyLo": math.Float64bits(-0x1p-9), "l1PolyHi": math.Float64bits(0x1p-8),
		"l1RowMask": 255 << 5, "l1Bias1023": 1023, "l1Bias2047": 2047,
	}
	if math.Float64frombits(want["exBound"]) != 702 {
		t.Fatalf("exBound is not 702")
	}
	got := map[string]uint64{}
	for _, m := range regexp.MustCompile(`(?m)^CONST4\((\w+), \$0x([0-9a-f]{16})\)`).FindAllStringSubmatch(string(src), -1) {
		v, err := strconv.ParseUint(m[2], 16, 64)
		if err != nil {
			t.Fatal(err)
		}
		got[m[1]] = v
	}
	if len(got) != len(want) {
		t.Errorf("%d constants in fastmath_amd64.s, %d expected", len(got), len(want))
	}
	for name, w := range want {
		if g, ok := got[name]; !ok || g != w {
			t.Errorf("%s = %#016x in fastmath_amd64.s, want %#016x", name, g, w)
		}
	}
}
