package infer

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"fitseal/fitters"
)

// Profile-likelihood intervals of quantiles and return levels against
// scipy (testdata/infer/profile_derived.json, made by
// make_profile_derived.py): the reference maximises over the nuisance
// parameter by its own means — closed forms, gammaincinv, brentq on
// invgauss.ppf — and finds the crossings by brentq, so it shares nothing
// with fitseal's profiler but the definition. The inverse Gaussian cases
// are the ones that once failed: with its mean held, an upper quantile is
// not monotone in the shape, and the profile took the constraint's second
// root, putting the upper bound of the n = 1000 return level about 2 %
// too low.
func TestDerivedProfileMatchesScipy(t *testing.T) {
	b, err := os.ReadFile("../../testdata/infer/profile_derived.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Samples   map[string][]float64 `json:"samples"`
		Intervals []struct {
			Name, Family, Quantity string
			Argument               float64
			Estimate, Lower, Upper float64
			Loglik                 float64
		} `json:"intervals"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	fits := map[string]*fitters.Fit{}
	checked := 0
	for _, c := range doc.Intervals {
		fam := family(t, c.Family)
		d := fitters.Complete(doc.Samples[c.Name])
		fit := fits[c.Name]
		if fit == nil {
			if fit, err = fam.Fit(d, fitters.Options{}); err != nil || !fit.Converged {
				t.Fatalf("%s: not fitted: %v", c.Name, err)
			}
			fits[c.Name] = fit
			if math.Abs(fit.LogLik-c.Loglik) > 1e-8*math.Abs(c.Loglik) {
				t.Errorf("%s: log-likelihood %v, scipy's %v", c.Name, fit.LogLik, c.Loglik)
			}
		}
		q := Quantile
		if c.Quantity == "return_level" {
			q = ReturnLevel
		}
		got, err := Derived(fam, fit, d, q, c.Argument, MethodProfile, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		// The bounds are roots of ℓp − cut found to 1e-10 relative on
		// both sides (they agree to some 1e-11); the estimate moves with
		// the MLE, which scipy's Nelder–Mead finds only to about 1e-8
		// (the bounds, where ℓp is steep, hardly depend on it).
		for _, pair := range [][3]float64{{got.Estimate, c.Estimate, 1e-7}, {got.Lower, c.Lower, 1e-8}, {got.Upper, c.Upper, 1e-8}} {
			if !(math.Abs(pair[0]-pair[1]) <= pair[2]*math.Abs(pair[1])) {
				t.Errorf("%s %s %v: estimate and bounds %v [%v, %v], scipy %v [%v, %v] (%s)",
					c.Name, c.Quantity, c.Argument, got.Estimate, got.Lower, got.Upper, c.Estimate, c.Lower, c.Upper, got.Note)
				break
			}
		}
		checked++
	}
	if checked < 32 {
		t.Errorf("%d intervals checked, the file holds 32", checked)
	}
}

func TestOnBranch(t *testing.T) {
	rising := func(x float64) float64 { return 2*x - 1 }
	peak := func(x float64) float64 { return 1 - (x-1)*(x-1) } // roots at 0 (rising) and 2 (falling)
	for _, c := range []struct {
		name   string
		h      func(float64) float64
		root   float64
		rising float64
		want   bool
	}{
		{"no check", peak, 2, 0, true},
		{"rising root, rising branch", rising, 0.5, 1, true},
		{"rising root, falling branch", rising, 0.5, -1, false},
		{"peak: the rising root", peak, 0, 1, true},
		{"peak: the falling root", peak, 2, 1, false},
		{"peak: the falling root on a falling branch", peak, 2, -1, true},
		{"undefined beside the root: kept", func(x float64) float64 { return math.NaN() }, 1, 1, true},
	} {
		if got := onBranch(c.h, c.root, 1e-6, c.rising); got != c.want {
			t.Errorf("%s: onBranch = %v, want %v", c.name, got, c.want)
		}
	}
}
