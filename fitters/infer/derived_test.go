package infer

import (
	"math"
	"strings"
	"testing"

	"fitseal/fitters"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestExponentialDerivedClosedForm: every derived quantity of the
// exponential is a monotone function of the rate, so its profile interval
// is the rate's profile interval mapped through it (the profile
// likelihood is invariant under reparameterisation), and its delta-method
// interval follows from se(ln λ̂) = 1/√n:
//
//	quantile q = −ln(1−p)/λ:  ln q = const − ln λ, Wald q̂·exp(±z/√n)
//	exceedance S = e^(−λt):   se(logit Ŝ) = t λ̂ /((1 − Ŝ)√n)
func TestExponentialDerivedClosedForm(t *testing.T) {
	fam := family(t, "exponential")
	d := fitters.Complete(ballBearings)
	fit := fitOf(t, fam, d)
	n := float64(len(ballBearings))
	lam := fit.Estimates[0]
	dev := func(r float64) float64 { return n*(r-1-math.Log(r)) - chi95/2 }
	lamLo, lamHi := lam*bisect(dev, 1e-6, 1), lam*bisect(dev, 1, 100)
	qOf := func(p, l float64) float64 { return -math.Log1p(-p) / l }
	sOf := func(x, l float64) float64 { return math.Exp(-l * x) }
	logit := func(s float64) float64 { return math.Log(s / (1 - s)) }
	expit := func(v float64) float64 { return 1 / (1 + math.Exp(-v)) }
	s100 := sOf(100, lam)
	seLogitS := 100 * lam / ((1 - s100) * math.Sqrt(n))
	tests := []struct {
		q               Quantity
		arg             float64
		m               Method
		est, lo, hi, se float64
	}{
		{Quantile, 0.1, MethodProfile, qOf(0.1, lam), qOf(0.1, lamHi), qOf(0.1, lamLo), qOf(0.1, lam) / math.Sqrt(n)},
		{Quantile, 0.99, MethodWald, qOf(0.99, lam), qOf(0.99, lam) * math.Exp(-z975/math.Sqrt(n)), qOf(0.99, lam) * math.Exp(z975/math.Sqrt(n)), qOf(0.99, lam) / math.Sqrt(n)},
		{ReturnLevel, 100, MethodProfile, qOf(0.99, lam), qOf(0.99, lamHi), qOf(0.99, lamLo), qOf(0.99, lam) / math.Sqrt(n)},
		{Exceedance, 100, MethodProfile, s100, sOf(100, lamHi), sOf(100, lamLo), seLogitS * s100 * (1 - s100)},
		{Exceedance, 100, MethodWald, s100, expit(logit(s100) - z975*seLogitS), expit(logit(s100) + z975*seLogitS), seLogitS * s100 * (1 - s100)},
	}
	for _, tc := range tests {
		got, err := Derived(fam, fit, d, tc.q, tc.arg, tc.m, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		if !close(got.Estimate, tc.est, 1e-12) || !close(got.Lower, tc.lo, 1e-7) || !close(got.Upper, tc.hi, 1e-7) || !close(got.StdError, tc.se, 1e-6) {
			t.Errorf("%s(%v) %s: %v [%v, %v] se %v, want %v [%v, %v] se %v; %s %q",
				tc.q, tc.arg, tc.m, got.Estimate, got.Lower, got.Upper, got.StdError, tc.est, tc.lo, tc.hi, tc.se, got.Method, got.Note)
		}
	}
}

// TestNormalQuantileProfile checks the two-parameter route (solve for one
// parameter, maximise over the other) for the normal 0.99 quantile
// q = μ + z σ against a direct computation: ℓp(q) = max over σ of
// ℓ(q − zσ, σ), maximised here by golden-section search, and the interval
// ends found by bisection on ℓp(q) = ℓ̂ − χ²₁(0.95)/2. The delta method's
// variance is σ̂²/n + z²σ̂²/(2n) (μ̂ and σ̂ are uncorrelated).
func TestNormalQuantileProfile(t *testing.T) {
	fam := family(t, "normal")
	d := fitters.Complete(ballBearings)
	fit := fitOf(t, fam, d)
	n := float64(len(ballBearings))
	mu, sig := fit.Estimates[0], fit.Estimates[1]
	z := distuv.UnitNormal.Quantile(0.99)
	q := mu + z*sig
	lp := func(qq float64) float64 {
		f := func(s float64) float64 { return fam.LogLik([]float64{qq - z*s, s}, d) }
		a, b := math.Log(sig/20), math.Log(sig*20)
		g := (math.Sqrt(5) - 1) / 2
		for i := 0; i < 200; i++ {
			c, e := b-g*(b-a), a+g*(b-a)
			if f(math.Exp(c)) > f(math.Exp(e)) {
				b = e
			} else {
				a = c
			}
		}
		return f(math.Exp((a + b) / 2))
	}
	target := fit.LogLik - chi95/2
	lo := bisect(func(x float64) float64 { return lp(x) - target }, q-10*sig, q)
	hi := bisect(func(x float64) float64 { return lp(x) - target }, q, q+10*sig)
	got, err := Derived(fam, fit, d, Quantile, 0.99, MethodProfile, Settings{Level: 0.95})
	if err != nil {
		t.Fatal(err)
	}
	if !close(got.Lower, lo, 1e-6) || !close(got.Upper, hi, 1e-6) {
		t.Errorf("profile: [%v, %v], want [%v, %v] (%s, %q)", got.Lower, got.Upper, lo, hi, got.Method, got.Note)
	}
	se := sig * math.Sqrt(1/n+z*z/(2*n))
	w, err := Derived(fam, fit, d, Quantile, 0.99, MethodWald, Settings{Level: 0.95})
	if err != nil {
		t.Fatal(err)
	}
	if !close(w.StdError, se, 1e-6) || !close(w.Lower, q-z975*se, 1e-6) || !close(w.Upper, q+z975*se, 1e-6) {
		t.Errorf("delta: %v [%v, %v], want se %v [%v, %v]", w.StdError, w.Lower, w.Upper, se, q-z975*se, q+z975*se)
	}
}

// TestBootstrapTDerivedExact: the exponential 0.99 quantile is a monotone
// function of the rate (log scale: the rate's pivot), and the normal 0.99
// quantile q = μ + zσ has the pivot (q̂ − q)/se(q̂) with the delta-method
// se(q̂) = σ̂√((1 + z²/2)/n), whose law is that of a noncentral t; so their
// bootstrap-t intervals are the exact ones up to Monte-Carlo error (scipy,
// testdata/infer/bootstrap_t.json; Efron & Tibshirani, 1993, §12.5).
func TestBootstrapTDerivedExact(t *testing.T) {
	exact := loadExactIntervals(t)
	d := fitters.Complete(ballBearings)
	for _, tc := range []struct{ family, scale string }{
		{"exponential", "log"},
		{"normal", "natural"},
	} {
		fam := family(t, tc.family)
		fit := fitOf(t, fam, d)
		e := exact[tc.family+" quantile 0.99"]
		got, err := Derived(fam, fit, d, Quantile, 0.99, MethodBootstrap, ballSettings(t, fam, fit, d))
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("%s q99: bootstrap-t (%v, %v), exact (%v, %v)", tc.family, got.Lower, got.Upper, e.Lower, e.Upper)
		want := "bootstrap-t (" + tc.scale + " scale, B = 4000)"
		if !withinWidth(got.Lower, got.Upper, e, 0.05) || got.Method != want || got.Note != "" {
			t.Errorf("%s q99: (%v, %v) %q %q, want about (%v, %v) %q", tc.family, got.Lower, got.Upper, got.Method, got.Note, e.Lower, e.Upper, want)
		}
	}
}

// TestBinomialCommonTrials: when every row has the same number of trials
// (10 here) a binomial's quantiles and exceedance probabilities are those
// of the member with 10 trials; with p̂ = 28/80 = 0.35, scipy 1.10 gives
// binom.ppf(0.5, 10, 0.35) = 3, binom.ppf(0.9, 10, 0.35) = 5 and
// binom.sf(5, 10, 0.35) = 0.09493408017324216 (computed with /usr/bin/python3
// from the closed form p̂ = Σk/Σn). Rows with different numbers of trials
// have no single value, and say so.
func TestBinomialCommonTrials(t *testing.T) {
	fam := family(t, "binomial")
	d := &fitters.Data{Exact: []float64{3, 5, 2, 0, 7, 4, 1, 6}, Trials: []int{10, 10, 10, 10, 10, 10, 10, 10}}
	fit := fitOf(t, fam, d)
	for _, c := range []struct {
		q    Quantity
		arg  float64
		want float64
	}{
		{Quantile, 0.5, 3}, {Quantile, 0.9, 5}, {Exceedance, 5, 0.09493408017324216},
	} {
		v, err := Derived(fam, fit, d, c.q, c.arg, MethodProfile, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(v.Estimate-c.want) > 1e-12*math.Max(1, c.want) {
			t.Errorf("%s %v: %v (%q), scipy %v", c.q, c.arg, v.Estimate, v.Note, c.want)
		}
		if c.q == Exceedance && !(v.Lower < v.Estimate && v.Estimate < v.Upper) {
			t.Errorf("%s %v: interval [%v, %v] by %q (%q)", c.q, c.arg, v.Lower, v.Upper, v.Method, v.Note)
		}
	}
	d.Trials[3] = 12
	fit = fitOf(t, fam, d)
	v, err := Derived(fam, fit, d, Quantile, 0.5, MethodProfile, Settings{Level: 0.95})
	if err != nil || !math.IsNaN(v.Estimate) || !strings.Contains(v.Note, "different numbers of trials") {
		t.Errorf("different trials: %+v, %v; want no value and the reason", v, err)
	}
}
