package infer

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"fitseal/fitters"
)

// TestBetaBinomialLimitDerived: counts out of a common 10 trials that are
// less spread than a binomial's put the betabinomial's maximum at its limit
// α, β → ∞ with α/(α+β) = p̂ = Σk/Σn, the binomial. Its derived quantities
// are then the binomial's, given by every interval method with the intervals
// empty and the reason in the note. Values from scipy's binom.ppf and
// binom.sf at p̂ (testdata/infer/limit_derived.json, made by
// make_limit_derived.py, which also confirms the limit with mpmath). With
// different numbers of trials there is still no single value.
func TestBetaBinomialLimitDerived(t *testing.T) {
	b, err := os.ReadFile("../../testdata/infer/limit_derived.json")
	if err != nil {
		t.Fatal(err)
	}
	type value struct{ Argument, Value float64 }
	var ref struct {
		Trials      int
		Counts      []float64
		P, Loglik   float64
		Quantile    []value
		ReturnLevel []value `json:"return_level"`
		Exceedance  []value
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	trials := make([]int, len(ref.Counts))
	for i := range trials {
		trials[i] = ref.Trials
	}
	d := &fitters.Data{Exact: ref.Counts, Trials: trials}
	fam := family(t, "betabinomial")
	fit := fitOf(t, fam, d)
	if !math.IsInf(fit.Estimates[0], 1) || !math.IsInf(fit.Estimates[1], 1) || !close(fit.LogLik, ref.Loglik, 1e-12) {
		t.Fatalf("fit %v, log-likelihood %v: want the binomial limit, log-likelihood %v", fit.Estimates, fit.LogLik, ref.Loglik)
	}
	cases := []struct {
		q      Quantity
		values []value
	}{{Quantile, ref.Quantile}, {ReturnLevel, ref.ReturnLevel}, {Exceedance, ref.Exceedance}}
	for _, c := range cases {
		if len(c.values) == 0 {
			t.Fatalf("%s: no reference values", c.q)
		}
		for _, v := range c.values {
			for _, m := range []Method{MethodWald, MethodProfile, MethodBootstrap} {
				t.Run(fmt.Sprintf("%s/%v/%s", c.q, v.Argument, m), func(t *testing.T) {
					got, err := Derived(fam, fit, d, c.q, v.Argument, m, Settings{Level: 0.95})
					if err != nil {
						t.Fatal(err)
					}
					if !close(got.Estimate, v.Value, 1e-12) {
						t.Errorf("%v, scipy's binomial %v (note %q)", got.Estimate, v.Value, got.Note)
					}
					if !math.IsNaN(got.Lower) || !math.IsNaN(got.Upper) {
						t.Errorf("interval [%v, %v]: want none at the limit", got.Lower, got.Upper)
					}
					for _, want := range []string{"the binomial's with p = alpha/(alpha+beta) = " + fmt.Sprint(ref.P), "10 trials", "no interval: "} {
						if !strings.Contains(got.Note, want) {
							t.Errorf("note %q lacks %q", got.Note, want)
						}
					}
				})
			}
		}
	}

	// Different numbers of trials: the limit has no single value either.
	d.Trials = append([]int(nil), trials...)
	d.Trials[0] = 12
	fit = fitOf(t, fam, d)
	if !math.IsInf(fit.Estimates[0], 1) {
		t.Fatalf("fit %v: the check needs the limit", fit.Estimates)
	}
	v, err := Derived(fam, fit, d, Quantile, 0.5, MethodProfile, Settings{Level: 0.95})
	if err != nil || !math.IsNaN(v.Estimate) || !strings.Contains(v.Note, "different numbers of trials") {
		t.Errorf("different trials: %+v, %v; want no value and the reason", v, err)
	}
}
