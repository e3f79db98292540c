package fitters

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strconv"
	"testing"
)

// studentTTailRow is one row of testdata/studentt/tails.json (the grid) or
// tails_random.json (160 points off it): ln F(z) and ln S(z) of the
// standard Student t with DF degrees of freedom, computed by mpmath at 60
// digits (incomplete beta, checked against quadrature of the density;
// testdata/studentt/make_tails.py).
type studentTTailRow struct {
	DF, Z, LogCDF, LogSF string
}

func loadStudentTTails(t *testing.T, name string, rows int) []studentTTailRow {
	t.Helper()
	raw, err := os.ReadFile("../testdata/studentt/" + name)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct{ Rows []studentTTailRow }
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Rows) != rows {
		t.Fatalf("%s has %d rows, want %d", name, len(doc.Rows), rows)
	}
	return doc.Rows
}

func parseTailRef(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil && !(err.(*strconv.NumError).Err == strconv.ErrRange && math.Abs(v) < 1) {
		t.Fatalf("parse %q: %v", s, err)
	}
	return v // values below the float64 range parse as ±0
}

// tailRelErr is |got − want|/|want|, with an absolute floor of the smallest
// normal float64 for references below the float64 range (ln S = −1e-348
// is best represented by −0 or a subnormal).
func tailRelErr(got, want float64) float64 {
	d := math.Abs(got - want)
	if d <= 0x1p-1022 {
		return 0
	}
	return d / math.Abs(want)
}

// TestStudentTTailsMpmath checks ln F and ln S of the standard t against
// mpmath (testdata/studentt/tails.json, make_tails.py) on df from 1 to 1e20
// and z from −1e3 to 1e3: relative error below 1e-13 on every entry.
func TestStudentTTailsMpmath(t *testing.T) {
	checkStudentTTails(t, loadStudentTTails(t, "tails.json", 14*15), func(r studentTTailRow) string { return "df=" + r.DF })
}

// TestStudentTTailsMpmathRandom is the same check on 160 random (df, z)
// off the grid (tails_random.json: df 1 to 1e20, half of them 20 to 2000
// around the switches, |z| 1e-3 to 1e4), errors summarised per decade of df.
func TestStudentTTailsMpmathRandom(t *testing.T) {
	checkStudentTTails(t, loadStudentTTails(t, "tails_random.json", 160), func(r studentTTailRow) string {
		df, _ := strconv.ParseFloat(r.DF, 64)
		return fmt.Sprintf("df in [1e%d, 1e%d)", int(math.Floor(math.Log10(df))), int(math.Floor(math.Log10(df)))+1)
	})
}

// checkStudentTTails asserts relative error below 1e-13 in ln F and ln S
// on every row and logs the largest per group. One exception, where the
// float64 format itself sets the floor: the smaller of ln F, ln S is the
// complement ln(1 − e^L) ≈ −e^L of the tail L = the other one, so its
// relative error is the absolute error of L, at least half an ulp of |L|
// (5.7e-14 at L = −584, where F is 1e-254). There the bound is 2 ulps of
// |L| if that is larger (at most 3.3e-13, at L ≈ −745 where e^L underflows).
func checkStudentTTails(t *testing.T, rows []studentTTailRow, group func(studentTTailRow) string) {
	t.Helper()
	const tol = 1e-13
	complementTol := func(l float64) float64 { return math.Max(tol, 0x1p-51*math.Abs(l)) }
	maxErr := map[string]float64{}
	var order []string
	for _, r := range rows {
		df, z := parseTailRef(t, r.DF), parseTailRef(t, r.Z)
		d := StudentT{0, 1, df}
		lf, ls := d.LogCDF(z), d.LogSurvival(z)
		wf, ws := parseTailRef(t, r.LogCDF), parseTailRef(t, r.LogSF)
		ef, es := tailRelErr(lf, wf), tailRelErr(ls, ws)
		tolF, tolS := tol, tol
		if math.Abs(wf) < math.Abs(ws) {
			tolF = complementTol(ws)
		} else {
			tolS = complementTol(wf)
		}
		g := group(r)
		if _, ok := maxErr[g]; !ok {
			order = append(order, g)
		}
		maxErr[g] = math.Max(maxErr[g], math.Max(ef, es))
		if ef > tolF || es > tolS {
			t.Errorf("df=%s z=%s: ln F %v (want %s, rel %.2g), ln S %v (want %s, rel %.2g)",
				r.DF, r.Z, lf, r.LogCDF, ef, ls, r.LogSF, es)
		}
	}
	for _, k := range order {
		t.Logf("%-18s max relative error %.3g", k, maxErr[k])
	}
}

// tailDFs are the degrees of freedom of the property tests: both sides of
// every switch of tLogLowerTail (ν = 30) and up to the normal limit.
var tailDFs = []float64{0.7, 1, 3, 29.999, 30, 30.001, 100, 1e3, 1e5, 1e8, 1e12, 1e17, 1e300, math.Inf(1)}

