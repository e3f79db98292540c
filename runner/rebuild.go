package runner

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"

	"fitseal/fitters"
)

// UnmarshalJSON reads a number, and null as NaN (undefined or not computed).
func (x *Number) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*x = Number(math.NaN())
		return nil
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return err
	}
	*x = Number(f)
	return nil
}

// Rebuild assembles the Results of the plan's analyses from recorded
// results.json documents (the parts of a sharded run), without fitting:
// each fit's estimates, log-likelihood and optimiser record are read back,
// the comparison is recomputed by fitters.Compare from them, and intervals,
// derived quantities and goodness of fit are taken as recorded. Every
// analysis of the plan must be in exactly one document; analyses outside
// the plan are ignored. seeds are the recorded seeds of the parts, put
// back in plan order.
//
// A number that results.json writes as null is NaN when read back, except a
// confidence bound marked open, which is the infinite limit on its side (an
// open bound that is finite is written as a number). The caller checks that
// Files of the rebuilt results gives back the recorded bytes.
func Rebuild(p *Project, data map[string]*DatasetData, plan *Plan, docs [][]byte, seeds []Seed) (*Results, error) {
	byName := map[string]*docAnalysis{}
	from := map[string]int{}
	for i, b := range docs {
		var doc docRoot
		dec := json.NewDecoder(bytes.NewReader(b))
		dec.DisallowUnknownFields()
		if err := dec.Decode(&doc); err != nil {
			return nil, fmt.Errorf("results.json of part %d: %w", i+1, err)
		}
		if doc.Format != ResultsFormat {
			return nil, fmt.Errorf("results.json of part %d: format %q, want %q", i+1, doc.Format, ResultsFormat)
		}
		for k := range doc.Analyses {
			a := &doc.Analyses[k]
			if j, dup := from[a.Name]; dup {
				return nil, fmt.Errorf("analysis %q is in part %d and in part %d", a.Name, j+1, i+1)
			}
			from[a.Name] = i
			byName[a.Name] = a
		}
	}
	seedOf := map[string]Seed{}
	for _, s := range seeds {
		seedOf[s.Analysis+"\x00"+s.Family] = s
	}
	res := &Results{Project: p, Data: data, Plan: plan.Names()}
	for _, pa := range plan.Analyses {
		da := byName[pa.Name]
		if da == nil {
			return nil, fmt.Errorf("analysis %q is in no part", pa.Name)
		}
		ar, err := rebuildAnalysis(pa, da)
		if err != nil {
			return nil, fmt.Errorf("analysis %q: %w", pa.Name, err)
		}
		for _, fam := range pa.Candidates.Families {
			if s, ok := seedOf[pa.Name+"\x00"+fam]; ok {
				res.Seeds = append(res.Seeds, s)
			}
		}
		res.Analyses = append(res.Analyses, ar)
	}
	return res, nil
}

func num(x Number) float64 { return float64(x) }

// bound is a recorded confidence bound: null on an open side is the
// infinite limit (sign −1 for a lower bound, +1 for an upper one).
func bound(x Number, open bool, sign int) float64 {
	f := float64(x)
	if open && math.IsNaN(f) {
		return math.Inf(sign)
	}
	return f
}

func rebuildAnalysis(pa *PlannedAnalysis, da *docAnalysis) (*AnalysisResult, error) {
	fams := pa.Candidates.Families
	if len(da.Fits) != len(fams) {
		return nil, fmt.Errorf("%d fits recorded, the plan has %d candidates", len(da.Fits), len(fams))
	}
	if da.Dataset != pa.DatasetName {
		return nil, fmt.Errorf("recorded dataset %q, the plan says %q", da.Dataset, pa.DatasetName)
	}
	entries := make([]fitters.Entry, len(fams))
	params := make([][]ParameterRow, len(fams))
	notes := make([]string, len(fams))
	for i, df := range da.Fits {
		if df.Family != fams[i] {
			return nil, fmt.Errorf("fit %d is of %q, the plan has %q", i+1, df.Family, fams[i])
		}
		entries[i].Family = df.Family
		notes[i] = df.Inference
		if df.Optimizer == nil {
			entries[i].Err = &fitters.InapplicableError{Family: df.Family, Reason: df.Inapplicable}
			continue
		}
		o := df.Optimizer
		f := &fitters.Fit{Family: df.Family, LogLik: num(df.LogLik), N: df.N, NCensored: df.NCensored,
			Convergence: fitters.Convergence{Method: o.Method, Iterations: o.Iterations, Evaluations: o.Evaluations,
				GradientNorm: num(o.GradientNorm), Converged: o.Converged, Reason: o.Reason, Note: o.Note}}
		if df.K != nil {
			f.K = *df.K
		}
		var rows []ParameterRow
		for _, dp := range df.Parameters {
			f.Parameters = append(f.Parameters, dp.Name)
			f.Estimates = append(f.Estimates, num(dp.Estimate))
			f.Fixed = append(f.Fixed, dp.Fixed)
			rows = append(rows, ParameterRow{Parameter: dp.Name, Estimate: num(dp.Estimate), StdError: num(dp.StdError),
				CILower: bound(dp.CILower, dp.LowerOpen, -1), CIUpper: bound(dp.CIUpper, dp.UpperOpen, 1),
				LowerOpen: dp.LowerOpen, UpperOpen: dp.UpperOpen, CIMethod: dp.CIMethod, Fixed: dp.Fixed, Note: dp.Note})
		}
		if df.Rank > 0 {
			params[i] = rows
		}
		entries[i].Fit = f
	}
	crit, err := fitters.ParseCriterion(pa.Spec.Criterion)
	if err != nil {
		return nil, err
	}
	cmp, err := fitters.Compare(entries, crit)
	if err != nil {
		return nil, err
	}
	for i, row := range cmp.Rows {
		if row.Rank != da.Fits[i].Rank {
			return nil, fmt.Errorf("%s: recorded rank %d, the recorded fits give %d", row.Family, da.Fits[i].Rank, row.Rank)
		}
	}
	ar := &AnalysisResult{Name: pa.Name, Dataset: pa.DatasetName, Group: pa.Group, Spec: pa.Spec, Comparison: cmp,
		Parameters: params, Inference: notes}
	for _, d := range da.Derived {
		ar.Derived = append(ar.Derived, DerivedRow{Family: d.Family, Quantity: d.Quantity, Argument: num(d.Argument),
			Estimate: num(d.Estimate), StdError: num(d.StdError),
			CILower: bound(d.CILower, d.LowerOpen, -1), CIUpper: bound(d.CIUpper, d.UpperOpen, 1),
			LowerOpen: d.LowerOpen, UpperOpen: d.UpperOpen, CIMethod: d.CIMethod, Note: d.Note})
	}
	for _, g := range da.GOF {
		ar.GOF = append(ar.GOF, GOFRow{Family: g.Family, Statistic: g.Statistic, Value: num(g.Value), PValue: num(g.PValue),
			Replicates: g.Replicates, Note: g.Note})
	}
	return ar, nil
}
