package fitters

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"
)

// agreementSeeds is the number of seeds per censoring pattern and
// generating member in the agreement tests: 8 (120 datasets per family),
// 40 (600) with FITSEAL_LONG=1.
func agreementSeeds() int {
	if os.Getenv("FITSEAL_LONG") == "1" {
		return 40
	}
	return 8
}

// TestGammaCensoredNewtonAgreesWithBFGS compares the censored gamma Newton
// route with the generic BFGS route on seeded censored datasets (120, or
// 600 with FITSEAL_LONG=1) from shapes 0.4 (J-shaped), 2.5 and 40 (nearly
// normal).
func TestGammaCensoredNewtonAgreesWithBFGS(t *testing.T) {
	truths := [][]float64{{0.4, 0.02}, {2.5, 0.8}, {40, 4}}
	seeds := agreementSeeds()
	// Estimates within 1e-8 relative (measured on 600 datasets: 7e-9,
	// BFGS's own stopping error; log-likelihoods within 3e-14).
	c := newtonAgreementCase{name: "gamma", truths: truths, scenarios: censoredScenarios, relative: true}
	compared, declined := agreeWithGeneric(t, c, seeds, 1e-8)
	t.Logf("%d datasets compared with BFGS, %d declined", compared, declined)
	if compared < len(truths)*len(censoredScenarios)*seeds*9/10 {
		t.Errorf("only %d datasets compared", compared)
	}
}

// censoredNewtonReference is testdata/censored_newton/reference.json,
// written by make_reference.py there (scipy maxima polished by Newton's
// method in mpmath at 40 digits; mpmath derivatives of ln P and ln Q).
type censoredNewtonReference struct {
	Fits []struct {
		Family, Kind string
		Data         struct {
			Exact, Left, Right []float64
			Lower              []float64
			Upper              []*float64
		}
		Scipy struct {
			Estimates []float64
			Loglik    float64
		}
		Estimates []float64
		Loglik    float64
	}
	GammaScores []struct {
		Shape, Y float64
		LnP, LnQ []float64 // value, ∂a, ∂b, ∂aa, ∂ab, ∂bb in (a, b) = (ln k, ln y)
	} `json:"gamma_scores"`
}

func loadCensoredNewtonReference(t *testing.T) *censoredNewtonReference {
	t.Helper()
	b, err := os.ReadFile("../testdata/censored_newton/reference.json")
	if err != nil {
		t.Fatalf("%v (regenerate with /usr/bin/python3 testdata/censored_newton/make_reference.py)", err)
	}
	var r censoredNewtonReference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return &r
}

// TestGammaCensoredShapeDerivatives checks the route's score and Hessian
// of a single non-detect (ln P(k, y)) and a single suspension (ln Q(k, y)),
// whose shape derivatives come from finite differences, against mpmath's
// derivatives at 40 digits (testdata/censored_newton, make_reference.py),
// from the far lower to the far upper tail and shapes 0.3 to 150. The
// route works in (κ, ν) with y = e^κ·e^ν·t; with (a, b) = (ln k, ln y),
// ∂_κ = ∂_a + ∂_b and ∂_ν = ∂_b. Tolerances, relative to
// max(1, |ℓ|, |entry|): ℓ 1e-14, the analytic ν entries 1e-12, the
// differenced score 2e-12 (measured: 1e-13 to 1e-12), the Hessian 1e-9
// (mixed) and 1e-7 (κκ).
func TestGammaCensoredShapeDerivatives(t *testing.T) {
	ref := loadCensoredNewtonReference(t)
	if len(ref.GammaScores) < 10 {
		t.Fatalf("only %d reference points", len(ref.GammaScores))
	}
	for _, r := range ref.GammaScores {
		for _, side := range []string{"lnP", "lnQ"} {
			want := r.LnP
			s := gammaCensoredSample{c: 1}
			if side == "lnP" {
				s.tallied.left.add(r.Y / r.Shape)
			} else {
				want = r.LnQ
				s.tallied.right.add(r.Y / r.Shape)
			}
			p := gammaCensoredPoint(&s, math.Log(r.Shape), 0)
			fa, fb, faa, fab, fbb := want[1], want[2], want[3], want[4], want[5]
			checks := []struct {
				what      string
				got, want float64
				tol       float64
			}{
				{"ℓ", p.ll, want[0], 1e-14},
				{"∂ℓ/∂κ", p.g0, fa + fb, 2e-12},
				{"∂ℓ/∂ν", p.g1, fb, 1e-12},
				{"∂²ℓ/∂κ²", p.h00, faa + 2*fab + fbb, 1e-7},
				{"∂²ℓ/∂κ∂ν", p.h01, fab + fbb, 1e-9},
				{"∂²ℓ/∂ν²", p.h11, fbb, 1e-12},
			}
			for _, c := range checks {
				scale := math.Max(1, math.Max(math.Abs(want[0]), math.Abs(c.want)))
				if !(math.Abs(c.got-c.want) <= c.tol*scale) {
					t.Errorf("k = %v, y = %v, %s: %s = %.15g, mpmath %.15g (err %.2g of %.2g)", r.Shape, r.Y, side, c.what, c.got, c.want, math.Abs(c.got-c.want)/scale, scale)
				}
			}
		}
	}
}

