package fitters

import (
	"fmt"
	"math"
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
//     run to such a boundary, whatever the data's pattern;
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
