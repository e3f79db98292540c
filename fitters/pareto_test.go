package fitters

import (
	"math"
	"testing"
)

func TestParetoFamily(t *testing.T) { coreFamilyChecks(t, "pareto") }

func TestParetoRobust(t *testing.T) {
	x := loadCoreReference(t, "pareto").Fits[0].Data
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "pareto", x, 0x1p-20, []int{1, 0}, nil)
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "pareto", x, 0x1p990, []int{1, 0}, nil)
	})
	t.Run("boundary note", func(t *testing.T) {
		fit, err := mustFamily(t, "pareto").Fit(Complete(x), Options{})
		if err != nil || !fit.Converged {
			t.Fatal(err, fit)
		}
		lo, _ := minMax(x)
		if fit.Estimates[0] != lo {
			t.Errorf("scale %v, want the sample minimum %v", fit.Estimates[0], lo)
		}
		if fit.Note == "" {
			t.Error("the boundary estimate of the scale is not noted")
		}
		if fit.K != 2 {
			t.Errorf("k = %d, want 2 (the scale is estimated)", fit.K)
		}
	})
	t.Run("clustered", func(t *testing.T) {
		// α̂ = n/Σ ln(x/min); for data within 0.1 of 1e7 that is ≈ 1/mean((x−min)/min).
		checkClusteredPareto(t)
	})
}

func checkClusteredPareto(t *testing.T) {
	x := make([]float64, 100)
	for i := range x {
		x[i] = 1e7 + 0.001*float64(i)
	}
	fit, err := mustFamily(t, "pareto").Fit(Complete(x), Options{})
	if err != nil || !fit.Converged {
		t.Fatal(err, fit)
	}
	// Σ (x − min)/min = 0.001·(0+…+99)/1e7 = 4.95e-7; ln(1+u) ≈ u − u²/2.
	var s float64
	for i := range x {
		u := (x[i] - 1e7) / 1e7 // x[i] − 1e7 is exact
		s += u - u*u/2
	}
	if want := 100 / s; relDiff(fit.Estimates[1], want, 1) > 1e-8 {
		t.Errorf("shape %v, want %v", fit.Estimates[1], want)
	}
}

func TestParetoInapplicable(t *testing.T) {
	checkInapplicable(t, "pareto", Complete([]float64{1, 0, 3}))
	checkInapplicable(t, "pareto", Complete([]float64{2, 2, 2}))
}

// TestParetoSuspensionBelowScale: a suspension below the smallest exact
// value has S = 1 at every admissible scale, so it changes neither estimate
// (Epstein & Sobel's total-time form counts only the time above the scale).
func TestParetoSuspensionBelowScale(t *testing.T) {
	f := mustFamily(t, "pareto")
	exact := []float64{2, 3, 5, 8}
	plain, err1 := f.Fit(Complete(exact), Options{})
	susp, err2 := f.Fit(&Data{Exact: exact, Right: []float64{1.5, 4}}, Options{})
	if err1 != nil || err2 != nil || !plain.Converged || !susp.Converged {
		t.Fatal(err1, err2, plain, susp)
	}
	if susp.Estimates[0] != 2 {
		t.Errorf("scale %v, want the smallest exact value 2", susp.Estimates[0])
	}
	// α̂ = 4 / (ln(3/2) + ln(5/2) + ln(8/2) + ln(4/2)): the suspension at 4 adds ln 2.
	want := 4 / (math.Log(1.5) + math.Log(2.5) + math.Log(4) + math.Log(2))
	if relDiff(susp.Estimates[1], want, 1) > 1e-14 {
		t.Errorf("shape %v, want %v", susp.Estimates[1], want)
	}
	checkOptimum(t, f, susp, &Data{Exact: exact, Right: []float64{1.5, 4}})
}