// TestStudentTTailsMonotone checks that ln F rises and ln S falls in z on a
// grid that crosses the switch q = ln(1 + z²/ν) = 1 of the large-ν route.
func TestStudentTTailsMonotone(t *testing.T) {
	for _, nu := range tailDFs {
		d := StudentT{0, 1, nu}
		prevF, prevS := math.Inf(-1), 0.0
		for z := -60.0; z <= 60; z += 0.01 {
			lf, ls := d.LogCDF(z), d.LogSurvival(z)
			if lf < prevF || ls > prevS {
				t.Fatalf("df=%g z=%g: ln F %v after %v, ln S %v after %v", nu, z, lf, prevF, ls, prevS)
			}
			prevF, prevS = lf, ls
		}
		// across q = 1 exactly: z = ±√(ν(e−1)) and its neighbours
		if nu > 30 && !math.IsInf(nu, 1) {
			z0 := -math.Sqrt(nu * (math.E - 1))
			a, b := math.Nextafter(z0, math.Inf(-1)), math.Nextafter(z0, 0)
			fa, f0, fb := d.LogCDF(a), d.LogCDF(z0), d.LogCDF(b)
			if !(fa <= f0 && f0 <= fb) || math.Abs(fb-fa) > 1e-14*math.Abs(f0) {
				t.Errorf("df=%g at the switch z=%v: ln F %v, %v, %v", nu, z0, fa, f0, fb)
			}
		}
	}
}

// TestStudentTTailsComplement checks F + S = 1 (e^lnF + e^lnS within 4e-16
// of 1), ln S ≤ 0 and ln F ≤ 0 everywhere, and symmetry ln F(z) = ln S(−z).
func TestStudentTTailsComplement(t *testing.T) {
	zs := []float64{0, 1e-8, 0.1, 0.5, 1, 1.5, 2, 3, 5, 10, 40, 1e3, 1e8, 1e200}
	for _, nu := range tailDFs {
		d := StudentT{0, 1, nu}
		for _, z0 := range zs {
			for _, z := range []float64{-z0, z0} {
				lf, ls := d.LogCDF(z), d.LogSurvival(z)
				if lf > 0 || ls > 0 || math.IsNaN(lf) || math.IsNaN(ls) {
					t.Errorf("df=%g z=%g: ln F %v, ln S %v, want both ≤ 0", nu, z, lf, ls)
				}
				if sum := math.Exp(lf) + math.Exp(ls); math.Abs(sum-1) > 4e-16 {
					t.Errorf("df=%g z=%g: F + S = %v", nu, z, sum)
				}
				if lf != d.LogSurvival(-z) {
					t.Errorf("df=%g z=%g: ln F %v but ln S(−z) %v", nu, z, lf, d.LogSurvival(-z))
				}
			}
		}
	}
}

// TestStudentTNormalGamma checks the series of G(q) = e^(3q/4) √((q/2)/sinh(q/2))
// behind the large-ν expansion against its closed form, and its first
// coefficients against the hand expansion 1 + 3q/4 + 25q²/96.
func TestStudentTNormalGamma(t *testing.T) {
	if g := tNormalGamma; math.Abs(g[1]-0.75) > 1e-16 || math.Abs(g[2]-25.0/96) > 1e-16 {
		t.Fatalf("γ1 = %v, γ2 = %v, want 3/4, 25/96", g[1], g[2])
	}
	for _, q := range []float64{0.01, 0.3, 1, 2} {
		var s, p float64 = 0, 1
		for _, g := range tNormalGamma {
			s += g * p
			p *= q
		}
		want := math.Exp(0.75*q) * math.Sqrt(q/2/math.Sinh(q/2))
		if math.Abs(s-want) > 4e-16*want {
			t.Errorf("G(%g): series %v, closed form %v", q, s, want)
		}
	}
}

// TestStudentTNormalExpansionCentre checks the large-ν expansion where the
// answer is exact: as z → 0 it must give F = 1/2, which needs K, the
// Mills ratio and every term of the series to agree.
func TestStudentTNormalExpansionCentre(t *testing.T) {
	for _, nu := range []float64{31, 100, 1e3, 1e6, 1e12, 1e20} {
		got := tLogLowerTailNormalExpansion(math.Log1p(1e-300/nu), nu) // z ≈ −1e-150
		if math.Abs(got+math.Ln2) > 2e-16 {
			t.Errorf("df=%g: ln F(0−) = %v, want −ln 2", nu, got)
		}
	}
}

// BenchmarkStudentTTails times ln F and ln S of the t at df above the
// incomplete-beta range on 64 points from z = −40 to 40.
func BenchmarkStudentTTails(b *testing.B) {
	for _, nu := range []float64{10, 100, 1e4, 1e8} {
		b.Run(fmt.Sprintf("df=%g", nu), func(b *testing.B) {
			d := StudentT{0, 1, nu}
			var s float64
			for b.Loop() {
				for i := range 64 {
					z := -40 + 80*float64(i)/63
					s += d.LogCDF(z) + d.LogSurvival(z)
				}
			}
			if math.IsNaN(s) {
				b.Fatal("NaN")
			}
		})
	}
}
