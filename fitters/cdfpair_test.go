package fitters_test

import (
	"math"
	"testing"

	"fitseal/fitters"
)

// TestCDFTailsSpot checks fitters.CDFTails (each family's own CDFTails
// where it has one, the LogCDF/LogSurvival route otherwise) against the
// exact values of spot.json (mpmath at 60 digits, cross-checked against
// scipy; testdata/reference/make_spot.py), far tails included: ln F and
// ln S to the tolerance of TestReferenceSpot, relative and without a floor
// (ln F ≈ −1e-30 in the upper tail must keep its digits), and F to
// that tolerance relative to F plus 4ε absolute (F is used only as a
// probability in KS and CvM).
func TestCDFTailsSpot(t *testing.T) {
	ms := loadSpot(t)
	names := memberNames(ms)
	const eps = 0x1p-52
	for i, m := range ms {
		m := m
		t.Run(names[i], func(t *testing.T) {
			f := lookup(t, m.Family)
			dist, err := f.New(paramVector(t, f, m.Params))
			if err != nil {
				t.Fatalf("New(%s): %v", paramString(m.Params), err)
			}
			for _, pt := range m.Points {
				cdf, lf, ls := fitters.CDFTails(dist, pt.X)
				for _, c := range []struct {
					what      string
					got, want float64
					cond      float64
				}{
					{"ln F", lf, float64(pt.LogCDF), pt.Cond.LogCDF},
					{"ln S", ls, float64(pt.LogSF), pt.Cond.LogSF},
				} {
					if tol := spotTolerance(c.cond); !spotClose(c.got, c.want, tol, false) {
						t.Errorf("%s CDFTails(%.17g): %s = %.17g, exact %.17g (relative error %.3g, tolerance %.3g)",
							paramString(m.Params), pt.X, c.what, c.got, c.want, relErr(c.got, c.want), tol)
					}
				}
				want := math.Exp(float64(pt.LogCDF))
				if tol := spotTolerance(pt.Cond.LogCDF)*want + 4*eps; !(math.Abs(cdf-want) <= tol) {
					t.Errorf("%s CDFTails(%.17g): F = %.17g, exact %.17g", paramString(m.Params), pt.X, cdf, want)
				}
			}
		})
	}
}

// TestCDFTailsAgreesWithLogCDF checks each family's own CDFTails against
// its LogCDF and LogSurvival (themselves checked against exact values in
// TestReferenceSpot) on a dense grid: quantiles from 1e-12 to 1 − 1e-12
// and points far beyond both ends, outside the support included.
func TestCDFTailsAgreesWithLogCDF(t *testing.T) {
	members := []struct {
		family string
		params []float64
	}{
		{"normal", []float64{10, 2}},
		{"lognormal", []float64{1, 0.5}},
		{"lognormal", []float64{-3, 2.5}},
		{"lognormal3", []float64{1, 0.4, 20}},
		{"exponential", []float64{0.3}},
		{"gamma", []float64{2.5, 0.4}},
		{"gamma", []float64{0.3, 5}},
		{"gamma", []float64{400, 2}},
		{"invgauss", []float64{3, 8}},
		{"invgauss", []float64{1, 300}},
		{"gumbel", []float64{5, 2}},
		{"logistic", []float64{5, 2}},
		{"weibull", []float64{1.8, 120}},
		{"weibull", []float64{0.5, 2}},
		{"weibull3", []float64{2.2, 10, 5}},
		{"loglogistic", []float64{3, 4}},
		{"gev", []float64{5, 2, 0.1}},
		{"gev", []float64{5, 2, -0.3}},
		{"gev", []float64{5, 2, 0}},
		{"gpd", []float64{2, 0.2, 1}},
		{"gpd", []float64{2, -0.25, 1}},
		{"pareto", []float64{1, 2.5}},
	}
	for _, m := range members {
		f := lookup(t, m.family)
		dist, err := f.New(m.params)
		if err != nil {
			t.Fatal(err)
		}
		if _, ok := dist.(fitters.CDFTailer); !ok {
			t.Errorf("%s has no CDFTails of its own", m.family)
			continue
		}
		lo, med, hi := dist.Quantile(1e-3), dist.Quantile(0.5), dist.Quantile(1-1e-3)
		var xs []float64
		for _, p := range []float64{1e-12, 1e-9, 1e-6, 1e-4, 0.01, 0.1, 0.25, 0.4, 0.49, 0.5, 0.51, 0.6, 0.75, 0.9, 0.99, 0.9999, 1 - 1e-6, 1 - 1e-9, 1 - 1e-12} {
			xs = append(xs, dist.Quantile(p))
		}
		for k := 0; k < 12; k++ {
			s := math.Ldexp(1, k)
			xs = append(xs, hi+s*(hi-med), lo-s*(med-lo), lo*math.Pow(10, -float64(k)))
		}
		for _, x := range xs {
			cdf, lf, ls := dist.(fitters.CDFTailer).CDFTails(x)
			wf, ws := dist.LogCDF(x), dist.LogSurvival(x)
			if !logsAgree(lf, wf) || !logsAgree(ls, ws) || !(math.Abs(cdf-math.Exp(wf)) <= 1e-15) {
				t.Errorf("%s%v at x = %.17g: CDFTails (%.17g, %.17g, %.17g), LogCDF/LogSurvival (%.17g, %.17g, %.17g)",
					m.family, m.params, x, cdf, lf, ls, math.Exp(wf), wf, ws)
			}
		}
	}
}

// logsAgree: equal infinities and zeros, otherwise within 1e-9 relative.
// Not tighter: normal.go's ln Φ(z) for 3 < z < 5 is ln(1 − Q) with 1 − Q
// rounded first, good to about 1e-10 relative only (within
// TestReferenceSpot's 1e-10), where normalTails takes log1p(−Q) and keeps
// every digit; the exact values are checked in TestCDFTailsSpot.
func logsAgree(got, want float64) bool {
	if math.IsInf(want, 0) || want == 0 {
		return got == want
	}
	return math.Abs(got-want) <= 1e-9*math.Abs(want)
}
