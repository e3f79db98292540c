package infer

import (
	"math"
	"strings"
	"testing"

	"fitseal/fitters"
)

// TestModelAverageByHand works a model average through by hand, from the
// log-likelihoods to the interval.
//
// Three candidates on n = 20 observations, AICc = 2k − 2 ln L + 2k(k+1)/(n−k−1):
//
//	A: ln L = −50,   k = 1: AICc = 102 + 4/18  = 102.2222222
//	B: ln L = −48.5, k = 2: AICc = 101 + 12/17 = 101.7058824
//	C: ln L = −48,   k = 3: AICc = 102 + 24/16 = 103.5
//
// Δ = (0.5163399, 0, 1.7941176); exp(−Δ/2) = (0.7724640, 1, 0.4077672),
// Σ = 2.1802312, w = (0.3543037, 0.4586670, 0.1870293).
// Estimates 10, 12, 13 with standard errors 1, 1.5, 2:
//
//	θ̄ = 0.3543037·10 + 0.4586670·12 + 0.1870293·13 = 11.478422
//	(θ̂ᵢ − θ̄)² = (2.1857315, 0.2720436, 2.3151997)
//	se = 0.3543037·√(1 + 2.1857315) + 0.4586670·√(2.25 + 0.2720436) + 0.1870293·√(4 + 2.3151997)
//	   = 0.6323831 + 0.7284064 + 0.4700059 = 1.8307954
//	interval 11.478422 ± 1.959964·1.8307954.
//
// The by-hand figures carry 7–8 digits, hence the tolerance.
func TestModelAverageByHand(t *testing.T) {
	fit := func(ll float64, k int) *fitters.Fit {
		return &fitters.Fit{LogLik: ll, K: k, N: 20, Convergence: fitters.Convergence{Converged: true}}
	}
	c, err := fitters.Compare([]fitters.Entry{
		{Family: "exponential", Fit: fit(-50, 1)},
		{Family: "gamma", Fit: fit(-48.5, 2)},
		{Family: "gev", Fit: fit(-48, 3)},
	}, fitters.AICc)
	if err != nil {
		t.Fatal(err)
	}
	wantW := []float64{0.3543037, 0.4586670, 0.1870293}
	est := []float64{10, 12, 13}
	se := []float64{1, 1.5, 2}
	var cands []Candidate
	for i, r := range c.Rows {
		if !close(r.Weight, wantW[i], 2e-6) {
			t.Errorf("weight %s = %v, want %v", r.Family, r.Weight, wantW[i])
		}
		cands = append(cands, Candidate{Family: r.Family, Weight: r.Weight, Estimate: est[i], StdError: se[i]})
	}
	// A candidate without weight (not converged) is ignored.
	cands = append(cands, Candidate{Family: "weibull", Weight: math.NaN(), Estimate: 99, StdError: 1})
	got, err := ModelAverage(Quantile, 0.9, cands, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if !close(got.Estimate, 11.478422, 1e-5) || !close(got.StdError, 1.8307954, 1e-5) {
		t.Errorf("average %v se %v, want 11.478422 se 1.8307954", got.Estimate, got.StdError)
	}
	if !close(got.Lower, 11.478422-1.959964*1.8307954, 1e-5) || !close(got.Upper, 11.478422+1.959964*1.8307954, 1e-5) {
		t.Errorf("interval [%v, %v]", got.Lower, got.Upper)
	}
	if got.Note != "" {
		t.Errorf("note %q, want none", got.Note)
	}

	// A weighted candidate without a standard error is left out, visibly,
	// and the rest renormalised: with A alone left, the average is 10 ± 1.
	cands[1].StdError, cands[2].StdError = math.NaN(), math.NaN()
	got, _ = ModelAverage(Quantile, 0.9, cands, 0.95)
	if got.Estimate != 10 || got.StdError != 1 || got.Note == "" {
		t.Errorf("renormalised average %v se %v note %q, want 10, 1 and a note", got.Estimate, got.StdError, got.Note)
	}
}

// TestModelAverageExceedanceLogit works the logit-scale interval of a
// model-averaged exceedance probability by hand (weights 0.7, 0.3;
// p = 0.01 ± 0.008 and 0.03 ± 0.02): the normal interval on the natural
// scale would start at −0.01207, below any probability; on the logit scale
// λ̄ = Σ wᵢ logit pᵢ, se(λ̄) by eq. 4.9 with seᵢ/(pᵢ(1−pᵢ)), and the
// interval expit(λ̄ ± 1.96·se) = (0.0022996861519430827, 0.0797207893107144).
func TestModelAverageExceedanceLogit(t *testing.T) {
	cands := []Candidate{
		{Family: "lognormal", Weight: 0.7, Estimate: 0.01, StdError: 0.008},
		{Family: "gamma", Weight: 0.3, Estimate: 0.03, StdError: 0.02},
	}
	got, err := ModelAverage(Exceedance, 11.3, cands, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"estimate", got.Estimate, 0.016},
		{"std error", got.StdError, 0.01432393336944022},
		{"lower", got.Lower, 0.0022996861519430827},
		{"upper", got.Upper, 0.0797207893107144},
	} {
		if math.Abs(c.got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%s = %v, want %v", c.name, c.got, c.want)
		}
	}
	if !strings.Contains(got.Method, "logit") {
		t.Errorf("method %q does not say the interval is on the logit scale", got.Method)
	}
}

