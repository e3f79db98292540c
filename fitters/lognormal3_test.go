package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Reference: testdata/families/lognormal3.json (scipy lognorm with loc below
// the sample minimum, careful multi-start maximisation of the interior local
// maximum; the fixed-threshold case is the closed form on ln(x − u),
// make_multi.py).
func TestLognormal3ReferenceFits(t *testing.T) {
	multiCheckFits(t, "lognormal3", 1e-6, func(i int, p []float64) float64 {
		switch i {
		case 0:
			return 1 // mu, a logarithm: absolute 1e-6 near 0
		case 2:
			return math.Exp(p[0]) * p[1] // threshold: relative to the spread
		}
		return 0
	})
}

func TestLognormal3SpotValues(t *testing.T) { multiCheckSpots(t, "lognormal3", 1e-9) }

func TestLognormal3Gradient(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 40)
	for i := range x {
		x[i] = Lognormal3{1, 0.5, 10}.Rand(r)
	}
	floor, _ := minMax(x)
	dev := make([]float64, len(x))
	for i, v := range x {
		dev[i] = v - floor
	}
	for _, th := range [][]float64{{1, math.Log(0.5), 0}, {0, 1, -2}, {1.5, -0.2, 1}} {
		multiCheckGradient(t, "lognormal3", lognormal3NLL(dev, true), th, 1e-6)
		multiCheckGradient(t, "lognormal3 fixed", lognormal3NLL(x, false), th[:2], 1e-6)
	}
	multiCheckRoundTrip(t, Lognormal3{1, 0.5, 10}, []float64{10.01, 11, 13, 20})
}

// Heavy lognormal data (sigma 2.5): the likelihood is unbounded as the
// threshold nears the minimum. Here an interior local maximum lies 3.1e-4
// below the minimum (the profile log-likelihood in the threshold, by the
// closed-form mu and sigma, is −93.8596 there and −93.871 at gaps 2e-4 and
// 5e-4, −97.3 at 1e-10); the convention of checkIrregular holds.
func TestLognormal3Unbounded(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	x := make([]float64, 40)
	for i := range x {
		x[i] = Lognormal3{0, 2.5, 3}.Rand(r)
	}
	fit, err := lognormal3Family{}.Fit(Complete(x), Options{})
	if err != nil {
		t.Fatal(err)
	}
	checkIrregular(t, fit, x)
}

// Uniform data (no skew): the maximum lies at the normal limit, threshold →
// −∞; the fit must not report a huge finite threshold as converged.
func TestLognormal3NormalLimit(t *testing.T) {
	r := rand.New(rand.NewPCG(23, 24))
	x := make([]float64, 100)
	for i := range x {
		x[i] = 10 + r.Float64()
	}
	fit, err := lognormal3Family{}.Fit(Complete(x), Options{})
	if err != nil {
		t.Fatal(err)
	}
	checkIrregular(t, fit, x)
}

func TestLognormal3Censored(t *testing.T) {
	ref := loadMultiRef(t, "lognormal3")
	d := &Data{}
	for _, v := range ref.Cases[0].Data {
		if v > 16 {
			d.Right = append(d.Right, 16)
		} else {
			d.Exact = append(d.Exact, v)
		}
	}
	fit, err := lognormal3Family{}.Fit(d, Options{})
	if err != nil || !fit.Converged {
		t.Fatalf("err %v fit %+v", err, fit)
	}
	multiCheckNearby(t, lognormal3Family{}, fit, d)
	fixed, err := lognormal3Family{}.Fit(d, Options{Fixed: Fixed{"threshold": 9}})
	if err != nil || !fixed.Converged || fixed.K != 2 || !fixed.Fixed[2] {
		t.Fatalf("fixed threshold: err %v fit %+v", err, fixed)
	}
	multiCheckNearby(t, lognormal3Family{}, fixed, d)
}
