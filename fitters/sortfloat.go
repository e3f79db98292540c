package fitters

import (
	"math"
	"math/bits"
	"slices"
)

// FloatSorter sorts float64 values in ascending order by radix sorting
// their bits (Knuth, 1998, TAOCP vol. 3, §5.2.5) in O(n) time for data of
// any reasonable spread, instead of the O(n log n) comparisons of
// slices.Sort, and keeps its scratch buffers between calls, so that a
// bootstrap worker sorting one replicate after another allocates nothing
// once warm. A FloatSorter is not safe for concurrent use; give each
// goroutine its own. The zero value is ready.
//
// Each value is mapped to a 64-bit key whose unsigned order is the order of
// the values (Herf, 2001): a non-negative x keeps its bits with the sign bit
// set, a negative x has every bit flipped. Then −Inf < negative normals <
// negative subnormals < +0 < positive subnormals < normals < +Inf, as for <.
// The values themselves are moved, the key recomputed from them where
// needed, so no inverse mapping is needed and bits are never altered.
//
// Up to msdMaxLen values, one most-significant-digit pass deals the values
// into about 2n buckets that split the range of their keys evenly, and
// insertion sort finishes each bucket (slices.Sort a bucket of more than
// insertionMax values, so that clumped data cost at worst O(n log n)).
// Beyond, least-significant-digit passes on each byte of the key, skipping
// a byte that every key shares.
//
// The result is bit for bit that of slices.Sort on every input: equal keys
// are equal bits, so the order among ties cannot show. The two exceptions,
// where slices.Sort's order among values that compare equal (or unordered)
// is visible, are left to slices.Sort itself: an input holding a NaN (which
// slices.Sort puts first) or a −0 (equal to +0 under <, so its place among
// the zeros is pdqsort's choice) is detected in the first pass over the
// values and sorted by slices.Sort. Inputs shorter than radixMinLen go to
// slices.Sort too (its insertion sort is as fast there).
type FloatSorter struct {
	tmp    []float64
	count  [8][256]int32 // one histogram per byte of the key (LSD)
	bucket []int32       // bucket counts, then ends (MSD)
}

// msdMaxLen is the length up to which SortInto takes one MSD bucket pass
// and insertion sort instead of the LSD passes: at n = 1000 the LSD passes
// took 4× as long (every byte of the key is a pass, and a byte shared by
// many keys makes each pass a chain of increments of one counter); at
// n = 1e5 the two were even, 2–3 ms against slices.Sort's 20–27 ms.
const msdMaxLen = 1 << 17

// insertionMax is the bucket size above which a bucket goes to slices.Sort.
const insertionMax = 24

// radixMinLen is the length below which slices.Sort is faster
// (BenchmarkSortFloat64s).
const radixMinLen = 64

// floatKey is x's bits mapped so that unsigned order is numeric order.
func floatKey(x float64) uint64 {
	b := math.Float64bits(x)
	return b ^ (uint64(int64(b)>>63) | 1<<63)
}

// Sort sorts x in ascending order, in place, exactly as slices.Sort would.
func (s *FloatSorter) Sort(x []float64) { s.SortInto(x, x) }

// SortInto writes the values of src in ascending order into dst, leaving
// src unchanged (unless dst is src). dst must have src's length and must be
// either src itself or a slice that does not overlap it.
func (s *FloatSorter) SortInto(dst, src []float64) {
	n := len(src)
	if len(dst) != n {
		panic("fitters: SortInto needs len(dst) == len(src)")
	}
	if n < radixMinLen || n > math.MaxInt32 {
		copyUnlessSame(dst, src)
		slices.Sort(dst)
		return
	}
	if n <= msdMaxLen {
		s.msdSort(dst, src)
		return
	}
	h := &s.count
	*h = [8][256]int32{}

	// Counting pass: the histogram of every byte at once, and the check
	// for NaN and −0 (their order is slices.Sort's own business).
	const negZero = 1 << 63
	special := false
	for _, v := range src {
		b := math.Float64bits(v)
		if v != v || b == negZero {
			special = true
		}
		k := b ^ (uint64(int64(b)>>63) | 1<<63)
		h[0][byte(k)]++
		h[1][byte(k>>8)]++
		h[2][byte(k>>16)]++
		h[3][byte(k>>24)]++
		h[4][byte(k>>32)]++
		h[5][byte(k>>40)]++
		h[6][byte(k>>48)]++
		h[7][byte(k>>56)]++
	}
	if special {
		copyUnlessSame(dst, src)
		slices.Sort(dst)
		return
	}

	// A byte that every key shares moves nothing: skip its pass.
	k0 := floatKey(src[0])
	var active [8]uint
	passes := 0
	for d := uint(0); d < 8; d++ {
		if h[d][byte(k0>>(8*d))] != int32(n) {
			active[passes] = d
			passes++
		}
	}
	if passes == 0 { // all values equal
		copyUnlessSame(dst, src)
		return
	}
	if cap(s.tmp) < n {
		s.tmp = make([]float64, n)
	}
	tmp := s.tmp[:n]

	// The passes alternate between dst and tmp and end in dst.
	in, out, next := src, tmp, dst
	if passes%2 == 1 {
		out, next = dst, tmp
		if &src[0] == &dst[0] {
			copy(tmp, src)
			in = tmp
		}
	}
	for _, d := range active[:passes] {
		shift := 8 * d
		c := &h[d]
		var sum int32
		for i, m := range c { // exclusive prefix sums: each bucket's first slot
			c[i] = sum
			sum += m
		}
		for _, v := range in {
			b := math.Float64bits(v)
			j := byte((b ^ (uint64(int64(b)>>63) | 1<<63)) >> shift)
			out[c[j]] = v
			c[j]++
		}
		in, out, next = out, next, out
	}
}

