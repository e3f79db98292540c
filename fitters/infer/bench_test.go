package infer

import (
	"math/rand/v2"
	"testing"

	"fitseal/fitters"
)

// BenchmarkBootstrapAD times the goodness-of-fit check of the benchmark
// workload (../shared/bench/run.sh --gof): n = 1000 observations, B = 999
// parametric-bootstrap replicates, each refitted, KS, CvM and AD on each,
// on all available cores. The sample is drawn from the family itself with
// a fixed seed (a workload, not a reference). cpu-ms/op is the process's
// CPU time per check (both workers together): on a shared machine it
// measures the work rather than the wait, and is the figure to compare.
func BenchmarkBootstrapAD(b *testing.B) {
	for _, c := range []struct {
		name, family string
		params       []float64
	}{
		{"gamma", "gamma", []float64{2.5, 0.4}},
		{"gamma-shape0.7", "gamma", []float64{0.7, 0.4}}, // draws with u^(1/a) (powFixed.powsInto)
		{"weibull", "weibull", []float64{1.8, 120}},
		{"gumbel", "gumbel", []float64{10, 3}},
		{"loglogistic", "loglogistic", []float64{20, 3}},
	} {
		b.Run(c.name, func(b *testing.B) {
			fam := family(b, c.family)
			dist, err := fam.New(c.params)
			if err != nil {
				b.Fatal(err)
			}
			r := rand.New(rand.NewPCG(1, 2))
			x := make([]float64, 1000)
			for i := range x {
				x[i] = dist.Rand(r)
			}
			d := fitters.Complete(x)
			fit := fitOf(b, fam, d)
			b.ResetTimer()
			c0 := processCPUNanos()
			for i := 0; i < b.N; i++ {
				g, err := CheckFit(fam, fit, d, BootstrapOptions{Replicates: 999,
					Stream: Stream{Master: 1, Analysis: "bench", Family: c.family}})
				if err != nil || g.Statistics[2].Replicates != 999 {
					b.Fatalf("%v %+v", err, g)
				}
			}
			if c0 >= 0 {
				b.ReportMetric(float64(processCPUNanos()-c0)/1e6/float64(b.N), "cpu-ms/op")
			}
		})
	}
}

// BenchmarkBootstrapCensored times the censored check at the same size:
// n = 1000 weibull(1.8, 120) lifetimes, each suspended at its own
// uniform(0, 250) time (about 30 % suspended), B = 999 replicates drawn by
// the conditional bootstrap and refitted, ks and cvm against the
// Kaplan–Meier estimate on each. This loop allocates per replicate, unlike
// the complete-data one; the figure shows what a censored check costs.
func BenchmarkBootstrapCensored(b *testing.B) {
	fam := family(b, "weibull")
	w := fitters.Weibull{Shape: 1.8, Scale: 120}
	r := rand.New(rand.NewPCG(1, 2))
	d := &fitters.Data{}
	for range 1000 {
		if x, c := w.Rand(r), 250*r.Float64(); x <= c {
			d.Exact = append(d.Exact, x)
		} else {
			d.Right = append(d.Right, c)
		}
	}
	fit := fitOf(b, fam, d)
	b.ResetTimer()
	c0 := processCPUNanos()
	for i := 0; i < b.N; i++ {
		g, err := CheckFit(fam, fit, d, BootstrapOptions{Replicates: 999,
			Stream: Stream{Master: 1, Analysis: "bench", Family: "weibull"}})
		if err != nil || g.Statistics[1].Replicates != 999 {
			b.Fatalf("%v %+v", err, g)
		}
	}
	if c0 >= 0 {
		b.ReportMetric(float64(processCPUNanos()-c0)/1e6/float64(b.N), "cpu-ms/op")
	}
}
