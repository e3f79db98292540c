package fitters_test

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"fitseal/fitters"
)

// batchMembers are the families with a batch routine of their own and the
// others (through CDFTails or LogCDF/LogSurvival), with parameters from
// the tests of CDFTails.
var batchMembers = []struct {
	family string
	params []float64
}{
	{"normal", []float64{10, 2}},
	{"lognormal", []float64{1, 0.5}},
	{"lognormal", []float64{-3, 2.5}},
	{"exponential", []float64{0.3}},
	{"gamma", []float64{2.5, 0.4}},
	{"gamma", []float64{0.3, 5}},
	{"gamma", []float64{40, 2}},
	{"gamma", []float64{400, 2}},
	{"invgauss", []float64{3, 8}},
	{"invgauss", []float64{1, 300}},
	{"invgauss", []float64{10, 150}},
	{"invgauss", []float64{1, 0.1}},
	{"gumbel", []float64{5, 2}},
	{"logistic", []float64{5, 2}},
	{"weibull", []float64{1.8, 120}},
	{"weibull", []float64{0.5, 2}},
	{"weibull", []float64{40, 1e6}},
	{"loglogistic", []float64{3, 4}},
	{"gev", []float64{5, 2, 0.1}},
	{"pareto", []float64{1, 2.5}},
	{"beta", []float64{2, 3}},
}

// batchPoints returns, sorted, a seeded sample of 700 from d, its
// quantiles from 1e-12 to 1 − 1e-12, points far beyond both ends, and
// points outside the support.
func batchPoints(d fitters.Dist) []float64 {
	r := rand.New(rand.NewPCG(11, 12))
	var xs []float64
	for range 700 {
		xs = append(xs, d.Rand(r))
	}
	for _, p := range []float64{1e-12, 1e-9, 1e-6, 1e-4, 0.01, 0.1, 0.25, 0.4, 0.49, 0.5, 0.51, 0.6, 0.75, 0.9, 0.99, 0.9999, 1 - 1e-6, 1 - 1e-9, 1 - 1e-12} {
		xs = append(xs, d.Quantile(p))
	}
	lo, med, hi := d.Quantile(1e-3), d.Quantile(0.5), d.Quantile(1-1e-3)
	for k := 0; k < 12; k++ {
		s := math.Ldexp(1, k)
		xs = append(xs, hi+s*(hi-med), lo-s*(med-lo), lo*math.Pow(10, -float64(k)))
	}
	xs = append(xs, 0, -1)
	slices.Sort(xs)
	return xs
}

// TestCDFTailsBatchEqualsCDFTails: the batch routines give F, ln F and ln S
// bit for bit as fitters.CDFTails point by point (on arm64 to 1e-13:
// TwinsAgree) (whose accuracy
// TestCDFTailsSpot checks against mpmath), over a sample, far quantiles,
// points beyond both tails and outside the support, in blocks of every
// length up to CDFTailsBlock.
func TestCDFTailsBatchEqualsCDFTails(t *testing.T) {
	for _, m := range batchMembers {
		d, err := lookup(t, m.family).New(m.params)
		if err != nil {
			t.Fatal(err)
		}
		xs := batchPoints(d)
		f := make([]float64, fitters.CDFTailsBlock)
		lf := make([]float64, fitters.CDFTailsBlock)
		ls := make([]float64, fitters.CDFTailsBlock)
		for lo, step := 0, 1; lo < len(xs); lo, step = lo+step, step%fitters.CDFTailsBlock+7 {
			block := xs[lo:min(lo+step, len(xs))]
			fitters.CDFTailsBatch(d, block, f, lf, ls)
			for j, x := range block {
				wf, wlf, wls := fitters.CDFTails(d, x)
				if !same(f[j], wf) || !same(lf[j], wlf) || !same(ls[j], wls) {
					t.Errorf("%s%v at x = %.17g: batch (%.17g, %.17g, %.17g), CDFTails (%.17g, %.17g, %.17g)",
						m.family, m.params, x, f[j], lf[j], ls[j], wf, wlf, wls)
				}
			}
		}
	}
}

// same is equality that takes NaN as equal to NaN.
func same(a, b float64) bool { return fitters.TwinsAgree(a, b) }
