package fitters

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// BenchmarkInvGaussTails times InvGauss.CDFTails (linear space) against
// invGaussTailsLog (log space) per point, on the quantiles of the two
// inverse Gaussians of the EDF benchmark.
func BenchmarkInvGaussTails(b *testing.B) {
	for _, d := range []InvGauss{{Mean: 3, Shape: 8}, {Mean: 10, Shape: 150}} {
		xs := make([]float64, 1000)
		for i := range xs {
			xs[i] = d.Quantile((float64(i) + 0.5) / 1000)
		}
		b.Run("linear", func(b *testing.B) {
			var s float64
			for i := 0; i < b.N; i++ {
				_, lf, ls := d.CDFTails(xs[i%1000])
				s += lf + ls
			}
			sinkGamma = s
		})
		b.Run("log", func(b *testing.B) {
			var s float64
			for i := 0; i < b.N; i++ {
				a, bb := d.ab(xs[i%1000])
				_, lf, ls := invGaussTailsLog(a, bb)
				s += lf + ls
			}
			sinkGamma = s
		})
	}
}

// TestInvGaussTailsReference checks InvGauss.CDFTails against mpmath at 80
// digits (cross-checked against scipy; testdata/reference/
// make_invgauss_tails.py) for six (μ, λ) from 0.1 to 250 in λ/μ and x from
// μ/1000 to 1000μ, both tails down to 1e−300: ln F and ln S within
// 1e−13 + 4·cond·ε absolutely (the relative error of F and S) and, where
// the logarithm is below 1 in size, relatively; F within that relative
// tolerance plus 4ε.
func TestInvGaussTailsReference(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "invgauss_tails.json"))
	if err != nil {
		t.Fatalf("reading reference values: %v (regenerate with /usr/bin/python3 testdata/reference/make_invgauss_tails.py)", err)
	}
	var ref struct {
		Points []struct {
			Mu         float64
			Lambda     float64
			X, A       float64
			LogF, LogS string
			Cond       float64
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Points) < 400 {
		t.Fatalf("invgauss_tails.json has only %d points", len(ref.Points))
	}
	var worst float64
	for _, pt := range ref.Points {
		wantF, err1 := strconv.ParseFloat(pt.LogF, 64)
		wantS, err2 := strconv.ParseFloat(pt.LogS, 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("bad reference at x=%g", pt.X)
		}
		tol := 1e-13 + 4*0x1p-52*pt.Cond
		cdf, lf, ls := InvGauss{Mean: pt.Mu, Shape: pt.Lambda}.CDFTails(pt.X)
		for _, c := range []struct {
			what      string
			got, want float64
		}{{"ln F", lf, wantF}, {"ln S", ls, wantS}} {
			e := math.Abs(c.got - c.want)
			switch {
			case c.want == 0:
				if c.got != 0 {
					e = math.Inf(1)
				}
			case math.Abs(c.want) < 1:
				e /= math.Abs(c.want)
			}
			if pt.Cond < 1e3 {
				worst = math.Max(worst, e)
			}
			if !(e <= tol) {
				t.Errorf("μ=%g λ=%g x=%.17g (a=%.3g): %s = %.17g, exact %.17g (error %.3g, tolerance %.3g)",
					pt.Mu, pt.Lambda, pt.X, pt.A, c.what, c.got, c.want, e, tol)
			}
		}
		if want := math.Exp(wantF); !(math.Abs(cdf-want) <= tol*want+4*0x1p-52) {
			t.Errorf("μ=%g λ=%g x=%.17g: F = %.17g, exact %.17g", pt.Mu, pt.Lambda, pt.X, cdf, want)
		}
	}
	t.Logf("worst error where cond < 1e3: %.3g", worst)
}
