package fitters

import (
	"fmt"
	"math"
	"strings"
)

// checkedFamily wraps every registered family with the checks that hold for
// all of them, so that no family can report an optimum the data do not
// support:
//
//   - data made only of suspensions (or only of non-detects) do not identify
//     any continuous family: the likelihood rises toward its supremum 1 as
//     the distribution moves beyond every limit. Such a fit fails with that
//     reason instead of returning the runaway parameters;
//   - a fit to censored data alone whose log-likelihood has reached 0 has
//     run to such a boundary, whatever the data's pattern; so has one whose
//     log-likelihood has come within flatTolerance of what a distribution
//     flat across the data gives (flatSupremum);
//   - a converged fit with a non-finite estimate must say in its Note which
//     limiting family it reached (df → ∞, size → ∞); otherwise it is marked
//     as not converged.
type checkedFamily struct{ Family }

// Fit runs the family's own fit between the shared checks.
func (c checkedFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if c.Kind() == Continuous {
		if reason := unidentified(d); reason != "" {
			if err := c.Family.Applicable(d, opt.Fixed); err != nil {
				return nil, err
			}
			fit := newFit(c.Family, d)
			fit.markFixed(opt.Fixed)
			fit.Convergence = Convergence{Method: "none", Reason: reason}
			return fit, nil
		}
	}
	fit, err := c.Family.Fit(d, opt)
	if err != nil || fit == nil {
		return fit, err
	}
	if fit.Converged && c.Kind() == Continuous && len(d.Exact) == 0 && d.N() > 0 &&
		fit.LogLik > -1e-9*float64(d.N()) {
		fit.Converged = false
		fit.Reason = fmt.Sprintf("the log-likelihood of the %d censored observations reached %.3g, its supremum 0, at a parameter boundary: the data do not identify the parameters", d.N(), fit.LogLik)
	}
	if fit.Converged && c.Kind() == Continuous {
		if flat, ok := flatSupremum(d); ok && math.Abs(fit.LogLik-flat) <= flatTolerance {
			fit.Converged = false
			fit.Reason = fmt.Sprintf("no exact value and no bounded interval, and the log-likelihood reached %.6g, within %g of %.6g, what a distribution flat across the data gives (probability %.3g below every non-detect limit, %.3g above every suspension): the fit runs off toward that limit (an ever larger scale) and the data do not identify the parameters",
				fit.LogLik, flatTolerance, flat, 1-float64(boundedBelow(d))/float64(d.N()), float64(boundedBelow(d))/float64(d.N()))
		}
	}
	if flat, ok := flatSupremum(d); ok && !fit.Converged && c.Kind() == Continuous && fit.K >= 2 && !strings.Contains(fit.Reason, "flat across the data") {
		fit.Reason = JoinNote(fit.Reason, fmt.Sprintf("the data have no exact value and no bounded interval, which identify a family only where failures and survivors show a trend; without one the likelihood only approaches %.6g, what a distribution flat across the data gives", flat))
	}
	if x0, ok := concentratesOn(d); ok && c.Kind() == Continuous && fit.K >= 2 {
		why := fmt.Sprintf("the data have one distinct exact value, %v, and every censored observation allows it: the likelihood of a family with a free scale has no bound as the family concentrates on that value", x0)
		if fit.Converged {
			// A stop on the way there (which one depends on rounding, so
			// on the platform) is not a maximum.
			fit.Converged = false
			fit.Reason = fmt.Sprintf("stopped at %v, log-likelihood %.6g, on the way to no maximum: %s", fit.Estimates, fit.LogLik, why)
		} else {
			fit.Reason = JoinNote(fit.Reason, why)
		}
	}
	if fit.Converged && fit.Note == "" {
		for i, v := range fit.Estimates {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				fit.Converged = false
				fit.Reason = fmt.Sprintf("the estimate of %s is %v", fit.Parameters[i], v)
				break
			}
		}
	}
	return fit, nil
}

