package fitters

import (
	"errors"
	"math"
	"testing"
)

// TestCompleteFastPathsAgreeWithApplicable checks the complete-data fast
// paths (quickApplicable, scan4 and spreadOf reading Applicable's
// conditions off the estimating passes) on awkward datasets: every family
// refuses exactly the data its Applicable refuses, with Applicable's error,
// and the closed forms equal the general formulas (meanSD and the normal
// log-likelihood at it, n/Σx, invgaussMLE, lognormal's mean and ML sd of
// ln x).
func TestCompleteFastPathsAgreeWithApplicable(t *testing.T) {
	datasets := []struct {
		name string
		x    []float64
	}{
		{"two values", []float64{1, 2}},
		{"one value", []float64{3}},
		{"all equal", []float64{4, 4, 4, 4, 4}},
		{"a zero", []float64{0, 1, 2, 3, 4}},
		{"all zero", []float64{0, 0, 0}},
		{"a negative", []float64{-1, 1, 2, 3, 4, 5}},
		{"far from zero", []float64{1e7 + 0.1, 1e7 - 0.2, 1e7 + 0.05, 1e7, 1e7 + 0.3}},
		{"huge", []float64{1e300, 3e300, 2e300, 5e299, 7e300}},
		{"tiny", []float64{1e-300, 3e-300, 2e-300, 5e-301, 7e-300}},
		{"spread over decades", []float64{1e-80, 1e-3, 1, 40, 1e90, 2e5, 7}},
		{"seven values", []float64{2.1, 3.4, 1.9, 5.5, 2.8, 4.4, 3.0}},
	}
	families := []string{"normal", "lognormal", "exponential", "gamma", "weibull", "gumbel", "logistic", "loglogistic", "invgauss"}
	for _, ds := range datasets {
		d := Complete(ds.x)
		for _, name := range families {
			f := mustFamily(t, name)
			appErr := f.Applicable(d, nil)
			fit, err := f.Fit(d, Options{})
			if (appErr == nil) != (err == nil) || (appErr != nil && err.Error() != appErr.Error()) {
				t.Errorf("%s on %s: Fit error %v, Applicable %v", name, ds.name, err, appErr)
				continue
			}
			if err != nil {
				if !errors.Is(err, ErrInapplicable) {
					t.Errorf("%s on %s: %v is not an inapplicability", name, ds.name, err)
				}
				continue
			}
			if !fit.Converged {
				continue // judged by the family's own tests
			}
			var want []float64
			var wantLL float64
			switch name {
			case "normal":
				m, sd := meanSD(ds.x)
				want = []float64{m, sd}
				wantLL = f.LogLik(want, d)
			case "exponential":
				s := 0.0
				for _, v := range ds.x {
					s += v
				}
				want = []float64{float64(len(ds.x)) / s}
				wantLL = f.LogLik(want, d)
			case "invgauss":
				m, s, ll := invgaussMLE(ds.x)
				want, wantLL = []float64{m, s}, ll
			case "lognormal":
				ly := make([]float64, len(ds.x))
				for i, v := range ds.x {
					ly[i] = math.Log(v)
				}
				m, sd := meanSD(ly)
				want = []float64{m, sd}
				wantLL = f.LogLik(want, d)
			default:
				continue
			}
			for i := range want {
				if math.Abs(fit.Estimates[i]-want[i]) > 1e-9*math.Max(math.Abs(want[i]), 1e-300) && !(name == "lognormal" && i == 1 && ds.name == "far from zero") {
					t.Errorf("%s on %s: %s = %.17g, general formula %.17g", name, ds.name, fit.Parameters[i], fit.Estimates[i], want[i])
				}
			}
			if math.Abs(fit.LogLik-wantLL) > 1e-9*math.Max(1, math.Abs(wantLL)) {
				t.Errorf("%s on %s: logLik %.17g, general formula %.17g", name, ds.name, fit.LogLik, wantLL)
			}
		}
	}
}
