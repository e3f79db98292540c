package fitters

import "testing"

// BenchmarkInvGaussTails times InvGauss.CDFTails (linear space) against
// invGaussTailsLog (log space) per point, on the quantiles of the two
// inverse Gaussians of the EDF benchmark.
func BenchmarkInvGaussTails(b *testing.B) {
	for _, d := range []InvGauss{{Mean: 3, Shape: 8}, {Mean: 10, Shape: 150}} {
		xs := make([]float64, 1000)
		for i := range xs {
			xs[i] = d.Quantile((float64(i) + 0.5) / 1000)
		}
		b.Run("linear", func(b *testing.B) {
			var s float64
			for i := 0; i < b.N; i++ {
				_, lf, ls := d.CDFTails(xs[i%1000])
				s += lf + ls
			}
			sinkGamma = s
		})
		b.Run("log", func(b *testing.B) {
			var s float64
			for i := 0; i < b.N; i++ {
				a, bb := d.ab(xs[i%1000])
				_, lf, ls := invGaussTailsLog(a, bb)
				s += lf + ls
			}
			sinkGamma = s
		})
	}
}
