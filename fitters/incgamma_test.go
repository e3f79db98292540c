package fitters

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// incGammaPoint is one reference value of incgamma.json: ln P(a, x) and
// ln Q(a, x) by mpmath at 60 digits, cross-checked against scipy
// (testdata/reference/make_incgamma.py), and the condition number of the
// smaller tail.
type incGammaPoint struct {
	A, X       float64
	LogP, LogQ string
	Cond       float64
}

func loadIncGamma(t *testing.T) []incGammaPoint {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "incgamma.json"))
	if err != nil {
		t.Fatalf("reading reference values: %v (regenerate with /usr/bin/python3 testdata/reference/make_incgamma.py)", err)
	}
	var ref struct{ Points []incGammaPoint }
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Points) < 500 {
		t.Fatalf("incgamma.json has only %d points", len(ref.Points))
	}
	return ref.Points
}

// incGammaTolerance is the allowed error of ln P and ln Q in absolute terms
// (= the relative error of P and Q): 1e-13, widened by the condition
// number cond of the point times 4ε (the rounding of x and a alone moves
// the exact value by cond·ε).
func incGammaTolerance(cond float64) float64 { return 1e-13 + 4*0x1p-52*cond }

// TestIncGammaTailsReference checks Gamma{a, 1}.CDFTails (incGammaTails for
// a ≤ 100, gonum's evaluator beyond and where incGammaTails declines)
// against mpmath on a grid of a from 1e-3 to 1e4 and x over both tails:
// ln P and ln Q within incGammaTolerance of the exact value, both
// absolutely (the relative error of P and Q) and, where the logarithm is
// tiny (ln(1 − T) ≈ −T), relatively.
func TestIncGammaTailsReference(t *testing.T) {
	var worst, worstDirect float64
	for _, pt := range loadIncGamma(t) {
		wantP, err1 := strconv.ParseFloat(pt.LogP, 64)
		wantQ, err2 := strconv.ParseFloat(pt.LogQ, 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("bad reference at a=%g x=%g", pt.A, pt.X)
		}
		tol := incGammaTolerance(pt.Cond)
		cdf, lp, lq := Gamma{Shape: pt.A, Rate: 1}.CDFTails(pt.X)
		for _, c := range []struct {
			what      string
			got, want float64
		}{{"ln P", lp, wantP}, {"ln Q", lq, wantQ}} {
			e := math.Abs(c.got - c.want) // absolute error of the log
			switch {
			case c.want == 0:
				// ln(1 − T) with T below 1e−308: 0 exactly.
				if c.got != 0 {
					e = math.Inf(1)
				}
			case math.Abs(c.want) < 1:
				e /= math.Abs(c.want)
			}
			tol := tol
			if pt.A > incGammaMaxShape {
				// gonum's evaluator (unchanged by incGammaTails): its
				// error grows with the shape, to about 6·cond·ε at a = 1e4.
				tol = 1e-13 + 16*0x1p-52*pt.Cond
			}
			if pt.Cond < 1e3 {
				worst = math.Max(worst, e)
			}
			if !(e <= tol) {
				t.Errorf("a=%.17g x=%.17g: %s = %.17g, exact %.17g (error %.3g, tolerance %.3g, cond %.3g)",
					pt.A, pt.X, c.what, c.got, c.want, e, tol, pt.Cond)
			}
		}
		if want := math.Exp(wantP); !(math.Abs(cdf-want) <= tol*want+4*0x1p-52) {
			t.Errorf("a=%.17g x=%.17g: F = %.17g, exact %.17g", pt.A, pt.X, cdf, want)
		}
		if pt.A <= incGammaMaxShape {
			if _, dp, dq, ok := incGammaTails(pt.A, pt.X); ok && pt.Cond < 1e3 {
				worstDirect = math.Max(worstDirect, math.Max(math.Abs(dp-wantP), math.Abs(dq-wantQ)))
			}
		}
	}
	t.Logf("worst error where cond < 1e3: %.3g (CDFTails), %.3g absolute in the logs (incGammaTails alone)", worst, worstDirect)
}

// TestLog1mSmall checks log1mSmall against math.Log1p(−p) from 0 to 0.9.
func TestLog1mSmall(t *testing.T) {
	var worst float64
	for i := 0; i <= 20000; i++ {
		for _, p := range []float64{0.9 * float64(i) / 20000, math.Ldexp(1, -i/20) * 0.9} {
			want := math.Log1p(-p)
			got := log1mSmall(p)
			e := math.Abs(got - want)
			if want != 0 {
				e /= math.Abs(want)
			}
			worst = math.Max(worst, e)
			if !(e <= 1e-15) {
				t.Fatalf("log1mSmall(%.17g) = %.17g, math.Log1p(−p) = %.17g", p, got, want)
			}
		}
	}
	t.Logf("worst relative difference from math.Log1p: %.3g", worst)
}

// BenchmarkGammaTails times incGammaTails against gonum's evaluator
// (gammaTailsGonum) on the points of a gamma sample (shape 2.5, as the
// EDF benchmark), per point.
func BenchmarkGammaTails(b *testing.B) {
	d := Gamma{Shape: 2.5, Rate: 1}
	xs := make([]float64, 1000)
	for i := range xs {
		xs[i] = d.Quantile((float64(i) + 0.5) / 1000)
	}
	b.Run("incGammaTails", func(b *testing.B) {
		var s float64
		for i := 0; i < b.N; i++ {
			_, lf, ls, _ := incGammaTails(d.Shape, xs[i%1000])
			s += lf + ls
		}
		sinkGamma = s
	})
	b.Run("gonum", func(b *testing.B) {
		var s float64
		for i := 0; i < b.N; i++ {
			_, lf, ls := gammaTailsGonum(d.Shape, xs[i%1000])
			s += lf + ls
		}
		sinkGamma = s
	})
}

var sinkGamma float64
