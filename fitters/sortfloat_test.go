package fitters

import (
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// sameBits reports whether a and b hold the same float64 bit patterns.
func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// checkAgainstSlicesSort sorts x with Sort and SortInto and compares both,
// bit for bit, with slices.Sort (the reference: the radix sort must be a
// drop-in replacement for it).
func checkAgainstSlicesSort(t *testing.T, s *FloatSorter, x []float64) {
	t.Helper()
	want := slices.Clone(x)
	slices.Sort(want)

	src := slices.Clone(x)
	dst := make([]float64, len(x))
	s.SortInto(dst, src)
	if !sameBits(dst, want) {
		t.Fatalf("SortInto(%v) = %v, want %v", x, dst, want)
	}
	if !sameBits(src, x) {
		t.Fatalf("SortInto changed its source: %v, was %v", src, x)
	}
	inPlace := slices.Clone(x)
	s.Sort(inPlace)
	if !sameBits(inPlace, want) {
		t.Fatalf("Sort(%v) = %v, want %v", x, inPlace, want)
	}
}

// edgeValues are the values whose bit patterns the key mapping must order
// correctly: signed zeros, infinities, the subnormal and normal extremes.
var edgeValues = []float64{
	0, math.Copysign(0, -1), math.Inf(1), math.Inf(-1),
	math.SmallestNonzeroFloat64, -math.SmallestNonzeroFloat64,
	0x1p-1022, -0x1p-1022, 0x1p-1022 - 0x1p-1074, // smallest normal, largest subnormal
	math.MaxFloat64, -math.MaxFloat64, 1, -1, math.Nextafter(1, 2), math.Nextafter(-1, -2),
}

// TestFloatSorterMatchesSlicesSort compares the radix sort with slices.Sort
// on inputs of lengths on both sides of radixMinLen and of the change of
// digit width, drawn from several shapes of data.
func TestFloatSorterMatchesSlicesSort(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 1))
	gens := []struct {
		name string
		draw func() float64
	}{
		{"uniform01", r.Float64},
		{"normal", r.NormFloat64},
		{"lognormal wide", func() float64 { return math.Exp(40 * r.NormFloat64()) }},
		{"few distinct", func() float64 { return float64(r.IntN(5)) - 2 }},
		{"all bit patterns", func() float64 {
			for {
				if v := math.Float64frombits(r.Uint64()); !math.IsNaN(v) {
					return v
				}
			}
		}},
		{"edge values", func() float64 { return edgeValues[r.IntN(len(edgeValues))] }},
		{"positive edges and subnormals", func() float64 {
			if r.IntN(2) == 0 {
				return math.Float64frombits(r.Uint64N(1 << 52)) // subnormal or +0
			}
			return []float64{0, math.Inf(1), math.MaxFloat64, 1}[r.IntN(4)]
		}},
		{"clumped with outliers", func() float64 {
			switch r.IntN(100) {
			case 0:
				return 1e300
			case 1:
				return -1e-300
			}
			return 1 + 1e-12*r.Float64()
		}},
		{"with NaN", func() float64 {
			if r.IntN(50) == 0 {
				return math.NaN()
			}
			return r.NormFloat64()
		}},
	}
	var s FloatSorter // one sorter for every case: scratch reuse across sizes
	for _, g := range gens {
		for _, n := range []int{0, 1, 2, 10, radixMinLen - 1, radixMinLen, 100, 1000, 4095, 4096, 5000, 70000, msdMaxLen + 1} {
			x := make([]float64, n)
			for i := range x {
				x[i] = g.draw()
			}
			t.Run(fmt.Sprintf("%s/n=%d", g.name, n), func(t *testing.T) {
				checkAgainstSlicesSort(t, &s, x)
				sorted := slices.Clone(x)
				slices.Sort(sorted)
				checkAgainstSlicesSort(t, &s, sorted) // already in order
				slices.Reverse(sorted)
				checkAgainstSlicesSort(t, &s, sorted) // reversed
			})
		}
	}
}

