package fitters

import (
	"math"
	"testing"
)

// TestLognormalOnePassShiftGuard: where the shift K (median of ln x at the
// first, middle and last value) is far from the mean of ln x — here those
// three values are outliers 10⁶ times the rest — the one-pass sums would
// cancel, so lognormalFastMLE declines, and the family's Fit gives
// lognormalMLE's estimates (the route about x[0], two passes).
func TestLognormalOnePassShiftGuard(t *testing.T) {
	x := make([]float64, 1001)
	for i := range x {
		x[i] = math.Exp(0.1 * math.Sin(float64(i)))
	}
	for _, i := range []int{0, len(x) / 2, len(x) - 1} {
		x[i] = 1e6
	}
	if m, s, l, ok := lognormalFastMLE(x); ok {
		t.Fatalf("took data whose shift is far from the mean of ln x: (%v, %v, %v)", m, s, l)
	}
	fit, err := lognormalFamily{}.Fit(Complete(x), Options{})
	if err != nil {
		t.Fatal(err)
	}
	m, s, l := lognormalMLE(x)
	if fit.Estimates[0] != m || fit.Estimates[1] != s || fit.LogLik != l {
		t.Errorf("Fit gave %v %v, lognormalMLE (%v, %v, %v)", fit.Estimates, fit.LogLik, m, s, l)
	}
}
