package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// TestLogLikFuncMatchesLogLik checks LogLikFunc's prepared forms against
// LogLik, the per-value sum, on draws from each family (n = 7 and 1000),
// on data clustered far from zero (1e7 ± 0.1, where the forms must keep
// the digits of the spread), with left-, right- and interval-censored
// values added, and (n = 1000) with half the values left- or
// right-censored, whose terms come from the batch tail routines: at the MLE and at points up to several standard errors
// away on each side (the range a profile likelihood visits), and at
// invalid parameters (−Inf from both). Agreement: 1e-12 relative, or
// 1e-10·n where the log-likelihood is near zero.
func TestLogLikFuncMatchesLogLik(t *testing.T) {
	type dataset struct {
		name string
		d    *Data
	}
	for _, c := range []struct {
		family string
		params []float64
		shift  float64 // added to every draw (0: none)
	}{
		{"exponential", []float64{0.5}, 0},
		{"gamma", []float64{2.5, 0.4}, 0},
		{"gamma", []float64{0.3, 2}, 0},
		{"gamma", []float64{60, 2}, 0}, // shape ≥ 30: the large-shape form
		{"normal", []float64{3, 2}, 0},
		{"normal", []float64{1e7, 0.1}, 0},
		{"lognormal", []float64{1, 0.5}, 0},
		{"lognormal", []float64{math.Log(1e7), 1e-8}, 0},
		{"invgauss", []float64{2, 3}, 0},
		{"invgauss", []float64{1e7, 1e21}, 0},
		{"weibull", []float64{1.8, 120}, 0},
		{"weibull", []float64{0.6, 3}, 0},
		{"gumbel", []float64{10, 2}, 0},
		{"gumbel", []float64{1e7, 0.05}, 0},
		{"logistic", []float64{3, 2}, 0},
		{"logistic", []float64{1e7, 0.05}, 0},
		{"loglogistic", []float64{3, 2}, 0},
		{"loglogistic", []float64{1e7, 3e7}, 0},
		{"gev", []float64{10, 2, 0.1}, 0},
		{"gev", []float64{10, 2, -0.25}, 0},
		{"gev", []float64{10, 2, 1e-9}, 0},
		{"gev", []float64{1e7, 0.1, 0.05}, 0},
	} {
		fam, _ := Lookup(c.family)
		dist, err := fam.New(c.params)
		if err != nil {
			t.Fatal(err)
		}
		for _, n := range []int{7, 1000} {
			r := rand.New(rand.NewPCG(11, uint64(n)))
			x := make([]float64, n)
			for i := range x {
				x[i] = dist.Rand(r)
			}
			cens := &Data{Exact: x[:n-3], Left: []float64{x[n-3]}, Right: []float64{x[n-2]},
				Lower: []float64{0.9 * x[n-1]}, Upper: []float64{1.1 * x[n-1]}}
			if x[n-1] < 0 {
				cens.Lower[0], cens.Upper[0] = 1.1*x[n-1], 0.9*x[n-1]
			}
			// Heavily censored: 40 % suspended at a random fraction of their
			// value (right-censored), 10 % known only to lie below twice it
			// (left-censored): the batched tails of censoredPart.
			heavy := &Data{}
			for i, v := range x {
				switch {
				case i%10 < 4:
					heavy.Right = append(heavy.Right, v-math.Abs(v)*r.Float64()*0.5)
				case i%10 == 4:
					heavy.Left = append(heavy.Left, v+math.Abs(v))
				default:
					heavy.Exact = append(heavy.Exact, v)
				}
			}
			for _, ds := range []dataset{{"complete", Complete(x)}, {"censored", cens}, {"heavily censored", heavy}} {
				name := fmt.Sprintf("%s%v/n=%d/%s", c.family, c.params, n, ds.name)
				fit, err := fam.Fit(ds.d, Options{})
				if err != nil || !fit.Converged {
					t.Logf("%s: not fitted (%v)", name, err)
					continue
				}
				f := LogLikFunc(fam, ds.d)
				r := rand.New(rand.NewPCG(5, uint64(n)))
				for trial := 0; trial < 40; trial++ {
					p := append([]float64(nil), fit.Estimates...)
					if trial > 0 {
						for i := range p {
							// up to ±30 % (n = 7) or ±5 % (n = 1000) of each
							// estimate, or of its magnitude for a location
							spread := 0.3
							if n == 1000 {
								spread = 0.05
							}
							if c.family == "lognormal" && i == 0 || c.family == "normal" && i == 0 ||
								c.family == "gumbel" && i == 0 || c.family == "logistic" && i == 0 || c.family == "gev" && i == 0 {
								p[i] += (2*r.Float64() - 1) * spread * 3 * fit.Estimates[1]
							} else {
								p[i] *= 1 + (2*r.Float64()-1)*spread
							}
						}
					}
					want, got := fam.LogLik(p, ds.d), f(p)
					tol := math.Max(1e-12*math.Abs(want), 1e-10*float64(n))
					if !(math.Abs(got-want) <= tol) && !(math.IsInf(want, -1) && math.IsInf(got, -1)) {
						t.Errorf("%s at %v: LogLikFunc %v, LogLik %v (diff %.3g)", name, p, got, want, got-want)
						break
					}
				}
				bad := append([]float64(nil), fit.Estimates...)
				bad[len(bad)-1] = -1
				if v := f(bad); !math.IsInf(v, -1) {
					t.Errorf("%s at %v: LogLikFunc %v, want −Inf", name, bad, v)
				}
			}
		}
	}
}

