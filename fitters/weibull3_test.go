package fitters

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// Reference: testdata/families/weibull3.json (scipy weibull_min with loc
// below the sample minimum, careful multi-start maximisation of the interior
// local maximum, make_multi.py).
func TestWeibull3ReferenceFits(t *testing.T) {
	multiCheckFits(t, "weibull3", 1e-6, func(i int, p []float64) float64 {
		if i == 2 {
			return p[1] // threshold: relative to the scale
		}
		return 0
	})
}

func TestWeibull3SpotValues(t *testing.T) { multiCheckSpots(t, "weibull3", 1e-9) }

func TestWeibull3Gradient(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 40)
	for i := range x {
		x[i] = Weibull3{2, 3, 10}.Rand(r)
	}
	floor, _ := minMax(x)
	dev := make([]float64, len(x))
	for i, v := range x {
		dev[i] = v - floor
	}
	for _, th := range [][]float64{{math.Log(2), math.Log(3), 0}, {0, 1, -2}, {1.5, 1.2, 1}} {
		multiCheckGradient(t, "weibull3", weibull3NLL(dev, true), th, 1e-6)
		multiCheckGradient(t, "weibull3 fixed", weibull3NLL(x, false), th[:2], 1e-6)
	}
	multiCheckRoundTrip(t, Weibull3{2, 3, 10}, []float64{10.0001, 11, 13, 20})
}

func TestWeibull3Applicable(t *testing.T) {
	f := weibull3Family{}
	if err := f.Applicable(Complete([]float64{29, 32, 35}), Fixed{"threshold": 30}); !errors.Is(err, ErrInapplicable) {
		t.Errorf("value below the fixed threshold: got %v", err)
	}
	if err := f.Applicable(Complete([]float64{31, 32}), nil); !errors.Is(err, ErrInapplicable) {
		t.Errorf("two values for three parameters: got %v", err)
	}
	if err := f.Applicable(Complete([]float64{31, 32}), Fixed{"shape": 2}); err == nil {
		t.Errorf("fixing the shape must be refused")
	}
}

// Shape below 1: the likelihood grows without bound as the threshold nears
// the sample minimum and typically has no interior maximum. The fit must
// never report the runaway value: either an interior local maximum with a
// note, or non-regular with a reason and no log-likelihood.
func TestWeibull3Unbounded(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	x := make([]float64, 80)
	for i := range x {
		x[i] = Weibull3{0.6, 2, 5}.Rand(r)
	}
	fit, err := weibull3Family{}.Fit(Complete(x), Options{})
	if err != nil {
		t.Fatal(err)
	}
	checkIrregular(t, fit, x)
}

// checkIrregular asserts the convention for threshold families: a converged
// fit is an interior local maximum strictly below the minimum, with a note
// (moving the threshold by ±0.1% of its gap to the minimum, or any other
// parameter by ±1e-6 relative, lowers the log-likelihood); otherwise a
// reason and no numbers.
func checkIrregular(t *testing.T, fit *Fit, x []float64) {
	t.Helper()
	lo, _ := minMax(x)
	if fit.Converged {
		g := fit.Estimate("threshold")
		if !(g < lo) || fit.Note == "" {
			t.Errorf("converged at threshold %v (minimum %v), note %q", g, lo, fit.Note)
		}
		f, _ := Lookup(fit.Family)
		for i := range fit.Estimates {
			for _, s := range []float64{1, -1} {
				p := append([]float64(nil), fit.Estimates...)
				if i == 2 {
					p[i] += s * 1e-3 * (lo - g)
				} else {
					p[i] *= 1 + s*1e-6
				}
				if ll := f.LogLik(p, Complete(x)); ll > fit.LogLik+1e-10*math.Abs(fit.LogLik) {
					t.Errorf("nearby %v gives %v > %v", p, ll, fit.LogLik)
				}
			}
		}
	} else if fit.Reason == "" || !math.IsNaN(fit.LogLik) {
		t.Errorf("non-regular fit must give a reason and no log-likelihood: %+v", fit)
	}
	t.Logf("estimates %v loglik %v converged %v note %q reason %q", fit.Estimates, fit.LogLik, fit.Converged, fit.Note, fit.Reason)
}

// Symmetric data: the three-parameter Weibull tends to its smallest-extreme-
// value limit as the threshold → −∞ or has a far interior maximum; either
// way the convention holds.
func TestWeibull3FarThreshold(t *testing.T) {
	r := rand.New(rand.NewPCG(13, 14))
	x := make([]float64, 100)
	for i := range x {
		x[i] = 50 - Weibull3{1, 1, 0}.Rand(r) // left-skewed
	}
	fit, err := weibull3Family{}.Fit(Complete(x), Options{})
	if err != nil {
		t.Fatal(err)
	}
	checkIrregular(t, fit, x)
}

func TestWeibull3Censored(t *testing.T) {
	ref := loadMultiRef(t, "weibull3")
	d := &Data{}
	for _, v := range ref.Cases[0].Data {
		if v > 20 {
			d.Right = append(d.Right, 20)
		} else {
			d.Exact = append(d.Exact, v)
		}
	}
	fit, err := weibull3Family{}.Fit(d, Options{})
	if err != nil || !fit.Converged {
		t.Fatalf("err %v fit %+v", err, fit)
	}
	multiCheckNearby(t, weibull3Family{}, fit, d)
	fixed, err := weibull3Family{}.Fit(d, Options{Fixed: Fixed{"threshold": 5}})
	if err != nil || !fixed.Converged || fixed.K != 2 || !fixed.Fixed[2] {
		t.Fatalf("fixed threshold: err %v fit %+v", err, fixed)
	}
	multiCheckNearby(t, weibull3Family{}, fixed, d)
}
