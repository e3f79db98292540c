package fitters

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestCountRand checks each count family's variates against its moments:
// the sample mean of 40 000 seeded draws lies within 5 standard errors of
// the mean, and the sample variance within 10 % of the variance (formulas:
// Johnson, Kemp & Kotz, Univariate Discrete Distributions, 2005).
func TestCountRand(t *testing.T) {
	cases := []struct {
		name       string
		d          Dist
		mean, var_ float64
	}{
		{"poisson", Poisson{3.5}, 3.5, 3.5},
		{"negbinomial", NegBinomial{2.5, 4}, 4, 4 + 16/2.5},
		{"negbinomial/limit", NegBinomial{math.Inf(1), 4}, 4, 4},
		{"geometric", Geometric{0.2}, 0.8 / 0.2, 0.8 / 0.04},
		{"binomial", Binomial{P: 0.3, Trials: 20}, 6, 20 * 0.3 * 0.7},
		{"betabinomial", BetaBinomial{Alpha: 2, Beta: 5, Trials: 30}, 30 * 2.0 / 7, 30 * 2 * 5 * (7 + 30) / (49 * 8.0)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := rand.New(rand.NewPCG(1, 2))
			const n = 40000
			x := make([]float64, n)
			for i := range x {
				x[i] = c.d.Rand(r)
				if !isCount(x[i]) {
					t.Fatalf("variate %v is not a count", x[i])
				}
			}
			m, v := meanVar(x)
			if se := math.Sqrt(c.var_ / n); math.Abs(m-c.mean) > 5*se {
				t.Errorf("sample mean %.4f, want %.4f ± %.4f", m, c.mean, 5*se)
			}
			if math.Abs(v/c.var_-1) > 0.1 {
				t.Errorf("sample variance %.4f, want %.4f", v, c.var_)
			}
		})
	}
}

// TestCountQuantileInvertsCDF checks the definition of the discrete
// quantile on a grid: F(q) ≥ p and F(q − 1) < p, and that the pmf sums to
// the CDF.
func TestCountQuantileInvertsCDF(t *testing.T) {
	dists := map[string]Dist{
		"poisson":      Poisson{12.3},
		"negbinomial":  NegBinomial{0.7, 9},
		"geometric":    Geometric{0.05},
		"binomial":     Binomial{P: 0.81, Trials: 57},
		"betabinomial": BetaBinomial{Alpha: 0.5, Beta: 1.5, Trials: 40},
	}
	for name, d := range dists {
		for _, p := range []float64{1e-9, 0.001, 0.05, 0.3, 0.5, 0.77, 0.95, 0.999} {
			q := d.Quantile(p)
			if math.Exp(d.LogCDF(q)) < p*(1-1e-14) || (q > 0 && math.Exp(d.LogCDF(q-1)) >= p) {
				t.Errorf("%s: Quantile(%v) = %v with F(q) = %v, F(q−1) = %v", name, p, q, math.Exp(d.LogCDF(q)), math.Exp(d.LogCDF(q-1)))
			}
		}
		var s float64
		for k := 0.0; k <= 25; k++ {
			s += math.Exp(d.LogPDF(k))
			if got := math.Exp(d.LogCDF(k)); math.Abs(got-s) > 1e-13 {
				t.Errorf("%s: F(%v) = %.16g, Σ pmf = %.16g", name, k, got, s)
			}
			if got := math.Exp(d.LogCDF(k)) + math.Exp(d.LogSurvival(k)); math.Abs(got-1) > 1e-14 {
				t.Errorf("%s: F + S at %v = %.17g", name, k, got)
			}
		}
		if !math.IsInf(d.LogPDF(2.5), -1) || !math.IsInf(d.LogPDF(-1), -1) {
			t.Errorf("%s: a non-count must have probability 0", name)
		}
	}
}

