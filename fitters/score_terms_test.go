package fitters

import (
	"math"
	"testing"
)

// TestLogisticScoreTerms: the derivative-only form used by the observed
// information gives bit for bit the g′ and g″ of logisticLogDensity, whose
// derivatives are checked against the density in logistic_test.go, and g″
// agrees with a central difference of g′ (independent of both codes).
func TestLogisticScoreTerms(t *testing.T) {
	for _, z := range []float64{-745, -40, -3.5, -1, -1e-9, 0, 1e-9, 0.5, 2, 17, 40, 745} {
		_, dg, d2g := logisticLogDensity(z)
		g1, g2 := logisticScoreTerms(z)
		if g1 != dg || g2 != d2g {
			t.Errorf("z=%g: (%g, %g), logisticLogDensity (%g, %g)", z, g1, g2, dg, d2g)
		}
		if math.Abs(z) < 30 {
			h := 1e-5
			a, _ := logisticScoreTerms(z + h)
			b, _ := logisticScoreTerms(z - h)
			if fd := (a - b) / (2 * h); math.Abs(fd-g2) > 1e-9 {
				t.Errorf("z=%g: g″ %g, central difference of g′ %g", z, g2, fd)
			}
		}
	}
}