// TestCensoredNewtonReference fits the gamma and inverse Gaussian to the
// censored datasets of testdata/censored_newton (detection limits with
// suspensions, random suspensions, bins with exact values, heavy right
// censoring) and checks the Newton route against the maximum found by
// scipy and polished by Newton's method in mpmath at 40 digits: the fit
// takes the route and converges, its log-likelihood is within 1e-12
// relative of the reference's (and never lower by more than that), and its
// estimates within 1e-10 relative (measured: 1e-16 to 1e-11). The scipy
// maxima themselves are only good to about 1e-7 (Nelder–Mead and BFGS in
// float64); they are checked to be no higher than the reference beyond
// rounding.
func TestCensoredNewtonReference(t *testing.T) {
	ref := loadCensoredNewtonReference(t)
	if len(ref.Fits) < 8 {
		t.Fatalf("only %d reference fits", len(ref.Fits))
	}
	for _, c := range ref.Fits {
		d := &Data{Exact: c.Data.Exact, Left: c.Data.Left, Right: c.Data.Right, Lower: c.Data.Lower}
		for _, u := range c.Data.Upper {
			if u == nil {
				d.Upper = append(d.Upper, math.Inf(1))
			} else {
				d.Upper = append(d.Upper, *u)
			}
		}
		label := c.Family + "/" + c.Kind
		f, _ := Lookup(c.Family)
		fit, err := f.Fit(d, Options{})
		if err != nil {
			t.Fatalf("%s: %v", label, err)
		}
		if !fit.Converged || !strings.HasPrefix(fit.Method, "censored Newton") {
			t.Errorf("%s: %q converged %v (%s)", label, fit.Method, fit.Converged, fit.Reason)
			continue
		}
		scale := math.Max(1, math.Abs(c.Loglik))
		if math.Abs(fit.LogLik-c.Loglik) > 1e-12*scale {
			t.Errorf("%s: logL %.17g, mpmath %.17g", label, fit.LogLik, c.Loglik)
		}
		if c.Scipy.Loglik > c.Loglik+1e-12*scale {
			t.Errorf("%s: scipy's logL %.17g above the polished %.17g", label, c.Scipy.Loglik, c.Loglik)
		}
		for i, want := range c.Estimates {
			if rel := math.Abs(fit.Estimates[i]/want - 1); rel > 1e-10 {
				t.Errorf("%s: %s %.15g, mpmath %.15g (rel %.2g)", label, f.Parameters()[i], fit.Estimates[i], want, rel)
			}
		}
		t.Logf("%s: %d iterations; estimates within %.1e of mpmath (scipy's within %.1e)", label, fit.Iterations,
			math.Max(math.Abs(fit.Estimates[0]/c.Estimates[0]-1), math.Abs(fit.Estimates[1]/c.Estimates[1]-1)),
			math.Max(math.Abs(c.Scipy.Estimates[0]/c.Estimates[0]-1), math.Abs(c.Scipy.Estimates[1]/c.Estimates[1]-1)))
	}
}

