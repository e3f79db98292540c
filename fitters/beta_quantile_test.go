package fitters

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// betaQuantilePoint is one reference quantile of beta_quantile.json: the
// p-quantile of beta(A, B) is Z, or 1 − Z when Upper, with condition
// number Kappa = |d ln Z / d ln p| in its tail.
type betaQuantilePoint struct {
	A, B, P float64
	Upper   bool
	Z       string
	Kappa   float64
}

// TestBetaQuantileReference checks Beta.Quantile for shapes 1e-2 … 1e9 at
// p = 1e-10 … 1 − 1e-4 against mpmath (testdata/reference/beta_quantile.json,
// made by make_beta_quantile.py), in the quantile's own tail variable z (x,
// or 1 − x above 1/2): within (8ε + 1e-13·κ)·z, plus the 2⁻⁵³ by which
// 1 − x is rounded near 1 and the 2⁻¹⁰⁷⁰ of subnormal values near 0 (a
// quantile below the smallest double is 0; above 1 − 2⁻⁵³ it may be
// that double or 1). Before the Newton polish, gonum's inverse missed by a
// relative 1e-6 at β = 6.4e8 and 4e-5 at α = 0.01, β = 1e9, and gave
// 0.9375 for beta(1.4e6, 0.01)'s 1e-10-quantile, 1 − 1.1e-5.
func TestBetaQuantileReference(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "beta_quantile.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct{ Points []betaQuantilePoint }
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Points) < 1000 {
		t.Fatalf("beta_quantile.json has only %d points", len(ref.Points))
	}
	var worst float64
	for _, pt := range ref.Points {
		want := mustParse(t, pt.Z)
		x := Beta{Alpha: pt.A, Beta: pt.B}.Quantile(pt.P)
		got := x
		tol := (8*0x1p-52+1e-13*pt.Kappa)*want + 0x1p-1070
		if pt.Upper {
			got = 1 - x
			tol += 0x1p-53
		}
		e := math.Abs(got - want)
		worst = math.Max(worst, e/tol)
		if !(e <= tol) {
			t.Errorf("beta(%g, %g).Quantile(%g) = %.17g: tail variable %.17g, exact %.17g (error %.3g, tolerance %.3g)", pt.A, pt.B, pt.P, x, got, want, e, tol)
		}
	}
	t.Logf("worst error: %.3g of the tolerance", worst)
}