// TestCountApplicable checks the support checks and their reasons.
func TestCountApplicable(t *testing.T) {
	cases := []struct {
		family string
		d      *Data
		want   string // substring of the reason; "" means applicable
	}{
		{"poisson", Complete([]float64{0, 1, 2}), ""},
		{"poisson", Complete([]float64{0, 1.5, 2}), "non-negative integer counts, observation 2 is 1.5"},
		{"poisson", Complete([]float64{0, -1}), "observation 2 is -1"},
		{"poisson", Complete([]float64{0, 0, 0}), "all 3 counts are 0"},
		{"poisson", &Data{Exact: []float64{1}, Right: []float64{3}}, "exact counts only, the data have 1 censored"},
		{"negbinomial", Complete([]float64{3}), "at least 2 counts"},
		{"geometric", Complete([]float64{0, 0}), "boundary"},
		{"binomial", Complete([]float64{1, 2}), "set trials_column"},
		{"binomial", &Data{Exact: []float64{1, 4}, Trials: []int{5, 3}}, "observation 2 is 4 successes out of 3 trials"},
		{"binomial", &Data{Exact: []float64{0, 0}, Trials: []int{5, 3}}, "no successes"},
		{"binomial", &Data{Exact: []float64{5, 3}, Trials: []int{5, 3}}, "every one of 8 trials is a success"},
		{"binomial", &Data{Exact: []float64{1, 2}, Trials: []int{5, 3}}, ""},
		{"betabinomial", &Data{Exact: []float64{1, 0, 1}, Trials: []int{1, 1, 1}}, "at most 1 trial"},
		{"betabinomial", &Data{Exact: []float64{0, 0}, Trials: []int{4, 4}}, "betabinomial: no successes"},
		{"betabinomial", &Data{Exact: []float64{1, 2}, Trials: []int{5, 3}}, ""},
	}
	for _, c := range cases {
		f, _ := Lookup(c.family)
		err := f.Applicable(c.d, nil)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s %v: unexpected %v", c.family, c.d, err)
		case c.want != "" && (err == nil || !errors.Is(err, ErrInapplicable) || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%s %v: got %v, want an inapplicable error containing %q", c.family, c.d, err, c.want)
		}
		if c.want != "" {
			if _, ferr := f.Fit(c.d, Options{}); ferr == nil {
				t.Errorf("%s %v: Fit accepted inapplicable data", c.family, c.d)
			}
		}
	}
	for _, name := range []string{"poisson", "negbinomial", "geometric", "binomial", "betabinomial"} {
		f, _ := Lookup(name)
		if f.Kind() != Discrete {
			t.Errorf("%s: Kind %v, want discrete", name, f.Kind())
		}
		if err := f.Applicable(Complete([]float64{1, 2}), Fixed{"p": 0.5}); err == nil {
			t.Errorf("%s accepted a fixed parameter", name)
		}
	}
}

// TestCountFitIsMaximum checks that no nearby parameters beat the fitted
// log-likelihood (a property check on top of the scipy references), for
// simulated data with the trials varying per observation.
func TestCountFitIsMaximum(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	counts := make([]float64, 300)
	binx := make([]float64, 300)
	trials := make([]int, 300)
	for i := range counts {
		counts[i] = NegBinomial{1.7, 6}.Rand(r)
		trials[i] = 3 + r.IntN(25)
		binx[i] = BetaBinomial{Alpha: 1.2, Beta: 3, Trials: trials[i]}.Rand(r)
	}
	for _, c := range []struct {
		family string
		d      *Data
	}{
		{"poisson", Complete(counts)}, {"negbinomial", Complete(counts)}, {"geometric", Complete(counts)},
		{"binomial", &Data{Exact: binx, Trials: trials}}, {"betabinomial", &Data{Exact: binx, Trials: trials}},
	} {
		f, _ := Lookup(c.family)
		fit, err := f.Fit(c.d, Options{})
		if err != nil || !fit.Converged || fit.Note != "" {
			t.Fatalf("%s: %v %+v", c.family, err, fit)
		}
		if ll := f.LogLik(fit.Estimates, c.d); ll != fit.LogLik {
			t.Errorf("%s: reported loglik %v, LogLik at the estimates %v", c.family, fit.LogLik, ll)
		}
		for i := range fit.Estimates {
			for _, h := range []float64{-1e-4, 1e-4} {
				p := append([]float64(nil), fit.Estimates...)
				p[i] *= 1 + h
				if ll := f.LogLik(p, c.d); ll > fit.LogLik {
					t.Errorf("%s: moving %s by %v raises the loglik from %.12g to %.12g", c.family, fit.Parameters[i], h, fit.LogLik, ll)
				}
			}
		}
	}
}

