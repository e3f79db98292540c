package infer

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"fitseal/fitters"
)

// TestCensoredEnvelope: the envelope of samples censored as the data were
// holds most of the data's empirical quantiles when the model fits (weibull
// lifetimes, each suspended at its own uniform time, fitted by the
// weibull) and visibly fewer when it does not (a normal fitted to an even
// mixture of weibull(4, 50) and weibull(4, 150), suspended the same way);
// non-detects likewise (lognormal concentrations below two detection
// limits, fitted by the lognormal, and by a normal). Bounds are ordered,
// and the same seed gives the same envelope. Invented data, fixed seeds.
func TestCensoredEnvelope(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	suspended := func(draw func() float64) *fitters.Data {
		d := &fitters.Data{}
		for range 120 {
			x, c := draw(), 250*rng.Float64()
			if x > c {
				d.Right = append(d.Right, c)
			} else {
				d.Exact = append(d.Exact, x)
			}
		}
		return d
	}
	weib := func(k, s float64) float64 { return s * math.Pow(-math.Log(1-rng.Float64()), 1/k) }
	fitting := suspended(func() float64 { return weib(1.8, 100) })
	mixture := suspended(func() float64 {
		if rng.Float64() < 0.5 {
			return weib(4, 50)
		}
		return weib(4, 150)
	})
	nonDetects := &fitters.Data{}
	for i := range 120 {
		x, limit := math.Exp(0.5+rng.NormFloat64()), []float64{0.8, 1.4}[i%2]
		if x < limit {
			nonDetects.Left = append(nonDetects.Left, limit)
		} else {
			nonDetects.Exact = append(nonDetects.Exact, x)
		}
	}
	inside := func(name string, d *fitters.Data, famName string) float64 {
		t.Helper()
		fam := family(t, famName)
		fit := fitOf(t, fam, d)
		dist, err := fam.New(fit.Estimates)
		if err != nil {
			t.Fatal(err)
		}
		var step *fitters.StepCDF
		if len(d.Left) > 0 {
			step, err = fitters.ReverseKaplanMeier(d.Exact, d.Left)
		} else {
			step, err = fitters.KaplanMeier(d.Exact, d.Right)
		}
		if err != nil {
			t.Fatal(err)
		}
		x := slices.Sorted(slices.Values(d.Exact))
		probs := make([]float64, len(x))
		for j, v := range x {
			probs[j] = (step.At(math.Nextafter(v, math.Inf(-1))) + step.At(v)) / 2
		}
		lo, hi, ok := CensoredEnvelope(dist, d, probs, 199, 0.95, 42)
		lo2, hi2, _ := CensoredEnvelope(dist, d, probs, 199, 0.95, 42)
		same := func(a, b []float64) bool {
			return slices.EqualFunc(a, b, func(x, y float64) bool { return x == y || math.IsNaN(x) && math.IsNaN(y) })
		}
		if !ok || !same(lo, lo2) || !same(hi, hi2) {
			t.Fatalf("%s: ok %v, or not the same envelope from the same seed", name, ok)
		}
		in, defined := 0, 0
		for j, v := range x {
			if math.IsNaN(lo[j]) || math.IsNaN(hi[j]) {
				continue
			}
			defined++
			if lo[j] > hi[j] {
				t.Errorf("%s: at p = %v the envelope is [%v, %v]", name, probs[j], lo[j], hi[j])
			}
			if lo[j] <= v && v <= hi[j] {
				in++
			}
		}
		if defined < len(x)*3/4 {
			t.Errorf("%s: the envelope is defined at %d of %d points", name, defined, len(x))
		}
		share := float64(in) / float64(defined)
		t.Logf("%s (%s): %d of %d points inside", name, famName, in, defined)
		return share
	}
	for _, c := range []struct {
		name       string
		d          *fitters.Data
		right, bad string
	}{
		{"suspensions", fitting, "weibull", ""},
		{"mixture", mixture, "", "normal"},
		{"non-detects", nonDetects, "lognormal", "normal"},
	} {
		if c.right != "" {
			if s := inside(c.name, c.d, c.right); s < 0.8 {
				t.Errorf("%s: the fitting %s holds %.2f of the points, want at least 0.8", c.name, c.right, s)
			}
		}
		if c.bad != "" {
			if s := inside(c.name, c.d, c.bad); s > 0.7 {
				t.Errorf("%s: the %s holds %.2f of the points, want at most 0.7", c.name, c.bad, s)
			}
		}
	}
	if _, _, ok := CensoredEnvelope(fitters.Normal{Mu: 0, Sigma: 1}, fitters.Complete([]float64{1, 2, 3}), []float64{0.5}, 9, 0.95, 1); ok {
		t.Error("complete data: want no censored envelope")
	}
}
