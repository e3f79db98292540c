package fitters

import (
	"math"
	"testing"
)

// BenchmarkFitParallel measures how far this machine's cores scale work
// that shares nothing: every goroutine fits the nine families of the batch
// workload to its own copies of their n = 1000 samples, over and over.
// Run it with -cpu 1,2: ns/op is wall time per round of nine fits, so the
// ratio of the two lines is the speed-up from one core to two that the
// batch workload's fitting could reach at best (docs/PERFORMANCE.md); the
// sum of the estimates is kept so that no fit can be optimised away.
func BenchmarkFitParallel(b *testing.B) {
	type job struct {
		f Family
		d *Data
	}
	var jobs []job
	for _, fam := range coreBenchFamilies {
		jobs = append(jobs, job{mustFamily(b, fam.name), Complete(coreBenchSample(b, fam.name, fam.params, 1000))})
	}
	b.ResetTimer()
	b.RunParallel(func(pb *testing.PB) {
		mine := make([]job, len(jobs))
		for i, j := range jobs {
			mine[i] = job{j.f, Complete(append([]float64(nil), j.d.Exact...))}
		}
		sum := 0.0
		for pb.Next() {
			for _, j := range mine {
				fit, err := j.f.Fit(j.d, Options{})
				if err != nil || !fit.Converged {
					b.Errorf("%s: %v", j.f.Name(), err)
					return
				}
				sum += fit.Estimates[0]
			}
		}
		if math.IsNaN(sum) {
			b.Error("a NaN estimate")
		}
	})
}
