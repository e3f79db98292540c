package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Reference: testdata/families/studentt.json (scipy t, careful multi-start
// maximisation; spot values by mpmath at 60 digits; the light-tailed case's
// reference is the normal maximum, df = +Inf; make_multi.py).
func TestStudentTReferenceFits(t *testing.T) {
	multiCheckFits(t, "studentt", 1e-6, func(i int, p []float64) float64 {
		if i == 0 {
			return p[1] // location: relative to the scale
		}
		return 0
	})
}

func TestStudentTSpotValues(t *testing.T) { multiCheckSpots(t, "studentt", 1e-9) }

func TestStudentTGradient(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 40)
	for i := range x {
		x[i] = StudentT{3, 2, 4}.Rand(r)
	}
	for _, th := range [][]float64{{3, math.Log(2), math.Log(4)}, {2.5, 0, 0}, {3, 1, math.Log(300)}, {3.2, 0.6, math.Log(1e6)}} {
		multiCheckGradient(t, "studentt", studentTNLL(x), th, 1e-6)
	}
	multiCheckRoundTrip(t, StudentT{1, 2, 3}, []float64{-100, -3, 0.999, 1, 1.001, 5, 1000})
}

// lnGammaHalfStep against ln Γ(x+½) − ln Γ(x) by mpmath at 40 digits
// (mpmath.loggamma, Debian python3-mpmath 1.2.1).
func TestLnGammaHalfStep(t *testing.T) {
	for _, c := range []struct{ x, want float64 }{
		{10, 1.138797739322294022}, {12.5, 1.2528669837254404479},
		{40, 1.841314808421924927}, {300, 2.8514745708543344546},
	} {
		if got := lnGammaHalfStep(c.x); math.Abs(got-c.want) > 2e-16*c.want {
			t.Errorf("x=%v: %.17g, mpmath %.17g", c.x, got, c.want)
		}
	}
}

// Uniform data have kurtosis 1.8 < 3: the likelihood increases with df all
// the way to the normal limit, which must be reported with a note.
func TestStudentTNormalLimit(t *testing.T) {
	ref := loadMultiRef(t, "studentt")
	for _, c := range ref.Cases {
		if c.Limit == "" {
			continue
		}
		fit, err := studentTFamily{}.Fit(Complete(c.Data), Options{})
		if err != nil {
			t.Fatal(err)
		}
		if !math.IsInf(fit.Estimate("df"), 1) || fit.Note == "" || !fit.Converged {
			t.Errorf("want df = +Inf with a note, got %+v", fit)
		}
		// The limit's log-likelihood is the normal one, and finite df do worse.
		if ll := (studentTFamily{}).LogLik([]float64{fit.Estimates[0], fit.Estimates[1], 1e4}, Complete(c.Data)); ll >= fit.LogLik {
			t.Errorf("df = 1e4 gives %v ≥ limit %v", ll, fit.LogLik)
		}
	}
}

func TestStudentTCensored(t *testing.T) {
	ref := loadMultiRef(t, "studentt")
	d := &Data{}
	for _, v := range ref.Cases[0].Data {
		switch {
		case v < -2:
			d.Left = append(d.Left, -2)
		case v > 12:
			d.Right = append(d.Right, 12)
		default:
			d.Exact = append(d.Exact, v)
		}
	}
	fit, err := studentTFamily{}.Fit(d, Options{})
	if err != nil || !fit.Converged || math.IsInf(fit.Estimate("df"), 1) {
		t.Fatalf("err %v fit %+v", err, fit)
	}
	multiCheckNearby(t, studentTFamily{}, fit, d)
}

// Rounded data with ties (values to one decimal): the fit must still
// converge to an interior maximum.
func TestStudentTTies(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	x := make([]float64, 60)
	for i := range x {
		x[i] = math.Round(StudentT{0, 1, 5}.Rand(r)*10) / 10
	}
	fit, err := studentTFamily{}.Fit(Complete(x), Options{})
	if err != nil || !fit.Converged {
		t.Fatalf("err %v fit %+v", err, fit)
	}
	multiCheckNearby(t, studentTFamily{}, fit, Complete(x))
}
