package fitters

import "testing"

func TestGumbelFamily(t *testing.T) { coreFamilyChecks(t, "gumbel") }

func TestGumbelRobust(t *testing.T) {
	x := loadCoreReference(t, "gumbel").Fits[0].Data
	t.Run("far from zero", func(t *testing.T) { checkShiftEquivariance(t, "gumbel", x) })
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "gumbel", x, 0x1p-20, []int{1, 1}, nil)
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "gumbel", x, 0x1p990, []int{1, 1}, nil)
	})
}

func TestGumbelInapplicable(t *testing.T) {
	checkInapplicable(t, "gumbel", Complete([]float64{3, 3, 3}))
	checkInapplicable(t, "gumbel", Complete([]float64{3}))
}
