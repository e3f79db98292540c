package runner

import (
	"errors"
	"fmt"
	"strings"
	"sync/atomic"

	"fitseal/fitters"
	"fitseal/fitters/infer"
)

// BootstrapPurpose is the purpose of the one random stream family each fit
// owns: its parametric-bootstrap replicates, shared by the bootstrap
// intervals and the goodness-of-fit p-values.
const BootstrapPurpose = "bootstrap"

// inference is what package infer adds to one converged fit.
type inference struct {
	parameters []infer.ParameterInterval
	// derived holds one value per quantity of the analysis, in the order of
	// quantities().
	derived []infer.DerivedValue
	gof     *infer.GoodnessOfFit
	// replicates is the bootstrap actually drawn (0 when none was); note
	// says why none was, when one was asked for.
	replicates, failed int
	note               string
	// aboveFit is true when a profile found a log-likelihood above the
	// fit's (infer's AboveFit on any interval).
	aboveFit bool
}

// NoGOFNote begins the inference note of a fit for which no
// goodness-of-fit statistic was computed; the reason follows.
const NoGOFNote = "no goodness-of-fit statistic: "

// InferenceRemarks is a fit's inference note without its no-goodness-of-fit
// clause (NoGOFNote …, which the goodness-of-fit tables report): what it
// says of the bootstrap and the intervals (a fallback to profile intervals,
// a local maximum, a failed bootstrap), for the places that print notes.
// The reason there was no bootstrap ("no bootstrap: …") is kept only
// beside the fallback it caused: for goodness of fit alone the tables say
// it already.
func InferenceRemarks(note string) string {
	fallback := strings.Contains(note, BootstrapFallbackNote)
	var keep []string
	for _, clause := range strings.Split(note, "; ") {
		switch {
		case clause == "", strings.HasPrefix(clause, NoGOFNote):
		case strings.HasPrefix(clause, noBootstrapNote) && !fallback:
		default:
			keep = append(keep, clause)
		}
	}
	return strings.Join(keep, "; ")
}

// GroupRemarks gathers the families with the same remark, in the order
// given: one line "a, b: remark" per distinct remark, so that a reason
// shared by every fit of an analysis is read once.
func GroupRemarks(families, remarks []string) []string {
	var order []string
	byRemark := map[string][]string{}
	for i, r := range remarks {
		if r == "" {
			continue
		}
		if _, ok := byRemark[r]; !ok {
			order = append(order, r)
		}
		byRemark[r] = append(byRemark[r], families[i])
	}
	out := make([]string, len(order))
	for i, r := range order {
		out[i] = strings.Join(byRemark[r], ", ") + ": " + r
	}
	return out
}

// noBootstrapNote begins the clause saying why no bootstrap was drawn.
const noBootstrapNote = "no bootstrap: "

// LocalMaximumNote is the note of a fit whose profile found a higher
// log-likelihood than the fit's own.
const LocalMaximumNote = "a profile found a higher log-likelihood than the fit's: the fit is a local maximum, so its log-likelihood, criterion, weight and intervals understate what the family can do; look at the profile plots and consider fixing a parameter"

// BootstrapFallbackNote is the note of a fit whose bootstrap intervals
// could not be computed, for the reason its note gives before it.
const BootstrapFallbackNote = "intervals = \"bootstrap\" needs the replicates: profile-likelihood intervals given instead"

// stream is the identity of a fit's bootstrap stream.
func stream(p *Project, analysis, family string) infer.Stream {
	return infer.Stream{Master: p.Settings.Seed, Analysis: analysis, Family: family, Purpose: BootstrapPurpose}
}

