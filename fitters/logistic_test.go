package fitters

import "testing"

func TestLogisticFamily(t *testing.T) { coreFamilyChecks(t, "logistic") }

func TestLogisticRobust(t *testing.T) {
	x := loadCoreReference(t, "logistic").Fits[0].Data
	t.Run("far from zero", func(t *testing.T) { checkShiftEquivariance(t, "logistic", x) })
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "logistic", x, 0x1p-20, []int{1, 1}, nil)
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "logistic", x, 0x1p990, []int{1, 1}, nil)
	})
}

func TestLogisticInapplicable(t *testing.T) {
	checkInapplicable(t, "logistic", Complete([]float64{3, 3}))
}