// TestNegBinomialLimit checks that underdispersed counts give the Poisson
// limit as a converged fit, and that the limit member behaves as a Poisson.
func TestNegBinomialLimit(t *testing.T) {
	d := Complete([]float64{2, 3, 3, 4, 2, 3, 4, 3, 2, 3}) // ML variance 0.49 < mean 2.9
	fit, err := negBinomialFamily{}.Fit(d, Options{})
	if err != nil {
		t.Fatal(err)
	}
	pl := poissonFamily{}.LogLik([]float64{2.9}, d)
	if !fit.Converged || !math.IsInf(fit.Estimates[0], 1) || fit.Estimates[1] != 2.9 || fit.LogLik != pl {
		t.Fatalf("got %+v, want size +Inf, mean 2.9, loglik %v", fit, pl)
	}
	dist, err := negBinomialFamily{}.New(fit.Estimates)
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []float64{0, 2, 9} {
		if dist.LogPDF(k) != (Poisson{2.9}).LogPDF(k) || dist.LogCDF(k) != (Poisson{2.9}).LogCDF(k) {
			t.Errorf("limit member differs from the Poisson at %v", k)
		}
	}
	// Betabinomial: binomial counts with little spread.
	bd := &Data{Exact: []float64{5, 5, 4, 6, 5, 5, 6, 4}, Trials: []int{10, 10, 10, 10, 10, 10, 10, 10}}
	bfit, err := betaBinomialFamily{}.Fit(bd, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !bfit.Converged || !math.IsInf(bfit.Estimates[0], 1) || !strings.Contains(bfit.Note, "binomial limit") ||
		bfit.LogLik != (binomialFamily{}).LogLik([]float64{0.5}, bd) {
		t.Errorf("betabinomial on underdispersed data: %+v", bfit)
	}
}

// TestCountLogLikRefusesCensored documents that count likelihoods are NaN
// for censored data (the families refuse it in Applicable).
func TestCountLogLikRefusesCensored(t *testing.T) {
	d := &Data{Exact: []float64{1, 2}, Left: []float64{1}, Trials: []int{3, 3}}
	for _, name := range []string{"poisson", "negbinomial", "geometric", "binomial", "betabinomial"} {
		f, _ := Lookup(name)
		p := []float64{0.5}
		if len(f.Parameters()) == 2 {
			p = []float64{2, 3}
		}
		if ll := f.LogLik(p, d); !math.IsNaN(ll) {
			t.Errorf("%s: LogLik with censored data = %v, want NaN", name, ll)
		}
	}
}

// TestNegBinomialBracket: counts that are mostly zero with a few very large
// values put the size's root far below the method-of-moments guess; the
// fit must still find it (checked by the profile score's sign change and
// against nearby sizes).
func TestNegBinomialBracket(t *testing.T) {
	x := make([]float64, 200)
	x[0], x[1], x[2], x[3] = 4000, 1500, 900, 2
	d := Complete(x)
	fit, err := negBinomialFamily{}.Fit(d, Options{})
	if err != nil || !fit.Converged || fit.Note != "" {
		t.Fatalf("%v %+v", err, fit)
	}
	r := fit.Estimates[0]
	for _, h := range []float64{0.999, 1.001} {
		if ll := (negBinomialFamily{}).LogLik([]float64{r * h, fit.Estimates[1]}, d); ll > fit.LogLik {
			t.Errorf("size %v·%v beats the fit: %v > %v", r, h, ll, fit.LogLik)
		}
	}
	xb, s2 := meanVar(x)
	if r0 := xb * xb / (s2 - xb); r > r0/2 {
		t.Logf("root %v not below half the moment guess %v: the case does not exercise the bracket", r, r0)
	}
}
