package fitters

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

// multiRef is one testdata/families/<family>.json file, written by
// testdata/families/make_multi.py with Debian's scipy.
type multiRef struct {
	Family string
	Source string
	Cases  []struct {
		Name   string
		Seed   int
		Data   []float64
		Params []float64
		Loglik float64
		Fixed  Fixed
		Limit  string
	}
	Spots []struct {
		Params []float64
		Points []struct {
			X      float64
			Logpdf float64
			Logcdf float64
			Logsf  float64
		}
		Quantiles []struct{ P, X float64 }
	}
}

func loadMultiRef(t *testing.T, family string) multiRef {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "families", family+".json"))
	if err != nil {
		t.Fatal(err)
	}
	var r multiRef
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	if r.Family != family || len(r.Cases) == 0 {
		t.Fatalf("%s.json: bad reference file", family)
	}
	return r
}

// multiClose reports whether got is within tol of want relative to
// max(|want|, unit).
func multiClose(got, want, tol, unit float64) bool {
	if math.IsInf(want, 0) {
		return got == want
	}
	return math.Abs(got-want) <= tol*math.Max(math.Abs(want), unit)
}

// multiCheckFits fits every case of the family's reference file and
// compares with scipy's careful maximum (source: the file's "source"): the
// log-likelihood must be at least the reference less 1e-9 relative, and each
// parameter within paramTol relative to max(|reference|, unit(i, params)),
// where unit gives location-type parameters the scale of the fit.
func multiCheckFits(t *testing.T, family string, paramTol float64, unit func(i int, p []float64) float64) {
	ref := loadMultiRef(t, family)
	f, _ := Lookup(family)
	for _, c := range ref.Cases {
		t.Run(c.Name, func(t *testing.T) {
			fit, err := f.Fit(Complete(c.Data), Options{Fixed: c.Fixed})
			if err != nil {
				t.Fatal(err)
			}
			if !fit.Converged {
				t.Fatalf("not converged: %s", fit.Reason)
			}
			if fit.LogLik < c.Loglik-1e-9*math.Abs(c.Loglik) {
				t.Errorf("log-likelihood %.15g below scipy's %.15g (%s)", fit.LogLik, c.Loglik, ref.Source)
			}
			for i, want := range c.Params {
				if got := fit.Estimates[i]; !multiClose(got, want, paramTol, unit(i, c.Params)) {
					t.Errorf("%s = %.12g, scipy %.12g (%s)", fit.Parameters[i], got, want, ref.Source)
				}
			}
			t.Logf("loglik %.15g (scipy %.15g), estimates %v (scipy %v), %s", fit.LogLik, c.Loglik, fit.Estimates, c.Params, fit.Method)
			if c.Limit != "" && fit.Note == "" {
				t.Errorf("limit %q not noted", c.Limit)
			}
			multiCheckNearby(t, f, fit, Complete(c.Data))
		})
	}
}

// multiCheckNearby perturbs each free parameter (and pairs of them) by
// ±1e-4 and ±1e-6 relative and asserts none beats the reported optimum by
// more than 1e-10 relative (property check: the optimum is a local maximum).
func multiCheckNearby(t *testing.T, f Family, fit *Fit, d *Data) {
	t.Helper()
	base := fit.LogLik
	var free []int
	for i, fx := range fit.Fixed {
		if !fx && finiteParam(fit.Estimates[i]) {
			free = append(free, i)
		}
	}
	p := append([]float64(nil), fit.Estimates...)
	step := func(i int, h float64) float64 {
		v := fit.Estimates[i]
		return v + h*math.Max(math.Abs(v), 1e-3)
	}
	for _, h := range []float64{1e-4, -1e-4, 1e-6, -1e-6} {
		for a, i := range free {
			copy(p, fit.Estimates)
			p[i] = step(i, h)
			if ll := f.LogLik(p, d); ll > base+1e-10*math.Abs(base) {
				t.Errorf("nearby %v gives %.15g > %.15g", p, ll, base)
			}
			for _, j := range free[a+1:] {
				for _, s := range []float64{1, -1} {
					copy(p, fit.Estimates)
					p[i], p[j] = step(i, h), step(j, s*h)
					if ll := f.LogLik(p, d); ll > base+1e-10*math.Abs(base) {
						t.Errorf("nearby %v gives %.15g > %.15g", p, ll, base)
					}
				}
			}
		}
	}
}

// multiCheckSpots compares log-density, log-CDF, log-survival and quantiles with
// scipy's values (relative 1e-9; absolute 1e-12 near zero).
func multiCheckSpots(t *testing.T, family string, tol float64) {
	ref := loadMultiRef(t, family)
	f, _ := Lookup(family)
	for _, s := range ref.Spots {
		d, err := f.New(s.Params)
		if err != nil {
			t.Fatal(err)
		}
		for _, pt := range s.Points {
			for _, c := range []struct {
				name      string
				got, want float64
			}{
				{"logpdf", d.LogPDF(pt.X), pt.Logpdf},
				{"logcdf", d.LogCDF(pt.X), pt.Logcdf},
				{"logsf", d.LogSurvival(pt.X), pt.Logsf},
			} {
				if !multiClose(c.got, c.want, tol, 1e-3) {
					t.Errorf("%v %s(%v) = %.15g, scipy %.15g", s.Params, c.name, pt.X, c.got, c.want)
				}
			}
		}
		for _, q := range s.Quantiles {
			if got := d.Quantile(q.P); !multiClose(got, q.X, tol, 1e-6) {
				t.Errorf("%v quantile(%v) = %.15g, scipy %.15g", s.Params, q.P, got, q.X)
			}
		}
	}
}

// multiCheckGradient compares an analytic value-and-gradient function with the
// central finite differences of gonum/diff/fd at theta.
func multiCheckGradient(t *testing.T, name string, nll exactNLL, theta []float64, tol float64) {
	t.Helper()
	g := make([]float64, len(theta))
	v := nll(theta, g)
	if math.IsInf(v, 0) || math.IsNaN(v) {
		t.Fatalf("%s: value %v at %v", name, v, theta)
	}
	if v2 := nll(theta, nil); v2 != v {
		t.Errorf("%s: value with gradient %v, without %v", name, v, v2)
	}
	want := fd.Gradient(nil, func(x []float64) float64 { return nll(x, nil) }, theta,
		&fd.Settings{Formula: fd.Central, Step: 1e-6})
	for i := range g {
		if math.Abs(g[i]-want[i]) > tol*math.Max(1, math.Abs(want[i])) {
			t.Errorf("%s at %v: ∂/∂θ%d analytic %.10g, finite difference %.10g", name, theta, i, g[i], want[i])
		}
	}
}

// multiCheckRoundTrip asserts Quantile(CDF(x)) ≈ x through the log-CDF at the
// given points and that Rand reproduces under one seed.
func multiCheckRoundTrip(t *testing.T, d Dist, xs []float64) {
	t.Helper()
	for _, x := range xs {
		p := math.Exp(d.LogCDF(x))
		if p <= 1e-300 || p >= 1-1e-12 {
			continue
		}
		if got := d.Quantile(p); !multiClose(got, x, 1e-8, 1e-8) {
			t.Errorf("Quantile(CDF(%v)) = %v", x, got)
		}
	}
}