// TestFloatSorterEveryPassCount sorts inputs that differ only in one byte
// of their keys, or in several, so that every number of active passes (odd
// and even, in place and into another slice) is taken.
func TestFloatSorterEveryPassCount(t *testing.T) {
	var s FloatSorter
	r := rand.New(rand.NewPCG(8, 2))
	for _, n := range []int{200, msdMaxLen + 1} { // the MSD and the LSD route
		for varying := 1; varying <= 8; varying++ {
			x := make([]float64, n)
			for i := range x {
				b := math.Float64bits(1.5) &^ (1<<(8*varying-1) - 1) // clear the low varying bytes (save the top bit)
				b |= r.Uint64() & (1<<(8*varying-1) - 1)
				if math.IsNaN(math.Float64frombits(b)) {
					b = 0
				}
				x[i] = math.Float64frombits(b)
			}
			checkAgainstSlicesSort(t, &s, x)
		}
		same := make([]float64, n)
		for i := range same {
			same[i] = 3.25
		}
		checkAgainstSlicesSort(t, &s, same) // no active pass
	}
}

// TestFloatSorterNoAllocation checks that a warm sorter allocates nothing.
func TestFloatSorterNoAllocation(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 3))
	x := make([]float64, 1000)
	dst := make([]float64, len(x))
	for i := range x {
		x[i] = r.ExpFloat64()
	}
	var s FloatSorter
	s.SortInto(dst, x)
	if a := testing.AllocsPerRun(20, func() { s.SortInto(dst, x) }); a != 0 {
		t.Errorf("a warm FloatSorter allocated %v times per sort, want 0", a)
	}
}

// FuzzSortFloat64s feeds arbitrary bit patterns (NaNs of every payload,
// signed zeros, subnormals included) to the radix sort and compares it
// with slices.Sort bit for bit.
func FuzzSortFloat64s(f *testing.F) {
	seed := make([]byte, 0, 8*len(edgeValues)*5)
	for rep := 0; rep < 5; rep++ {
		for _, v := range edgeValues {
			seed = binary.LittleEndian.AppendUint64(seed, math.Float64bits(v))
		}
	}
	f.Add(seed)
	f.Add(binary.LittleEndian.AppendUint64(slices.Clone(seed), math.Float64bits(math.NaN())))
	var s FloatSorter
	f.Fuzz(func(t *testing.T, b []byte) {
		x := make([]float64, len(b)/8)
		for i := range x {
			x[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
		}
		checkAgainstSlicesSort(t, &s, x)
		// The same values repeated past radixMinLen take the radix path.
		if len(x) > 0 && len(x) < radixMinLen {
			long := make([]float64, 0, 2*radixMinLen)
			for len(long) < 2*radixMinLen {
				long = append(long, x...)
			}
			checkAgainstSlicesSort(t, &s, long)
		}
	})
}

// BenchmarkSortFloat64s compares slices.Sort with the radix sort on
// exponential values (the shape of positive data that bootstrap replicates
// sort) at n = 100, 1000 and 1e5.
func BenchmarkSortFloat64s(b *testing.B) {
	for _, n := range []int{100, 1000, 100000} {
		r := rand.New(rand.NewPCG(8, 4))
		x := make([]float64, n)
		for i := range x {
			x[i] = 120 * r.ExpFloat64()
		}
		dst := make([]float64, n)
		b.Run(fmt.Sprintf("slices.Sort/n=%d", n), func(b *testing.B) {
			for b.Loop() {
				copy(dst, x)
				slices.Sort(dst)
			}
		})
		b.Run(fmt.Sprintf("radix/n=%d", n), func(b *testing.B) {
			var s FloatSorter
			for b.Loop() {
				s.SortInto(dst, x)
			}
		})
	}
}
