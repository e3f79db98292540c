package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

// logPassNanos is the floor: the fastest of 20 timed passes of math.Log
// over x, in nanoseconds (the fastest, because the benchmark machine is
// shared and slower passes measure the neighbours).
func logPassNanos(x []float64) float64 {
	best := math.Inf(1)
	var s float64
	for k := 0; k < 20; k++ {
		t0 := time.Now()
		for _, v := range x {
			s += math.Log(math.Abs(v) + 1)
		}
		best = math.Min(best, float64(time.Since(t0).Nanoseconds()))
	}
	if s == 0 {
		return math.NaN()
	}
	return best
}

// logPassCPUNanos is the floor in CPU time: passes of math.Log over x
// repeated for at least 50 ms of this process's CPU time, averaged.
func logPassCPUNanos(x []float64) float64 {
	var s float64
	c0 := processCPUNanos()
	passes := 0
	for processCPUNanos()-c0 < 50e6 {
		for _, v := range x {
			s += math.Log(math.Abs(v) + 1)
		}
		passes++
	}
	if s == 0 {
		return math.NaN()
	}
	return float64(processCPUNanos()-c0) / float64(passes)
}

// BenchmarkFitMulti times the multi-start fits of gev, gpd, beta, studentt,
// weibull3 and lognormal3 on seeded samples from the family itself, beside
// the floor: one pass of math.Log over data of the same size. Their ratio is
// the cost of a fit in "log passes": log-passes compares wall-clock time
// with the fastest of 20 floor passes, cpu-log-passes compares the process's
// CPU time per fit with the floor's (the steadier figure on a shared
// machine, where wall-clock time includes waiting for the other jobs).
func BenchmarkFitMulti(b *testing.B) {
	cases := []struct {
		family string
		dist   Dist
		opt    Options
	}{
		{"gev", GEV{10, 2, 0.2}, Options{}},
		{"gpd", GPD{5, 0.2, 30}, Options{Fixed: Fixed{"threshold": 30}}},
		{"beta", Beta{2, 5}, Options{}},
		{"studentt", StudentT{3, 2, 5}, Options{}},
		{"weibull3", Weibull3{2.5, 10, 5}, Options{}},
		{"lognormal3", Lognormal3{1, 0.5, 10}, Options{}},
	}
	for _, n := range []int{1000, 100000} {
		r := rand.New(rand.NewPCG(1, 2))
		x := make([]float64, n)
		for i := range x {
			x[i] = 1 + r.Float64()
		}
		b.Run(fmt.Sprintf("floor-log/n=%d", n), func(b *testing.B) {
			var s float64
			for i := 0; i < b.N; i++ {
				for _, v := range x {
					s += math.Log(v)
				}
			}
			if s == 0 {
				b.Fatal("no work")
			}
		})
	}
	for _, c := range cases {
		f, _ := Lookup(c.family)
		for _, n := range []int{1000, 100000} {
			r := rand.New(rand.NewPCG(1, 2))
			x := make([]float64, n)
			for i := range x {
				x[i] = c.dist.Rand(r)
			}
			d := Complete(x)
			b.Run(fmt.Sprintf("%s/n=%d", c.family, n), func(b *testing.B) {
				var fit *Fit
				c0 := processCPUNanos()
				for i := 0; i < b.N; i++ {
					var err error
					if fit, err = f.Fit(d, c.opt); err != nil {
						b.Fatal(err)
					}
				}
				if !fit.Converged {
					b.Fatalf("not converged: %s", fit.Reason)
				}
				b.ReportMetric(float64(fit.Evaluations), "evals")
				c1 := processCPUNanos()
				perFit := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
				b.ReportMetric(perFit/logPassNanos(x), "log-passes")
				if c0 >= 0 && c1 >= 0 {
					b.StopTimer()
					b.ReportMetric(float64(c1-c0)/float64(b.N)/logPassCPUNanos(x), "cpu-log-passes")
				}
			})
		}
	}
}
