package fitters

// Shared checks for the families of make_core.py: lognormal, exponential,
// gamma, weibull, gumbel, logistic, loglogistic, invgauss, pareto. Each
// family's _test.go calls coreFamilyChecks with its name.
//
// Source of the reference values: testdata/families/<family>.json, written by
// testdata/families/make_core.py with Debian's scipy 1.10 and mpmath 1.2
// (rerun: /usr/bin/python3 testdata/families/make_core.py).

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// coreNumber reads a JSON number or the strings "+Inf" / "-Inf"; null is NaN.
type coreNumber float64

func (c *coreNumber) UnmarshalJSON(b []byte) error {
	switch string(b) {
	case `"+Inf"`:
		*c = coreNumber(math.Inf(1))
		return nil
	case `"-Inf"`:
		*c = coreNumber(math.Inf(-1))
		return nil
	case "null":
		*c = coreNumber(math.NaN())
		return nil
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return err
	}
	*c = coreNumber(f)
	return nil
}

type coreReference struct {
	Family string `json:"family"`
	Source string `json:"source"`
	Fits   []struct {
		Name   string       `json:"name"`
		Data   []float64    `json:"data"`
		Params []coreNumber `json:"params"`
		LogLik float64      `json:"loglik"`
	} `json:"fits"`
	Censored []struct {
		Name   string       `json:"name"`
		Exact  []float64    `json:"exact"`
		Left   []float64    `json:"left"`
		Right  []float64    `json:"right"`
		Lower  []float64    `json:"lower"`
		Upper  []float64    `json:"upper"`
		Params []coreNumber `json:"params"`
		LogLik float64      `json:"loglik"`
	} `json:"censored"`
	Spots []struct {
		Params []float64  `json:"params"`
		X      float64    `json:"x"`
		LogPDF coreNumber `json:"logpdf"`
		LogCDF coreNumber `json:"logcdf"`
		LogSF  coreNumber `json:"logsf"`
	} `json:"spots"`
	Quantiles []struct {
		Params []float64 `json:"params"`
		P      float64   `json:"p"`
		X      float64   `json:"x"`
	} `json:"quantiles"`
}

func loadCoreReference(t *testing.T, family string) *coreReference {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "families", family+".json"))
	if err != nil {
		t.Fatalf("reference values: %v (regenerate with /usr/bin/python3 testdata/families/make_core.py)", err)
	}
	var r coreReference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatalf("%s.json: %v", family, err)
	}
	return &r
}

func mustFamily(t testing.TB, name string) Family {
	t.Helper()
	f, ok := Lookup(name)
	if !ok {
		t.Fatalf("family %q is not registered", name)
	}
	return f
}

// relDiff is |a − b| / max(|b|, floor).
func relDiff(a, b, floor float64) float64 {
	if a == b {
		return 0
	}
	return math.Abs(a-b) / math.Max(math.Abs(b), floor)
}

// checkFitAgainst asserts the fit converged, its log-likelihood is at least
// the reference − 1e-9 relative, and its parameters are within relTol.
func checkFitAgainst(t *testing.T, fit *Fit, want []coreNumber, wantLL, relTol float64) {
	t.Helper()
	if !fit.Converged {
		t.Fatalf("not converged: %s", fit.Reason)
	}
	if fit.LogLik < wantLL-1e-9*math.Abs(wantLL) {
		t.Errorf("loglik %v below the reference %v (scipy) by %.3g", fit.LogLik, wantLL, wantLL-fit.LogLik)
	}
	for i, w := range want {
		if d := relDiff(fit.Estimates[i], float64(w), 1e-300); d > relTol {
			t.Errorf("%s = %v, reference (scipy) %v: relative difference %.3g > %.3g", fit.Parameters[i], fit.Estimates[i], float64(w), d, relTol)
		}
	}
}

