package fitters

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
)

// Criterion is an information criterion used to rank candidate families.
type Criterion string

const (
	AIC  Criterion = "aic"
	AICc Criterion = "aicc"
	BIC  Criterion = "bic"
)

// ParseCriterion accepts "aic", "aicc" or "bic".
func ParseCriterion(s string) (Criterion, error) {
	switch c := Criterion(s); c {
	case AIC, AICc, BIC:
		return c, nil
	}
	return "", fmt.Errorf("unknown criterion %q: use \"aic\", \"aicc\" or \"bic\"", s)
}

// AkaikeIC is Akaike's information criterion, AIC = 2k − 2 ln L (Akaike, 1974).
func AkaikeIC(logLik float64, k int) float64 { return 2*float64(k) - 2*logLik }

// AkaikeICc is the small-sample correction of AIC (Hurvich & Tsai, 1989):
// AICc = AIC + 2k(k+1)/(n − k − 1). It is undefined (NaN) when n ≤ k + 1.
func AkaikeICc(logLik float64, k, n int) float64 {
	if n <= k+1 {
		return math.NaN()
	}
	kf := float64(k)
	return AkaikeIC(logLik, k) + 2*kf*(kf+1)/float64(n-k-1)
}

// BayesIC is Schwarz's Bayesian information criterion, BIC = k ln n − 2 ln L
// (Schwarz, 1978).
func BayesIC(logLik float64, k, n int) float64 {
	return float64(k)*math.Log(float64(n)) - 2*logLik
}

// Entry is one candidate of a comparison: the family's fit, or the error
// that prevented it (an *InapplicableError when the family cannot take the data).
type Entry struct {
	Family string
	Fit    *Fit
	Err    error
}

// Ranked is one candidate's row of a comparison.
type Ranked struct {
	Family string
	Fit    *Fit // nil when the family was not fitted
	// Inapplicable holds the reason a family could not be fitted ("" otherwise).
	Inapplicable string
	// AIC, AICc and BIC are NaN where undefined or not fitted.
	AIC, AICc, BIC float64
	// Value is the row's value of the comparison's effective criterion.
	Value float64
	// Delta is Value minus the smallest Value; Weight the Akaike weight
	// exp(−Δ/2)/Σ exp(−Δⱼ/2); EvidenceRatio exp(Δ/2), the best model's
	// weight over this one's. NaN for rows that carry no weight.
	Delta, Weight, EvidenceRatio float64
	// Rank is 1 for the best converged fit, 0 for rows that are not ranked
	// (inapplicable or not converged).
	Rank int
	// Support is the plain-language band of Delta (SupportLabel).
	Support string
	// Note says why a row carries no weight, or what else a reader must know.
	Note string
}

// Comparison ranks the candidates of one analysis on one criterion.
type Comparison struct {
	// Requested is the criterion asked for; Criterion the one used. They
	// differ when AICc is undefined for a candidate (n ≤ k + 1): the
	// comparison then falls back to AIC and Note says why.
	Requested Criterion
	Criterion Criterion
	Note      string
	Rows      []Ranked // in the order of the entries
}