// TestModelAverageQuantileLog works the log-scale interval of a
// model-averaged positive quantile by hand (weights 0.6, 0.4; 1000 ± 700
// and 300 ± 250, both families positive): the normal interval on the
// natural scale would start at −549.79, a negative life; on the log scale
// λ̄ = Σ wᵢ ln θᵢ, se(λ̄) by eq. 4.9 with seᵢ/θᵢ, and the interval
// exp(λ̄ ± 1.96·se) = (95.80933422534586, 3983.723444566493) (Python's
// math and statistics.NormalDist); the estimate stays Σ wᵢθᵢ = 720. A
// family that reaches below 0 (Positive false) keeps the normal interval.
func TestModelAverageQuantileLog(t *testing.T) {
	row := func(positive bool) *DerivedValue { return &DerivedValue{Positive: positive} }
	cands := []Candidate{
		{Family: "weibull", Weight: 0.6, Estimate: 1000, StdError: 700, Row: row(true)},
		{Family: "lognormal", Weight: 0.4, Estimate: 300, StdError: 250, Row: row(true)},
	}
	got, err := ModelAverage(Quantile, 0.5, cands, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"estimate", got.Estimate, 720},
		{"std error", got.StdError, 647.8634343568973},
		{"lower", got.Lower, 95.80933422534586},
		{"upper", got.Upper, 3983.723444566493},
	} {
		if math.Abs(c.got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%s = %v, want %v", c.name, c.got, c.want)
		}
	}
	if !strings.Contains(got.Method, "interval on the log scale") {
		t.Errorf("method %q does not say the interval is on the log scale", got.Method)
	}
	cands[1].Family, cands[1].Row = "normal", row(false)
	got, err = ModelAverage(Quantile, 0.5, cands, 0.95)
	if err != nil || !strings.Contains(got.Method, "normal interval") || math.Abs(got.Lower-(-549.7889982399479)) > 1e-9 {
		t.Errorf("with a family reaching below 0: %+v, %v; want the normal interval from −549.79", got, err)
	}
}

// TestModelAverageNotes: a candidate without a standard error is left out
// and the note says what share of the weight the average rests on; when
// none has one (quantiles of count families) the note says that instead of
// also claiming renormalised weights.
func TestModelAverageNotes(t *testing.T) {
	cands := []Candidate{
		{Family: "betabinomial", Weight: 0.75, Estimate: 2, StdError: math.NaN()},
		{Family: "poisson", Weight: 0.18, Estimate: 0.18, StdError: 0.05},
		{Family: "binomial", Weight: 0.07, Estimate: 2, StdError: math.NaN()},
	}
	v, err := ModelAverage(Exceedance, 3, cands, 0.95)
	if err != nil || !strings.Contains(v.Note, "left out for want of an estimate or standard error: betabinomial, binomial") ||
		!strings.Contains(v.Note, "they carry 0.18 of the weight") {
		t.Errorf("one candidate averaged: %q, %v", v.Note, err)
	}
	for i := range cands {
		cands[i].StdError = math.NaN()
	}
	v, err = ModelAverage(Quantile, 0.5, cands, 0.95)
	if err != nil || !math.IsNaN(v.Estimate) || !strings.HasPrefix(v.Note, "no candidate to average: none of betabinomial, poisson, binomial") || strings.Contains(v.Note, "renormalised") {
		t.Errorf("none averaged: %+v, %v", v, err)
	}
}

