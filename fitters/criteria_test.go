package fitters

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func fitOf(family string, logLik float64, k, n int) *Fit {
	return &Fit{Family: family, LogLik: logLik, K: k, N: n, Convergence: Convergence{Converged: true}}
}

// TestCompareByHand checks AIC, AICc, BIC, Δ, Akaike weights and evidence
// ratios against a computation by hand (two candidates, n = 10):
//
//	A: ln L = −10, k = 1: AIC = 22, AICc = 22 + 2·1·2/8 = 22.5, BIC = ln 10 + 20
//	B: ln L = −8,  k = 2: AIC = 20, AICc = 20 + 2·2·3/7 = 21.714285714285715, BIC = 2 ln 10 + 16
//	Δ_A = 0.7857142857142847; w_B = 1/(1 + e^(−Δ_A/2)) = 0.596970308648831,
//	w_A = 0.403029691351169; evidence ratio B:A = e^(Δ_A/2) = 1.4812067732465823.
func TestCompareByHand(t *testing.T) {
	c, err := Compare([]Entry{
		{Family: "exponential", Fit: fitOf("exponential", -10, 1, 10)},
		{Family: "gamma", Fit: fitOf("gamma", -8, 2, 10)},
	}, AICc)
	if err != nil {
		t.Fatal(err)
	}
	a, b := c.Rows[0], c.Rows[1]
	checks := []struct {
		name      string
		got, want float64
	}{
		{"AIC A", a.AIC, 22}, {"AIC B", b.AIC, 20},
		{"AICc A", a.AICc, 22.5}, {"AICc B", b.AICc, 21.714285714285715},
		{"BIC A", a.BIC, 22.302585092994047}, {"BIC B", b.BIC, 20.605170185988094},
		{"delta A", a.Delta, 0.7857142857142847}, {"delta B", b.Delta, 0},
		{"weight A", a.Weight, 0.403029691351169}, {"weight B", b.Weight, 0.596970308648831},
		{"evidence A", a.EvidenceRatio, 1.4812067732465823}, {"evidence B", b.EvidenceRatio, 1},
	}
	for _, ck := range checks {
		if math.Abs(ck.got-ck.want) > 1e-13*math.Max(1, math.Abs(ck.want)) {
			t.Errorf("%s = %v, want %v", ck.name, ck.got, ck.want)
		}
	}
	if a.Rank != 2 || b.Rank != 1 {
		t.Errorf("ranks = %d, %d; want 2, 1", a.Rank, b.Rank)
	}
	if c.Criterion != AICc || c.Note != "" {
		t.Errorf("criterion %q note %q, want aicc without note", c.Criterion, c.Note)
	}
	if a.Support != "substantial" || b.Support != "substantial" {
		t.Errorf("support = %q, %q", a.Support, b.Support)
	}
}

func TestCompareRules(t *testing.T) {
	notConverged := fitOf("weibull", -5, 2, 10)
	notConverged.Converged = false
	notConverged.Reason = "iteration limit reached"
	tests := []struct {
		name    string
		entries []Entry
		crit    Criterion
		wantErr string
		check   func(t *testing.T, c *Comparison)
	}{
		{
			name: "non-converged fit carries no weight",
			entries: []Entry{
				{Family: "gamma", Fit: fitOf("gamma", -8, 2, 10)},
				{Family: "weibull", Fit: notConverged},
			},
			crit: AIC,
			check: func(t *testing.T, c *Comparison) {
				if c.Rows[0].Weight != 1 || c.Rows[0].Rank != 1 {
					t.Errorf("converged row: weight %v rank %d, want 1 and 1", c.Rows[0].Weight, c.Rows[0].Rank)
				}
				r := c.Rows[1]
				if r.Rank != 0 || !math.IsNaN(r.Weight) || !strings.Contains(r.Note, "iteration limit") {
					t.Errorf("non-converged row = %+v", r)
				}
			},
		},
		{
			name: "inapplicable family is listed with its reason",
			entries: []Entry{
				{Family: "gamma", Fit: fitOf("gamma", -8, 2, 10)},
				{Family: "lognormal", Err: inapplicable("lognormal", "needs values > 0, the data have the value 0")},
			},
			crit: BIC,
			check: func(t *testing.T, c *Comparison) {
				if got := c.Rows[1].Inapplicable; !strings.Contains(got, "needs values > 0") {
					t.Errorf("reason = %q", got)
				}
			},
		},
		{
			name: "AICc undefined falls back to AIC visibly",
			entries: []Entry{
				{Family: "exponential", Fit: fitOf("exponential", -3, 1, 3)},
				{Family: "gamma", Fit: fitOf("gamma", -2.5, 2, 3)},
			},
			crit: AICc,
			check: func(t *testing.T, c *Comparison) {
				if c.Criterion != AIC || !strings.Contains(c.Note, "gamma") {
					t.Errorf("criterion %q note %q", c.Criterion, c.Note)
				}
				if !math.IsNaN(c.Rows[1].AICc) || !strings.Contains(c.Rows[1].Note, "AICc undefined") {
					t.Errorf("gamma row: AICc %v note %q", c.Rows[1].AICc, c.Rows[1].Note)
				}
				if c.Rows[0].Value != c.Rows[0].AIC {
					t.Errorf("ranked on %v, want AIC %v", c.Rows[0].Value, c.Rows[0].AIC)
				}
			},
		},
		{
			name: "different data refused",
			entries: []Entry{
				{Family: "gamma", Fit: fitOf("gamma", -8, 2, 10)},
				{Family: "weibull", Fit: fitOf("weibull", -8, 2, 9)},
			},
			crit:    AIC,
			wantErr: "different data",
		},
		{
			name:    "unknown criterion",
			entries: nil,
			crit:    "hqic",
			wantErr: "unknown criterion",
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, err := Compare(tc.entries, tc.crit)
			if tc.wantErr != "" {
				if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
					t.Fatalf("err = %v, want %q", err, tc.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			tc.check(t, c)
		})
	}
}

func TestSupportLabel(t *testing.T) {
	for _, tc := range []struct {
		delta float64
		want  string
	}{{0, "substantial"}, {2, "substantial"}, {3, "less"}, {5, "considerably less"}, {8, "little"}, {12, "essentially none"}} {
		if got := SupportLabel(tc.delta); got != tc.want {
			t.Errorf("SupportLabel(%v) = %q, want %q", tc.delta, got, tc.want)
		}
	}
}

func TestInapplicableErrorIs(t *testing.T) {
	err := inapplicable("beta", "needs 0 < x < 1")
	if !errors.Is(err, ErrInapplicable) {
		t.Error("InapplicableError does not match ErrInapplicable")
	}
}
