package fitters

import (
	"fmt"
	"math"
	"sort"
)

// newFit starts a Fit record for family f on data d, with every parameter
// free and the estimates unset (NaN). For up to four parameters the record
// and its Estimates and Fixed slices come from one allocation (fitBox); the
// parameter names are the family's shared slice (namesOf).
func newFit(f Family, d *Data) *Fit { return newFitIn(f, d, nil) }

// newFitOpt is newFit for the complete-data route of a family's Fit: when
// the caller gave a record through FitInto (opt.into) and d is complete, it
// starts that record instead of allocating one, so that a bootstrap refit
// allocates nothing. Only the complete-data routes call it, and none of
// them fits another family with opt, so one record is never filled twice
// by one fit.
func newFitOpt(f Family, d *Data, opt Options) *Fit {
	if opt.into != nil && d.IsComplete() {
		return newFitIn(f, d, &opt.into.box)
	}
	return newFit(f, d)
}

// newFitIn starts the record in b (a new one when b is nil or too small).
func newFitIn(f Family, d *Data, b *fitBox) *Fit {
	names := namesOf(f)
	k := len(names)
	var fit *Fit
	var est []float64
	var fixed []bool
	if k <= len(fitBox{}.est) {
		if b == nil {
			b = new(fitBox)
		}
		fit, est, fixed = &b.fit, b.est[:k:k], b.fixed[:k:k]
		clear(fixed)
	} else {
		fit, est, fixed = new(Fit), make([]float64, k), make([]bool, k)
	}
	for i := range est {
		est[i] = math.NaN()
	}
	*fit = Fit{
		Family:     f.Name(),
		Parameters: names,
		Estimates:  est,
		Fixed:      fixed,
		LogLik:     math.NaN(),
		K:          k,
		N:          d.N(),
		NCensored:  d.NCensored(),
	}
	return fit
}

// fitBox holds a Fit with room for its estimates and fixed flags, so that
// newFit allocates once, and a FitRecord not at all.
type fitBox struct {
	fit   Fit
	est   [4]float64
	fixed [4]bool
}

// FitRecord is a caller-owned home for the results of repeated fits
// (FitInto): its zero value is ready to use, and it is reused by each fit.
type FitRecord struct{ box fitBox }

// FitInto fits fam to d as fam.Fit(d, opt) does, with the same result,
// except that the complete-data routes of the continuous families of the
// batch workload (normal, lognormal, exponential, gamma, weibull, gumbel,
// logistic, loglogistic, invgauss) write it into rec and return &rec's Fit
// instead of allocating one: with their scratch buffers borrowed from a
// pool, such a refit allocates nothing. The returned Fit (its Estimates
// and Fixed included) is valid until the next FitInto with rec; copy what
// must outlive it. rec must not be used by two fits at once.
func FitInto(fam Family, d *Data, opt Options, rec *FitRecord) (*Fit, error) {
	opt.into = rec
	return fam.Fit(d, opt)
}

// closedForm is the convergence record of an explicit solution.
func closedForm() Convergence {
	return Convergence{Method: "closed form", Evaluations: 1, Converged: true}
}

// setOptimum records an optimiser's result: the estimates (already mapped
// back to the natural scale), the log-likelihood and the convergence record.
// Without any finite start, the fit is marked as failed.
func (fit *Fit) setOptimum(o optimum, estimates []float64, method string) {
	fit.Convergence = Convergence{
		Method:       fmt.Sprintf("%s, %d start(s)", method, o.starts),
		Iterations:   o.iterations,
		Evaluations:  o.evaluations,
		GradientNorm: o.gradNorm,
		Converged:    o.converged,
		Reason:       o.reason,
	}
	if o.theta == nil {
		fit.Convergence.Converged = false
		return
	}
	copy(fit.Estimates, estimates)
	fit.LogLik = -o.negLogLik
}