// TestModelAverageSoleFamily: when one family carries all the weight the
// average is that family's own row — estimate, interval (open ends and note
// included) — and the method says so: θ̄ = θ̂ and eq. 4.9 gives the family's
// own standard error, so a normal interval would be a second, different
// interval for the same number. Invented rows; the last case is a control
// with two weighted families, which are averaged as before.
func TestModelAverageSoleFamily(t *testing.T) {
	nan := math.NaN()
	profile := &DerivedValue{Quantity: ReturnLevel, Argument: 100, Estimate: 412.5, StdError: 61.2, Lower: 318.4, Upper: 1e300,
		UpperOpen: true, Method: "profile likelihood (solved for scale)", Note: "upper: the profile stays above the cut-off"}
	count := &DerivedValue{Quantity: Quantile, Argument: 0.9, Estimate: 7, StdError: nan, Lower: nan, Upper: nan,
		Method: "profile likelihood", Note: "a quantile of a discrete family is a step function of the parameters: no profile interval"}
	tests := []struct {
		name  string
		cands []Candidate
		own   *DerivedValue
		note  string // the averaged row's note begins with it
	}{
		{"the only weighted family", []Candidate{
			{Family: "gpd", Weight: 1, Estimate: profile.Estimate, StdError: profile.StdError, Row: profile},
			{Family: "weibull3", Weight: nan, Estimate: nan, StdError: nan},
			{Family: "lognormal3", Weight: 0, Estimate: 500, StdError: 10},
		}, profile, profile.Note},
		{"the only weighted family, without a standard error", []Candidate{
			{Family: "negbinomial", Weight: 1, Estimate: 7, StdError: nan, Row: count},
			{Family: "poisson", Weight: nan, Estimate: nan, StdError: nan},
		}, count, count.Note},
		{"the only one left with a standard error", []Candidate{
			{Family: "gpd", Weight: 0.6, Estimate: profile.Estimate, StdError: profile.StdError, Row: profile},
			{Family: "negbinomial", Weight: 0.4, Estimate: 380, StdError: nan, Row: &DerivedValue{Estimate: 380, StdError: nan}},
		}, profile, "left out for want of an estimate or standard error: negbinomial, so the average rests on gpd alone (it carries 0.6 of the weight); " + profile.Note},
		{"two weighted families", []Candidate{
			{Family: "gpd", Weight: 0.6, Estimate: profile.Estimate, StdError: profile.StdError, Row: profile},
			{Family: "weibull3", Weight: 0.4, Estimate: 380, StdError: 40, Row: &DerivedValue{Estimate: 380, StdError: 40}},
		}, nil, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ModelAverage(tc.cands[0].Row.Quantity, tc.cands[0].Row.Argument, tc.cands, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			if tc.own == nil {
				// θ̄ = 0.6·412.5 + 0.4·380 = 399.5, by eq. 4.1.
				if !close(got.Estimate, 399.5, 1e-14) || !strings.Contains(got.Method, "normal interval") {
					t.Errorf("average %v by %q, want 399.5 by the normal interval", got.Estimate, got.Method)
				}
				return
			}
			same := func(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }
			if !same(got.Estimate, tc.own.Estimate) || !same(got.StdError, tc.own.StdError) || !same(got.Lower, tc.own.Lower) ||
				!same(got.Upper, tc.own.Upper) || got.LowerOpen != tc.own.LowerOpen || got.UpperOpen != tc.own.UpperOpen {
				t.Errorf("average %+v, want the family's own row %+v", got, *tc.own)
			}
			if fam := tc.cands[0].Family; !strings.HasPrefix(got.Method, "model average: "+fam+" carries all the weight") || !strings.Contains(got.Method, tc.own.Method) {
				t.Errorf("method %q does not say that %s carries all the weight and name its method %q", got.Method, fam, tc.own.Method)
			}
			if got.Note != tc.note {
				t.Errorf("note %q, want %q", got.Note, tc.note)
			}
		})
	}
}
