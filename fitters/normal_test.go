package fitters

import (
	"math"
	"testing"
)

// TestNormalExtremeMagnitudes checks the closed-form normal fit on data near
// both ends of the float64 range: scaling data by a power of two is exact,
// so the estimates must scale exactly with it (mu and sigma by 2^k) and the
// log-likelihood must shift by exactly −n·k·ln 2.
func TestNormalExtremeMagnitudes(t *testing.T) {
	base := []float64{1.5, 2.25, 2.75, 3.125, 4.5, 1.75, 2.5}
	f, _ := Lookup("normal")
	ref, err := f.Fit(Complete(base), Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []int{1000, -1000, 500} {
		x := make([]float64, len(base))
		for i, v := range base {
			x[i] = math.Ldexp(v, k)
		}
		fit, err := f.Fit(Complete(x), Options{})
		if err != nil {
			t.Fatal(err)
		}
		scale := math.Ldexp(1, k)
		for i, name := range fit.Parameters {
			want := ref.Estimates[i] * scale
			if got := fit.Estimates[i]; !(math.Abs(got-want) <= 1e-14*math.Abs(want)) {
				t.Errorf("2^%d: %s = %v, want %v", k, name, got, want)
			}
		}
		wantLL := ref.LogLik - float64(len(x)*k)*math.Ln2
		if !(math.Abs(fit.LogLik-wantLL) <= 1e-12*math.Abs(wantLL)) {
			t.Errorf("2^%d: loglik = %v, want %v", k, fit.LogLik, wantLL)
		}
	}
}
