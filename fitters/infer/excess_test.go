package infer

import (
	"encoding/json"
	"fmt"
	"os"
	"strings"
	"testing"

	"fitseal/fitters"
)

// TestExcessNotesGiveTheRightRule: gpd models X given X > u, and each
// derived row's note says how to make its value unconditional. The rule
// stated must be the one for that quantity, and it must give the right
// number: checked on a Lomax parent whose excesses over u are exactly the
// gpd used here, with the parent's unconditional exceedance probabilities,
// quantiles and return levels (the level exceeded on average once in T
// years by 365 values a year) from scipy (testdata/infer/excess_rules.json,
// made by make_excess_rules.py). ζ = P(X > u) and λ = 365ζ come from the
// parent, as a user would take them from the whole record.
//
//	exceedance:   P(X > t) = ζ·P(X > t | X > u)
//	quantile:     the p-quantile is the gpd's quantile at 1 − (1 − p)/ζ
//	return level: the T-year level is the gpd's quantile at 1 − 1/(λT)
//
// (Multiplying a quantile or return level by ζ, which the note once
// advised for every quantity, gives nothing of the kind.)
func TestExcessNotesGiveTheRightRule(t *testing.T) {
	b, err := os.ReadFile("../../testdata/infer/excess_rules.json")
	if err != nil {
		t.Fatal(err)
	}
	type value struct{ Argument, Unconditional float64 }
	var ref struct {
		Scale, Shape, Threshold float64
		Zeta, Lambda            float64
		Sample                  []float64
		Exceedance              []value
		Quantile                []value
		ReturnLevel             []value `json:"return_level"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	fam := family(t, "gpd")
	fit := &fitters.Fit{Family: "gpd", Parameters: fam.Parameters(), Estimates: []float64{ref.Scale, ref.Shape, ref.Threshold},
		Fixed: []bool{false, false, true}, K: 2, N: len(ref.Sample), Convergence: fitters.Convergence{Converged: true}}
	d := fitters.Complete(ref.Sample)
	dist, err := fam.New(fit.Estimates)
	if err != nil {
		t.Fatal(err)
	}
	zeta, lambda := ref.Zeta, ref.Lambda
	tests := []struct {
		q      Quantity
		values []value
		// rule is the note's fragment stating the rule at arg, and
		// unconditional the value the rule gives from the gpd row.
		rule          func(arg float64) string
		unconditional func(row DerivedValue) float64
	}{
		{Exceedance, ref.Exceedance,
			func(arg float64) string {
				return fmt.Sprintf("the unconditional P(X > %v) is this times P(X > %v)", arg, ref.Threshold)
			},
			func(row DerivedValue) float64 { return row.Estimate * zeta }},
		{Quantile, ref.Quantile,
			func(arg float64) string { return fmt.Sprintf("quantile at 1 − (1 − %v)/ζ", arg) },
			func(row DerivedValue) float64 { return dist.Quantile(1 - (1-row.Argument)/zeta) }},
		{ReturnLevel, ref.ReturnLevel,
			func(arg float64) string {
				return fmt.Sprintf("the %v-year return level is this family's return level for period λ·%v, its quantile at 1 − 1/(λ·%v)", arg, arg, arg)
			},
			func(row DerivedValue) float64 { return dist.Quantile(1 - 1/(lambda*row.Argument)) }},
	}
	for _, tc := range tests {
		if len(tc.values) == 0 {
			t.Fatalf("%s: no reference values", tc.q)
		}
		for _, v := range tc.values {
			name := fmt.Sprintf("%s/%v", tc.q, v.Argument)
			t.Run(name, func(t *testing.T) {
				row, err := Derived(fam, fit, d, tc.q, v.Argument, MethodWald, Settings{Level: 0.95})
				if err != nil {
					t.Fatal(err)
				}
				if !strings.Contains(row.Note, fmt.Sprintf("X > %v", ref.Threshold)) {
					t.Errorf("note %q does not say the value is conditional on X > %v", row.Note, ref.Threshold)
				}
				if rule := tc.rule(v.Argument); !strings.Contains(row.Note, rule) {
					t.Errorf("note %q does not state the rule %q", row.Note, rule)
				}
				if tc.q != Exceedance && strings.Contains(row.Note, "times") {
					t.Errorf("note %q tells to multiply a %s", row.Note, tc.q)
				}
				if got := tc.unconditional(row); !close(got, v.Unconditional, 1e-10) {
					t.Errorf("the note's rule gives %v, scipy's unconditional value is %v", got, v.Unconditional)
				}
			})
		}
	}

	// Below the threshold the conditional probability is 1, and the note
	// does not pretend it can be made unconditional.
	row, err := Derived(fam, fit, d, Exceedance, 20, MethodWald, Settings{Level: 0.95})
	if err != nil {
		t.Fatal(err)
	}
	if row.Estimate != 1 || strings.Contains(row.Note, "times") || !strings.Contains(row.Note, "says nothing of P(X > 20)") {
		t.Errorf("P(X > 20 | X > 30) = %v, note %q: want 1 and no rule to make it unconditional", row.Estimate, row.Note)
	}
}

// TestExcessFamilies: the rows of gpd, and of weibull3 and lognormal3 with
// their threshold held fixed (SPEC: "the same kind of excess model"), are
// conditional on X > u and say so; weibull3 and lognormal3 with the
// threshold estimated, and a family without one, are not. Invented values
// above u = 30.
func TestExcessFamilies(t *testing.T) {
	sample := []float64{31.2, 32.5, 33.1, 34.8, 36.0, 37.7, 39.9, 42.4, 45.1, 48.3, 52.9, 58.0, 64.6, 73.2, 88.5}
	for _, c := range []struct {
		family      string
		theta       []float64
		fixed       []bool
		conditional bool
	}{
		{"gpd", []float64{10, 0.1, 30}, []bool{false, false, true}, true},
		{"weibull3", []float64{1.1, 15, 30}, []bool{false, false, true}, true},
		{"lognormal3", []float64{2.5, 0.9, 30}, []bool{false, false, true}, true},
		{"weibull3", []float64{1.1, 15, 30}, []bool{false, false, false}, false},
		{"lognormal3", []float64{2.5, 0.9, 30}, []bool{false, false, false}, false},
		{"weibull", []float64{1.5, 45}, []bool{false, false}, false},
	} {
		fam := family(t, c.family)
		k := 0
		for _, f := range c.fixed {
			if !f {
				k++
			}
		}
		fit := &fitters.Fit{Family: c.family, Parameters: fam.Parameters(), Estimates: c.theta, Fixed: c.fixed, K: k,
			N: len(sample), Convergence: fitters.Convergence{Converged: true}}
		for _, q := range []Quantity{Quantile, ReturnLevel, Exceedance} {
			arg := map[Quantity]float64{Quantile: 0.9, ReturnLevel: 100, Exceedance: 50}[q]
			v, err := Derived(fam, fit, fitters.Complete(sample), q, arg, MethodWald, Settings{Level: 0.95})
			if err != nil {
				t.Fatalf("%s %v: %v", c.family, q, err)
			}
			given := strings.Contains(v.Note, "X > 30): "+c.family+" models the excesses over its threshold 30") ||
				strings.Contains(v.Note, "X > 30: "+c.family+" models the excesses over its threshold 30")
			if given != c.conditional {
				t.Errorf("%s (fixed %v) %v: note %q, want conditional %v", c.family, c.fixed, q, v.Note, c.conditional)
			}
		}
	}
}
