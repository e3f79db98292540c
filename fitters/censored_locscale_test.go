package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// withGenericCensored runs fn with every censored fit sent to the generic
// BFGS route.
func withGenericCensored(fn func()) {
	genericCensoredOnly = true
	defer func() { genericCensoredOnly = false }()
	fn()
}

// censoredScenario censors n draws of dist in one of the ways field data
// are censored.
type censoredScenario struct {
	name string
	make func(dist Dist, r *rand.Rand, n int) *Data
}

var censoredScenarios = []censoredScenario{
	{"two detection limits and suspensions", func(dist Dist, r *rand.Rand, n int) *Data {
		limits := []float64{dist.Quantile(0.1), dist.Quantile(0.25)}
		susp := dist.Quantile(0.85)
		d := &Data{}
		for i := 0; i < n; i++ {
			x := dist.Rand(r)
			switch l := limits[i%2]; {
			case x < l:
				d.Left = append(d.Left, l)
			case x > susp:
				d.Right = append(d.Right, susp)
			default:
				d.Exact = append(d.Exact, x)
			}
		}
		return d
	}},
	{"60 % suspensions (random)", func(dist Dist, r *rand.Rand, n int) *Data {
		d := &Data{}
		for i := 0; i < n; i++ {
			x := dist.Rand(r)
			if r.Float64() < 0.6 {
				// suspended at a uniform fraction of the way to x
				// (values of a location family may be negative: go
				// from the 0.01 quantile).
				lo := math.Min(x, dist.Quantile(0.01))
				d.Right = append(d.Right, lo+r.Float64()*(x-lo))
				continue
			}
			d.Exact = append(d.Exact, x)
		}
		return d
	}},
	{"binned with open end bins and a few exact", func(dist Dist, r *rand.Rand, n int) *Data {
		cuts := []float64{dist.Quantile(0.15), dist.Quantile(0.4), dist.Quantile(0.6), dist.Quantile(0.9)}
		d := &Data{}
		for i := 0; i < n; i++ {
			x := dist.Rand(r)
			if i%5 == 0 {
				d.Exact = append(d.Exact, x)
				continue
			}
			l, u := math.Inf(-1), math.Inf(1)
			for _, c := range cuts {
				if c < x {
					l = c
				} else {
					u = c
					break
				}
			}
			d.Lower = append(d.Lower, l)
			d.Upper = append(d.Upper, u)
		}
		return d
	}},
	{"only three exact values", func(dist Dist, r *rand.Rand, n int) *Data {
		limit, susp := dist.Quantile(0.3), dist.Quantile(0.6)
		d := &Data{}
		for i := 0; i < n; i++ {
			x := dist.Rand(r)
			switch {
			case len(d.Exact) < 3 && x > limit && x < susp:
				d.Exact = append(d.Exact, x)
			case x <= limit:
				d.Left = append(d.Left, limit)
			case x >= susp:
				d.Right = append(d.Right, susp)
			default:
				d.Lower = append(d.Lower, limit)
				d.Upper = append(d.Upper, susp)
			}
		}
		return d
	}},
	{"heavy right censoring at one time", func(dist Dist, r *rand.Rand, n int) *Data {
		susp := dist.Quantile(0.4)
		d := &Data{}
		for i := 0; i < n; i++ {
			if x := dist.Rand(r); x < susp {
				d.Exact = append(d.Exact, x)
			} else {
				d.Right = append(d.Right, susp)
			}
		}
		return d
	}},
}

// censoredLocScaleTruth is each family's generating member for the
// agreement test (a skewed weibull, a lognormal far from 1, …).
var censoredLocScaleTruth = map[string][]float64{
	"normal":      {10, 2},
	"lognormal":   {3, 0.8},
	"logistic":    {-5, 1.5},
	"gumbel":      {100, 7},
	"weibull":     {1.7, 250},
	"loglogistic": {40, 3},
}

// newtonFit fits censored d through the family's Fit and checks that it
// took the censored Newton route.
func newtonFit(f Family, d *Data) (*Fit, error) {
	fit, err := f.Fit(d, Options{})
	if err != nil {
		return nil, err
	}
	if !strings.HasPrefix(fit.Method, "censored Newton") {
		return nil, fmt.Errorf("Fit did not take the censored Newton route (%q, converged %v: %s)", fit.Method, fit.Converged, fit.Reason)
	}
	return fit, nil
}

// checkRouteLogLik reports whether fit's log-likelihood (ℓ of the
// standardized values mapped back) is the family's own LogLik at its
// estimates, to tol relative.
func checkRouteLogLik(f Family, fit *Fit, d *Data, tol float64) error {
	want := f.LogLik(fit.Estimates, d)
	if rel := math.Abs(fit.LogLik-want) / math.Max(1, math.Abs(want)); !(rel <= tol) {
		return fmt.Errorf("reported logL %.17g, family LogLik at the estimates %.17g (rel %.2g)", fit.LogLik, want, rel)
	}
	return nil
}