// infer computes intervals, derived quantities and goodness of fit for a
// converged fit: one parametric bootstrap of B = settings.bootstrap
// replicates (when the data are complete, censored in one direction or
// binned: whatever infer.Bootstrap can simulate) serves both the bootstrap
// intervals and the p-values; the observed information is computed once.
// bootWorkers is the parallelism of the bootstrap, drawn counts its
// replicates for the progress line, and share offers idle workers'
// help to it (infer.BootstrapOptions.Share; none changes a number).
func inferFit(p *Project, pa *PlannedAnalysis, fam fitters.Family, fit *fitters.Fit, opt fitters.Options, bootWorkers int, drawn *atomic.Int64, share func(func() bool)) (*inference, error) {
	d := &pa.Group.Data
	if d.Trials != nil {
		// A count family that takes no number of trials (poisson beside
		// binomial) models the counts alone, as its fit did: so do its
		// intervals, derived quantities and goodness of fit.
		if dist, err := fam.New(fit.Estimates); err == nil && !infer.TakesTrials(dist) {
			d = &fitters.Data{Exact: d.Exact}
		}
	}
	s := p.Settings
	out := &inference{}
	method, err := infer.ParseMethod(s.Intervals)
	if err != nil {
		return nil, err
	}
	// The replicates' observed information serves the bootstrap-t intervals
	// only: a bootstrap for goodness of fit alone does not compute it.
	settings := infer.Settings{Level: s.Confidence, Bootstrap: infer.BootstrapOptions{
		Replicates: s.Bootstrap, Workers: bootWorkers, Stream: stream(p, pa.Name, fam.Name()), Fit: opt, Drawn: drawn,
		Share: share, Information: method == infer.MethodBootstrap}}
	if info, err := infer.ObservedInformation(fam, fit, d); err == nil {
		settings.Information = info
	}
	if method == infer.MethodProfile {
		// One prepared log-likelihood for all the fit's profiles.
		settings.LogLik = fitters.LogLikFunc(fam, d)
	}
	if s.Bootstrap > 0 {
		rep, err := infer.Bootstrap(fam, fit, d, settings.Bootstrap)
		switch {
		case errors.Is(err, infer.ErrBootstrapNotApplicable):
			out.note = noBootstrapNote + err.Error()
		case err != nil:
			out.note = "bootstrap failed: " + err.Error()
		default:
			settings.Replicates = rep
			out.replicates, out.failed = rep.Requested, rep.Failed
		}
	}
	if method == infer.MethodBootstrap && settings.Replicates == nil {
		// Without replicates (overlapping intervals or data censored in
		// both directions, which the bootstrap cannot simulate, or a failed
		// bootstrap) the intervals fall back to the profile likelihood, and
		// the note says so: never a bootstrap method named on rows it gave
		// nothing to. Data censored in one direction or binned have
		// replicates (drawn as the data were recorded), each with its
		// refit's observed information on its own sample, so their
		// bootstrap-t intervals are given.
		method = infer.MethodProfile
		settings.LogLik = fitters.LogLikFunc(fam, d)
		out.note = fitters.JoinNote(out.note, BootstrapFallbackNote)
	}
	if out.parameters, err = infer.Intervals(fam, fit, d, method, settings); err != nil {
		return nil, fmt.Errorf("intervals: %w", err)
	}
	for _, q := range quantities(pa.Spec) {
		v, err := infer.Derived(fam, fit, d, infer.Quantity(q.kind), q.arg, method, settings)
		if err != nil {
			return nil, fmt.Errorf("%s %v: %w", q.kind, q.arg, err)
		}
		out.derived = append(out.derived, v)
	}
	for _, r := range out.parameters {
		out.aboveFit = out.aboveFit || r.AboveFit
	}
	for _, v := range out.derived {
		out.aboveFit = out.aboveFit || v.AboveFit
	}
	if out.aboveFit {
		out.note = fitters.JoinNote(out.note, LocalMaximumNote)
	}
	if out.gof, err = infer.CheckFitFrom(fam, fit, d, settings.Replicates); err != nil {
		return nil, fmt.Errorf("goodness of fit: %w", err)
	}
	if !out.gof.Applicable && out.gof.Reason != "" {
		// gof.csv has no row for it, so the fit's note says why.
		out.note = fitters.JoinNote(out.note, NoGOFNote+out.gof.Reason)
	}
	return out, nil
}
