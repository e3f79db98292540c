package infer

import (
	"fmt"
	"math"

	"fitseal/fitters"
)

// Statistic is one goodness-of-fit statistic with its parametric-bootstrap
// p-value.
type Statistic struct {
	Name  string  // "ks", "cvm", "ad" or "chisq"
	Value float64 // on the observed data with the fitted model
	// PValue is (r + 1)/(B + 1), r the replicates whose statistic is at
	// least Value and B the replicates that gave one; NaN without a bootstrap.
	PValue float64
	// Replicates is B, the replicates the p-value rests on.
	Replicates int
	// Note: failed replicates, pooled cells, ….
	Note string
	// Uninformative is true when the statistic cannot tell fits apart
	// (every cell pooled into one): it gets no p-value, whatever the
	// replicates give.
	Uninformative bool
}

// GoodnessOfFit is the absolute check of one fit.
type GoodnessOfFit struct {
	// Applicable is false when no statistic is given for these data;
	// Reason says why, in words for the report.
	Applicable bool
	Reason     string
	Statistics []Statistic
}

// CheckFit computes the goodness-of-fit statistics of fit on d and, when
// opt.Replicates > 0, their parametric-bootstrap p-values from a fresh
// Bootstrap (which refits the family on every replicate: tables for known
// parameters would be wrong here; Stephens, 1974). See CheckFitFrom to reuse
// replicates already drawn for intervals.
func CheckFit(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, opt BootstrapOptions) (*GoodnessOfFit, error) {
	g, err := observedStatistics(fam, fit, d)
	if err != nil || !g.Applicable || opt.Replicates <= 0 {
		return g, err
	}
	opt.NoStatistics = false
	rep, err := Bootstrap(fam, fit, d, opt)
	if err != nil {
		return nil, err
	}
	return checkFitFrom(g, rep), nil
}

// CheckFitFrom is CheckFit with the p-values taken from replicates rep
// drawn by Bootstrap for the same fit and data.
func CheckFitFrom(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, rep *Replicates) (*GoodnessOfFit, error) {
	g, err := observedStatistics(fam, fit, d)
	if err != nil || !g.Applicable || rep == nil {
		return g, err
	}
	return checkFitFrom(g, rep), nil
}

func checkFitFrom(g *GoodnessOfFit, rep *Replicates) *GoodnessOfFit {
	for si := range g.Statistics {
		s := &g.Statistics[si]
		if math.IsInf(s.Value, 1) || s.Uninformative {
			continue // no p-value for an infinite or uninformative statistic (see observedStatistics)
		}
		var r, b int
		for _, row := range rep.Statistics {
			if row == nil {
				continue
			}
			b++
			if row[si] >= s.Value {
				r++
			}
		}
		s.Replicates = b
		if b > 0 {
			s.PValue = float64(r+1) / float64(b+1)
		} else if rep.Succeeded() > 0 {
			s.Note = "the replicates were drawn without statistics (BootstrapOptions.NoStatistics): no p-value"
		}
		if rep.PValueNote != "" && b > 0 {
			s.Note = fitters.JoinNote(s.Note, rep.PValueNote)
		}
		if rep.Failed > 0 {
			s.Note = fitters.JoinNote(s.Note, fmt.Sprintf("%d of %d replicates failed and are left out (%s)", rep.Failed, rep.Requested, rep.FirstFailure))
			if float64(rep.Failed) >= failedShare*float64(rep.Requested) {
				s.Note = fitters.JoinNote(s.Note, "so many that the p-value, resting on the others, may be biased: the replicates whose refit fails may be those least like the data")
			}
		}
	}
	return g
}

// observedStatistics computes the statistics on the data, or says why none apply.
func observedStatistics(fam fitters.Family, fit *fitters.Fit, d *fitters.Data) (*GoodnessOfFit, error) {
	switch {
	case d.N() == 0:
		return &GoodnessOfFit{Reason: "no observations"}, nil
	case !fit.Converged:
		return &GoodnessOfFit{Reason: "the fit did not converge"}, nil
	}
	dist, err := fam.New(fit.Estimates)
	if err != nil {
		if limit := limitParameter(fit); limit != "" {
			// The optimum is the limiting family (betabinomial's binomial),
			// whose own row, when it is a candidate, has the statistic.
			return &GoodnessOfFit{Reason: limit + ": the optimum is the limiting family, judged by that family's own row"}, nil
		}
		return nil, fmt.Errorf("%s: %w", fam.Name(), err)
	}
	if !d.IsComplete() {
		return observedCensored(fam, dist, d), nil
	}
	x := d.SortedExact() // sorted once for every family fitted to d
	g := &GoodnessOfFit{Applicable: true}
	if fam.Kind() == fitters.Discrete {
		comps := []component{{dist, float64(len(x))}}
		if d.Trials != nil {
			var ok bool
			if comps, ok = groupTrials(d.Trials).components(dist, nil); !ok {
				return &GoodnessOfFit{Reason: "the data give numbers of trials, which this family does not take"}, nil
			}
		}
		var c cells
		v, nc := chiSquareCounts(comps, x, &c)
		s := Statistic{Name: ChiSquare, Value: v, PValue: math.NaN(),
			Note: fmt.Sprintf("%d cells after pooling to expected counts ≥ %d (common practice)", nc, minExpected)}
		if nc < 2 {
			s.Note = "every cell pooled into one: the statistic carries no information; no p-value"
			s.Uninformative = true
		}
		g.Statistics = []Statistic{s}
		return g, nil
	}
	var edf [3]float64
	edfStatistics(dist, x, &edf)
	ties := tiesNote(d.TiedExact(), len(x)) // counted once per dataset, with its sort
	for i, name := range statNames(fitters.Continuous) {
		st := Statistic{Name: name, Value: edf[i], PValue: math.NaN(), Note: ties}
		if math.IsInf(edf[i], 1) {
			st.Note = "infinite: an observation lies on the edge of the fitted support (as pareto's smallest value, which is its scale estimate), where ln F or ln S is −∞; no p-value"
		}
		g.Statistics = append(g.Statistics, st)
	}
	return g, nil
}

// failedShare is the share of failed replicates from which a p-value's
// note warns that it may be biased (a choice: a few failures move it
// little).
const failedShare = 0.1

// tiesShare is the share of the exact values repeating another from which
// the statistics' notes warn of ties (a choice: a few ties move an EDF
// statistic little).
const tiesShare = 0.05

// tiesNote warns, when at least tiesShare of n exact values repeat
// another (ties of them: values recorded to a resolution), that the
// replicates of a continuous model have no ties, so that the EDF statistic
// runs larger on the data than on the replicates and the p-value can come
// out too small; "" otherwise.
func tiesNote(ties, n int) string {
	if ties == 0 || float64(ties) < tiesShare*float64(n) {
		return ""
	}
	return fmt.Sprintf("%d of the %d exact values repeat another (values recorded to a resolution?): the replicates of the continuous model have no ties, "+
		"so the statistic runs larger on these data than on the replicates and the p-value can be too small", ties, n)
}
