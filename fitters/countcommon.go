package fitters

import (
	"math"
)

// Shared machinery of the count families (poisson, negbinomial, geometric,
// binomial, betabinomial).
//
// Their LogPDF is the log probability mass at an integer x (−Inf off the
// integers and outside the support); LogCDF(x) = ln P(X ≤ ⌊x⌋) and
// LogSurvival(x) = ln P(X > ⌊x⌋). Count data are exact observations only:
// the specification applies censoring to the continuous families, and a
// censored count ("at least 3") has no agreed reading, so every count family
// refuses censored data in Applicable and returns NaN from LogLik for them.

// isCount reports whether x is a non-negative integer.
func isCount(x float64) bool {
	return x >= 0 && x == math.Floor(x) && !math.IsInf(x, 1)
}

// countLnFactorial returns ln k! for k ≥ 0.
func countLnFactorial(k float64) float64 {
	v, _ := math.Lgamma(k + 1)
	return v
}

// countLnChoose returns ln C(n, k) for integers 0 ≤ k ≤ n.
func countLnChoose(n, k float64) float64 {
	if k == 0 || k == n {
		return 0
	}
	a, _ := math.Lgamma(n + 1)
	b, _ := math.Lgamma(k + 1)
	c, _ := math.Lgamma(n - k + 1)
	return a - b - c
}

// countXLogY returns x·ln y with the convention 0·ln 0 = 0.
func countXLogY(x, y float64) float64 {
	if x == 0 {
		return 0
	}
	return x * math.Log(y)
}

// countXLog1pY returns x·ln(1 + y) with the convention 0·ln 0 = 0.
func countXLog1pY(x, y float64) float64 {
	if x == 0 {
		return 0
	}
	return x * math.Log1p(y)
}

// countLogAddExp returns ln(e^a + e^b) without overflow.
func countLogAddExp(a, b float64) float64 {
	if math.IsInf(a, -1) {
		return b
	}
	if math.IsInf(b, -1) {
		return a
	}
	if a < b {
		a, b = b, a
	}
	return a + math.Log1p(math.Exp(b-a))
}

// countLogTailSum returns ln Σ_{j=from, from+step, …} exp(lpmf(j)) for a tail in
// which the terms eventually fall geometrically (step is +1 for an upper tail,
// −1 for a lower tail; the sum stops at stop inclusive, or when a term is below
// 1e-17 of the running sum). Used where the regularized incomplete gamma or
// beta function has underflowed, so the tail is far out and short.
func countLogTailSum(lpmf func(j float64) float64, from, stop, step float64) float64 {
	s := math.Inf(-1)
	for j := from; (step > 0 && j <= stop) || (step < 0 && j >= stop); j += step {
		t := lpmf(j)
		if t < s-40 {
			break
		}
		s = countLogAddExp(s, t)
	}
	return s
}

// countLogFromTails turns a lower-tail probability lower = P(X ≤ k) and its
// complement upper = 1 − lower, both computed directly (not by
// subtraction), into ln of the requested one, accurate in both tails:
// ln p for p ≤ 1/2, log1p(−complement) above. When the requested value has
// underflowed, fallback computes it in log space.
func countLogFromTails(want, other float64, fallback func() float64) float64 {
	switch {
	case want > 0.5:
		return math.Log1p(-other)
	case want > 1e-290:
		return math.Log(want)
	default:
		return fallback()
	}
}

// discreteQuantile returns the smallest integer k in [lo, hi] with
// F(k) ≥ p, where logCDF(k) = ln F(k); hi may be +Inf. guess is a starting
// point (any integer). It brackets by doubling steps and then bisects.
func discreteQuantile(logCDF func(k float64) float64, p, guess, lo, hi float64) float64 {
	switch {
	case math.IsNaN(p) || p < 0 || p > 1:
		return math.NaN()
	case p == 0:
		return lo
	case p == 1:
		return hi
	}
	lp := math.Log(p)
	ok := func(k float64) bool { return logCDF(k) >= lp }
	k := math.Max(lo, math.Min(hi, math.Floor(guess)))
	if math.IsNaN(k) {
		k = lo
	}
	var a, b float64 // ok(b) true, ok(a) false (a may be lo−1)
	if ok(k) {
		b = k
		step := 1.0
		a = b - step
		for a >= lo && ok(a) {
			b = a
			step *= 2
			a = b - step
		}
		if a < lo {
			a = lo - 1
		}
	} else {
		a = k
		step := 1.0
		b = a + step
		for !ok(b) {
			if b >= hi {
				return hi
			}
			a = b
			step *= 2
			b = math.Min(a+step, hi)
		}
	}
	for b-a > 1 {
		m := math.Floor(a + (b-a)/2)
		if m >= lo && ok(m) {
			b = m
		} else {
			a = m
		}
	}
	return b
}

