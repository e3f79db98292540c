package fitters

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// incBetaPoint is one reference value of incbeta.json: ln I_x(a, b),
// ln I_(1−x)(b, a), ln f(x) and ln B(a, b) by mpmath at 50 digits
// (testdata/reference/make_incbeta.py), with the condition number of the
// smaller tail in x.
type incBetaPoint struct {
	A, B, X                       float64
	LogCDF, LogSF, LogPDF, LnBeta string
	Cond                          float64
}

func loadIncBeta(t *testing.T) []incBetaPoint {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "incbeta.json"))
	if err != nil {
		t.Fatalf("reading reference values: %v (regenerate with /usr/bin/python3 testdata/reference/make_incbeta.py)", err)
	}
	var ref struct{ Points []incBetaPoint }
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Points) < 1000 {
		t.Fatalf("incbeta.json has only %d points", len(ref.Points))
	}
	return ref.Points
}

// TestBetaTailsReference checks Beta{α, β}'s LogCDF, LogSurvival and LogPDF
// and lnBeta against mpmath (testdata/reference/incbeta.json, made by
// make_incbeta.py) on a grid of α and β from 1e-2 to 1e9 and x from 1e-12
// to 1 − 1e-12, at fixed points and around the mean. The logarithms of the
// tails must be within tol = 2e-13 + 64ε·cond (cond the condition number of
// the smaller tail in x: the shapes' own rounding inside the power term
// moves it by a few ε·cond) absolutely, which is the relative error of the
// tails, or relatively where the logarithm is beyond ±1; the log-density and
// ln B within 1e-13, absolutely or relatively likewise. Before lnBeta and
// logIncBetaLarge the tails were off by 3.5e-6 at β = 6.4e8, and the
// survival function by 5e-7 at α = 0.01, x = 1e-12 (gonum's incomplete
// beta at 1 − x rounded).
func TestBetaTailsReference(t *testing.T) {
	var worst float64
	var worstAt incBetaPoint
	for _, pt := range loadIncBeta(t) {
		d := Beta{pt.A, pt.B}
		tol := 2e-13 + 64*0x1p-52*pt.Cond
		for _, c := range []struct {
			name      string
			got, want float64
			tol       float64
		}{
			{"ln F", d.LogCDF(pt.X), parseRef(t, pt.LogCDF), tol},
			{"ln S", d.LogSurvival(pt.X), parseRef(t, pt.LogSF), tol},
			{"ln f", d.LogPDF(pt.X), parseRef(t, pt.LogPDF), 1e-13},
			{"ln B", lnBeta(pt.A, pt.B), parseRef(t, pt.LnBeta), 1e-13},
		} {
			err := math.Abs(c.got - c.want)
			if m := math.Abs(c.want); m > 1 {
				err /= m // large logs: relative
			}
			if !(err <= c.tol) {
				t.Errorf("%s at a=%g b=%g x=%g: got %v, want %v (mpmath), error %.2g > %.2g",
					c.name, pt.A, pt.B, pt.X, c.got, c.want, err, c.tol)
			}
			if e := err / c.tol; e > worst {
				worst, worstAt = e, pt
			}
		}
	}
	t.Logf("worst error/tolerance %.3g at a=%g b=%g x=%g", worst, worstAt.A, worstAt.B, worstAt.X)
}
