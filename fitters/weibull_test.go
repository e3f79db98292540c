package fitters

import (
	"math"
	"testing"
)

func TestWeibullFamily(t *testing.T) { coreFamilyChecks(t, "weibull") }

func TestWeibullRobust(t *testing.T) {
	x := loadCoreReference(t, "weibull").Fits[0].Data
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "weibull", x, math.Ldexp(1, -20), []int{0, 1}, nil)
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "weibull", x, math.Ldexp(1, 990), []int{0, 1}, nil)
	})
	t.Run("clustered", func(t *testing.T) {
		// ln x is then nearly (x − m)/m, whose Weibull shape is of the order
		// of the Gumbel moment value π m/(√6 sd) (a uniform sample is not
		// Gumbel, hence the loose tolerance; the optimum check is the proof).
		checkClustered(t, "weibull", 0.5, func(fit *Fit, m, sd float64) (float64, float64) {
			return fit.Estimate("shape"), math.Pi * m / (math.Sqrt(6) * sd)
		})
	})
}

func TestWeibullInapplicable(t *testing.T) {
	checkInapplicable(t, "weibull", Complete([]float64{1, 0, 3}))
	checkInapplicable(t, "weibull", Complete([]float64{1, -1, 3}))
	checkInapplicable(t, "weibull", Complete([]float64{4, 4, 4}))
}