// needCounts makes a count family inapplicable unless d holds at least min
// exact observations, all non-negative integers, and nothing censored.
func needCounts(family string, d *Data, min int) error {
	if !d.IsComplete() {
		return inapplicable(family, "count families take exact counts only, the data have %d censored values", d.NCensored())
	}
	if len(d.Exact) < min {
		return inapplicable(family, "needs at least %d counts, the data have %d", min, len(d.Exact))
	}
	for i, x := range d.Exact {
		if !isCount(x) {
			return inapplicable(family, "needs non-negative integer counts, observation %d is %v", i+1, x)
		}
	}
	return nil
}

// needTrials makes a binomial-type family inapplicable unless every count
// has its number of trials (from the trials column) and 0 ≤ x ≤ trials.
func needTrials(family string, d *Data) error {
	if d.Trials == nil {
		return inapplicable(family, "needs the number of trials of each count: set trials_column")
	}
	if len(d.Trials) != len(d.Exact) {
		return inapplicable(family, "has %d trials for %d counts", len(d.Trials), len(d.Exact))
	}
	for i, x := range d.Exact {
		if n := d.Trials[i]; n < 0 {
			return inapplicable(family, "observation %d has %d trials: trials must be ≥ 0", i+1, n)
		} else if x > float64(n) {
			return inapplicable(family, "observation %d is %v successes out of %d trials: counts must not exceed trials", i+1, x, n)
		}
	}
	return nil
}

// tailCounts returns T[j] = #{i : x_i > j} for j = 0 … max(x)−1: with it
// Σ_i Σ_{j<x_i} g(j) = Σ_j T[j]·g(j), which turns the Pochhammer sums of the
// negative binomial and beta-binomial likelihoods (ln Γ(a+x) − ln Γ(a) =
// Σ_{j<x} ln(a+j)) into one pass over the distinct j, exact for large a.
func tailCounts(x []float64) []float64 {
	var max float64
	for _, v := range x {
		max = math.Max(max, v)
	}
	hist := make([]float64, int(max)+1)
	for _, v := range x {
		hist[int(v)]++
	}
	t := make([]float64, int(max))
	var above float64
	for j := int(max); j >= 1; j-- {
		above += hist[j]
		t[j-1] = above
	}
	return t
}

// maxTailCount bounds the largest count for which the tail-count sums are
// used; beyond it the families fall back to ln Γ differences.
const maxTailCount = 1 << 20

// countLnPoch returns ln Γ(a+k) − ln Γ(a) = Σ_{j<k} ln(a+j), summed
// directly for small k (exact for large a) and by ln Γ otherwise.
func countLnPoch(a, k float64) float64 {
	if k == 0 {
		return 0
	}
	if k <= 32 {
		var s float64
		for j := 0.0; j < k; j++ {
			s += math.Log(a + j)
		}
		return s
	}
	if a >= 10 {
		// Stirling: ln Γ(z) = (z−½)ln z − z + ½ln 2π + δ(z); the difference
		// of the leading terms is formed without cancellation.
		return (a-0.5)*math.Log1p(k/a) + k*math.Log(a+k) - k + stirlingDelta(a+k) - stirlingDelta(a)
	}
	x, _ := math.Lgamma(a + k)
	y, _ := math.Lgamma(a)
	return x - y
}

// countLogLik is Σ ln p(xᵢ) over the exact counts for a family whose member
// needs no per-observation trials; NaN for censored data (count families do
// not take censoring) and −Inf for invalid parameters.
func countLogLik(f Family, params []float64, d *Data) float64 {
	if !d.IsComplete() {
		return math.NaN()
	}
	dist, err := f.New(params)
	if err != nil {
		return math.Inf(-1)
	}
	var ll float64
	for _, x := range d.Exact {
		ll += dist.LogPDF(x)
	}
	return ll
}