// checkOptimum asserts that the reported log-likelihood is the family's
// LogLik at the estimates and that no nearby parameter vector (each
// parameter and each pair moved by ±h relative) beats it.
func checkOptimum(t *testing.T, f Family, fit *Fit, d *Data) {
	t.Helper()
	ll := f.LogLik(fit.Estimates, d)
	if relDiff(fit.LogLik, ll, 1) > 1e-10 {
		t.Errorf("reported loglik %v but LogLik at the estimates is %v", fit.LogLik, ll)
	}
	k := len(fit.Estimates)
	slack := 1e-12 * math.Max(1, math.Abs(ll))
	for _, h := range []float64{1e-3, 1e-5} {
		for i := 0; i < k; i++ {
			for j := i; j < k; j++ {
				for _, si := range []float64{-1, 1} {
					for _, sj := range []float64{-1, 1} {
						if i == j && sj < 0 {
							continue
						}
						p := append([]float64(nil), fit.Estimates...)
						p[i] += si * h * math.Max(math.Abs(p[i]), 1e-300)
						if j != i {
							p[j] += sj * h * math.Max(math.Abs(p[j]), 1e-300)
						}
						if v := f.LogLik(p, d); v > ll+slack {
							t.Errorf("nearby %v has loglik %v > optimum %v at %v", p, v, ll, fit.Estimates)
						}
					}
				}
			}
		}
	}
}

// coreFamilyChecks runs the reference fits, spot values, quantiles, the
// quantile round trip, random variates and the nearby-optimum check.
func coreFamilyChecks(t *testing.T, family string) {
	ref := loadCoreReference(t, family)
	f := mustFamily(t, family)
	t.Run("fits", func(t *testing.T) {
		for _, c := range ref.Fits {
			t.Run(c.Name, func(t *testing.T) {
				d := Complete(c.Data)
				fit, err := f.Fit(d, Options{})
				if err != nil {
					t.Fatal(err)
				}
				checkFitAgainst(t, fit, c.Params, c.LogLik, 1e-6)
				checkOptimum(t, f, fit, d)
			})
		}
	})
	t.Run("censored", func(t *testing.T) {
		for _, c := range ref.Censored {
			t.Run(c.Name, func(t *testing.T) {
				d := &Data{Exact: c.Exact, Left: c.Left, Right: c.Right, Lower: c.Lower, Upper: c.Upper}
				fit, err := f.Fit(d, Options{})
				if err != nil {
					t.Fatal(err)
				}
				// BFGS stops on the log-likelihood's tolerance: the
				// parameters agree to about its square root.
				checkFitAgainst(t, fit, c.Params, c.LogLik, 1e-4)
				if ll := f.LogLik(fit.Estimates, d); relDiff(fit.LogLik, ll, 1) > 1e-10 {
					t.Errorf("reported loglik %v but LogLik at the estimates is %v", fit.LogLik, ll)
				}
			})
		}
	})
	t.Run("spots", func(t *testing.T) {
		for _, s := range ref.Spots {
			dist, err := f.New(s.Params)
			if err != nil {
				t.Fatal(err)
			}
			for _, c := range []struct {
				what      string
				got, want float64
			}{
				{"LogPDF", dist.LogPDF(s.X), float64(s.LogPDF)},
				{"LogCDF", dist.LogCDF(s.X), float64(s.LogCDF)},
				{"LogSurvival", dist.LogSurvival(s.X), float64(s.LogSF)},
			} {
				if math.IsInf(c.want, 0) || math.IsInf(c.got, 0) {
					if c.got != c.want {
						t.Errorf("%s(%v) at %v = %v, mpmath %v", c.what, s.X, s.Params, c.got, c.want)
					}
					continue
				}
				// Relative to the value, absolute near 0 (1e-300 floor
				// would demand more than the inputs' rounding allows).
				if d := relDiff(c.got, c.want, 1e-3); d > 1e-11 {
					t.Errorf("%s(%v) at %v = %v, mpmath %v (rel. diff %.3g)", c.what, s.X, s.Params, c.got, c.want, d)
				}
			}
		}
	})
	t.Run("quantiles", func(t *testing.T) {
		for _, q := range ref.Quantiles {
			dist, _ := f.New(q.Params)
			if got := dist.Quantile(q.P); relDiff(got, q.X, 1e-300) > 1e-10 {
				t.Errorf("Quantile(%v) at %v = %v, mpmath %v (rel. diff %.3g)", q.P, q.Params, got, q.X, relDiff(got, q.X, 1e-300))
			}
		}
	})
	t.Run("roundtrip", func(t *testing.T) {
		// Quantile(CDF(x)) ≈ x in the lower half and through the survival
		// function in the upper half.
		dist, _ := f.New(ref.Spots[0].Params)
		for _, p := range []float64{1e-12, 1e-6, 0.01, 0.2, 0.5, 0.8, 0.99, 1 - 1e-9} {
			x := dist.Quantile(p)
			var back float64
			if p <= 0.5 {
				back = math.Exp(dist.LogCDF(x))
			} else {
				back = -math.Expm1(dist.LogSurvival(x))
			}
			// x itself is rounded: allow for F's change over 4 ulp of x.
			tail := math.Min(p, 1-p)
			tol := 1e-9 + 4*0x1p-52*math.Abs(x)*math.Exp(dist.LogPDF(x))/tail
			if relDiff(back, p, 1e-300) > tol {
				t.Errorf("CDF(Quantile(%v)) = %v", p, back)
			}
		}
	})
	t.Run("rand", func(t *testing.T) {
		// Variates from the explicit source: F(X) is uniform, so its mean is
		// 1/2 with standard error 1/√(12n); and the stream is reproducible.
		dist, _ := f.New(ref.Spots[0].Params)
		r := rand.New(rand.NewPCG(7, 11))
		const n = 20000
		var s float64
		first := make([]float64, 5)
		for i := 0; i < n; i++ {
			x := dist.Rand(r)
			if i < 5 {
				first[i] = x
			}
			s += math.Exp(dist.LogCDF(x))
		}
		if m := s / n; math.Abs(m-0.5) > 5/math.Sqrt(12*n) {
			t.Errorf("mean of F(X) over %d variates is %v, want 0.5 ± %v", n, m, 5/math.Sqrt(12*n))
		}
		r2 := rand.New(rand.NewPCG(7, 11))
		for i := 0; i < 5; i++ {
			if x := dist.Rand(r2); x != first[i] {
				t.Fatalf("variate %d differs on a second run from the same seed: %v vs %v", i, x, first[i])
			}
		}
	})
}

