package runner

import (
	"bytes"
	"encoding/csv"
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
func (r *Results) Files() (map[string][]byte, error) {
	out := map[string][]byte{}
	for name, rows := range map[string][][]string{
		FitsFile: r.fitsRows(), ParametersFile: r.parameterRows(), DerivedFile: r.derivedRows(), GOFFile: r.gofRows(),
	} {
		var b bytes.Buffer
		w := csv.NewWriter(&b)
		if err := w.WriteAll(rows); err != nil {
			return nil, err
		}
		out[name] = b.Bytes()
	}
	out[ResultsFile] = r.resultsJSON()
	return out, nil
}

// resultsJSON is results.json (layout: document_json.go).
func (r *Results) resultsJSON() []byte {
	doc := r.document()
	size := 4096 // a little over the size, so that the buffer grows once at most
	for _, d := range doc.Datasets {
		size += 100 * len(d.Groups)
	}
	for _, a := range doc.Analyses {
		size += 500 + 1400*len(a.Fits) + 350*(len(a.Derived)+len(a.GOF))
	}
	return appendDocument(make([]byte, 0, size), &doc)
}

func itoa(n int) string { return strconv.Itoa(n) }

func (r *Results) fitsRows() [][]string {
	rows := [][]string{FitsHeader}
	for _, a := range r.Analyses {
		d := &a.Group.Data
		for _, row := range a.Comparison.Rows {
			n, nc, k, loglik, converged := itoa(d.N()), itoa(d.NCensored()), "", "", "false"
			var method, iterations, evaluations, gradNorm string
			if f := row.Fit; f != nil {
				n, nc = itoa(f.N), itoa(f.NCensored)
				method, iterations, evaluations, gradNorm = f.Method, itoa(f.Iterations), itoa(f.Evaluations), FormatFloat(f.GradientNorm)
				if f.Converged {
					k, loglik, converged = itoa(f.K), FormatFloat(f.LogLik), "true"
				}
			}
			rank := ""
			if row.Rank > 0 {
				rank = itoa(row.Rank)
			}
			rows = append(rows, []string{
				a.Name, a.Dataset, row.Family, n, nc, k, loglik,
				FormatFloat(row.AIC), FormatFloat(row.AICc), FormatFloat(row.BIC),
				string(a.Comparison.Criterion), FormatFloat(row.Delta), FormatFloat(row.Weight), rank, converged, row.Note,
				FormatFloat(row.EvidenceRatio), row.Support, method, iterations, evaluations, gradNorm,
			})
		}
	}
	return rows
}

func (r *Results) parameterRows() [][]string {
	rows := [][]string{ParametersHeader}
	for _, a := range r.Analyses {
		for i, ps := range a.Parameters {
			fam := a.Comparison.Rows[i].Family
			for _, p := range ps {
				rows = append(rows, []string{a.Name, fam, p.Parameter, FormatFloat(p.Estimate), FormatFloat(p.StdError),
					FormatFloat(p.CILower), FormatFloat(p.CIUpper), p.CIMethod, strconv.FormatBool(p.Fixed)})
			}
		}
	}
	return rows
}

func (r *Results) derivedRows() [][]string {
	rows := [][]string{DerivedHeader}
	for _, a := range r.Analyses {
		for _, d := range a.Derived {
			rows = append(rows, []string{a.Name, d.Family, d.Quantity, FormatFloat(d.Argument), FormatFloat(d.Estimate),
				FormatFloat(d.CILower), FormatFloat(d.CIUpper), d.CIMethod})
		}
	}
	return rows
}

func (r *Results) gofRows() [][]string {
	rows := [][]string{GOFHeader}
	for _, a := range r.Analyses {
		for _, g := range a.GOF {
			rows = append(rows, []string{a.Name, g.Family, g.Statistic, FormatFloat(g.Value), FormatFloat(g.PValue), itoa(g.Replicates)})
		}
	}
	return rows
}