// TestCensoredNewtonFallback checks the honest fallback: with an iteration
// budget of one step, the Newton routes cannot converge, the fit comes
// from the BFGS route, and the method says the Newton route was left and
// why; the convergence flag is BFGS's own verdict.
func TestCensoredNewtonFallback(t *testing.T) {
	d := &Data{Exact: []float64{1.2, 0.7, 3.1, 2.2, 0.9, 4.0, 1.6}, Left: []float64{0.5, 0.5}, Right: []float64{5, 5, 5}}
	for _, name := range []string{"gamma", "invgauss"} {
		f, _ := Lookup(name)
		fit, err := f.Fit(d, Options{MaxIterations: 1})
		if err != nil {
			t.Fatal(err)
		}
		if !strings.HasPrefix(fit.Method, "BFGS") || !strings.Contains(fit.Method, "censored Newton route did not converge first (iteration limit 1 reached)") {
			t.Errorf("%s: method %q", name, fit.Method)
		}
		full, err := f.Fit(d, Options{})
		if err != nil || !full.Converged || !strings.HasPrefix(full.Method, "censored Newton") {
			t.Errorf("%s: full budget: %v %+v", name, err, full)
		}
	}
}

// TestCensoredNewtonDeterministic fits the same censored data twice: the
// results are identical to the bit (no map order or timing enters).
func TestCensoredNewtonDeterministic(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 9))
	for _, name := range []string{"gamma", "invgauss"} {
		f, _ := Lookup(name)
		dist, _ := f.New([]float64{2, 3})
		d := censoredScenarios[2].make(dist, r, 300) // many distinct intervals
		a, err1 := f.Fit(d, Options{})
		b, err2 := f.Fit(d, Options{})
		if err1 != nil || err2 != nil || !a.Converged {
			t.Fatalf("%s: %v %v %+v", name, err1, err2, a)
		}
		if a.LogLik != b.LogLik || a.Estimates[0] != b.Estimates[0] || a.Estimates[1] != b.Estimates[1] || a.Iterations != b.Iterations {
			t.Errorf("%s: %+v then %+v", name, a, b)
		}
	}
}

// TestGammaCensoredPointDerivatives checks gammaCensoredPoint as a whole
// (exact values, non-detects, suspensions, bins, far tails) against
// differences of its own ℓ and score, and its ℓ against the family's
// LogLik, at shapes 0.3 to 80.
func TestGammaCensoredPointDerivatives(t *testing.T) {
	d := &Data{Exact: []float64{1.1, 0.4, 2.6, 0.9, 1.7, 3.3},
		Left: []float64{0.05, 0.3, 0.3}, Right: []float64{4, 30, 4},
		Lower: []float64{0.5, 1.5, 0.2, 2}, Upper: []float64{0.8, 2.5, 0.5, math.Inf(1)}}
	f, _ := Lookup("gamma")
	c := censoredCentre(d)
	s, ok := newGammaCensoredSample(d, c)
	if !ok {
		t.Fatal("sample rejected")
	}
	eval := func(kappa, nu float64) newton2Point { return gammaCensoredPoint(&s, kappa, nu) }
	for _, pt := range [][2]float64{{0, 0}, {math.Log(0.3), 0.2}, {math.Log(3), -0.4}, {math.Log(80), 0.1}} {
		kappa, nu := pt[0], pt[1]
		k := math.Exp(kappa)
		if want, got := f.LogLik([]float64{k, k * math.Exp(nu) / c}, d), eval(kappa, nu).ll; math.Abs(got-want) > 1e-12*math.Abs(want) {
			t.Errorf("(%v, %v): ℓ %.17g, LogLik %.17g", kappa, nu, got, want)
		}
		checkPointDerivatives(t, "gamma", eval, kappa, nu, 1e-3, 1e-7)
	}
}

// TestSmallTally checks that tally keeps distinct values in order of
// first appearance with their counts, before and after it switches to a
// map at 17 distinct values.
func TestSmallTally(t *testing.T) {
	var st tally
	want := map[float64]float64{}
	var order []float64
	for i := 0; i < 200; i++ {
		v := float64((i * 7) % 23)
		if _, ok := want[v]; !ok {
			order = append(order, v)
		}
		want[v]++
		st.add(v)
	}
	if len(st.u) != len(order) {
		t.Fatalf("%d distinct, want %d", len(st.u), len(order))
	}
	for i, v := range order {
		if st.u[i] != v || st.n[i] != want[v] {
			t.Errorf("entry %d: %v×%v, want %v×%v", i, st.u[i], st.n[i], v, want[v])
		}
	}
}
