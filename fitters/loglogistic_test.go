package fitters

import (
	"math"
	"testing"
)

func TestLogLogisticFamily(t *testing.T) { coreFamilyChecks(t, "loglogistic") }

func TestLogLogisticRobust(t *testing.T) {
	x := loadCoreReference(t, "loglogistic").Fits[0].Data
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "loglogistic", x, 0x1p-20, []int{1, 0}, nil)
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "loglogistic", x, 0x1p990, []int{1, 0}, nil)
	})
	t.Run("clustered", func(t *testing.T) {
		// ln x ≈ ln m + (x − m)/m: a logistic of scale ≈ sd·√3/(π m) fitted
		// to uniform values (hence the loose tolerance).
		checkClustered(t, "loglogistic", 0.5, func(fit *Fit, m, sd float64) (float64, float64) {
			return fit.Estimate("shape"), math.Pi * m / (math.Sqrt(3) * sd)
		})
	})
}

func TestLogLogisticInapplicable(t *testing.T) {
	checkInapplicable(t, "loglogistic", Complete([]float64{1, 0, 3}))
	checkInapplicable(t, "loglogistic", Complete([]float64{7, 7}))
}
