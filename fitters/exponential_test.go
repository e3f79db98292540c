package fitters

import (
	"math"
	"testing"
)

func TestExponentialFamily(t *testing.T) { coreFamilyChecks(t, "exponential") }

func TestExponentialRobust(t *testing.T) {
	x := loadCoreReference(t, "exponential").Fits[0].Data
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "exponential", x, math.Ldexp(1, -20), []int{-1}, nil)
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "exponential", x, math.Ldexp(1, 990), []int{-1}, nil)
	})
	t.Run("zeros allowed", func(t *testing.T) {
		fit, err := mustFamily(t, "exponential").Fit(Complete([]float64{0, 0, 1, 3}), Options{})
		if err != nil || !fit.Converged || fit.Estimates[0] != 1 {
			t.Fatalf("fit of {0,0,1,3}: %v %+v, want rate 4/4 = 1", err, fit)
		}
		// ln L = n ln λ − λΣx = 0 − 4
		if fit.LogLik != -4 {
			t.Errorf("loglik %v, want −4", fit.LogLik)
		}
	})
	t.Run("right-censored closed form", func(t *testing.T) {
		// Epstein & Sobel (1953): λ̂ = r / total time on test.
		d := &Data{Exact: []float64{2, 3, 5}, Right: []float64{10, 10}}
		fit, err := mustFamily(t, "exponential").Fit(d, Options{})
		if err != nil || !fit.Converged {
			t.Fatal(err, fit)
		}
		if want := 3.0 / 30; relDiff(fit.Estimates[0], want, 1) > 1e-15 {
			t.Errorf("rate %v, want %v", fit.Estimates[0], want)
		}
		checkOptimum(t, mustFamily(t, "exponential"), fit, d)
	})
}

func TestExponentialInapplicable(t *testing.T) {
	checkInapplicable(t, "exponential", Complete([]float64{1, -2}))
	checkInapplicable(t, "exponential", Complete([]float64{0, 0}))
	checkInapplicable(t, "exponential", Complete(nil))
}