// copyUnlessSame copies src into dst unless they are the same slice.
func copyUnlessSame(dst, src []float64) {
	if len(src) > 0 && &dst[0] != &src[0] {
		copy(dst, src)
	}
}

// SortFloat64s sorts x in ascending order with a FloatSorter of its own: the
// same result as slices.Sort(x), in O(n) time, with 8n bytes of scratch
// held during the call.
func SortFloat64s(x []float64) {
	var s FloatSorter
	s.Sort(x)
}

// msdSort sorts by one bucket pass on the key's leading bits (below the
// bits that every key shares) and then insertion sort within each bucket,
// or slices.Sort for a bucket of more than insertionMax values. Buckets
// are equal slices of the key range: as the key is the exponent followed
// by the mantissa, each holds a slice of a binade, and positive data of
// any spread fall into many small ones.
func (s *FloatSorter) msdSort(dst, src []float64) {
	n := len(src)
	const negZero = 1 << 63
	kmin, kmax := ^uint64(0), uint64(0)
	special := false
	for _, v := range src {
		b := math.Float64bits(v)
		if v != v || b == negZero {
			special = true
		}
		k := b ^ (uint64(int64(b)>>63) | 1<<63)
		kmin = min(kmin, k)
		kmax = max(kmax, k)
	}
	if special {
		copyUnlessSame(dst, src)
		slices.Sort(dst)
		return
	}
	if kmin == kmax {
		copyUnlessSame(dst, src)
		return
	}
	nb := uint(bits.Len(uint(n))) + 1 // about two buckets per value
	nb = min(max(nb, 8), 16)
	shift := uint(0)
	if l := uint(bits.Len64(kmax - kmin)); l > nb {
		shift = l - nb
	}
	nbuckets := int((kmax-kmin)>>shift) + 1
	if cap(s.bucket) < nbuckets+1 {
		s.bucket = make([]int32, 1<<nb+1)
	}
	c := s.bucket[:nbuckets+1]
	clear(c)
	for _, v := range src {
		b := math.Float64bits(v)
		c[((b^(uint64(int64(b)>>63)|1<<63))-kmin)>>shift+1]++
	}
	for i := 1; i < len(c); i++ { // c[j] = first slot of bucket j
		c[i] += c[i-1]
	}
	in := src
	if &src[0] == &dst[0] {
		if cap(s.tmp) < n {
			s.tmp = make([]float64, n)
		}
		in = s.tmp[:n]
		copy(in, src)
	}
	for _, v := range in {
		b := math.Float64bits(v)
		j := ((b ^ (uint64(int64(b)>>63) | 1<<63)) - kmin) >> shift
		dst[c[j]] = v
		c[j]++
	}
	// Now c[j] is the end of bucket j (and the start of bucket j+1).
	if shift == 0 {
		return // each bucket holds one key: already in order
	}
	start := int32(0)
	for _, end := range c[:nbuckets] {
		switch m := end - start; {
		case m > insertionMax:
			slices.Sort(dst[start:end])
		case m > 1:
			insertionSort(dst[start:end])
		}
		start = end
	}
}

// insertionSort sorts a short x with no NaN and no −0 in ascending order.
func insertionSort(x []float64) {
	for i := 1; i < len(x); i++ {
		v := x[i]
		j := i
		for ; j > 0 && v < x[j-1]; j-- {
			x[j] = x[j-1]
		}
		x[j] = v
	}
}
