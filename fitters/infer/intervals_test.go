package infer

import (
	"math"
	"testing"

	"fitseal/fitters"
)

// z975 and chi95 are the standard normal 0.975 quantile and the χ²₁ 0.95
// quantile (recalled from memory; chi95 = z975²).
const (
	z975  = 1.959963984540054
	chi95 = 3.841458820694124
)

func TestCutOff(t *testing.T) {
	if got := 2 * chiSquareCut(0.95); !close(got, chi95, 1e-12) {
		t.Errorf("χ²₁(0.95) = %v, want %v", got, chi95)
	}
}

// TestNormalIntervalsClosedForm checks Wald and profile intervals for the
// normal mean and standard deviation against their closed forms. With
// x̄ and σ̂² = Σ(x − x̄)²/n, c = χ²₁(0.95)/2:
//
//	Wald μ:     x̄ ± z σ̂/√n
//	Wald σ:     σ̂ exp(± z/√(2n))             (log scale; se(σ̂) = σ̂/√(2n))
//	profile μ:  ℓp(μ) = −(n/2) ln(σ̂² + (μ − x̄)²) + const, so
//	            μ = x̄ ± σ̂ √(exp(2c/n) − 1)
//	profile σ:  ℓ̂ − ℓp(σ) = (n/2)(r − 1 − ln r), r = σ̂²/σ², = c at both ends.
func TestNormalIntervalsClosedForm(t *testing.T) {
	fam := family(t, "normal")
	d := fitters.Complete(ballBearings)
	fit := fitOf(t, fam, d)
	n := float64(len(ballBearings))
	xbar, sig := meanAndMLSigma(ballBearings)
	c := chi95 / 2
	dev := func(r float64) float64 { return n/2*(r-1-math.Log(r)) - c }
	rLo, rHi := bisect(dev, 1e-6, 1), bisect(dev, 1, 100) // r = σ̂²/σ²: r < 1 is the upper σ
	want := map[Method][2][2]float64{
		MethodWald: {
			{xbar - z975*sig/math.Sqrt(n), xbar + z975*sig/math.Sqrt(n)},
			{sig * math.Exp(-z975/math.Sqrt(2*n)), sig * math.Exp(z975/math.Sqrt(2*n))},
		},
		MethodProfile: {
			{xbar - sig*math.Sqrt(math.Expm1(2*c/n)), xbar + sig*math.Sqrt(math.Expm1(2*c/n))},
			{sig / math.Sqrt(rHi), sig / math.Sqrt(rLo)},
		},
	}
	for _, m := range []Method{MethodWald, MethodProfile} {
		rows, err := Intervals(fam, fit, d, m, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range rows {
			w := want[m][i]
			if !close(r.Lower, w[0], 1e-7) || !close(r.Upper, w[1], 1e-7) || r.LowerOpen || r.UpperOpen {
				t.Errorf("%s %s: (%v, %v), want (%v, %v); note %q", m, r.Parameter, r.Lower, r.Upper, w[0], w[1], r.Note)
			}
		}
		if se := rows[0].StdError; !close(se, sig/math.Sqrt(n), 1e-9) {
			t.Errorf("se(mu) = %v, want σ̂/√n = %v", se, sig/math.Sqrt(n))
		}
		if se := rows[1].StdError; !close(se, sig/math.Sqrt(2*n), 1e-9) {
			t.Errorf("se(sigma) = %v, want σ̂/√(2n) = %v", se, sig/math.Sqrt(2*n))
		}
	}
}

// TestExponentialIntervalsClosedForm: with ρ = λ/λ̂, ℓ̂ − ℓ(λ) = n(ρ − 1 − ln ρ),
// so the profile interval solves n(ρ − 1 − ln ρ) = χ²₁(0.95)/2 (Cox &
// Hinkley, 1974); Wald on the log scale is λ̂ exp(±z/√n) (se(λ̂) = λ̂/√n).
func TestExponentialIntervalsClosedForm(t *testing.T) {
	fam := family(t, "exponential")
	d := fitters.Complete(ballBearings)
	fit := fitOf(t, fam, d)
	n := float64(len(ballBearings))
	lam := fit.Estimates[0]
	dev := func(r float64) float64 { return n*(r-1-math.Log(r)) - chi95/2 }
	tests := []struct {
		m      Method
		lo, hi float64
	}{
		{MethodWald, lam * math.Exp(-z975/math.Sqrt(n)), lam * math.Exp(z975/math.Sqrt(n))},
		{MethodProfile, lam * bisect(dev, 1e-6, 1), lam * bisect(dev, 1, 100)},
	}
	for _, tc := range tests {
		rows, err := Intervals(fam, fit, d, tc.m, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		r := rows[0]
		if !close(r.Lower, tc.lo, 1e-7) || !close(r.Upper, tc.hi, 1e-7) {
			t.Errorf("%s: (%v, %v), want (%v, %v); note %q", tc.m, r.Lower, r.Upper, tc.lo, tc.hi, r.Note)
		}
		if !close(r.StdError, lam/math.Sqrt(n), 1e-9) {
			t.Errorf("se = %v, want %v", r.StdError, lam/math.Sqrt(n))
		}
	}
}
