package fitters

import (
	"math"
	"testing"
)

func TestGammaFamily(t *testing.T) { coreFamilyChecks(t, "gamma") }

func TestGammaRobust(t *testing.T) {
	x := loadCoreReference(t, "gamma").Fits[0].Data
	t.Run("tiny", func(t *testing.T) {
		checkScaleEquivariance(t, "gamma", x, math.Ldexp(1, -20), []int{0, -1}, nil)
	})
	t.Run("huge", func(t *testing.T) {
		checkScaleEquivariance(t, "gamma", x, math.Ldexp(1, 990), []int{0, -1}, nil)
	})
	t.Run("clustered", func(t *testing.T) {
		// For data with a tiny relative spread, ln x̄ − mean ln x ≈ v/(2m²)
		// and k̂ ≈ 1/(2s) ≈ m²/v.
		checkClustered(t, "gamma", 1e-6, func(fit *Fit, m, sd float64) (float64, float64) {
			return fit.Estimate("shape"), m * m / (sd * sd)
		})
	})
}

func TestGammaInapplicable(t *testing.T) {
	checkInapplicable(t, "gamma", Complete([]float64{1, 0, 3}))
	checkInapplicable(t, "gamma", Complete([]float64{5, 5}))
}

// TestLogMinusDigamma checks ln k − ψ(k) against exact values of ψ:
// ψ(1) = −γ, ψ(n) = −γ + Σ_{j<n} 1/j, ψ(1/2) = −γ − 2 ln 2 (Abramowitz &
// Stegun 6.3.2–6.3.4; γ = 0.57721566490153286061, A&S 6.1.3), the
// derivative against central differences, and the large-k series.
func TestLogMinusDigamma(t *testing.T) {
	const euler = 0.57721566490153286061
	harmonic := func(n int) float64 {
		var s float64
		for j := 1; j < n; j++ {
			s += 1 / float64(j)
		}
		return s
	}
	for _, c := range []struct{ k, psi float64 }{
		{0.5, -euler - 2*math.Ln2},
		{1, -euler},
		{3, -euler + harmonic(3)},
		{11, -euler + harmonic(11)},
		{12, -euler + harmonic(12)},
		{40, -euler + harmonic(40)},
	} {
		v, _ := logMinusDigamma(c.k)
		if want := math.Log(c.k) - c.psi; relDiff(v, want, 1e-300) > 1e-13*math.Max(1, math.Log(c.k)/want) {
			t.Errorf("ln k − ψ(k) at %v = %v, exact %v", c.k, v, want)
		}
	}
	for _, k := range []float64{1e-3, 0.5, 3, 11.9, 12.1, 50, 1e3} {
		_, dv := logMinusDigamma(k)
		h := 1e-4 * k
		v1, _ := logMinusDigamma(k + h)
		v0, _ := logMinusDigamma(k - h)
		if fd := (v1 - v0) / (2 * h); relDiff(dv, fd, 1e-300) > 1e-6 {
			t.Errorf("derivative at %v = %v, central difference %v", k, dv, fd)
		}
	}
	// Large k: ln k − ψ(k) = 1/(2k) + 1/(12k²) + O(k⁻⁴) (Abramowitz & Stegun 6.3.18).
	v, _ := logMinusDigamma(1e8)
	if want := 0.5e-8 + 1.0/12e16; relDiff(v, want, 1e-300) > 1e-15 {
		t.Errorf("ln k − ψ(k) at 1e8 = %v, want %v", v, want)
	}
}
