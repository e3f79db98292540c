package infer

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"fitseal/fitters"
)

// BenchmarkDerivedProfile times profile-likelihood intervals as a project
// asks for them with the default settings: every parameter's, then three
// percentiles and a 100-year return level, on n observations drawn from
// the family itself with a fixed seed (a workload, not a reference).
func BenchmarkDerivedProfile(b *testing.B) {
	for _, c := range []struct {
		family string
		params []float64
	}{
		{"gamma", []float64{2.5, 0.4}},
		{"weibull", []float64{1.8, 120}},
		{"lognormal", []float64{1, 0.5}},
		{"gumbel", []float64{10, 2}},
		{"loglogistic", []float64{3, 2}},
		{"invgauss", []float64{2, 3}},
		{"gev", []float64{10, 2, 0.1}},
	} {
		for _, n := range []int{50, 1000} {
			b.Run(fmt.Sprintf("%s/n=%d", c.family, n), func(b *testing.B) {
				fam := family(b, c.family)
				dist, err := fam.New(c.params)
				if err != nil {
					b.Fatal(err)
				}
				r := rand.New(rand.NewPCG(3, 4))
				x := make([]float64, n)
				for i := range x {
					x[i] = dist.Rand(r)
				}
				d := fitters.Complete(x)
				fit := fitOf(b, fam, d)
				queries := []struct {
					q   Quantity
					arg float64
				}{{Quantile, 0.1}, {Quantile, 0.5}, {Quantile, 0.9}, {ReturnLevel, 100}}
				s := Settings{Level: 0.95}
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					rows, err := Intervals(fam, fit, d, MethodProfile, s)
					if err != nil || len(rows) != len(c.params) {
						b.Fatalf("%s: %v %+v", c.family, err, rows)
					}
					for _, q := range queries {
						v, err := Derived(fam, fit, d, q.q, q.arg, MethodProfile, s)
						if err != nil || v.Lower != v.Lower || v.Upper != v.Upper {
							b.Fatalf("%s %v: %v %+v", c.family, q, err, v)
						}
					}
				}
			})
		}
	}
}

// BenchmarkDerivedProfileCensored is BenchmarkDerivedProfile on 1000 units
// of which every other one is suspended at a random fraction of its life
// (right-censored), as a field-return dataset would be (a workload, not a
// reference).
func BenchmarkDerivedProfileCensored(b *testing.B) {
	for _, c := range []struct {
		family string
		params []float64
	}{
		{"weibull", []float64{1.8, 120}},
		{"lognormal", []float64{4, 0.5}},
		{"gamma", []float64{2.5, 0.05}},
	} {
		b.Run(c.family, func(b *testing.B) {
			fam := family(b, c.family)
			dist, err := fam.New(c.params)
			if err != nil {
				b.Fatal(err)
			}
			r := rand.New(rand.NewPCG(3, 4))
			d := &fitters.Data{}
			for i := 0; i < 1000; i++ {
				x := dist.Rand(r)
				if i%2 == 0 {
					d.Right = append(d.Right, x*r.Float64())
				} else {
					d.Exact = append(d.Exact, x)
				}
			}
			fit := fitOf(b, fam, d)
			s := Settings{Level: 0.95}
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if _, err := Intervals(fam, fit, d, MethodProfile, s); err != nil {
					b.Fatal(err)
				}
				for _, p := range []float64{0.1, 0.5, 0.9} {
					v, err := Derived(fam, fit, d, Quantile, p, MethodProfile, s)
					if err != nil || v.Lower != v.Lower || v.Upper != v.Upper {
						b.Fatalf("%s %v: %v %+v", c.family, p, err, v)
					}
				}
			}
		})
	}
}