// TestCensoredLocScaleAgreesWithGeneric fits every location-scale family
// to seeded censored datasets (five censoring patterns, n from 15 to 200)
// by the censored Newton route and by the generic BFGS route: where the
// generic route converges, the two maxima agree (log-likelihood within
// 1e-9 relative, estimates within 1e-6 relative), and the Newton route
// itself converges on every dataset.
func TestCensoredLocScaleAgreesWithGeneric(t *testing.T) {
	const perScenario = 12
	for name, truth := range censoredLocScaleTruth {
		f, _ := Lookup(name)
		dist, err := f.New(truth)
		if err != nil {
			t.Fatal(err)
		}
		compared := 0
		for si, sc := range censoredScenarios {
			for k := 0; k < perScenario; k++ {
				r := rand.New(rand.NewPCG(uint64(si), uint64(k)))
				n := 15 + r.IntN(186)
				d := sc.make(dist, r, n)
				if f.Applicable(d, nil) != nil || d.IsComplete() {
					continue
				}
				label := fmt.Sprintf("%s/%s/seed %d (n=%d)", name, sc.name, k, n)
				var gen *Fit
				withGenericCensored(func() { gen, err = f.Fit(d, Options{}) })
				if err != nil {
					t.Fatalf("%s: generic: %v", label, err)
				}
				nf, err := newtonFit(f, d)
				if err != nil {
					t.Errorf("%s: %v", label, err)
					continue
				}
				if err := checkRouteLogLik(f, nf, d, 1e-12); err != nil {
					t.Errorf("%s: %v", label, err)
				}
				if !gen.Converged {
					continue
				}
				compared++
				if rel := math.Abs(nf.LogLik-gen.LogLik) / math.Max(1, math.Abs(gen.LogLik)); rel > 1e-9 {
					t.Errorf("%s: logL Newton %.15g, generic %.15g (rel %.2g)", label, nf.LogLik, gen.LogLik, rel)
				}
				for i := range nf.Estimates {
					a, b := nf.Estimates[i], gen.Estimates[i]
					if rel := math.Abs(a-b) / math.Max(1e-300, math.Abs(b)); rel > 1e-6 {
						t.Errorf("%s: %s Newton %.15g, generic %.15g (rel %.2g)", label, f.Parameters()[i], a, b, rel)
					}
				}
			}
		}
		t.Logf("%s: %d datasets compared with the generic route", name, compared)
		if compared < len(censoredScenarios)*perScenario*3/4 {
			t.Errorf("%s: only %d datasets compared", name, compared)
		}
	}
}

// TestCensoredLocScaleDerivatives checks the analytic score and observed
// Hessian of censoredLocScalePoint against central differences of its own
// log-likelihood, for every standardized law and every kind of observation,
// tails included (z up to ±8).
func TestCensoredLocScaleDerivatives(t *testing.T) {
	cs := censoredSample{
		exact: []float64{-1.2, 0.3, 0.9, 2.5},
		censoredTallies: censoredTallies{
			lower:   []float64{-3, 0.2, 2},
			upper:   []float64{-2.5, 0.7, 7},
			inCount: []float64{1, 3, 1},
		},
	}
	for _, u := range []float64{-8, -0.5, -0.5} {
		cs.left.add(u)
	}
	for _, u := range []float64{1.1, 6, 1.1, 1.1} {
		cs.right.add(u)
	}
	laws := map[string]stdLocScale{"normal": stdNormal, "logistic": stdLogistic, "sev": stdSEV, "gumbel": stdGumbel}
	for name, std := range laws {
		a, b := 0.3, 0.9
		p := censoredLocScalePoint(std, &cs, a, b)
		ll := func(a, b float64) float64 { return censoredLocScalePoint(std, &cs, a, b).ll }
		grad := func(a, b float64) (float64, float64) {
			q := censoredLocScalePoint(std, &cs, a, b)
			return q.ga, q.gb
		}
		const h = 1e-5
		fa := (ll(a+h, b) - ll(a-h, b)) / (2 * h)
		fb := (ll(a, b+h) - ll(a, b-h)) / (2 * h)
		gaP, gbP := grad(a+h, b)
		gaM, gbM := grad(a-h, b)
		_, gbPb := grad(a, b+h)
		_, gbMb := grad(a, b-h)
		checks := []struct {
			what      string
			got, want float64
		}{
			{"∂ℓ/∂a", p.ga, fa}, {"∂ℓ/∂b", p.gb, fb},
			{"∂²ℓ/∂a²", p.haa, (gaP - gaM) / (2 * h)},
			{"∂²ℓ/∂a∂b", p.hab, (gbP - gbM) / (2 * h)},
			{"∂²ℓ/∂b²", p.hbb, (gbPb - gbMb) / (2 * h)},
		}
		for _, c := range checks {
			if math.Abs(c.got-c.want) > 1e-6*math.Max(1, math.Abs(c.want)) {
				t.Errorf("%s: %s = %.10g, central difference %.10g", name, c.what, c.got, c.want)
			}
		}
	}
}