// TestLogLikFuncFallsBack checks that data a prepared form cannot take,
// and families without one, get LogLik itself: a zero for the positive
// families, a value outside the support, and gpd.
func TestLogLikFuncFallsBack(t *testing.T) {
	for _, c := range []struct {
		family string
		x      []float64
		p      []float64
	}{
		{"gamma", []float64{0, 1, 2, 3}, []float64{2, 1}},
		{"weibull", []float64{0, 1, 2, 3}, []float64{1, 2}},
		{"lognormal", []float64{-1, 1, 2, 3}, []float64{0, 1}},
		{"exponential", []float64{-1, 1, 2}, []float64{1}},
		{"gpd", []float64{1, 2, 3, 5}, []float64{0, 1, 0.1}},
	} {
		fam, _ := Lookup(c.family)
		d := Complete(c.x)
		want, got := fam.LogLik(c.p, d), LogLikFunc(fam, d)(c.p)
		if got != want && !(math.IsNaN(got) && math.IsNaN(want)) {
			t.Errorf("%s on %v at %v: LogLikFunc %v, LogLik %v", c.family, c.x, c.p, got, want)
		}
	}
}

// TestLogisticLogLikSumMatchesLogisticSums checks the ℓ-only pass against
// logisticSums' ℓ bit for bit, over lengths around the block and product
// sizes.
func TestLogisticLogLikSumMatchesLogisticSums(t *testing.T) {
	r := rand.New(rand.NewPCG(2, 3))
	for _, n := range []int{1, 7, logProductChunk - 1, logProductChunk, 3*logProductChunk + 5, expSumBlock + 17} {
		v := make([]float64, n)
		for i := range v {
			v[i] = 3 * r.NormFloat64()
		}
		work := make([]float64, min(n, expSumBlock))
		for _, ab := range [][2]float64{{0, 1}, {0.3, 1.7}, {-2, 0.2}, {40, 9}} {
			want := logisticSums(v, work, ab[0], ab[1]).ll
			if got := logisticLogLikSum(v, work, ab[0], ab[1]); got != want {
				t.Errorf("n=%d a=%v b=%v: %v, logisticSums %v", n, ab[0], ab[1], got, want)
			}
		}
	}
}

// TestLogAboutMatchesLogsAbout checks logAbout, one value at a time,
// against logsAboutInto's loop, bit for bit, on both sides of its switch
// between log1p and log.
func TestLogAboutMatchesLogsAbout(t *testing.T) {
	x := []float64{1e-300, 0.2, 0.5, 0.50000001, 0.9, 1, 1.1, 1.49999999, 1.5, 3, 1e300}
	y := make([]float64, len(x))
	ref := 1.0
	lnRef, _ := logsAboutInto(y, x, ref)
	for i, v := range x {
		if got := logAbout(v, ref, lnRef); math.Float64bits(got) != math.Float64bits(y[i]) {
			t.Errorf("logAbout(%v) = %v, logsAboutInto %v", v, got, y[i])
		}
	}
}
