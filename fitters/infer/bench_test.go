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
