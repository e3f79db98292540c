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
	takes     func(*Data) bool       // the datasets the route is for (nil: all censored)
	declines  func(*Data, *Fit) bool // a fallback the route may take (nil: none)
	// relative: differences of log-likelihoods and estimates relative to
	// the value itself; otherwise to max(|value|, 1), absolute below 1
	// (a shape near 0).
	relative bool
}

// agreeWithGeneric fits family c.name to seeded censored datasets drawn
// from each member of c.truths (c.scenarios, n from 15 to 200,
// perScenario seeds each) by its Fit, and by the generic BFGS route
// (genericCensoredOnly). Every dataset the route takes (c.takes; the
// Pareto keeps its closed form with suspensions alone) must be fitted by
// it and converge, unless c.declines allows the fallback taken;
// its log-likelihood is the family's LogLik at its estimates (1e-11
// relative), never below the BFGS route's by more than 1e-9 (relative as
// c.scale says), and
// the estimates agree with BFGS's within estTol relative where BFGS
// converges. It returns the number compared and the worst differences.
func agreeWithGeneric(t *testing.T, c newtonAgreementCase, perScenario int, estTol float64) (compared, declined int) {
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
					if c.declines != nil && c.declines(d, nf) {
						declined++
						t.Logf("%s: declined: %s → %v (converged %v)", label, nf.Method, nf.Estimates, nf.Converged)
						continue
					}
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
				if nf.LogLik < gen.LogLik-1e-9*c.scale(gen.LogLik) {
					t.Errorf("%s: logL Newton %.15g below BFGS %.15g", label, nf.LogLik, gen.LogLik)
				}
				for i := range nf.Estimates {
					a, b := nf.Estimates[i], gen.Estimates[i]
					rel := math.Abs(a-b) / c.scale(b)
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
	t.Logf("%s: Newton logL − BFGS logL (relative) from %.2g to %.2g; estimates differ by at most %.2g relative; %d declined", c.name, worstBelow, bestAbove, worstEst, declined)
	return compared, declined
}

// scale is the denominator of a relative difference from v.
func (c newtonAgreementCase) scale(v float64) float64 {
	if c.relative {
		return math.Abs(v)
	}
	return math.Max(math.Abs(v), 1)
}