// setSolved records the complete-data solution of a two-parameter family's
// estimating equations: the convergence record always, the estimates and
// the log-likelihood only when the solve converged (a failed solve leaves
// them NaN, so no unconverged number is ever reported).
func (fit *Fit) setSolved(a, b, logLik float64, conv Convergence) {
	fit.Convergence = conv
	if conv.Converged {
		if len(fit.Estimates) == 2 {
			fit.Estimates[0], fit.Estimates[1] = a, b
		} else {
			fit.Estimates = []float64{a, b}
		}
		fit.LogLik = logLik
	}
}

// noFixed refuses fixed parameters for a family that has none to fix.
func noFixed(family string, fixed Fixed) error {
	for name := range fixed {
		return fmt.Errorf("%s: parameter %q cannot be fixed", family, name)
	}
	return nil
}

// checkFixedNames refuses fixed parameters that the family does not have.
func checkFixedNames(f Family, fixed Fixed, allowed ...string) error {
	names := make([]string, 0, len(fixed))
	for n := range fixed {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		ok := false
		for _, a := range allowed {
			ok = ok || a == n
		}
		if !ok {
			return fmt.Errorf("%s: parameter %q cannot be fixed (fixable: %v)", f.Name(), n, allowed)
		}
		if v := fixed[n]; math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%s: fixed %s must be a finite number, got %v", f.Name(), n, v)
		}
	}
	return nil
}

// needDistinct makes a family inapplicable unless d has at least min
// observations and its exact values are not all equal (with no censored
// values to spread them): a scale parameter's MLE would be zero.
func needDistinct(family string, d *Data, min int) error {
	if d.N() < min {
		return inapplicable(family, "needs at least %d observations, the data have %d", min, d.N())
	}
	if len(d.Exact) == 0 {
		return nil // identifiability of fully censored data is judged by the fit
	}
	if d.IsComplete() {
		lo, hi := minMax(d.Exact)
		if lo == hi {
			return inapplicable(family, "all %d observations equal %v: the scale has no finite maximum-likelihood estimate", d.N(), lo)
		}
	}
	return nil
}

// needPositive makes a family inapplicable when any recorded value is ≤ 0
// (or < 0 when zero is allowed).
func needPositive(family string, d *Data, allowZero bool) error {
	check := func(x float64, what string) error {
		if x < 0 || (!allowZero && x == 0) {
			bound := "> 0"
			if allowZero {
				bound = "≥ 0"
			}
			return inapplicable(family, "needs values %s, the data have the %s %v", bound, what, x)
		}
		return nil
	}
	for _, x := range d.Exact {
		if err := check(x, "value"); err != nil {
			return err
		}
	}
	for _, x := range d.Right {
		if err := check(x, "suspension"); err != nil {
			return err
		}
	}
	// A non-detect limit must be above 0 even where 0 itself is in the
	// support: P(X ≤ 0) = 0, so a non-detect at 0 has probability 0 under
	// every parameter value.
	for _, x := range d.Left {
		if x <= 0 {
			return inapplicable(family, "needs non-detect limits > 0, the data have the non-detect limit %v (P(X ≤ %v) = 0 for this family: record the detection limit)", x, x)
		}
	}
	for i := range d.Upper {
		if d.Upper[i] <= 0 {
			return inapplicable(family, "needs values > 0, the data have the interval (%v, %v]", d.Lower[i], d.Upper[i])
		}
	}
	return nil
}

