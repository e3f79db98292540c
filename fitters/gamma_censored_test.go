package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// censoredNewtonAgreement fits family name to seeded censored datasets
// drawn from each member of truths (the five censoring patterns of
// censoredScenarios, n from 15 to 200, perScenario seeds each) by its Fit,
// which must take the censored Newton route and converge, and by the
// generic BFGS route (genericCensoredOnly). Where BFGS converges, the
// Newton maximum is never lower (log-likelihood within 1e-9 relative) and
// the estimates agree within 1e-6 relative; the reported log-likelihood is
// the family's own LogLik at the estimates (1e-11 relative). It returns how
// many datasets were compared, and on how many the route declined (allowed
// only where boundary says the likelihood's supremum is on the edge of the
// parameter space, with no interior maximum to converge to).
func censoredNewtonAgreement(t *testing.T, name, prefix string, truths [][]float64, perScenario int, boundary func(*Data, *Fit) bool) (compared, declined int) {
	t.Helper()
	f, _ := Lookup(name)
	for ti, truth := range truths {
		dist, err := f.New(truth)
		if err != nil {
			t.Fatal(err)
		}
		for si, sc := range censoredScenarios {
			for k := 0; k < perScenario; k++ {
				r := rand.New(rand.NewPCG(uint64(100*ti+si), uint64(k)))
				n := 15 + r.IntN(186)
				d := sc.make(dist, r, n)
				if f.Applicable(d, nil) != nil || d.IsComplete() {
					continue
				}
				label := fmt.Sprintf("%s%v/%s/seed %d (n=%d)", name, truth, sc.name, k, n)
				nf, err := f.Fit(d, Options{})
				if err != nil {
					t.Fatalf("%s: %v", label, err)
				}
				if !strings.HasPrefix(nf.Method, prefix) {
					// The route may decline only where the supremum lies on
					// the parameter space's edge (boundary), and must say
					// so in the method.
					if boundary == nil || !boundary(d, nf) || !strings.Contains(nf.Method, "censored Newton route did not converge") {
						t.Errorf("%s: Fit took %q (converged %v: %s)", label, nf.Method, nf.Converged, nf.Reason)
					}
					declined++
					continue
				}
				if !nf.Converged {
					t.Errorf("%s: not converged: %s", label, nf.Reason)
					continue
				}
				if err := checkRouteLogLik(f, nf, d, 1e-11); err != nil {
					t.Errorf("%s: %v", label, err)
				}
				var gen *Fit
				withGenericCensored(func() { gen, err = f.Fit(d, Options{}) })
				if err != nil {
					t.Fatalf("%s: generic: %v", label, err)
				}
				if !gen.Converged {
					continue
				}
				compared++
				if nf.LogLik < gen.LogLik-1e-9*math.Abs(gen.LogLik) {
					t.Errorf("%s: logL Newton %.15g below BFGS %.15g", label, nf.LogLik, gen.LogLik)
				}
				for i := range nf.Estimates {
					a, b := nf.Estimates[i], gen.Estimates[i]
					if rel := math.Abs(a-b) / math.Abs(b); rel > 1e-6 {
						t.Errorf("%s: %s Newton %.15g, BFGS %.15g (rel %.2g)", label, f.Parameters()[i], a, b, rel)
					}
				}
			}
		}
	}
	return compared, declined
}

// TestGammaCensoredNewtonAgreesWithBFGS compares the censored gamma Newton
// route with the generic BFGS route on 360 seeded censored datasets from
// shapes 0.4 (J-shaped), 2.5 and 40 (nearly normal).
func TestGammaCensoredNewtonAgreesWithBFGS(t *testing.T) {
	truths := [][]float64{{0.4, 0.02}, {2.5, 0.8}, {40, 4}}
	compared, declined := censoredNewtonAgreement(t, "gamma", "censored Newton", truths, 24, nil)
	t.Logf("%d datasets compared with BFGS, %d declined", compared, declined)
	if compared < 300 {
		t.Errorf("only %d datasets compared", compared)
	}
}
