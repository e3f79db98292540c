package fitters

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// benchSample draws n values from the family's member at the reference
// generating parameters and censors them: a non-detect limit at the 0.1
// quantile and another at the 0.2 quantile (alternately) and suspensions at
// the 0.8 quantile, about 25 % censored in all. With complete = true the
// values are returned as they are.
func benchSample(b *testing.B, f Family, truth []float64, n int, complete bool) *Data {
	b.Helper()
	dist, err := f.New(truth)
	if err != nil {
		b.Fatal(err)
	}
	r := rand.New(rand.NewPCG(1, uint64(n)))
	limits := []float64{dist.Quantile(0.1), dist.Quantile(0.2)}
	susp := dist.Quantile(0.8)
	d := &Data{}
	for i := 0; i < n; i++ {
		x := dist.Rand(r)
		switch l := limits[i%2]; {
		case complete:
			d.Exact = append(d.Exact, x)
		case x < l:
			d.Left = append(d.Left, l)
		case x > susp:
			d.Right = append(d.Right, susp)
		default:
			d.Exact = append(d.Exact, x)
		}
	}
	return d
}

// BenchmarkFitCensored fits every continuous family to 1000 values with
// non-detects at two limits and suspensions, next to the same values
// complete ("complete/n=1000").
func BenchmarkFitCensored(b *testing.B) {
	ref := loadCensoredReference(b)
	seen := map[string]bool{}
	for _, c := range ref.Cases {
		if seen[c.Family] {
			continue
		}
		seen[c.Family] = true
		f, ok := Lookup(c.Family)
		if !ok {
			continue
		}
		opt := censoredOptions(c.Family, ref)
		truth := paramsOf(f, c.Generating, opt)
		for _, complete := range []bool{false, true} {
			name := c.Family + "/n=1000"
			if complete {
				name = c.Family + "/complete/n=1000"
			}
			d := benchSample(b, f, truth, 1000, complete)
			b.Run(name, func(b *testing.B) {
				for i := 0; i < b.N; i++ {
					fit, err := f.Fit(d, opt)
					if err != nil || !fit.Converged {
						b.Fatalf("%v %v", err, fit)
					}
				}
			})
		}
	}
}

// BenchmarkFitCounts fits every count family to 1000 counts (overdispersed
// for the unbounded families; 5–40 trials each for the binomial types).
func BenchmarkFitCounts(b *testing.B) {
	r := rand.New(rand.NewPCG(3, 4))
	counts := make([]float64, 1000)
	bx := make([]float64, 1000)
	trials := make([]int, 1000)
	for i := range counts {
		counts[i] = NegBinomial{2, 7}.Rand(r)
		trials[i] = 5 + r.IntN(36)
		bx[i] = BetaBinomial{Alpha: 2, Beta: 5, Trials: trials[i]}.Rand(r)
	}
	for _, name := range []string{"poisson", "negbinomial", "geometric", "binomial", "betabinomial"} {
		f, _ := Lookup(name)
		d := Complete(counts)
		if name == "binomial" || name == "betabinomial" {
			d = &Data{Exact: bx, Trials: trials}
		}
		b.Run(fmt.Sprintf("%s/n=1000", name), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				fit, err := f.Fit(d, Options{})
				if err != nil || !fit.Converged {
					b.Fatalf("%v %v", err, fit)
				}
			}
		})
	}
}

// BenchmarkNonparametric times the estimates a report draws for 1000
// values: Kaplan–Meier with suspensions and Turnbull on binned values with
// some exact ones.
func BenchmarkNonparametric(b *testing.B) {
	r := rand.New(rand.NewPCG(5, 1000))
	var exact, right []float64
	iv := &Data{}
	for i := 0; i < 1000; i++ {
		x := 100 * r.ExpFloat64()
		if c := 150 * r.Float64(); x > c {
			right = append(right, c)
		} else {
			exact = append(exact, x)
		}
		if i%4 == 0 {
			iv.Exact = append(iv.Exact, x)
		} else {
			lo := 10 * float64(int(x/10))
			iv.Lower = append(iv.Lower, lo)
			iv.Upper = append(iv.Upper, lo+10)
		}
	}
	b.Run("kaplan-meier/n=1000", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if _, err := KaplanMeier(exact, right); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("turnbull/n=1000", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if s, err := Turnbull(iv, TurnbullOptions{}); err != nil || !s.Converged {
				b.Fatal(err)
			}
		}
	})
}

