package runner

import (
	"fmt"
	"math"

	"fitseal/fitters"
	"fitseal/fitters/infer"
)

// Results is everything a run found, in plan order.
type Results struct {
	Project  *Project
	Data     map[string]*DatasetData
	Analyses []*AnalysisResult
	// Seeds lists every derived seed, in plan order.
	Seeds []Seed
	// Plan names every analysis of the whole plan, in order, when known
	// (Run sets it); Analyses may hold only a shard of it.
	Plan []string
}

// AnalysisResult is one analysis: the comparison of its candidates and the
// derived quantities.
type AnalysisResult struct {
	Name, Dataset string
	Group         *Group
	Spec          *Analysis
	// Comparison ranks the candidates; its Rows are in candidate order.
	Comparison *fitters.Comparison
	// Parameters per family row (nil for a family that was not fitted or
	// did not converge), in the order of Comparison.Rows.
	Parameters [][]ParameterRow
	// Inference holds, per family row, a note on the intervals and the
	// bootstrap (why none was drawn, or why inference failed), "" when none.
	Inference []string
	Derived   []DerivedRow
	GOF       []GOFRow
}

// ParameterRow is one parameter of one fit: the estimate, its standard
// error from the observed information and its confidence interval by the
// project's interval method (package fitters/infer). A side the data do not
// bound is open: its bound is the limit of the parameter's range.
type ParameterRow struct {
	Parameter            string
	Estimate             float64
	StdError             float64
	CILower, CIUpper     float64
	LowerOpen, UpperOpen bool
	CIMethod             string
	Fixed                bool
	Note                 string
}

// DerivedRow is one derived quantity of one family, or of the Akaike-weighted
// model average (Family = "model-average").
type DerivedRow struct {
	Family               string
	Quantity             string // "quantile", "return_level" or "exceedance"
	Argument             float64
	Estimate             float64
	StdError             float64
	CILower, CIUpper     float64
	LowerOpen, UpperOpen bool
	CIMethod             string
	Note                 string
}

// GOFRow is one goodness-of-fit statistic of one fit, with its
// parametric-bootstrap p-value (NaN when bootstrap = 0).
type GOFRow struct {
	Family     string
	Statistic  string
	Value      float64
	PValue     float64
	Replicates int
	Note       string
}

// ModelAverage names the Akaike-weighted rows of derived.csv.
const ModelAverage = "model-average"

// assemble ranks each analysis's candidates and gathers intervals, derived
// quantities and goodness of fit, in plan order; the analyses are
// assembled on up to workers goroutines, each into its own slot, so the
// result does not depend on their number.
func assemble(p *Project, plan *Plan, tasks []taskResult, workers int) (*Results, error) {
	// first[i] is the index in tasks of analysis i's first task.
	first := make([]int, len(plan.Analyses)+1)
	for i, pa := range plan.Analyses {
		first[i+1] = first[i] + len(pa.Candidates.Families)
	}
	analyses := make([]*AnalysisResult, len(plan.Analyses))
	seeds := make([][]Seed, len(plan.Analyses))
	err := ForEachErr(workers, len(plan.Analyses), func(i int) (err error) {
		analyses[i], seeds[i], err = assembleAnalysis(p, plan.Analyses[i], tasks[first[i]:first[i+1]])
		return err
	})
	if err != nil {
		return nil, err
	}
	res := &Results{Project: p, Analyses: analyses}
	for i := range plan.Analyses {
		res.Seeds = append(res.Seeds, seeds[i]...)
	}
	return res, nil
}

// assembleAnalysis ranks one analysis's candidates (tasks holds its fits,
// in candidate order) and gathers its intervals, derived quantities,
// goodness of fit and the seeds of its bootstrap streams.
func assembleAnalysis(p *Project, pa *PlannedAnalysis, tasks []taskResult) (*AnalysisResult, []Seed, error) {
	var seeds []Seed
	entries := make([]fitters.Entry, 0, len(pa.Candidates.Families))
	infs := make([]*taskResult, 0, len(pa.Candidates.Families))
	for ti, fam := range pa.Candidates.Families {
		tr := &tasks[ti]
		entries = append(entries, fitters.Entry{Family: fam, Fit: tr.fit, Err: tr.err})
		infs = append(infs, tr)
		if tr.inf != nil && tr.inf.replicates > 0 {
			st := stream(p, pa.Name, fam)
			a, b := st.StreamSeed(0)
			seeds = append(seeds, Seed{Analysis: pa.Name, Family: fam, Purpose: st.Purpose,
				Replicates: tr.inf.replicates, Identity: st.Identity(0), FirstSeed: [2]uint64{a, b}})
		}
	}
	crit, err := fitters.ParseCriterion(pa.Spec.Criterion)
	if err != nil {
		return nil, nil, err
	}
	cmp, err := fitters.Compare(entries, crit)
	if err != nil {
		return nil, nil, fmt.Errorf("analysis %q: %w", pa.Name, err)
	}
	ar := &AnalysisResult{Name: pa.Name, Dataset: pa.DatasetName, Group: pa.Group, Spec: pa.Spec, Comparison: cmp,
		Parameters: make([][]ParameterRow, len(cmp.Rows)), Inference: make([]string, len(cmp.Rows))}
	for i, row := range cmp.Rows {
		tr := infs[i]
		switch {
		case tr.infErr != nil:
			ar.Inference[i] = "no intervals: " + tr.infErr.Error()
		case tr.inf != nil:
			ar.Inference[i] = tr.inf.note
			if tr.inf.aboveFit {
				cmp.Rows[i].Note = fitters.JoinNote(cmp.Rows[i].Note, LocalMaximumNote)
			}
		}
		if row.Rank > 0 {
			ar.Parameters[i] = parameterRows(row.Fit, tr.inf)
			ar.GOF = append(ar.GOF, gofRows(row.Family, tr.inf)...)
		}
	}
	ar.Derived = derived(p, pa.Spec, cmp, infs)
	return ar, seeds, nil
}

