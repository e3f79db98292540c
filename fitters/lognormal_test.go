package fitters

import (
	"math"
	"testing"
)

func TestLogNormalFamily(t *testing.T) { coreFamilyChecks(t, "lognormal") }

func TestLogNormalRobust(t *testing.T) {
	ref := loadCoreReference(t, "lognormal")
	x := ref.Fits[0].Data
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "lognormal", x, math.Ldexp(1, -20), []int{0, 0}, []bool{true, false})
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "lognormal", x, math.Ldexp(1, 990), []int{0, 0}, []bool{true, false})
	})
	t.Run("clustered", func(t *testing.T) {
		// 1e7 + u, u spread 0.1: σ ≈ sd(u)/1e7, μ ≈ ln 1e7.
		checkClustered(t, "lognormal", 1e-6, func(fit *Fit, m, sd float64) (float64, float64) {
			return fit.Estimate("sigma"), sd / m
		})
	})
}

func TestLogNormalInapplicable(t *testing.T) {
	checkInapplicable(t, "lognormal", Complete([]float64{1, 2, 0}))
	checkInapplicable(t, "lognormal", Complete([]float64{1, -2, 3}))
	checkInapplicable(t, "lognormal", Complete([]float64{2, 2, 2}))
	checkInapplicable(t, "lognormal", Complete([]float64{2}))
}
