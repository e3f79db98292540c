package fitters_test

import (
	"math"
	"math/big"
	"testing"

	"fitseal/fitters"
)

// NIST Statistical Reference Datasets, univariate summary statistics,
// "lower/average/higher difficulty" numerical-accuracy sets NumAcc1–4.
// The construction and the certified values below are recalled from memory
// (NIST StRD, Univariate Summary Statistics, NumAcc1–NumAcc4):
//
//	NumAcc1: 10000001, 10000003, 10000002                      (n = 3)
//	         certified mean 10000002, sd 1
//	NumAcc2: 1.2, then 1.1 and 1.3 alternating, 500 of each    (n = 1001)
//	         certified mean 1.2, sd 0.1
//	NumAcc3: 1000000.2, then 1000000.1 and 1000000.3 alternating (n = 1001)
//	         certified mean 1000000.2, sd 0.1
//	NumAcc4: 10000000.2, then 10000000.1 and 10000000.3 alternating (n = 1001)
//	         certified mean 10000000.2, sd 0.1
//
// (The certified sd is the n−1 one; the order of the alternating values does
// not change either statistic.)
type nistSet struct {
	name          string
	first         float64
	alternate     [2]float64
	n             int
	certifiedMean float64
	certifiedSD   float64
}

var nistNumAcc = []nistSet{
	{"NumAcc1", 10000001, [2]float64{10000003, 10000002}, 3, 10000002, 1},
	{"NumAcc2", 1.2, [2]float64{1.1, 1.3}, 1001, 1.2, 0.1},
	{"NumAcc3", 1000000.2, [2]float64{1000000.1, 1000000.3}, 1001, 1000000.2, 0.1},
	{"NumAcc4", 10000000.2, [2]float64{10000000.1, 10000000.3}, 1001, 10000000.2, 0.1},
}

func (s nistSet) data() []float64 {
	x := []float64{s.first}
	for i := 1; i < s.n; i++ {
		x = append(x, s.alternate[(i-1)%2])
	}
	return x
}

// exactNormalMLE returns the exact mean and ML standard deviation
// √(Σ(x−x̄)²/n) of the float64 values x, computed in rational arithmetic
// (math/big) and rounded once to float64.
func exactNormalMLE(x []float64) (mean, sigma float64) {
	n := new(big.Rat).SetInt64(int64(len(x)))
	sum := new(big.Rat)
	for _, v := range x {
		sum.Add(sum, new(big.Rat).SetFloat64(v))
	}
	m := new(big.Rat).Quo(sum, n)
	ss := new(big.Rat)
	for _, v := range x {
		d := new(big.Rat).Sub(new(big.Rat).SetFloat64(v), m)
		ss.Add(ss, d.Mul(d, d))
	}
	variance := new(big.Rat).Quo(ss, n)
	vf := new(big.Float).SetPrec(256).SetRat(variance)
	sf := new(big.Float).SetPrec(256).Sqrt(vf)
	mean, _ = m.Float64()
	sigma, _ = sf.Float64()
	return mean, sigma
}

// TestNISTNumAcc fits the normal family to NumAcc1–4 (source: NIST StRD,
// certified values recalled from memory, see nistNumAcc):
//
//   - the MLE of mu equals the certified mean to 1e-12 relative;
//   - the MLE of sigma equals the exact ML standard deviation of the data as
//     read into float64 (math/big, exactNormalMLE) to 1e-12 relative;
//   - that exact value lies within 1e-8 (relative) of certified sd·√((n−1)/n).
//     The decimal inputs of NumAcc3 and NumAcc4 are not exact in float64, so
//     the certified sd itself is out of reach at 1e-12.
func TestNISTNumAcc(t *testing.T) {
	for _, s := range nistNumAcc {
		s := s
		t.Run("normal/"+s.name, func(t *testing.T) {
			f := lookup(t, "normal")
			x := s.data()
			if len(x) != s.n {
				t.Fatalf("built %d values, want %d", len(x), s.n)
			}
			fit, err := f.Fit(fitters.Complete(x), fitters.Options{})
			if err != nil {
				t.Fatalf("Fit: %v", err)
			}
			if !fit.Converged {
				t.Errorf("not converged: %s", fit.Reason)
			}
			mu, sigma := fit.Estimate("mu"), fit.Estimate("sigma")
			if r := math.Abs(mu-s.certifiedMean) / s.certifiedMean; !(r <= 1e-12) {
				t.Errorf("mu = %.17g, certified mean %.17g (relative error %.3g > 1e-12)", mu, s.certifiedMean, r)
			}
			_, exact := exactNormalMLE(x)
			if r := math.Abs(sigma-exact) / exact; !(r <= 1e-12) {
				t.Errorf("sigma = %.17g, exact ML sd of the float64 data %.17g (relative error %.3g > 1e-12)", sigma, exact, r)
			}
			cert := s.certifiedSD * math.Sqrt(float64(s.n-1)/float64(s.n))
			if r := math.Abs(exact-cert) / cert; !(r <= 1e-8) {
				t.Errorf("exact ML sd %.17g vs certified sd·√((n−1)/n) = %.17g: relative difference %.3g > 1e-8", exact, cert, r)
			}
			t.Logf("mu %.17g (certified %.17g); sigma %.17g, exact %.17g, certified·√((n−1)/n) %.17g",
				mu, s.certifiedMean, sigma, exact, cert)
		})
	}
}
