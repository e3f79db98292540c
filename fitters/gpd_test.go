package fitters

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// Reference: testdata/families/gpd.json (scipy genpareto with loc fixed at
// the threshold, careful multi-start maximisation by make_multi.py).
func TestGPDReferenceFits(t *testing.T) {
	multiCheckFits(t, "gpd", 1e-6, func(i int, p []float64) float64 {
		if i == 1 {
			return 0.01 // shape near 0: absolute 1e-8
		}
		return 0
	})
}

func TestGPDSpotValues(t *testing.T) { multiCheckSpots(t, "gpd", 1e-9) }

func TestGPDGradient(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	y := make([]float64, 40)
	for i := range y {
		y[i] = GPD{2, 0.2, 0}.Rand(r)
	}
	for _, th := range [][]float64{{math.Log(2), 0.2}, {0.5, 1e-10}, {1, 0}, {1.2, -0.1}, {0.7, 0.003}} {
		multiCheckGradient(t, "gpd", gpdNLL(y), th, 1e-6)
	}
	multiCheckRoundTrip(t, GPD{2, -0.3, 10}, []float64{10.001, 11, 13, 16})
	multiCheckRoundTrip(t, GPD{2, 0.3, 10}, []float64{10.001, 11, 13, 160})
}

func TestGPDApplicable(t *testing.T) {
	f := gpdFamily{}
	for _, c := range []struct {
		name  string
		x     []float64
		fixed Fixed
	}{
		{"threshold not fixed", []float64{31, 32, 35}, nil},
		{"value below threshold", []float64{29, 32, 35}, Fixed{"threshold": 30}},
		{"all at threshold", []float64{30, 30, 30}, Fixed{"threshold": 30}},
	} {
		if err := f.Applicable(Complete(c.x), c.fixed); !errors.Is(err, ErrInapplicable) {
			t.Errorf("%s: got %v, want an InapplicableError", c.name, err)
		}
	}
	if err := f.Applicable(Complete([]float64{30, 31, 35}), Fixed{"threshold": 30}); err != nil {
		t.Errorf("values ≥ threshold: %v", err)
	}
	if err := f.Applicable(Complete([]float64{30, 31, 35}), Fixed{"scale": 3}); err == nil {
		t.Errorf("fixing the scale must be refused")
	}
}

// Excesses crowding the upper endpoint (true shape −1.5): the likelihood is
// unbounded for shape < −1; the fit reports an interior local maximum with a
// note or says it is non-regular, never the runaway value.
func TestGPDUnboundedShape(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	x := make([]float64, 25)
	for i := range x {
		x[i] = GPD{3, -1.5, 10}.Rand(r)
	}
	fit, err := gpdFamily{}.Fit(Complete(x), Options{Fixed: Fixed{"threshold": 10}})
	if err != nil {
		t.Fatal(err)
	}
	if fit.Converged {
		if !(fit.Estimate("shape") > -1) || fit.Note == "" {
			t.Errorf("converged with shape %v, note %q", fit.Estimate("shape"), fit.Note)
		}
	} else if fit.Reason == "" || !math.IsNaN(fit.LogLik) {
		t.Errorf("non-regular fit must give a reason and no log-likelihood: %+v", fit)
	}
	if fit.K != 2 || !fit.Fixed[2] || fit.Estimates[2] != 10 {
		t.Errorf("threshold must be reported fixed with k = 2: %+v", fit)
	}
	t.Logf("shape %v converged %v note %q reason %q", fit.Estimate("shape"), fit.Converged, fit.Note, fit.Reason)
}

func TestGPDCensored(t *testing.T) {
	ref := loadMultiRef(t, "gpd")
	c := ref.Cases[0]
	d := &Data{}
	for _, v := range c.Data {
		if v > 45 {
			d.Right = append(d.Right, 45)
		} else {
			d.Exact = append(d.Exact, v)
		}
	}
	fit, err := gpdFamily{}.Fit(d, Options{Fixed: c.Fixed})
	if err != nil || !fit.Converged {
		t.Fatalf("err %v fit %+v", err, fit)
	}
	multiCheckNearby(t, gpdFamily{}, fit, d)
}