func parameterRows(f *fitters.Fit, inf *inference) []ParameterRow {
	rows := make([]ParameterRow, len(f.Parameters))
	for i, name := range f.Parameters {
		rows[i] = ParameterRow{Parameter: name, Estimate: f.Estimates[i], StdError: math.NaN(),
			CILower: math.NaN(), CIUpper: math.NaN(), Fixed: f.Fixed[i]}
		if inf != nil && i < len(inf.parameters) {
			pi := inf.parameters[i]
			r := &rows[i]
			r.StdError, r.CILower, r.CIUpper = pi.StdError, pi.Lower, pi.Upper
			r.LowerOpen, r.UpperOpen, r.CIMethod, r.Note = pi.LowerOpen, pi.UpperOpen, pi.Method, pi.Note
			if !f.Fixed[i] {
				r.CIMethod = intervalMethod(pi.Method, pi.Lower, pi.Upper)
			}
		}
	}
	return rows
}

// intervalMethod is a row's ci_method: the method that gave its interval,
// or "" when it gave none (both bounds missing: a count quantile's profile,
// a fit that did not converge, a model average with nothing to average),
// so that no row names a method beside an empty interval; the row's note
// says why there is none. A fixed parameter's "fixed" is kept by its
// caller.
func intervalMethod(method string, lower, upper float64) string {
	if math.IsNaN(lower) && math.IsNaN(upper) {
		return ""
	}
	return method
}

func gofRows(family string, inf *inference) []GOFRow {
	if inf == nil || inf.gof == nil || !inf.gof.Applicable {
		return nil
	}
	var rows []GOFRow
	for _, st := range inf.gof.Statistics {
		rows = append(rows, GOFRow{Family: family, Statistic: st.Name, Value: st.Value, PValue: st.PValue,
			Replicates: st.Replicates, Note: st.Note})
	}
	return rows
}

// quantity is one derived quantity asked for by an analysis.
type quantity struct {
	kind string
	arg  float64
}

// quantities lists an analysis's derived quantities: quantiles, then return
// levels (the quantile at 1 − 1/T), then exceedance probabilities P(X > t).
func quantities(a *Analysis) []quantity {
	var qs []quantity
	for _, q := range a.Quantiles {
		qs = append(qs, quantity{"quantile", q})
	}
	for _, t := range a.ReturnPeriods {
		qs = append(qs, quantity{"return_level", t})
	}
	for _, x := range a.Thresholds {
		qs = append(qs, quantity{"exceedance", x})
	}
	return qs
}

func derivedRow(family string, v infer.DerivedValue) DerivedRow {
	return DerivedRow{Family: family, Quantity: string(v.Quantity), Argument: v.Argument, Estimate: v.Estimate,
		StdError: v.StdError, CILower: v.Lower, CIUpper: v.Upper, LowerOpen: v.LowerOpen, UpperOpen: v.UpperOpen,
		CIMethod: intervalMethod(v.Method, v.Lower, v.Upper), Note: v.Note}
}

// derived lists each quantity under every ranked fit, then the
// Akaike-weighted model average over the ranked fits with its unconditional
// standard error (Burnham & Anderson, 2002, eqs. 4.1 and 4.9; computed by
// infer.ModelAverage). Where one family carries all the weight the average
// is that family's own row, interval included.
func derived(p *Project, a *Analysis, cmp *fitters.Comparison, tasks []*taskResult) []DerivedRow {
	qs := quantities(a)
	if len(qs) == 0 {
		return nil
	}
	var rows []DerivedRow
	ranked := 0
	for i, r := range cmp.Rows {
		if r.Rank == 0 {
			continue
		}
		ranked++
		inf := tasks[i].inf
		for k, q := range qs {
			if inf != nil && k < len(inf.derived) {
				rows = append(rows, derivedRow(r.Family, inf.derived[k]))
				continue
			}
			nan := math.NaN()
			rows = append(rows, DerivedRow{Family: r.Family, Quantity: q.kind, Argument: q.arg, Estimate: nan,
				StdError: nan, CILower: nan, CIUpper: nan, Note: "not computed: " + errText(tasks[i].infErr)})
		}
	}
	if ranked == 0 {
		return rows
	}
	for k, q := range qs {
		var cands []infer.Candidate
		for i, r := range cmp.Rows {
			if r.Rank == 0 {
				continue
			}
			c := infer.Candidate{Family: r.Family, Weight: r.Weight, Estimate: math.NaN(), StdError: math.NaN()}
			if inf := tasks[i].inf; inf != nil && k < len(inf.derived) {
				c.Estimate, c.StdError, c.Row = inf.derived[k].Estimate, inf.derived[k].StdError, &inf.derived[k]
			}
			cands = append(cands, c)
		}
		v, err := infer.ModelAverage(infer.Quantity(q.kind), q.arg, cands, p.Settings.Confidence)
		if err != nil {
			nan := math.NaN()
			rows = append(rows, DerivedRow{Family: ModelAverage, Quantity: q.kind, Argument: q.arg, Estimate: nan,
				StdError: nan, CILower: nan, CIUpper: nan, Note: err.Error()})
			continue
		}
		rows = append(rows, derivedRow(ModelAverage, v))
	}
	return rows
}

func errText(err error) string {
	if err == nil {
		return "no inference for this fit"
	}
	return err.Error()
}
