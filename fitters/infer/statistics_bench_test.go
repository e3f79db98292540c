package infer

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// edfBenchCases are the families of the benchmark workload (issue 8) and
// the extreme-value families, each with parameters of a plausible fit.
var edfBenchCases = []struct {
	family string
	params []float64
}{
	{"normal", []float64{10, 2}},
	{"lognormal", []float64{1, 0.5}},
	{"exponential", []float64{0.3}},
	{"gamma", []float64{2.5, 0.4}},
	{"invgauss", []float64{3, 8}},
	{"invgauss", []float64{10, 150}}, // b ≥ 5: the Mills ratio's continued fraction
	{"gumbel", []float64{5, 2}},
	{"logistic", []float64{5, 2}},
	{"weibull", []float64{1.8, 120}},
	{"loglogistic", []float64{3, 4}},
	{"gev", []float64{5, 2, 0.1}},
	{"gpd", []float64{2, 0.2, 1}},
	{"pareto", []float64{1, 2.5}},
}

// BenchmarkEDFStatistics times KS, CvM and AD of one sorted sample of
// n = 1000 drawn from the distribution itself (seeded: a workload, not a
// reference). It must not allocate. cpu-ns/op is the process CPU time per
// call, steadier than ns/op on a machine shared with other work.
func BenchmarkEDFStatistics(b *testing.B) {
	for _, c := range edfBenchCases {
		b.Run(c.family, func(b *testing.B) {
			d, err := family(b, c.family).New(c.params)
			if err != nil {
				b.Fatal(err)
			}
			r := rand.New(rand.NewPCG(3, 4))
			x := make([]float64, 1000)
			for i := range x {
				x[i] = d.Rand(r)
			}
			slices.Sort(x)
			var out [3]float64
			b.ReportAllocs()
			b.ResetTimer()
			cpu := edfCPUNanos()
			for i := 0; i < b.N; i++ {
				edfStatistics(d, x, &out)
			}
			if cpu >= 0 {
				b.ReportMetric(float64(edfCPUNanos()-cpu)/float64(b.N), "cpu-ns/op")
			}
		})
	}
}
