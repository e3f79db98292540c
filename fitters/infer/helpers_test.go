package infer

import (
	"math"
	"testing"

	"fitseal/fitters"
)

// ballBearings are Lieblein & Zelen's (1956) 23 ball-bearing endurance
// times in millions of revolutions (recalled from memory; the closed-form
// checks below hold for any data, so a slip in a digit would not hide an error).
var ballBearings = []float64{17.88, 28.92, 33.00, 41.52, 42.12, 45.60, 48.48, 51.84, 51.96,
	54.12, 55.56, 67.80, 68.64, 68.64, 68.88, 84.12, 93.12, 98.64, 105.12, 105.84, 127.92, 128.04, 173.40}

func family(t testing.TB, name string) fitters.Family {
	t.Helper()
	f, ok := fitters.Lookup(name)
	if !ok {
		t.Fatalf("family %q is not registered", name)
	}
	return f
}

func fitOf(t testing.TB, fam fitters.Family, d *fitters.Data) *fitters.Fit {
	t.Helper()
	fit, err := fam.Fit(d, fitters.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !fit.Converged {
		t.Fatalf("%s fit did not converge: %s", fam.Name(), fit.Reason)
	}
	return fit
}

func close(got, want, rel float64) bool {
	if math.IsInf(want, 0) || math.IsNaN(want) {
		return got == want || (math.IsNaN(got) && math.IsNaN(want))
	}
	return math.Abs(got-want) <= rel*math.Max(1e-300, math.Abs(want))
}

// bisect solves f(x) = 0 on [a, b] (f(a), f(b) of opposite signs) to full
// precision; an independent solver for the closed-form checks.
func bisect(f func(float64) float64, a, b float64) float64 {
	fa := f(a)
	for i := 0; i < 200; i++ {
		m := 0.5 * (a + b)
		if m == a || m == b {
			return m
		}
		fm := f(m)
		if (fm > 0) == (fa > 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
	return 0.5 * (a + b)
}

func meanAndMLSigma(x []float64) (float64, float64) {
	var s float64
	for _, v := range x {
		s += v
	}
	m := s / float64(len(x))
	var ss float64
	for _, v := range x {
		ss += (v - m) * (v - m)
	}
	return m, math.Sqrt(ss / float64(len(x)))
}