// unidentified returns why d cannot identify a continuous family's
// parameters, or "" when nothing structural rules it out. With no exact
// value and no bounded interval, every observation censored on the same
// side leaves the likelihood without a maximum.
func unidentified(d *Data) string {
	if len(d.Exact) > 0 || d.N() == 0 {
		return ""
	}
	var below, above int // observations bounded only from above / only from below
	below = len(d.Left)
	above = len(d.Right)
	for i := range d.Lower {
		switch {
		case math.IsInf(d.Lower[i], -1):
			below++
		case math.IsInf(d.Upper[i], 1):
			above++
		default:
			return "" // a bounded interval carries information on both sides
		}
	}
	switch {
	case above == d.N():
		return fmt.Sprintf("all %d observations are right-censored (suspensions): with no failure observed the likelihood has no maximum, it rises toward 1 as the distribution moves above every suspension", d.N())
	case below == d.N():
		return fmt.Sprintf("all %d observations are left-censored (non-detects): with no value observed the likelihood has no maximum, it rises toward 1 as the distribution moves below every detection limit", d.N())
	}
	return ""
}

// concentratesOn reports x0 when d's exact values are all x0 and every
// censored observation allows a distribution concentrated on it: each
// non-detect limit at or above x0, each suspension at or below it, each
// interval containing it. Then, as a family with a free scale concentrates
// on x0, f(x0) grows without bound while every F(L), S(R) and interval
// probability stays away from 0: the likelihood has no maximum. (A
// one-parameter family such as the exponential cannot concentrate, and has
// one.)
func concentratesOn(d *Data) (float64, bool) {
	if len(d.Exact) == 0 || d.NCensored() == 0 {
		return 0, false
	}
	x0 := d.Exact[0]
	for _, x := range d.Exact[1:] {
		if x != x0 {
			return 0, false
		}
	}
	for _, l := range d.Left {
		if !(l >= x0) {
			return 0, false
		}
	}
	for _, r := range d.Right {
		if !(r <= x0) {
			return 0, false
		}
	}
	for i, l := range d.Lower {
		if !(l <= x0 && x0 <= d.Upper[i]) {
			return 0, false
		}
	}
	return x0, true
}

// flatTolerance is how near (in log-likelihood) a fit may come to the flat
// supremum before it counts as having run off toward it: 0.01 (0.02 in
// AIC) is immaterial to any comparison by AIC, AICc or BIC, and a fit
// running off slowly (pareto's scale toward 0) stops about 0.001 short.
const flatTolerance = 0.01

// flatSupremum is, for data with no exact value and no bounded interval
// (a non-detects and b suspensions, both present, n = a + b), the
// log-likelihood a ln(a/n) + b ln(b/n) of a distribution function flat at
// p = a/n over the whole range of the limits. Families with a scale that
// can grow without end (while the location follows) approach it; when the
// limits interleave weakly or not at all nothing beats it, so a fit whose
// log-likelihood comes that near it is on its way there, not at a maximum
// (one well above it is a maximum the data support: the limits interleave
// with a trend).
// ok is false for other data.
func flatSupremum(d *Data) (ll float64, ok bool) {
	if len(d.Exact) > 0 || d.N() == 0 {
		return 0, false
	}
	for i := range d.Lower {
		if !math.IsInf(d.Lower[i], -1) && !math.IsInf(d.Upper[i], 1) {
			return 0, false // a bounded interval
		}
	}
	above := boundedBelow(d)
	n, a, b := float64(d.N()), float64(d.N()-above), float64(above)
	if a == 0 || b == 0 {
		return 0, false
	}
	return a*math.Log(a/n) + b*math.Log(b/n), true
}

// boundedBelow counts the observations bounded only from below:
// suspensions and intervals (l, +∞).
func boundedBelow(d *Data) int {
	b := len(d.Right)
	for i := range d.Lower {
		if math.IsInf(d.Upper[i], 1) && !math.IsInf(d.Lower[i], -1) {
			b++
		}
	}
	return b
}

// markFixed flags the fixed parameters of fit and takes them out of k.
func (fit *Fit) markFixed(fixed Fixed) {
	for i, name := range fit.Parameters {
		if v, ok := fixed[name]; ok {
			fit.Fixed[i] = true
			fit.Estimates[i] = v
			fit.K--
		}
	}
}
