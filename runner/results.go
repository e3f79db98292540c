package runner

import (
	"fmt"
	"math"

	"fitseal/fitters"
)

// Results is everything a run found, in plan order.
type Results struct {
	Project  *Project
	Data     map[string]*DatasetData
	Analyses []*AnalysisResult
	// Seeds lists every derived seed, in plan order.
	Seeds []Seed
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
	Derived    []DerivedRow
	GOF        []GOFRow
}

// ParameterRow is one parameter of one fit.
//
// Extension point: StdError and the interval stay NaN and CIMethod empty
// until the inference package (fitters/infer) is wired in; the tables then
// fill them without changing their layout.
type ParameterRow struct {
	Parameter        string
	Estimate         float64
	StdError         float64
	CILower, CIUpper float64
	CIMethod         string
	Fixed            bool
}

// DerivedRow is one derived quantity of one family, or of the Akaike-weighted
// model average (Family = "model-average").
//
// Extension point: the interval stays NaN and CIMethod empty until the
// inference package provides intervals for derived quantities.
type DerivedRow struct {
	Family           string
	Quantity         string // "quantile", "return_level" or "exceedance"
	Argument         float64
	Estimate         float64
	CILower, CIUpper float64
	CIMethod         string
}

// GOFRow is one goodness-of-fit statistic (filled when the inference
// package's goodness-of-fit tests are wired in).
type GOFRow struct {
	Family     string
	Statistic  string
	Value      float64
	PValue     float64
	Replicates int
}

// ModelAverage names the Akaike-weighted rows of derived.csv.
const ModelAverage = "model-average"

// assemble ranks each analysis's candidates and computes the derived
// quantities, in plan order.
func assemble(p *Project, plan *Plan, tasks []taskResult) (*Results, error) {
	res := &Results{Project: p}
	ti := 0
	for _, pa := range plan.Analyses {
		entries := make([]fitters.Entry, 0, len(pa.Candidates.Families))
		for _, fam := range pa.Candidates.Families {
			tr := tasks[ti]
			ti++
			entries = append(entries, fitters.Entry{Family: fam, Fit: tr.fit, Err: tr.err})
			for _, purpose := range SeedPurposes {
				res.Seeds = append(res.Seeds, Seed{Analysis: pa.Name, Family: fam, Purpose: purpose,
					Seed: DeriveSeed(p.Settings.Seed, pa.Name, fam, purpose)})
			}
		}
		crit, err := fitters.ParseCriterion(pa.Spec.Criterion)
		if err != nil {
			return nil, err
		}
		cmp, err := fitters.Compare(entries, crit)
		if err != nil {
			return nil, fmt.Errorf("analysis %q: %w", pa.Name, err)
		}
		ar := &AnalysisResult{Name: pa.Name, Dataset: pa.DatasetName, Group: pa.Group, Spec: pa.Spec, Comparison: cmp,
			Parameters: make([][]ParameterRow, len(cmp.Rows))}
		for i, row := range cmp.Rows {
			if row.Rank > 0 {
				ar.Parameters[i] = parameterRows(row.Fit)
			}
		}
		ar.Derived = derived(pa.Spec, cmp)
		res.Analyses = append(res.Analyses, ar)
	}
	return res, nil
}

func parameterRows(f *fitters.Fit) []ParameterRow {
	rows := make([]ParameterRow, len(f.Parameters))
	for i, name := range f.Parameters {
		rows[i] = ParameterRow{Parameter: name, Estimate: f.Estimates[i], StdError: math.NaN(),
			CILower: math.NaN(), CIUpper: math.NaN(), Fixed: f.Fixed[i]}
	}
	return rows
}

// quantity is one derived quantity asked for by an analysis.
type quantity struct {
	kind string
	arg  float64
	// of evaluates it under one fitted distribution.
	of func(fitters.Dist) float64
}

func quantities(a *Analysis) []quantity {
	var qs []quantity
	for _, q := range a.Quantiles {
		qs = append(qs, quantity{"quantile", q, func(d fitters.Dist) float64 { return d.Quantile(q) }})
	}
	// The T-year return level is the quantile at 1 − 1/T (annual maxima).
	for _, t := range a.ReturnPeriods {
		qs = append(qs, quantity{"return_level", t, func(d fitters.Dist) float64 { return d.Quantile(1 - 1/t) }})
	}
	for _, x := range a.Thresholds {
		qs = append(qs, quantity{"exceedance", x, func(d fitters.Dist) float64 { return math.Exp(d.LogSurvival(x)) }})
	}
	return qs
}

// derived evaluates each quantity under every ranked fit, then the
// Akaike-weighted model average Σ wᵢ θ̂ᵢ over the ranked fits (Burnham &
// Anderson, 2002, §4.2.1). The average is left out (NaN) when any ranked
// fit's value is not finite.
func derived(a *Analysis, cmp *fitters.Comparison) []DerivedRow {
	qs := quantities(a)
	if len(qs) == 0 {
		return nil
	}
	var rows []DerivedRow
	dists := make([]fitters.Dist, len(cmp.Rows))
	for i, r := range cmp.Rows {
		if r.Rank == 0 {
			continue
		}
		fam, _ := fitters.Lookup(r.Family)
		if d, err := fam.New(r.Fit.Estimates); err == nil {
			dists[i] = d
		}
	}
	for i, r := range cmp.Rows {
		if dists[i] == nil {
			continue
		}
		for _, q := range qs {
			rows = append(rows, DerivedRow{Family: r.Family, Quantity: q.kind, Argument: q.arg, Estimate: q.of(dists[i]),
				CILower: math.NaN(), CIUpper: math.NaN()})
		}
	}
	ranked := 0
	for _, r := range cmp.Rows {
		if r.Rank > 0 {
			ranked++
		}
	}
	if ranked == 0 {
		return rows
	}
	for _, q := range qs {
		avg := 0.0
		for i, r := range cmp.Rows {
			if r.Rank == 0 {
				continue
			}
			if dists[i] == nil {
				avg = math.NaN()
				break
			}
			avg += r.Weight * q.of(dists[i])
		}
		if math.IsInf(avg, 0) {
			avg = math.NaN()
		}
		rows = append(rows, DerivedRow{Family: ModelAverage, Quantity: q.kind, Argument: q.arg, Estimate: avg,
			CILower: math.NaN(), CIUpper: math.NaN()})
	}
	return rows
}