// BenchmarkFitCensoredGammaInvgauss times the censored fits of the
// families with a dedicated two-parameter Newton route (gamma, inverse
// Gaussian, Pareto, GPD over the threshold 30, beta; benchSample's 1000 values,
// about 25 % censored) by their Newton routes and by the generic BFGS
// route (genericCensoredOnly), for the before/after ratio.
func BenchmarkFitCensoredGammaInvgauss(b *testing.B) {
	cases := []struct {
		name  string
		truth []float64
		opt   Options
	}{
		{"gamma", []float64{2.5, 0.8}, Options{}},
		{"invgauss", []float64{5, 12}, Options{}},
		{"pareto", []float64{2, 2.5}, Options{}},
		{"gpd", []float64{5, 0.2, 30}, Options{Fixed: Fixed{"threshold": 30}}},
		{"beta", []float64{2, 5}, Options{}},
	}
	for _, c := range cases {
		f, _ := Lookup(c.name)
		d := benchSample(b, f, c.truth, 1000, false)
		for _, generic := range []bool{false, true} {
			route := "newton"
			if generic {
				route = "generic"
			}
			b.Run(c.name+"/"+route, func(b *testing.B) {
				genericCensoredOnly = generic
				defer func() { genericCensoredOnly = false }()
				for i := 0; i < b.N; i++ {
					fit, err := f.Fit(d, c.opt)
					if err != nil || !fit.Converged {
						b.Fatalf("%v %+v", err, fit)
					}
				}
			})
		}
	}
}

// BenchmarkFitCensoredThreeParameter times the censored fits of gev,
// studentt, weibull3 and lognormal3 (benchSample's 1000 values at the
// censored reference's generating parameters, about 25 % censored) by
// their three-parameter Newton routes and by the generic BFGS route
// (genericCensoredOnly), with the cost in log passes: the time per fit
// over the fastest math.Log pass over the same 1000 values (log-passes),
// and the process's CPU time per fit over the CPU time of one such pass
// (cpu-log-passes, the steadier figure on a shared machine).
func BenchmarkFitCensoredThreeParameter(b *testing.B) {
	ref := loadCensoredReference(b)
	seen := map[string]bool{}
	for _, c := range ref.Cases {
		switch c.Family {
		case "gev", "studentt", "weibull3", "lognormal3":
		default:
			continue
		}
		if seen[c.Family] {
			continue
		}
		seen[c.Family] = true
		f, _ := Lookup(c.Family)
		opt := censoredOptions(c.Family, ref)
		d := benchSample(b, f, paramsOf(f, c.Generating, opt), 1000, false)
		floor := logPassNanos(d.Values())
		for _, generic := range []bool{false, true} {
			route := "newton"
			if generic {
				route = "generic"
			}
			b.Run(c.Family+"/"+route, func(b *testing.B) {
				genericCensoredOnly = generic
				defer func() { genericCensoredOnly = false }()
				var fit *Fit
				c0 := processCPUNanos()
				for i := 0; i < b.N; i++ {
					var err error
					fit, err = f.Fit(d, opt)
					if err != nil || !fit.Converged {
						b.Fatalf("%v %+v", err, fit)
					}
				}
				c1 := processCPUNanos()
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/floor, "log-passes")
				b.ReportMetric(float64(fit.Evaluations), "evals")
				if c0 >= 0 && c1 >= 0 {
					b.StopTimer()
					b.ReportMetric(float64(c1-c0)/float64(b.N)/logPassCPUNanos(d.Values()), "cpu-log-passes")
				}
			})
		}
	}
}
