package fitters

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// gammaLargeReference is testdata/reference/gamma_large.json, made by
// testdata/reference/make_gamma_large.py: mpmath at 60 digits (gammainc up
// to a = 1e4, the defining integral by quadrature above, checked against
// each other and P + Q = 1), ln P and ln Q for shapes 150 … 1e20 and gamma
// quantiles for shapes 1e-3 … 1e20 at p = 1e-10 … 1 − 1e-10.
type gammaLargeReference struct {
	Tails []struct {
		A, X       float64
		LogP, LogQ string
	}
	Quantiles []struct {
		Shape, P float64
		X        string
		Kappa    float64
	}
}

func loadGammaLarge(t *testing.T) gammaLargeReference {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "gamma_large.json"))
	if err != nil {
		t.Fatalf("reading reference values: %v (regenerate with /usr/bin/python3 testdata/reference/make_gamma_large.py)", err)
	}
	var ref gammaLargeReference
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Tails) < 100 || len(ref.Quantiles) < 150 {
		t.Fatalf("gamma_large.json has only %d tails and %d quantiles", len(ref.Tails), len(ref.Quantiles))
	}
	return ref
}

func mustParse(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// logTailError is the error of a tail's logarithm: absolute (the relative
// error of the tail) where |want| ≥ 1, relative below (ln(1 − T) ≈ −T).
func logTailError(got, want float64) float64 {
	if want == 0 {
		if got == 0 {
			return 0
		}
		return math.Inf(1)
	}
	e := math.Abs(got - want)
	if math.Abs(want) < 1 {
		e /= math.Abs(want)
	}
	return e
}

// TestGammaTailsLargeShape checks ln P and ln Q of the gamma distribution
// (LogCDF, LogSurvival and CDFTails) for shapes 150 … 1e20 against
// gamma_large.json (mpmath; see gammaLargeReference), in the bulk and both
// tails down to 1e-300: within 2e-14 + 8ε·|ln T|, T the smaller tail (the
// rounding of t²/2 = −a·log1pmx(x/a − 1) alone is a few ε of it; the
// larger tail's ln(1 − T) ≈ −T has T's relative error). gonum's evaluator,
// used here before, was off by whole units of ln T from a = 1e16.
func TestGammaTailsLargeShape(t *testing.T) {
	var worst float64
	var where string
	for _, pt := range loadGammaLarge(t).Tails {
		wantP, wantQ := mustParse(t, pt.LogP), mustParse(t, pt.LogQ)
		d := Gamma{Shape: pt.A, Rate: 1}
		_, tp, tq := d.CDFTails(pt.X)
		for _, c := range []struct {
			what      string
			got, want float64
		}{
			{"LogCDF", d.LogCDF(pt.X), wantP}, {"LogSurvival", d.LogSurvival(pt.X), wantQ},
			{"CDFTails ln F", tp, wantP}, {"CDFTails ln S", tq, wantQ},
		} {
			e := logTailError(c.got, c.want)
			if e > worst {
				worst, where = e, fmt.Sprintf("%s at shape %g, x %.17g", c.what, pt.A, pt.X)
			}
			if tol := 2e-14 + 8*0x1p-52*math.Max(math.Abs(wantP), math.Abs(wantQ)); !(e <= tol) {
				t.Errorf("shape %.17g x %.17g: %s = %.17g, exact %.17g (error %.3g)", pt.A, pt.X, c.what, c.got, c.want, e)
			}
		}
	}
	t.Logf("worst error: %.3g (%s)", worst, where)
}

// TestGammaQuantileReference checks Gamma.Quantile for shapes 1e-3 … 1e20
// at p = 1e-10 … 1 − 1e-10 against gamma_large.json (mpmath; see
// gammaLargeReference): within 8ε + 1e-13·κ relative, κ = |d ln x/d ln p|
// the quantile's condition number (1/shape in the lower tail of small
// shapes). Before, the quantiles from shape 1e16 on were off by up to
// millions of standard deviations and not even ordered.
func TestGammaQuantileReference(t *testing.T) {
	var worst float64
	for _, pt := range loadGammaLarge(t).Quantiles {
		want := mustParse(t, pt.X)
		got := Gamma{Shape: pt.Shape, Rate: 1}.Quantile(pt.P)
		e := math.Abs(got-want) / want
		tol := 8*0x1p-52 + 1e-13*pt.Kappa
		worst = math.Max(worst, e/tol)
		if !(e <= tol) {
			t.Errorf("shape %.17g: Quantile(%.17g) = %.17g, exact %.17g (relative error %.3g, tolerance %.3g)", pt.Shape, pt.P, got, want, e, tol)
		}
	}
	t.Logf("worst error: %.3g of the tolerance", worst)
}