// scaledData returns x·c.
func scaledData(x []float64, c float64) []float64 {
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = v * c
	}
	return out
}

// checkScaleEquivariance fits x and x·c (c a power of two, so the scaled
// data are exact) and checks that scale-type parameters scale by c (or 1/c
// for rates, given by power −1), shape-type ones stay (power 0) and the
// log-likelihood shifts by −n ln c; lnShift marks a parameter that shifts by
// ln c (lognormal's mu).
func checkScaleEquivariance(t *testing.T, family string, x []float64, c float64, powers []int, lnShift []bool) {
	t.Helper()
	f := mustFamily(t, family)
	base, err := f.Fit(Complete(x), Options{})
	if err != nil || !base.Converged {
		t.Fatalf("base fit: %v %+v", err, base)
	}
	d := Complete(scaledData(x, c))
	got, err := f.Fit(d, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !got.Converged {
		t.Fatalf("fit of x·%v not converged: %s", c, got.Reason)
	}
	for i, b := range base.Estimates {
		want := b * math.Pow(c, float64(powers[i]))
		if lnShift != nil && lnShift[i] {
			want = b + math.Log(c)
		}
		if rd := relDiff(got.Estimates[i], want, 1e-300); rd > 1e-9 {
			t.Errorf("x·%g: %s = %v, want %v (rel. diff %.3g)", c, got.Parameters[i], got.Estimates[i], want, rd)
		}
	}
	wantLL := base.LogLik - float64(len(x))*math.Log(c)
	if rd := relDiff(got.LogLik, wantLL, 1); rd > 1e-9 {
		t.Errorf("x·%g: loglik %v, want %v", c, got.LogLik, wantLL)
	}
	checkOptimum(t, f, got, d)
}

// checkShiftEquivariance fits x and 1e7 + x·2⁻⁷ (spread about 0.1 far
// from zero) against x·2⁻⁷ recovered exactly as (1e7 + x·2⁻⁷) − 1e7.
func checkShiftEquivariance(t *testing.T, family string, x []float64) {
	t.Helper()
	f := mustFamily(t, family)
	far := make([]float64, len(x))
	near := make([]float64, len(x))
	for i, v := range x {
		far[i] = 1e7 + v/128
		near[i] = far[i] - 1e7 // exact (Sterbenz)
	}
	a, err1 := f.Fit(Complete(near), Options{})
	b, err2 := f.Fit(Complete(far), Options{})
	if err1 != nil || err2 != nil || !a.Converged || !b.Converged {
		t.Fatalf("fits: %v %v %+v %+v", err1, err2, a, b)
	}
	scale := a.Estimates[1]
	if d := math.Abs((b.Estimates[0] - 1e7) - a.Estimates[0]); d > 1e-7*scale {
		t.Errorf("location %v − 1e7 vs %v: off by %.3g scales", b.Estimates[0], a.Estimates[0], d/scale)
	}
	if rd := relDiff(b.Estimates[1], scale, 1e-300); rd > 1e-7 {
		t.Errorf("scale %v vs %v (rel. diff %.3g)", b.Estimates[1], scale, rd)
	}
	if d := math.Abs(b.LogLik - a.LogLik); d > 1e-8*float64(len(x)) {
		t.Errorf("loglik %v vs %v", b.LogLik, a.LogLik)
	}
	checkOptimum(t, f, b, Complete(far))
}

// checkInapplicable asserts that Applicable and Fit refuse d with an
// *InapplicableError.
func checkInapplicable(t *testing.T, family string, d *Data) {
	t.Helper()
	f := mustFamily(t, family)
	err := f.Applicable(d, nil)
	var ie *InapplicableError
	if err == nil || !asInapplicable(err, &ie) {
		t.Errorf("Applicable(%v) = %v, want an *InapplicableError", d.Exact, err)
		return
	}
	if _, err := f.Fit(d, Options{}); err == nil {
		t.Errorf("Fit(%v) accepted inapplicable data", d.Exact)
	}
}

func asInapplicable(err error, target **InapplicableError) bool {
	ie, ok := err.(*InapplicableError)
	if ok {
		*target = ie
	}
	return ok
}

var _ = fmt.Sprintf

// checkClustered fits 1e7 + u for 200 values u spread over about 0.1 (a
// family with a spread parameter that depends on the data's relative
// spread) and compares the parameter picked by pick with its approximate
// value from the moments, to tol relative: the fit must neither fail nor
// lose the spread to rounding. No nearby vector may beat it.
func checkClustered(t *testing.T, family string, tol float64, pick func(fit *Fit, mean, sd float64) (got, approx float64)) {
	t.Helper()
	f := mustFamily(t, family)
	r := rand.New(rand.NewPCG(3, 5))
	x := make([]float64, 200)
	for i := range x {
		x[i] = 1e7 + 0.1*r.Float64()
	}
	d := Complete(x)
	fit, err := f.Fit(d, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !fit.Converged {
		t.Fatalf("not converged: %s", fit.Reason)
	}
	m, v := meanVar(x)
	got, approx := pick(fit, m, math.Sqrt(v))
	if rd := relDiff(got, approx, 1e-300); rd > tol {
		t.Errorf("estimate %v, moment approximation %v (rel. diff %.3g)", got, approx, rd)
	}
	checkOptimum(t, f, fit, d)
}

// TestCoreOverflowingSums fits 1000 values near 1e306, whose plain sum
// overflows: every family must still converge, report the log-likelihood
// its LogLik gives, and not be beaten nearby.
func TestCoreOverflowingSums(t *testing.T) {
	x := make([]float64, 1000)
	for i := range x {
		x[i] = 1e306 * float64(1+i%7)
	}
	d := Complete(x)
	for _, name := range []string{"lognormal", "exponential", "gamma", "weibull", "gumbel", "logistic", "loglogistic", "invgauss", "pareto"} {
		t.Run(name, func(t *testing.T) {
			f := mustFamily(t, name)
			fit, err := f.Fit(d, Options{})
			if err != nil || !fit.Converged {
				t.Fatalf("%v %+v", err, fit)
			}
			checkOptimum(t, f, fit, d)
		})
	}
}
