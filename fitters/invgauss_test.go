package fitters

import (
	"math"
	"testing"
)

func TestInvGaussFamily(t *testing.T) { coreFamilyChecks(t, "invgauss") }

func TestInvGaussRobust(t *testing.T) {
	x := loadCoreReference(t, "invgauss").Fits[0].Data
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "invgauss", x, 0x1p-20, []int{1, 1}, nil)
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "invgauss", x, 0x1p990, []int{1, 1}, nil)
	})
	t.Run("clustered", func(t *testing.T) {
		// 1/λ̂ = mean((x − x̄)²/(x x̄²)) ≈ v/m³ for a tiny relative spread.
		checkClustered(t, "invgauss", 1e-6, func(fit *Fit, m, sd float64) (float64, float64) {
			return fit.Estimate("shape"), m * m * m / (sd * sd)
		})
	})
}

func TestInvGaussInapplicable(t *testing.T) {
	checkInapplicable(t, "invgauss", Complete([]float64{1, 0, 3}))
	checkInapplicable(t, "invgauss", Complete([]float64{2, 2}))
}

// TestInvGaussSurvivalFarTail checks the far upper tail, where
// Φ(−a) − e^(2λ/μ)Φ(−b) cancels completely in double precision, against
// the tail's leading behaviour: S(x)/f(x) → 2μ²/λ as x → ∞ (the density's
// exponential rate is λ/(2μ²)), so ln S − ln f → ln(2μ²/λ).
func TestInvGaussSurvivalFarTail(t *testing.T) {
	d := InvGauss{Mean: 4, Shape: 9}
	want := math.Log(2 * 16 / 9.0)
	for _, x := range []float64{1e4, 1e5, 1e6} {
		got := d.LogSurvival(x) - d.LogPDF(x)
		// Next-order term: S/f = (2μ²/λ)(1 − 3μ²/(λx)·… ), within 1e-2 at 1e4.
		if math.Abs(got-want) > 300/x {
			t.Errorf("ln S − ln f at %v = %v, want → %v", x, got, want)
		}
		if math.IsInf(d.LogSurvival(x), 0) {
			t.Errorf("LogSurvival(%v) is infinite", x)
		}
	}
}
