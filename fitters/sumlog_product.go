package fitters

import "math"

// logSum is Σ ln xᵢ written as exp·ln 2 + frac: exp is an exact integer
// (binary exponents moved out of a running product) and frac the
// logarithm of what is left, so that a caller can cancel exp against
// n times another exponent exactly (gammaFast's s = ln x̄ − mean ln x).
type logSum struct {
	exp  int
	frac float64
}

// value returns Σ ln xᵢ as one number.
func (l logSum) value() float64 { return float64(l.exp)*math.Ln2 + l.frac }

// positiveSums are the sums that the complete-data closed forms of gamma
// and invgauss need, from one pass over the data (positiveScan).
type positiveSums struct {
	sum   float64 // Σ x
	log   logSum  // Σ ln x
	recip float64 // Σ 1/x (positiveScanRecip only)
}

const (
	// positiveExpLo is the biased binary exponent of 2⁻⁶⁴: positiveScan
	// takes values in [2⁻⁶⁴, 2⁶⁴), whose biased exponents e satisfy
	// e − positiveExpLo < 128 as unsigned integers (sign bit clear too).
	positiveExpLo = 1023 - 64
	// positiveBlock is how many values enter the four running products
	// between two renormalisations: each product in [1, 2) takes three
	// quads (x₁x₂)(x₃x₄) ∈ [2⁻²⁵⁶, 2²⁵⁶] and stays in [2⁻⁷⁶⁸, 2⁷⁶⁹],
	// inside the normal range.
	positiveBlock = 48
)

// positiveScan returns Σ x and Σ ln x of x in one pass, with ok = false
// (and the sums meaningless) unless every value lies in [2⁻⁶⁴, 2⁶⁴) — so
// every value is positive and finite — and len(x) ≥ 1. The range test is
// integer arithmetic on the values' exponent bits, off the floating-point
// dependency chains.
//
// Σ ln x is the logarithm of the running product of the values, kept in
// four interleaved products whose binary exponents are moved into an
// integer every positiveBlock values (exact), instead of one logarithm per
// value. Each multiplication rounds by at most u = 2⁻⁵³ relative and there
// are at most n + 8 of them, so |error of Σ ln x| ≤ (n + 9)u absolute
// (the last u for the one logarithm): the same order as rounding each of n
// logarithms of values near 1, and better than summing math.Log values,
// whose partial sums round at their own magnitude.
//
// Σ x is summed in four partial sums within each block and the block sums
// are added with a compensating term (Knuth's TwoSum), so its relative
// error stays below 8u whatever n (all terms are positive).
//
// TestPositiveScanAccuracy checks both against math/big and mpmath
// references on data spanning the whole range, all equal, and n = 1…10⁶.
func positiveScan(x []float64) (ps positiveSums, ok bool) {
	if len(x) == 0 {
		return ps, false
	}
	var bad uint64
	var tot, totErr float64
	p0, p1, p2, p3 := 1.0, 1.0, 1.0, 1.0
	var exp int
	i := 0
	for ; i+positiveBlock <= len(x); i += positiveBlock {
		blk := x[i : i+positiveBlock : i+positiveBlock]
		var s0, s1, s2, s3 float64
		for j := 0; j+16 <= len(blk); j += 16 {
			v := blk[j : j+16 : j+16]
			a0, a1, a2, a3 := v[0], v[1], v[2], v[3]
			b0, b1, b2, b3 := v[4], v[5], v[6], v[7]
			c0, c1, c2, c3 := v[8], v[9], v[10], v[11]
			d0, d1, d2, d3 := v[12], v[13], v[14], v[15]
			bad |= expOutside(a0) | expOutside(a1) | expOutside(a2) | expOutside(a3) |
				expOutside(b0) | expOutside(b1) | expOutside(b2) | expOutside(b3) |
				expOutside(c0) | expOutside(c1) | expOutside(c2) | expOutside(c3) |
				expOutside(d0) | expOutside(d1) | expOutside(d2) | expOutside(d3)
			s0 += (a0 + a1) + (a2 + a3)
			s1 += (b0 + b1) + (b2 + b3)
			s2 += (c0 + c1) + (c2 + c3)
			s3 += (d0 + d1) + (d2 + d3)
			p0 *= (a0 * a1) * (a2 * a3)
			p1 *= (b0 * b1) * (b2 * b3)
			p2 *= (c0 * c1) * (c2 * c3)
			p3 *= (d0 * d1) * (d2 * d3)
		}
		tot, totErr = twoSumAdd(tot, totErr, (s0+s1)+(s2+s3))
		p0, exp = splitExponent(p0, exp)
		p1, exp = splitExponent(p1, exp)
		p2, exp = splitExponent(p2, exp)
		p3, exp = splitExponent(p3, exp)
	}
	tail, pt, bt := positiveTail(x[i:], &exp)
	bad |= bt
	tot, totErr = twoSumAdd(tot, totErr, tail)
	ps.sum = tot + totErr
	ps.log = logSum{exp: exp, frac: math.Log(((p0 * p1) * (p2 * p3)) * pt)}
	return ps, bad < 128
}

