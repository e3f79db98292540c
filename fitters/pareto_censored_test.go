package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// newtonAgreementCase is a family's check against the generic BFGS route:
// the options of its fits, the censoring patterns, and which datasets the
// Newton route is meant for.
type newtonAgreementCase struct {
	name      string
	opt       Options
	truths    [][]float64
	scenarios []censoredScenario
	takes     func(*Data) bool // the datasets the route is for (nil: all censored)
}

// agreeWithGeneric is censoredNewtonAgreement for families that need
// options (the gpd's fixed threshold) or take the Newton route on part of
// the censored data only (the Pareto's closed form with suspensions
// alone): every dataset the route takes must be fitted by it and converge,
// its log-likelihood is the family's LogLik at its estimates (1e-11
// relative), never below the BFGS route's by more than 1e-9 relative, and
// the estimates agree with BFGS's within estTol relative where BFGS
// converges. It returns the number compared and the worst differences.
func agreeWithGeneric(t *testing.T, c newtonAgreementCase, perScenario int, estTol float64) (compared int) {
	t.Helper()
	f, _ := Lookup(c.name)
	var worstBelow, bestAbove, worstEst float64
	methods := map[string]int{}
	for ti, truth := range c.truths {
		dist, err := f.New(truth)
		if err != nil {
			t.Fatal(err)
		}
		for si, sc := range c.scenarios {
			for k := 0; k < perScenario; k++ {
				r := rand.New(rand.NewPCG(uint64(100*ti+si), uint64(k)))
				n := 15 + r.IntN(186)
				d := sc.make(dist, r, n)
				if f.Applicable(d, c.opt.Fixed) != nil || d.IsComplete() || (c.takes != nil && !c.takes(d)) {
					continue
				}
				label := fmt.Sprintf("%s%v/%s/seed %d (n=%d)", c.name, truth, sc.name, k, n)
				nf, err := f.Fit(d, c.opt)
				if err != nil {
					t.Fatalf("%s: %v", label, err)
				}
				methods[nf.Method]++
				if !strings.HasPrefix(nf.Method, "censored Newton") || !nf.Converged {
					t.Errorf("%s: Fit took %q (converged %v: %s)", label, nf.Method, nf.Converged, nf.Reason)
					continue
				}
				if err := checkRouteLogLik(f, nf, d, 1e-11); err != nil {
					t.Errorf("%s: %v", label, err)
				}
				var gen *Fit
				withGenericCensored(func() { gen, err = f.Fit(d, c.opt) })
				if err != nil {
					t.Fatalf("%s: generic: %v", label, err)
				}
				if !gen.Converged {
					continue
				}
				compared++
				dl := (nf.LogLik - gen.LogLik) / math.Max(1, math.Abs(gen.LogLik))
				worstBelow, bestAbove = math.Min(worstBelow, dl), math.Max(bestAbove, dl)
				if nf.LogLik < gen.LogLik-1e-9*math.Max(1, math.Abs(gen.LogLik)) {
					t.Errorf("%s: logL Newton %.15g below BFGS %.15g", label, nf.LogLik, gen.LogLik)
				}
				for i := range nf.Estimates {
					a, b := nf.Estimates[i], gen.Estimates[i]
					rel := math.Abs(a-b) / math.Max(math.Abs(b), 1e-300)
					if nf.Fixed[i] {
						continue
					}
					worstEst = math.Max(worstEst, rel)
					if rel > estTol {
						t.Errorf("%s: %s Newton %.15g, BFGS %.15g (rel %.2g)", label, f.Parameters()[i], a, b, rel)
					}
				}
			}
		}
	}
	for m, k := range methods {
		t.Logf("%s: %d × %s", c.name, k, m)
	}
	t.Logf("%s: Newton logL − BFGS logL (relative) from %.2g to %.2g; estimates differ by at most %.2g relative", c.name, worstBelow, bestAbove, worstEst)
	return compared
}

// paretoScenarios are censoredScenarios with non-detects or intervals
// (suspensions alone have the closed form) and one more where the
// maximum often lies on the edge scale = smallest exact value: a
// non-detect limit at the median for every third value, the others exact.
var paretoScenarios = []censoredScenario{
	censoredScenarios[0], censoredScenarios[2], censoredScenarios[3],
	{"non-detects at the median for a third", func(dist Dist, r *rand.Rand, n int) *Data {
		l := dist.Quantile(0.5)
		d := &Data{}
		for i := 0; i < n; i++ {
			x := dist.Rand(r)
			if i%3 == 0 && x < l {
				d.Left = append(d.Left, l)
				continue
			}
			d.Exact = append(d.Exact, x)
		}
		return d
	}},
}

// TestParetoCensoredNewtonAgreesWithBFGS compares the censored Pareto
// Newton route with the generic BFGS route (two starts inside the bound
// and the edge scale = smallest exact value) on seeded censored datasets
// (96, or 480 with FITSEAL_LONG=1) from shapes 0.6 (very heavy tail), 2.5
// and 12 (values close to the scale). Tolerance on the estimates 1e-8
// relative (BFGS's own stopping error).
func TestParetoCensoredNewtonAgreesWithBFGS(t *testing.T) {
	c := newtonAgreementCase{name: "pareto", truths: [][]float64{{1, 0.6}, {2, 2.5}, {10, 12}}, scenarios: paretoScenarios,
		takes: func(d *Data) bool { return len(d.Left) > 0 || len(d.Lower) > 0 }}
	seeds := agreementSeeds()
	compared := agreeWithGeneric(t, c, seeds, 1e-8)
	t.Logf("%d datasets compared with BFGS", compared)
	if compared < len(c.truths)*len(c.scenarios)*seeds*8/10 {
		t.Errorf("only %d datasets compared", compared)
	}
}
