package runner

import (
	"math"
	"strconv"
)

// Result file names, as they appear under the bundle's data/results/.
const (
	FitsFile       = "fits.csv"
	ParametersFile = "parameters.csv"
	DerivedFile    = "derived.csv"
	GOFFile        = "gof.csv"
	ResultsFile    = "results.json"
)

// Headers of the result tables (SPEC.md); fits.csv has extra columns after
// the specified ones.
var (
	FitsHeader = []string{"analysis", "dataset", "family", "n", "n_censored", "k", "loglik", "aic", "aicc", "bic",
		"criterion", "delta", "weight", "rank", "converged", "note",
		"evidence_ratio", "support", "method", "iterations", "evaluations", "gradient_norm"}
	ParametersHeader = []string{"analysis", "family", "parameter", "estimate", "std_error", "ci_lower", "ci_upper", "ci_method", "fixed"}
	DerivedHeader    = []string{"analysis", "family", "quantity", "argument", "estimate", "ci_lower", "ci_upper", "ci_method"}
	GOFHeader        = []string{"analysis", "family", "statistic", "value", "p_value", "replicates"}
)

// FormatFloat writes x in Go's shortest round-trip form; NaN and ±Inf (an
// undefined or missing number) give an empty cell.
func FormatFloat(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// Files returns the result files by name (FitsFile, …), each as the exact
// bytes to store; the same results give the same bytes.
func (r *Results) Files() (map[string][]byte, error) { return r.FilesOn(1) }

// FilesOn is [Results.Files] with the files written on at most workers
// goroutines at once (results.json on one while the tables are written on
// the others); the bytes do not depend on workers.
func (r *Results) FilesOn(workers int) (map[string][]byte, error) {
	names := []string{ResultsFile, FitsFile, ParametersFile, DerivedFile, GOFFile}
	write := []func() []byte{r.resultsJSON, r.fitsCSV, r.parametersCSV, r.derivedCSV, r.gofCSV}
	data := make([][]byte, len(names))
	ForEach(workers, len(names), func(i int) { data[i] = write[i]() })
	out := make(map[string][]byte, len(names))
	for i, name := range names {
		out[name] = data[i]
	}
	return out, nil
}

// resultsJSON is results.json (layout: document_json.go).
func (r *Results) resultsJSON() []byte {
	doc := r.document()
	// A little over the size, so that the buffer grows once at most: the
	// 1000-analysis bench (9 families, 3 GOF rows each) takes about 925
	// bytes per fit with its parameters and 110 per GOF row; twice the
	// size would be zeroed for nothing when the heap's memory is reused.
	size := 4096
	for _, d := range doc.Datasets {
		size += 100 * len(d.Groups)
	}
	for _, a := range doc.Analyses {
		size += 500 + len(a.Name) + 1100*len(a.Fits) + 300*len(a.Derived) + 160*len(a.GOF)
	}
	return appendDocument(make([]byte, 0, size), &doc)
}

func (r *Results) fitsCSV() []byte {
	rows := 0
	for _, a := range r.Analyses {
		rows += len(a.Comparison.Rows)
	}
	t := newCSVTable(FitsHeader, 256*rows+512)
	for _, a := range r.Analyses {
		d := &a.Group.Data
		for _, row := range a.Comparison.Rows {
			f := row.Fit
			t.text(a.Name)
			t.text(a.Dataset)
			t.text(row.Family)
			if f != nil {
				t.int(f.N)
				t.int(f.NCensored)
			} else {
				t.int(d.N())
				t.int(d.NCensored())
			}
			if f != nil && f.Converged {
				t.int(f.K)
				t.num(f.LogLik)
			} else {
				t.text("")
				t.text("")
			}
			t.num(row.AIC)
			t.num(row.AICc)
			t.num(row.BIC)
			t.text(string(a.Comparison.Criterion))
			t.num(row.Delta)
			t.num(row.Weight)
			if row.Rank > 0 {
				t.int(row.Rank)
			} else {
				t.text("")
			}
			t.bool(f != nil && f.Converged)
			t.text(row.Note)
			t.num(row.EvidenceRatio)
			t.text(row.Support)
			if f != nil {
				t.text(f.Method)
				t.int(f.Iterations)
				t.int(f.Evaluations)
				t.num(f.GradientNorm)
			} else {
				t.text("")
				t.text("")
				t.text("")
				t.text("")
			}
			t.end()
		}
	}
	return t.b
}

func (r *Results) parametersCSV() []byte {
	rows := 0
	for _, a := range r.Analyses {
		for _, ps := range a.Parameters {
			rows += len(ps)
		}
	}
	t := newCSVTable(ParametersHeader, 160*rows+512)
	for _, a := range r.Analyses {
		for i, ps := range a.Parameters {
			fam := a.Comparison.Rows[i].Family
			for _, p := range ps {
				t.text(a.Name)
				t.text(fam)
				t.text(p.Parameter)
				t.num(p.Estimate)
				t.num(p.StdError)
				t.num(p.CILower)
				t.num(p.CIUpper)
				t.text(p.CIMethod)
				t.bool(p.Fixed)
				t.end()
			}
		}
	}
	return t.b
}

func (r *Results) derivedCSV() []byte {
	rows := 0
	for _, a := range r.Analyses {
		rows += len(a.Derived)
	}
	t := newCSVTable(DerivedHeader, 160*rows+512)
	for _, a := range r.Analyses {
		for _, d := range a.Derived {
			t.text(a.Name)
			t.text(d.Family)
			t.text(d.Quantity)
			t.num(d.Argument)
			t.num(d.Estimate)
			t.num(d.CILower)
			t.num(d.CIUpper)
			t.text(d.CIMethod)
			t.end()
		}
	}
	return t.b
}

func (r *Results) gofCSV() []byte {
	rows := 0
	for _, a := range r.Analyses {
		rows += len(a.GOF)
	}
	t := newCSVTable(GOFHeader, 100*rows+512)
	for _, a := range r.Analyses {
		for _, g := range a.GOF {
			t.text(a.Name)
			t.text(g.Family)
			t.text(g.Statistic)
			t.num(g.Value)
			t.num(g.PValue)
			t.int(g.Replicates)
			t.end()
		}
	}
	return t.b
}
