package report

import (
	"math"
	"math/rand/v2"
	"testing"

	"fitseal/fitters"
)

// TestProfileCurveNormal checks the traced profile against its closed form,
// to 1e-9 relative,
// for the normal family with complete data (e.g. Pawitan 2001, §3.4):
//
//	ℓp(μ) = −n/2 · ln(2π σ̂²(μ)) − n/2,  σ̂²(μ) = mean (x − μ)²
//	ℓp(σ) = −n ln σ − n/2 · ln 2π − Σ(x − x̄)²/(2σ²)
func TestProfileCurveNormal(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 11))
	x := make([]float64, 25)
	for i := range x {
		x[i] = 10 + 2*r.NormFloat64()
	}
	d := fitters.Complete(x)
	fam, _ := fitters.Lookup("normal")
	fit, err := fam.Fit(d, fitters.Options{})
	if err != nil || !fit.Converged {
		t.Fatalf("fit: %v %+v", err, fit)
	}
	n := float64(len(x))
	mean, ss := 0.0, 0.0
	for _, v := range x {
		mean += v / n
	}
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	forms := []func(v float64) float64{
		func(mu float64) float64 {
			s2 := 0.0
			for _, v := range x {
				s2 += (v - mu) * (v - mu) / n
			}
			return -n/2*math.Log(2*math.Pi*s2) - n/2
		},
		func(sigma float64) float64 { return -n*math.Log(sigma) - n/2*math.Log(2*math.Pi) - ss/(2*sigma*sigma) },
	}
	sd := math.Sqrt(ss / n)
	bounds := [][2]float64{{mean - 0.8, mean + 0.8}, {sd * 0.75, sd * 1.4}}
	for i, form := range forms {
		pr, ok := ProfileCurve(fam, fit, d, i, bounds[i][0], bounds[i][1], math.NaN(), 0.95)
		if !ok || len(pr.Values) != ProfilePoints {
			t.Fatalf("parameter %d: %d points, ok %v", i, len(pr.Values), ok)
		}
		for k, v := range pr.Values {
			if want := form(v); math.Abs(pr.LogLik[k]-want) > 1e-9*math.Abs(want) {
				t.Errorf("%s at %g: profile %.10g, closed form %.10g", pr.Parameter, v, pr.LogLik[k], want)
			}
		}
		// The cut-off is ℓ(θ̂) − χ²₁(0.95)/2, with χ²₁(0.95) = 3.841458820694124 (scipy.stats.chi2.ppf(0.95, 1)).
		if want := fit.LogLik - 3.841458820694124/2; math.Abs(pr.Cutoff-want) > 1e-9 {
			t.Errorf("cut-off %v, want %v", pr.Cutoff, want)
		}
		if pr.Values[0] >= bounds[i][0] || pr.Values[len(pr.Values)-1] <= bounds[i][1] {
			t.Errorf("%s: the curve [%g, %g] does not reach past the interval %v", pr.Parameter, pr.Values[0], pr.Values[len(pr.Values)-1], bounds[i])
		}
	}
	if _, ok := ProfileCurve(fam, fit, d, 0, math.NaN(), math.NaN(), math.NaN(), 0.95); ok {
		t.Error("no interval and no standard error: there is nothing to span")
	}
}