// spreadOf returns the smallest and largest value, the mean and the
// maximum-likelihood standard deviation of x (len(x) ≥ 1) in two passes:
// the extremes and the sum in the first (scan4), the squared deviations with the
// compensating correction of Chan, Golub & LeVeque (1983) in the second
// (meanSD's algorithm). Each sum runs in four interleaved partial sums
// (sum4), which the processor adds in parallel; data beyond 2^±500, which
// meanSD first rescales, go through meanSD itself.
func spreadOf(x []float64) (lo, hi, mean, sd float64) {
	lo, hi, s := scan4(x)
	big := math.Abs(lo)
	if a := math.Abs(hi); a > big {
		big = a
	}
	if !(big <= 0x1p500) || (big > 0 && big < 0x1p-500) || math.IsInf(s, 0) {
		mean, sd = meanSD(x)
		return lo, hi, mean, sd
	}
	n := float64(len(x))
	m := s / n
	ss, c := sumSqDev4(x, m)
	variance := (ss - c*c/n) / n
	m += c / n
	if variance < 0 {
		variance = 0
	}
	return lo, hi, m, math.Sqrt(variance)
}

// sum4 returns Σ x in four interleaved partial sums, ((s₀+s₁)+(s₂+s₃)):
// the same accuracy as one running sum (each partial sum has a quarter of
// the terms) at a quarter of its latency.
func sum4(x []float64) float64 {
	var s0, s1, s2, s3 float64
	i := 0
	for ; i+4 <= len(x); i += 4 {
		s0 += x[i]
		s1 += x[i+1]
		s2 += x[i+2]
		s3 += x[i+3]
	}
	for ; i < len(x); i++ {
		s0 += x[i]
	}
	return (s0 + s1) + (s2 + s3)
}

// sumSqDev4 returns Σ(x − m)² and Σ(x − m), each in four interleaved
// partial sums as sum4.
func sumSqDev4(x []float64, m float64) (ss, c float64) {
	var q0, q1, q2, q3, c0, c1, c2, c3 float64
	i := 0
	for ; i+4 <= len(x); i += 4 {
		d0, d1, d2, d3 := x[i]-m, x[i+1]-m, x[i+2]-m, x[i+3]-m
		q0 += d0 * d0
		q1 += d1 * d1
		q2 += d2 * d2
		q3 += d3 * d3
		c0 += d0
		c1 += d1
		c2 += d2
		c3 += d3
	}
	for ; i < len(x); i++ {
		d := x[i] - m
		q0 += d * d
		c0 += d
	}
	return (q0 + q1) + (q2 + q3), (c0 + c1) + (c2 + c3)
}

// outsideUnitRange reports whether the largest magnitude among lo and hi
// is beyond 1e±100 (and not 0), where powerOfTwoScale rescales the data.
func outsideUnitRange(lo, hi float64) bool {
	m := math.Max(math.Abs(lo), math.Abs(hi))
	return m != 0 && !(m < 1e100 && m > 1e-100)
}

// scan4 returns the smallest and largest value of x (len(x) ≥ 1; NaN
// values are passed over, as in minMax) and Σ x, in one pass of four interleaved partial sums
// (as sum4). The complete-data fast paths read Applicable's conditions off
// it: values > 0 is lo > 0, not all equal is lo < hi.
func scan4(x []float64) (lo, hi, sum float64) {
	var s0, s1, s2, s3 float64
	lo, hi = x[0], x[0]
	i := 0
	for ; i+4 <= len(x); i += 4 {
		a, b, c, d := x[i], x[i+1], x[i+2], x[i+3]
		s0 += a
		s1 += b
		s2 += c
		s3 += d
		lo, hi = widen(lo, hi, a, b, c, d)
	}
	for ; i < len(x); i++ {
		s0 += x[i]
		lo, hi = widen(lo, hi, x[i], x[i], x[i], x[i])
	}
	return lo, hi, (s0 + s1) + (s2 + s3)
}

// quickApplicable reports whether d is complete data, with no fixed
// parameter, at least minN values, not all equal and (with positive) all
// > 0: then noFixed, needDistinct and needPositive hold, and a family's Fit
// may skip Applicable's separate passes. false only means "ask Applicable".
func quickApplicable(d *Data, opt Options, minN int, positive bool) bool {
	if !d.IsComplete() || len(opt.Fixed) != 0 || len(d.Exact) < max(minN, 1) {
		return false
	}
	lo, hi := minMax4(d.Exact)
	return lo < hi && (!positive || lo > 0)
}

