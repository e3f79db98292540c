package runner

import (
	"math"
	"strconv"

	"fitseal/fitters"
)

// Number is a float64 that marshals to JSON in Go's shortest round-trip form,
// and to null when it is NaN or infinite (undefined or not computed).
type Number float64

func (x Number) MarshalJSON() ([]byte, error) {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

// ResultsFormat names the layout of results.json.
const ResultsFormat = "fitseal-results/1"

type docRoot struct {
	Format   string        `json:"format"`
	Project  string        `json:"project"`
	Settings Settings      `json:"settings"`
	Datasets []docDataset  `json:"datasets"`
	Analyses []docAnalysis `json:"analyses"`
}

type docDataset struct {
	Name     string     `json:"name"`
	File     string     `json:"file"`
	Rows     int        `json:"rows"`
	Filtered int        `json:"filtered_by_where"`
	Missing  int        `json:"missing"`
	Groups   []docGroup `json:"groups,omitempty"`
}

type docGroup struct {
	Name      string `json:"name"`
	Rows      int    `json:"rows"`
	Missing   int    `json:"missing"`
	N         int    `json:"n"`
	NCensored int    `json:"n_censored"`
}

type docAnalysis struct {
	Name               string       `json:"name"`
	Dataset            string       `json:"dataset"`
	N                  int          `json:"n"`
	NCensored          int          `json:"n_censored"`
	Missing            int          `json:"missing"`
	Criterion          string       `json:"criterion"`
	RequestedCriterion string       `json:"requested_criterion"`
	Note               string       `json:"note"`
	Fits               []docFit     `json:"fits"`
	Derived            []docDerived `json:"derived"`
	GOF                []docGOF     `json:"gof"`
}

type docFit struct {
	Family        string         `json:"family"`
	Applicable    bool           `json:"applicable"`
	Inapplicable  string         `json:"inapplicable,omitempty"`
	N             int            `json:"n"`
	NCensored     int            `json:"n_censored"`
	K             *int           `json:"k"`
	LogLik        Number         `json:"loglik"`
	AIC           Number         `json:"aic"`
	AICc          Number         `json:"aicc"`
	BIC           Number         `json:"bic"`
	Delta         Number         `json:"delta"`
	Weight        Number         `json:"weight"`
	EvidenceRatio Number         `json:"evidence_ratio"`
	Rank          int            `json:"rank"`
	Support       string         `json:"support"`
	Converged     bool           `json:"converged"`
	Note          string         `json:"note"`
	Inference     string         `json:"inference_note"`
	Parameters    []docParameter `json:"parameters"`
	Optimizer     *Optimizer     `json:"optimizer,omitempty"`
}

type docParameter struct {
	Name      string `json:"name"`
	Estimate  Number `json:"estimate"`
	StdError  Number `json:"std_error"`
	CILower   Number `json:"ci_lower"`
	CIUpper   Number `json:"ci_upper"`
	LowerOpen bool   `json:"ci_lower_open"`
	UpperOpen bool   `json:"ci_upper_open"`
	CIMethod  string `json:"ci_method"`
	Fixed     bool   `json:"fixed"`
	Note      string `json:"note"`
}

// Optimizer is the convergence record of one fit as results.json and run.json show it.
type Optimizer struct {
	Method       string `json:"method"`
	Iterations   int    `json:"iterations"`
	Evaluations  int    `json:"evaluations"`
	GradientNorm Number `json:"gradient_norm"`
	Converged    bool   `json:"converged"`
	Reason       string `json:"reason"`
	Note         string `json:"note"`
}

type docDerived struct {
	Family    string `json:"family"`
	Quantity  string `json:"quantity"`
	Argument  Number `json:"argument"`
	Estimate  Number `json:"estimate"`
	StdError  Number `json:"std_error"`
	CILower   Number `json:"ci_lower"`
	CIUpper   Number `json:"ci_upper"`
	LowerOpen bool   `json:"ci_lower_open"`
	UpperOpen bool   `json:"ci_upper_open"`
	CIMethod  string `json:"ci_method"`
	Note      string `json:"note"`
}

type docGOF struct {
	Family     string `json:"family"`
	Statistic  string `json:"statistic"`
	Value      Number `json:"value"`
	PValue     Number `json:"p_value"`
	Replicates int    `json:"replicates"`
	Note       string `json:"note"`
}

func optimizer(f *fitters.Fit) *Optimizer {
	return &Optimizer{Method: f.Method, Iterations: f.Iterations, Evaluations: f.Evaluations,
		GradientNorm: Number(f.GradientNorm), Converged: f.Converged, Reason: f.Reason, Note: f.Convergence.Note}
}

// document is results.json: every table's content in one record.
func (r *Results) document() docRoot {
	doc := r.documentHead()
	for _, a := range r.Analyses {
		doc.Analyses = append(doc.Analyses, docAnalysisOf(a))
	}
	return doc
}

// documentHead is the document without its analyses (an empty list).
func (r *Results) documentHead() docRoot {
	p := r.Project
	doc := docRoot{Format: ResultsFormat, Project: p.Name, Settings: p.Settings, Datasets: []docDataset{}, Analyses: []docAnalysis{}}
	for _, d := range p.Datasets {
		dd := r.Data[d.Name]
		if dd == nil {
			continue
		}
		ds := docDataset{Name: d.Name, File: d.File, Rows: dd.Rows, Filtered: dd.Filtered, Missing: dd.Missing}
		if d.SplitBy != "" {
			for _, g := range dd.Groups {
				ds.Groups = append(ds.Groups, docGroup{Name: g.Name, Rows: g.Rows, Missing: g.Missing, N: g.Data.N(), NCensored: g.Data.NCensored()})
			}
		}
		doc.Datasets = append(doc.Datasets, ds)
	}
	return doc
}

// docAnalysisOf is one analysis of the document.
func docAnalysisOf(a *AnalysisResult) docAnalysis {
	c := a.Comparison
	da := docAnalysis{Name: a.Name, Dataset: a.Dataset, N: a.Group.Data.N(), NCensored: a.Group.Data.NCensored(),
		Missing: a.Group.Missing, Criterion: string(c.Criterion), RequestedCriterion: string(c.Requested), Note: c.Note,
		Fits: []docFit{}, Derived: []docDerived{}, GOF: []docGOF{}}
	for i, row := range c.Rows {
		df := docFit{Family: row.Family, Applicable: row.Inapplicable == "", Inapplicable: row.Inapplicable,
			N: da.N, NCensored: da.NCensored, LogLik: Number(math.NaN()),
			AIC: Number(row.AIC), AICc: Number(row.AICc), BIC: Number(row.BIC), Delta: Number(row.Delta), Weight: Number(row.Weight),
			EvidenceRatio: Number(row.EvidenceRatio), Rank: row.Rank, Support: row.Support, Note: row.Note, Inference: a.Inference[i],
			Parameters: []docParameter{}}
		if f := row.Fit; f != nil {
			df.N, df.NCensored, df.Converged = f.N, f.NCensored, f.Converged
			df.Optimizer = optimizer(f)
			if f.Converged {
				k := f.K
				df.K, df.LogLik = &k, Number(f.LogLik)
			}
		}
		for _, pr := range a.Parameters[i] {
			df.Parameters = append(df.Parameters, docParameter{Name: pr.Parameter, Estimate: Number(pr.Estimate),
				StdError: Number(pr.StdError), CILower: Number(pr.CILower), CIUpper: Number(pr.CIUpper), LowerOpen: pr.LowerOpen, UpperOpen: pr.UpperOpen,
				CIMethod: pr.CIMethod, Fixed: pr.Fixed, Note: pr.Note})
		}
		da.Fits = append(da.Fits, df)
	}
	for _, d := range a.Derived {
		da.Derived = append(da.Derived, docDerived{Family: d.Family, Quantity: d.Quantity, Argument: Number(d.Argument),
			Estimate: Number(d.Estimate), StdError: Number(d.StdError), CILower: Number(d.CILower), CIUpper: Number(d.CIUpper),
			LowerOpen: d.LowerOpen, UpperOpen: d.UpperOpen, CIMethod: d.CIMethod, Note: d.Note})
	}
	for _, g := range a.GOF {
		da.GOF = append(da.GOF, docGOF{Family: g.Family, Statistic: g.Statistic, Value: Number(g.Value), PValue: Number(g.PValue), Replicates: g.Replicates, Note: g.Note})
	}
	return da
}

// Record is what run.json needs from a run: the effective project (every
// setting, defaults applied), which keys took defaults, the seed derivation
// and every derived seed, and each fit's optimiser record.
type Record struct {
	Project        *Project      `json:"project"`
	SeedDerivation string        `json:"seed_derivation"`
	Seeds          []Seed        `json:"seeds"`
	Optimizers     []RecordedFit `json:"optimizers"`
}

// RecordedFit is the optimiser record of one fit.
type RecordedFit struct {
	Analysis  string     `json:"analysis"`
	Family    string     `json:"family"`
	Optimizer *Optimizer `json:"optimizer"`
}

// Record returns the run record for run.json.
func (r *Results) Record() *Record {
	rec := &Record{Project: r.Project, SeedDerivation: SeedDerivation, Seeds: r.Seeds, Optimizers: []RecordedFit{}}
	for _, a := range r.Analyses {
		for _, row := range a.Comparison.Rows {
			if row.Fit != nil {
				rec.Optimizers = append(rec.Optimizers, RecordedFit{Analysis: a.Name, Family: row.Family, Optimizer: optimizer(row.Fit)})
			}
		}
	}
	return rec
}
