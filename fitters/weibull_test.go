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

// TestWeibullLogCDFFarLowerTail: where the cumulative hazard (x/λ)^k
// underflows, ln F(x) = k ln(x/λ) − (x/λ)^k/2 + … is still finite (a
// left-censored value far below the scale must not contribute ln 0).
// Reference: the series itself; at x/λ = 1e-200, k = 2, ln F = −400 ln 10.
func TestWeibullLogCDFFarLowerTail(t *testing.T) {
	d := Weibull{Shape: 2, Scale: 1}
	for _, c := range []struct{ x, want float64 }{
		{1e-200, -400 * math.Ln10},
		{1e-160, -320 * math.Ln10},
		{1e-10, -20*math.Ln10 - 1e-20/2},
	} {
		got := d.LogCDF(c.x)
		if math.Abs(got-c.want) > 1e-13*math.Abs(c.want) {
			t.Errorf("LogCDF(%g) = %v, want %v", c.x, got, c.want)
		}
		_, tails, _ := d.CDFTails(c.x)
		if math.Abs(tails-got) > 1e-13*math.Abs(c.want) {
			t.Errorf("CDFTails(%g) ln F = %v, LogCDF = %v", c.x, tails, got)
		}
	}
}