// minMax4 returns the smallest and largest of x (len(x) ≥ 1), four values
// a step.
func minMax4(x []float64) (lo, hi float64) {
	lo, hi = x[0], x[0]
	i := 0
	for ; i+4 <= len(x); i += 4 {
		a, b, c, d := x[i], x[i+1], x[i+2], x[i+3]
		lo, hi = widen(lo, hi, a, b, c, d)
	}
	for ; i < len(x); i++ {
		lo, hi = widen(lo, hi, x[i], x[i], x[i], x[i])
	}
	return lo, hi
}

// widen extends [lo, hi] to a, b, c and d by plain comparisons (NaN never
// compares, so it is passed over, as in minMax); the builtin min and max,
// which propagate NaN, cost several times more per value.
func widen(lo, hi, a, b, c, d float64) (float64, float64) {
	if a < lo {
		lo = a
	}
	if b < lo {
		lo = b
	}
	if c < lo {
		lo = c
	}
	if d < lo {
		lo = d
	}
	if a > hi {
		hi = a
	}
	if b > hi {
		hi = b
	}
	if c > hi {
		hi = c
	}
	if d > hi {
		hi = d
	}
	return lo, hi
}

// sumOr4 returns Σ x in sum4's order (the same bits) and, off the
// floating-point chains, the OR of every value's bit pattern: its sign bit
// is set when some value is negative, −0 or a NaN with the sign bit.
// len(x) ≥ 1.
func sumOr4(x []float64) (sum float64, or uint64) {
	var s0, s1, s2, s3 float64
	i := 0
	for ; i+4 <= len(x); i += 4 {
		v := x[i : i+4 : i+4]
		a, b, c, e := v[0], v[1], v[2], v[3]
		s0 += a
		s1 += b
		s2 += c
		s3 += e
		or |= (math.Float64bits(a) | math.Float64bits(b)) | (math.Float64bits(c) | math.Float64bits(e))
	}
	for ; i < len(x); i++ {
		s0 += x[i]
		or |= math.Float64bits(x[i])
	}
	return (s0 + s1) + (s2 + s3), or
}

// meanSDQuick is spreadOf's mean and ML standard deviation without the
// extremes: Σ x (sum4), then sumSqDev4 and the correction of the mean —
// the same bits as spreadOf wherever both apply. ok is false, leaving the
// data to spreadOf, for non-finite sums, where Σ(x − x̄)² is infinite or
// below 2⁻⁹⁰⁰ (so no squared deviation overflowed, and the ones that
// underflowed carry less than n·2⁻¹⁰⁷⁴ — nothing relative to the sum),
// where the variance is not positive, and for all-equal data. Those need
// no pass of their own: with every value v, the computed mean is within
// (n/4 + 2)u|x̄| of v (sum4's error, u = 2⁻⁵³), so the computed variance
// is below ((n + 8)u·x̄)²; only a variance that small is followed by a
// scan for two different values (allEqual).
func meanSDQuick(x []float64) (mean, sd float64, ok bool) {
	s := sum4(x)
	if math.IsInf(s, 0) || math.IsNaN(s) {
		return 0, 0, false
	}
	n := float64(len(x))
	m := s / n
	ss, c := sumSqDev4(x, m)
	if !(ss >= 0x1p-900) || math.IsInf(ss, 0) {
		return 0, 0, false
	}
	variance := (ss - c*c/n) / n
	if tiny := (n + 8) * 0x1p-53 * m; !(variance > 0) || (variance <= tiny*tiny && allEqual(x)) {
		return 0, 0, false
	}
	return m + c/n, math.Sqrt(variance), true
}

// allEqual reports whether every value of x equals x[0].
func allEqual(x []float64) bool {
	for _, v := range x {
		if v != x[0] {
			return false
		}
	}
	return true
}