// Compare ranks entries by the criterion, following the same-data rules:
// every fitted candidate must have been fitted to the same observations
// (equal n and censoring counts), discrete and continuous families are
// never compared, and fits that did not converge are shown without weight.
//
// Akaike weights are wᵢ = exp(−Δᵢ/2) / Σⱼ exp(−Δⱼ/2) over the converged fits,
// Δᵢ being the difference to the smallest criterion value (Burnham &
// Anderson, 2002, §2.9). When AICc is requested but n ≤ k + 1 for some
// converged candidate, the whole comparison uses AIC, visibly.
func Compare(entries []Entry, criterion Criterion) (*Comparison, error) {
	if _, err := ParseCriterion(string(criterion)); err != nil {
		return nil, err
	}
	if err := sameFooting(entries); err != nil {
		return nil, err
	}
	c := &Comparison{Requested: criterion, Criterion: criterion, Rows: make([]Ranked, len(entries))}
	nan := math.NaN()
	var undefinedAICc []string
	for i, e := range entries {
		r := Ranked{Family: e.Family, Fit: e.Fit, AIC: nan, AICc: nan, BIC: nan, Value: nan,
			Delta: nan, Weight: nan, EvidenceRatio: nan}
		switch {
		case e.Err != nil:
			var ia *InapplicableError
			if errors.As(e.Err, &ia) {
				r.Inapplicable = ia.Reason
			} else {
				r.Inapplicable = e.Err.Error()
			}
			r.Note = "not applicable: " + r.Inapplicable
		case e.Fit == nil:
			r.Inapplicable = "no fit"
			r.Note = "not fitted"
		default:
			f := e.Fit
			if f.Converged && !math.IsNaN(f.LogLik) && !math.IsInf(f.LogLik, 0) {
				r.AIC = AkaikeIC(f.LogLik, f.K)
				r.AICc = AkaikeICc(f.LogLik, f.K, f.N)
				r.BIC = BayesIC(f.LogLik, f.K, f.N)
				if math.IsNaN(r.AICc) {
					r.Note = fmt.Sprintf("AICc undefined: n = %d is not above k + 1 = %d", f.N, f.K+1)
					undefinedAICc = append(undefinedAICc, e.Family)
				}
				if f.Note != "" {
					r.Note = JoinNote(r.Note, f.Note)
				}
			} else {
				reason := f.Reason
				if reason == "" {
					reason = "the optimiser did not converge"
				}
				r.Note = "not converged, no weight: " + reason
			}
		}
		c.Rows[i] = r
	}
	if criterion == AICc && len(undefinedAICc) > 0 {
		c.Criterion = AIC
		c.Note = fmt.Sprintf("ranked by AIC: AICc is undefined for %s (n ≤ k + 1)", strings.Join(undefinedAICc, ", "))
	}
	// Rank the rows that carry weight.
	var idx []int
	best := math.Inf(1)
	for i := range c.Rows {
		r := &c.Rows[i]
		if math.IsNaN(r.AIC) {
			continue
		}
		switch c.Criterion {
		case AIC:
			r.Value = r.AIC
		case AICc:
			r.Value = r.AICc
		case BIC:
			r.Value = r.BIC
		}
		idx = append(idx, i)
		best = math.Min(best, r.Value)
	}
	// Stable order: by value, ties by the order of the entries.
	sort.SliceStable(idx, func(a, b int) bool { return c.Rows[idx[a]].Value < c.Rows[idx[b]].Value })
	var total float64
	for _, i := range idx {
		r := &c.Rows[i]
		r.Delta = r.Value - best
		r.Weight = math.Exp(-r.Delta / 2)
		total += r.Weight
	}
	for rank, i := range idx {
		r := &c.Rows[i]
		r.Weight /= total
		r.EvidenceRatio = math.Exp(r.Delta / 2)
		r.Rank = rank + 1
		r.Support = SupportLabel(r.Delta)
	}
	return c, nil
}

// sameFooting enforces the same-data rules between the fitted candidates.
func sameFooting(entries []Entry) error {
	var first *Fit
	var firstKind Kind
	kindKnown := false
	for _, e := range entries {
		if f, ok := Lookup(e.Family); ok {
			if kindKnown && f.Kind() != firstKind {
				return fmt.Errorf("discrete and continuous families cannot be compared: their likelihoods are not on the same footing (%s is %s)", e.Family, f.Kind())
			}
			firstKind, kindKnown = f.Kind(), true
		}
		if e.Fit == nil {
			continue
		}
		if first == nil {
			first = e.Fit
			continue
		}
		if e.Fit.N != first.N || e.Fit.NCensored != first.NCensored {
			return fmt.Errorf("candidates were fitted to different data (%s: n = %d, %d censored; %s: n = %d, %d censored): every candidate of one comparison must see the same observations",
				first.Family, first.N, first.NCensored, e.Family, e.Fit.N, e.Fit.NCensored)
		}
	}
	return nil
}

// SupportLabel gives the plain-language band for a criterion difference Δ,
// after Burnham & Anderson (2002, §2.6): Δ ≤ 2 substantial support, 4–7
// considerably less, over 10 essentially none. The bands between (2–4,
// 7–10) are ours, to leave no gap. Labels describe, they are not tests.
func SupportLabel(delta float64) string {
	switch {
	case math.IsNaN(delta):
		return ""
	case delta <= 2:
		return "substantial"
	case delta < 4:
		return "less"
	case delta <= 7:
		return "considerably less"
	case delta <= 10:
		return "little"
	default:
		return "essentially none"
	}
}

// JoinNote joins two notes with "; ", either of which may be empty.
func JoinNote(a, b string) string {
	if a == "" {
		return b
	}
	if b == "" {
		return a
	}
	return a + "; " + b
}
