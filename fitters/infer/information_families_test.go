package infer

import (
	"math"
	"math/rand/v2"
	"testing"

	"fitseal/fitters"

	"gonum.org/v1/gonum/mat"
)

// TestFamiliesAnalyticInformation: each family's closed-form observed
// information (fitters/information.go) agrees with the finite-difference
// Hessian of its own log-likelihood, at the MLE and at a point away from it
// (where the gradient terms of the chain rule matter), on seeded data of
// n = 200 drawn from the family itself; censored data fall back on the
// numeric route.
func TestFamiliesAnalyticInformation(t *testing.T) {
	cases := []struct {
		name string
		p    []float64
	}{
		{"normal", []float64{3, 2}},
		{"logistic", []float64{-1, 0.5}},
		{"gumbel", []float64{10, 3}},
		{"lognormal", []float64{0.5, 0.8}},
		{"exponential", []float64{2.5}},
		{"gamma", []float64{2.2, 0.7}},
		{"invgauss", []float64{1.5, 4}},
		{"weibull", []float64{1.7, 30}},
		{"loglogistic", []float64{5, 3.2}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			fam := family(t, c.name)
			if _, ok := fam.(AnalyticInformation); !ok {
				t.Fatalf("%s has no closed-form information", c.name)
			}
			dist, err := fam.New(c.p)
			if err != nil {
				t.Fatal(err)
			}
			r := rand.New(rand.NewPCG(8, uint64(len(c.name))))
			x := make([]float64, 200)
			for i := range x {
				x[i] = dist.Rand(r)
			}
			d := fitters.Complete(x)
			fit := fitOf(t, fam, d)
			for _, shift := range []float64{0, 0.03} {
				f := *fit
				f.Estimates = append([]float64(nil), fit.Estimates...)
				for i := range f.Estimates {
					f.Estimates[i] *= 1 + shift*float64(i+1)
				}
				an, err := ObservedInformation(fam, &f, d)
				if an.Method != "analytic" {
					t.Fatalf("shift %v: method %q (%v)", shift, an.Method, err)
				}
				num, _ := observedInformation(fam, &f, d, false)
				k := len(f.Estimates)
				for i := 0; i < k; i++ {
					for j := 0; j < k; j++ {
						a, b := an.Hessian.At(i, j), num.Hessian.At(i, j)
						// Relative to the geometric mean of the diagonal: the
						// finite differences carry about 1e-7 of it.
						if math.Abs(a-b) > 1e-6*math.Sqrt(math.Abs(an.Hessian.At(i, i)*an.Hessian.At(j, j))) {
							t.Errorf("shift %v: H[%d][%d] analytic %v, numeric %v", shift, i, j, a, b)
						}
					}
				}
			}
			cens := &fitters.Data{Exact: x[:150], Right: x[150:]}
			if fam.(AnalyticInformation).ObservedInformation(fit.Estimates, cens, mat.NewSymDense(len(fit.Estimates), nil)) {
				t.Errorf("censored data: the closed form claims to apply")
			}
		})
	}
}