// TestCensoredLocScaleFarTail fits normal data with suspensions 40
// standard deviations above the bulk and non-detects 40 below: the tail
// terms come from the Mills ratio (ln Φ(−40) = −804.6…), so the fit
// converges with a finite log-likelihood, where ln(1 − Φ(40)) computed
// naively would be ln 0.
func TestCensoredLocScaleFarTail(t *testing.T) {
	d := &Data{
		Exact: []float64{-1.1, -0.4, 0.2, 0.5, 1.3, 0.9, -0.7},
		Right: []float64{40, 41},
		Left:  []float64{-40},
	}
	f, _ := Lookup("normal")
	fit := newFit(f, d)
	if !fitCensoredLocScale(fit, f, d, Options{}, []float64{0.1, 0.8}) {
		t.Fatal("no convergence")
	}
	var gen *Fit
	var err error
	withGenericCensored(func() { gen, err = f.Fit(d, Options{}) })
	if err != nil {
		t.Fatal(err)
	}
	if math.IsInf(fit.LogLik, 0) || math.Abs(fit.LogLik-gen.LogLik) > 1e-9*math.Abs(gen.LogLik) {
		t.Errorf("logL %v, generic %v", fit.LogLik, gen.LogLik)
	}
}

// TestCensoredLocScaleFallsBack checks that data the Newton route cannot
// take (a non-detect at 0 for the lognormal, whose ln F is then −∞) are
// left to the generic route, which reports them as before.
func TestCensoredLocScaleFallsBack(t *testing.T) {
	d := &Data{Exact: []float64{1, 2, 3, 5}, Left: []float64{0}}
	f, _ := Lookup("lognormal")
	fit := newFit(f, d)
	if fitCensoredLocScale(fit, f, d, Options{}, []float64{0.5, 0.6}) {
		t.Fatal("a non-detect at 0 of a lognormal must not be fitted by the Newton route")
	}
	if !math.IsNaN(fit.LogLik) {
		t.Error("the fit record was touched")
	}
}

// BenchmarkFitCensoredRoutes times each location-scale family's censored
// fit (benchSample's 1000 values, about 25 % censored) by the censored
// Newton route and by the generic BFGS route.
func BenchmarkFitCensoredRoutes(b *testing.B) {
	for _, name := range []string{"normal", "lognormal", "weibull", "gumbel", "logistic", "loglogistic"} {
		f, _ := Lookup(name)
		d := benchSample(b, f, censoredLocScaleTruth[name], 1000, false)
		b.Run(name+"/newton", func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := newtonFit(f, d); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(name+"/generic", func(b *testing.B) {
			genericCensoredOnly = true
			defer func() { genericCensoredOnly = false }()
			for i := 0; i < b.N; i++ {
				if _, err := f.Fit(d, Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestCensoredLocScaleClustered fits lognormal and weibull data clustered
// far from 1 (1e7 ± 50, some suspended, some below a detection limit): the
// route takes ln x about its start's centre (lnRatio), so the spread of
// ln x, about 5e-6, keeps its digits; both routes agree.
func TestCensoredLocScaleClustered(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 7))
	d := &Data{}
	for i := 0; i < 200; i++ {
		x := 1e7 + 20*r.NormFloat64()
		switch {
		case x < 1e7-25:
			d.Left = append(d.Left, 1e7-25)
		case x > 1e7+30:
			d.Right = append(d.Right, 1e7+30)
		default:
			d.Exact = append(d.Exact, x)
		}
	}
	for _, name := range []string{"lognormal", "weibull", "normal", "gumbel"} {
		f, _ := Lookup(name)
		nf, err := newtonFit(f, d)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		// The families' LogLik takes ln x − μ about e^μ, whose rounding
		// (2e-16 relative) moves each z by 1e-10 when σ = 2e-6: it agrees
		// with the route's ℓ only to about 1e-10 here.
		if err := checkRouteLogLik(f, nf, d, 1e-10); err != nil {
			t.Errorf("%s: %v", name, err)
		}
		var gen *Fit
		withGenericCensored(func() { gen, err = f.Fit(d, Options{}) })
		if err != nil || !gen.Converged {
			t.Fatalf("%s: generic route: %v %v", name, err, gen)
		}
		if nf.LogLik < gen.LogLik-1e-9*math.Abs(gen.LogLik) {
			t.Errorf("%s: Newton logL %.15g below the generic %.15g", name, nf.LogLik, gen.LogLik)
		}
		for i := range nf.Estimates {
			if rel := math.Abs(nf.Estimates[i]/gen.Estimates[i] - 1); rel > 1e-6 {
				t.Errorf("%s: %s Newton %.15g, generic %.15g", name, f.Parameters()[i], nf.Estimates[i], gen.Estimates[i])
			}
		}
	}
}
