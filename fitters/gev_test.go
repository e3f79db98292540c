package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Reference: testdata/families/gev.json (scipy genextreme, c = −ξ, careful
// multi-start maximisation by testdata/families/make_multi.py).
func TestGEVReferenceFits(t *testing.T) {
	multiCheckFits(t, "gev", 1e-6, func(i int, p []float64) float64 {
		if i == 0 {
			return p[1] // location: relative to the scale
		}
		return 0.01 // shape near 0: absolute 1e-8
	})
}

func TestGEVSpotValues(t *testing.T) { multiCheckSpots(t, "gev", 1e-9) }

func TestGEVGradient(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 50)
	for i := range x {
		x[i] = GEV{10, 2, 0.2}.Rand(r)
	}
	for _, th := range [][]float64{{10, math.Log(2), 0.2}, {9, 0.5, 1e-9}, {10, 1, 0}, {10.5, 0.8, -0.1}, {10, 0.7, 0.004}} {
		multiCheckGradient(t, "gev", gevNLL(x), th, 1e-6)
	}
}

func TestGEVTinyShapeContinuity(t *testing.T) {
	// Through ξ = 0 the density must move smoothly (series branch of boxLog).
	for _, x := range []float64{-2, 0.3, 5, 30} {
		g := GEV{0, 1, 0}.LogPDF(x)
		for _, xi := range []float64{1e-12, -1e-12, 1e-9} {
			if v := (GEV{0, 1, xi}).LogPDF(x); math.Abs(v-g) > 1e-7*math.Max(1, math.Abs(g)) {
				t.Errorf("ξ=%v x=%v: %v vs Gumbel %v", xi, x, v, g)
			}
		}
	}
	multiCheckRoundTrip(t, GEV{3, 2, -0.3}, []float64{-5, 0, 3, 7, 9})
	multiCheckRoundTrip(t, GEV{3, 2, 0.3}, []float64{-1, 0, 3, 7, 90})
}

// Data from a bounded-tail distribution whose points crowd the upper end:
// the likelihood is unbounded for shape < −1, and the fit must either report
// a local maximum with shape > −1 (with a note) or say it is non-regular.
func TestGEVUnboundedShape(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	x := make([]float64, 30)
	for i := range x {
		x[i] = GEV{0, 1, -1.6}.Rand(r)
	}
	fit, err := gevFamily{}.Fit(Complete(x), Options{})
	if err != nil {
		t.Fatal(err)
	}
	switch {
	case fit.Converged:
		if !(fit.Estimate("shape") > -1) || fit.Note == "" {
			t.Errorf("converged with shape %v, note %q", fit.Estimate("shape"), fit.Note)
		}
	default:
		if fit.Reason == "" || !math.IsNaN(fit.LogLik) {
			t.Errorf("non-regular fit must give a reason and no log-likelihood: %+v", fit)
		}
	}
	t.Logf("shape %v converged %v note %q reason %q", fit.Estimate("shape"), fit.Converged, fit.Note, fit.Reason)
}

func TestGEVCensored(t *testing.T) {
	// Right-censor the largest values of the Fréchet-like sample: the fit
	// must converge and beat nearby points on the censored likelihood.
	ref := loadMultiRef(t, "gev")
	x := ref.Cases[0].Data
	d := &Data{}
	for _, v := range x {
		if v > 16 {
			d.Right = append(d.Right, 16)
		} else {
			d.Exact = append(d.Exact, v)
		}
	}
	fit, err := gevFamily{}.Fit(d, Options{})
	if err != nil || !fit.Converged {
		t.Fatalf("err %v fit %+v", err, fit)
	}
	multiCheckNearby(t, gevFamily{}, fit, d)
}
