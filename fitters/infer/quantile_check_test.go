package infer

import (
	"math"
	"strings"
	"testing"

	"fitseal/fitters"
)

// offQuantile is a distribution whose Quantile is off by the factor
// scale: a stand-in for a numerical inversion that failed.
type offQuantile struct {
	fitters.Dist
	scale float64
}

func (d offQuantile) Quantile(p float64) float64 { return d.scale * d.Dist.Quantile(p) }

// offFamily is a family whose distributions are offQuantile.
type offFamily struct {
	fitters.Family
	scale float64
}

func (f offFamily) New(p []float64) (fitters.Dist, error) {
	d, err := f.Family.New(p)
	if err != nil {
		return nil, err
	}
	return offQuantile{d, f.scale}, nil
}

// TestCheckQuantile: a quantile whose CDF does not give back its
// probability is caught; a right one passes, a gamma's of shape 1e20
// (neighbouring floats differ in F by 1e-6 there) included. That
// Gamma.Quantile itself is right at these points is checked against
// mpmath in fitters (TestGammaQuantileReference, gamma_large.json).
func TestCheckQuantile(t *testing.T) {
	g := fitters.Gamma{Shape: 2.5, Rate: 1}
	huge := fitters.Gamma{Shape: 1e20, Rate: 1}
	for _, c := range []struct {
		name string
		d    fitters.Dist
		p    float64
		ok   bool
	}{
		{"gamma median", g, 0.5, true},
		{"gamma 1e-10", g, 1e-10, true},
		{"gamma 1 - 1e-10", g, 1 - 1e-10, true},
		{"shape 1e20, 0.01", huge, 0.01, true},
		{"shape 1e20, 0.99", huge, 0.99, true},
		{"off by 1e-3", offQuantile{g, 1.001}, 0.5, false},
		{"off by 1e-3, upper tail", offQuantile{g, 1.001}, 0.999, false},
		{"shape 1e20 off by 1e-12", offQuantile{huge, 1 + 1e-12}, 0.5, false},
		{"normal off by 1e-9", offQuantile{fitters.Normal{Mu: 0, Sigma: 1}, 1 + 1e-9}, 0.9, true}, // within 1e-6 in F
	} {
		t.Run(c.name, func(t *testing.T) {
			err := checkQuantile(c.d, c.p, c.d.Quantile(c.p))
			if (err == nil) != c.ok {
				t.Errorf("checkQuantile(%v) = %v, want ok=%v", c.p, err, c.ok)
			}
		})
	}
}

// TestDerivedRefusesBadQuantile: Derived reports no value, with the
// reason, for a quantile that does not invert the CDF, instead of the
// wrong number.
func TestDerivedRefusesBadQuantile(t *testing.T) {
	gamma := family(t, "gamma")
	d := &fitters.Data{Exact: ballBearings}
	fit := fitOf(t, gamma, d)
	for _, m := range []Method{MethodWald, MethodProfile} {
		v, err := Derived(offFamily{gamma, 1.01}, fit, d, Quantile, 0.1, m, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if !math.IsNaN(v.Estimate) || !strings.Contains(v.Note, "does not invert the CDF") {
			t.Errorf("%s: estimate %v, note %q; want no value and the reason", m, v.Estimate, v.Note)
		}
		good, err := Derived(gamma, fit, d, Quantile, 0.1, m, Settings{})
		if err != nil || math.IsNaN(good.Estimate) {
			t.Errorf("%s: the right quantile is refused: %v %v %q", m, good.Estimate, err, good.Note)
		}
	}
}