// positiveScanRecip is positiveScan with Σ 1/x as well, one division per
// four values: 1/a + 1/b + 1/c + 1/d = ((a+b)·cd + (c+d)·ab)/(ab·cd), whose
// products reuse the running product's (ab and cd). In range, ab·cd ∈
// [2⁻²⁵⁶, 2²⁵⁶], so nothing overflows or underflows; each group of four
// carries at most 8u relative error (eight roundings of positive
// quantities), and the groups are summed as Σ x is, so Σ 1/x is within
// 16u relative.
func positiveScanRecip(x []float64) (ps positiveSums, ok bool) {
	if len(x) == 0 {
		return ps, false
	}
	var bad uint64
	var tot, totErr, rtot, rtotErr float64
	p0, p1, p2, p3 := 1.0, 1.0, 1.0, 1.0
	var exp int
	i := 0
	for ; i+positiveBlock <= len(x); i += positiveBlock {
		blk := x[i : i+positiveBlock : i+positiveBlock]
		var s0, s1, s2, s3, r0, r1, r2, r3 float64
		for j := 0; j+16 <= len(blk); j += 16 {
			v := blk[j : j+16 : j+16]
			a0, a1, a2, a3 := v[0], v[1], v[2], v[3]
			b0, b1, b2, b3 := v[4], v[5], v[6], v[7]
			c0, c1, c2, c3 := v[8], v[9], v[10], v[11]
			d0, d1, d2, d3 := v[12], v[13], v[14], v[15]
			bad |= expOutside(a0) | expOutside(a1) | expOutside(a2) | expOutside(a3) |
				expOutside(b0) | expOutside(b1) | expOutside(b2) | expOutside(b3) |
				expOutside(c0) | expOutside(c1) | expOutside(c2) | expOutside(c3) |
				expOutside(d0) | expOutside(d1) | expOutside(d2) | expOutside(d3)
			aa, ab := a0+a1, a2+a3
			ba, bb := b0+b1, b2+b3
			ca, cb := c0+c1, c2+c3
			da, db := d0+d1, d2+d3
			s0 += aa + ab
			s1 += ba + bb
			s2 += ca + cb
			s3 += da + db
			am, an := a0*a1, a2*a3
			bm, bn := b0*b1, b2*b3
			cm, cn := c0*c1, c2*c3
			dm, dn := d0*d1, d2*d3
			ap, bp, cp, dp := am*an, bm*bn, cm*cn, dm*dn
			p0 *= ap
			p1 *= bp
			p2 *= cp
			p3 *= dp
			r0 += (aa*an + ab*am) / ap
			r1 += (ba*bn + bb*bm) / bp
			r2 += (ca*cn + cb*cm) / cp
			r3 += (da*dn + db*dm) / dp
		}
		tot, totErr = twoSumAdd(tot, totErr, (s0+s1)+(s2+s3))
		rtot, rtotErr = twoSumAdd(rtot, rtotErr, (r0+r1)+(r2+r3))
		p0, exp = splitExponent(p0, exp)
		p1, exp = splitExponent(p1, exp)
		p2, exp = splitExponent(p2, exp)
		p3, exp = splitExponent(p3, exp)
	}
	var rt float64
	for _, v := range x[i:] {
		rt += 1 / v
	}
	tail, pt, bt := positiveTail(x[i:], &exp)
	bad |= bt
	tot, totErr = twoSumAdd(tot, totErr, tail)
	rtot, rtotErr = twoSumAdd(rtot, rtotErr, rt)
	ps.sum = tot + totErr
	ps.recip = rtot + rtotErr
	ps.log = logSum{exp: exp, frac: math.Log(((p0 * p1) * (p2 * p3)) * pt)}
	return ps, bad < 128
}

// positiveTail is positiveScan's loop for the last values (fewer than a
// block): their sum, their product with its exponent moved into *exp (a
// value in [1, 2)), and the OR of their range tests. The product is
// renormalised every eighth factor: eight factors in range stay within
// 2^±512.
func positiveTail(x []float64, exp *int) (sum, prod float64, bad uint64) {
	prod = 1
	for i, v := range x {
		bad |= expOutside(v)
		sum += v
		prod *= v
		if i%8 == 7 {
			prod, *exp = splitExponent(prod, *exp)
		}
	}
	prod, *exp = splitExponent(prod, *exp)
	return sum, prod, bad
}

// expOutside is 0…127 when v ∈ [2⁻⁶⁴, 2⁶⁴) and at least 128 otherwise
// (negative numbers, zero, subnormals, infinities and NaN included): the
// biased exponent with the sign bit, less positiveExpLo, as an unsigned
// integer. ORed over the data, the result is < 128 exactly when every
// value is in range.
func expOutside(v float64) uint64 { return math.Float64bits(v)>>52 - positiveExpLo }

// splitExponent moves the binary exponent of a positive normal p into
// exp, returning the significand in [1, 2) (exact).
func splitExponent(p float64, exp int) (float64, int) {
	b := math.Float64bits(p)
	exp += int(b>>52&0x7ff) - 1023
	return math.Float64frombits(b&^(0x7ff<<52) | 1023<<52), exp
}

// twoSumAdd adds v to the compensated sum (s, e) (Knuth's TwoSum: s + v =
// s′ + the exact rounding error, which joins e).
func twoSumAdd(s, e, v float64) (float64, float64) {
	t := s + v
	w := t - s
	return t, e + ((s - (t - w)) + (v - w))
}
