package runner

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"strconv"
	"testing"
)

// The result CSVs are written by hand (csvwrite.go); they must be the bytes
// encoding/csv writes for the same cells. The cells below are the tables'
// definition, as they were built for encoding/csv before.
func TestResultCSVMatchesEncodingCSV(t *testing.T) {
	compared := map[string]int{}
	for _, tc := range []struct {
		families, settings string
		censored           bool
	}{
		{`"weibull", "lognormal", "exponential", "gev"`, "bootstrap = 9", true},
		{`"gamma", "normal", "beta", "logistic"`, "bootstrap = 19\nintervals = \"bootstrap\"", false},
	} {
		path := splitProject(t, 4, 30, tc.families, tc.settings, tc.censored)
		p, err := Load(path)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Run(context.Background(), p, RunOptions{Workers: 2})
		if err != nil {
			t.Fatal(err)
		}
		// Text that needs quoting, as a note or a name could hold.
		res.Analyses[0].Comparison.Rows[0].Note = "a, \"quoted\"\nnote"
		res.Analyses[0].Name = " leading space"
		files, err := res.Files()
		if err != nil {
			t.Fatal(err)
		}
		for name, rows := range map[string][][]string{
			FitsFile: referenceFitsRows(res), ParametersFile: referenceParameterRows(res),
			DerivedFile: referenceDerivedRows(res), GOFFile: referenceGOFRows(res),
		} {
			var b bytes.Buffer
			w := csv.NewWriter(&b)
			if err := w.WriteAll(rows); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(files[name], b.Bytes()) {
				t.Errorf("%s differs from encoding/csv's:\n got %q\nwant %q", name, files[name], b.Bytes())
			}
			compared[name] += len(rows) - 1
		}
	}
	for _, name := range []string{FitsFile, ParametersFile, DerivedFile, GOFFile} {
		if compared[name] == 0 {
			t.Errorf("%s: no rows compared", name)
		}
	}
}

func TestAppendCSVField(t *testing.T) {
	for _, s := range []string{"", "a", "a,b", `a"b`, "a\nb", "a\rb", "a\r\nb", " a", "\ta", "\u00a0a", "\u2028a", `\.`, `\.x`, "é", "\xff", "a b"} {
		checkCSVField(t, s)
	}
}

func checkCSVField(t *testing.T, s string) {
	t.Helper()
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write([]string{s, s})
	w.Flush()
	tb := &csvTable{rowStart: true}
	tb.text(s)
	tb.text(s)
	tb.end()
	if !bytes.Equal(tb.b, b.Bytes()) {
		t.Fatalf("%q: got %q, encoding/csv %q", s, tb.b, b.Bytes())
	}
}

func FuzzCSVField(f *testing.F) {
	for _, s := range []string{"", "a,b", "\"", " x", "\\.", "\r\n"} {
		f.Add(s)
	}
	f.Fuzz(checkCSVField)
}

func fmtF(x float64) string { return FormatFloat(x) }

func referenceFitsRows(r *Results) [][]string {
	itoa := strconv.Itoa
	rows := [][]string{FitsHeader}
	for _, a := range r.Analyses {
		d := &a.Group.Data
		for _, row := range a.Comparison.Rows {
			n, nc, k, loglik, converged := itoa(d.N()), itoa(d.NCensored()), "", "", "false"
			var method, iterations, evaluations, gradNorm string
			if f := row.Fit; f != nil {
				n, nc = itoa(f.N), itoa(f.NCensored)
				method, iterations, evaluations, gradNorm = f.Method, itoa(f.Iterations), itoa(f.Evaluations), fmtF(f.GradientNorm)
				if f.Converged {
					k, loglik, converged = itoa(f.K), fmtF(f.LogLik), "true"
				}
			}
			rank := ""
			if row.Rank > 0 {
				rank = itoa(row.Rank)
			}
			rows = append(rows, []string{
				a.Name, a.Dataset, row.Family, n, nc, k, loglik,
				fmtF(row.AIC), fmtF(row.AICc), fmtF(row.BIC),
				string(a.Comparison.Criterion), fmtF(row.Delta), fmtF(row.Weight), rank, converged, row.Note,
				fmtF(row.EvidenceRatio), row.Support, method, iterations, evaluations, gradNorm,
			})
		}
	}
	return rows
}

func referenceParameterRows(r *Results) [][]string {
	rows := [][]string{ParametersHeader}
	for _, a := range r.Analyses {
		for i, ps := range a.Parameters {
			fam := a.Comparison.Rows[i].Family
			for _, p := range ps {
				rows = append(rows, []string{a.Name, fam, p.Parameter, fmtF(p.Estimate), fmtF(p.StdError),
					fmtF(p.CILower), fmtF(p.CIUpper), p.CIMethod, strconv.FormatBool(p.Fixed)})
			}
		}
	}
	return rows
}

func referenceDerivedRows(r *Results) [][]string {
	rows := [][]string{DerivedHeader}
	for _, a := range r.Analyses {
		for _, d := range a.Derived {
			rows = append(rows, []string{a.Name, d.Family, d.Quantity, fmtF(d.Argument), fmtF(d.Estimate),
				fmtF(d.CILower), fmtF(d.CIUpper), d.CIMethod})
		}
	}
	return rows
}

func referenceGOFRows(r *Results) [][]string {
	rows := [][]string{GOFHeader}
	for _, a := range r.Analyses {
		for _, g := range a.GOF {
			rows = append(rows, []string{a.Name, g.Family, g.Statistic, fmtF(g.Value), fmtF(g.PValue), strconv.Itoa(g.Replicates)})
		}
	}
	return rows
}

// With several workers each result file is rendered in parts of consecutive
// analyses and joined (FilesOn): the bytes must be the file rendered whole,
// for any worker count, for fewer analyses than parts, for one and for none;
// and results.json must still be appendDocument's encoding of the document.
func TestFilesOnPartsJoinToTheWholeFile(t *testing.T) {
	path := splitProject(t, 7, 25, `"weibull", "lognormal", "exponential"`, "bootstrap = 0", true)
	p, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	full, err := Run(context.Background(), p, RunOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for _, keep := range []int{7, 1, 0} {
		res := *full
		res.Analyses = full.Analyses[:keep]
		whole, err := res.FilesOn(1)
		if err != nil {
			t.Fatal(err)
		}
		doc := res.document()
		if want := appendDocument(nil, &doc); !bytes.Equal(whole[ResultsFile], want) {
			t.Fatalf("%d analyses: results.json differs from appendDocument's", keep)
		}
		if len(whole) != len(resultFiles) {
			t.Fatalf("%d analyses: %d files, want %d", keep, len(whole), len(resultFiles))
		}
		for _, workers := range []int{2, 3, 5, 64} {
			got, err := res.FilesOn(workers)
			if err != nil {
				t.Fatal(err)
			}
			for name, b := range whole {
				if !bytes.Equal(got[name], b) {
					t.Errorf("%d analyses, %d workers: %s differs from the file rendered whole", keep, workers, name)
				}
			}
		}
		// HashedFilesOn: the same files, and each sum the SHA-256 of the
		// joined bytes, whatever the workers.
		for _, workers := range []int{1, 2, 5} {
			got, sums, err := res.HashedFilesOn(workers)
			if err != nil {
				t.Fatal(err)
			}
			for name, b := range whole {
				want := sha256.Sum256(b)
				if !bytes.Equal(got[name], b) || sums[name] != hex.EncodeToString(want[:]) {
					t.Errorf("%d analyses, %d workers: %s: sum %s, want %x (bytes equal: %v)", keep, workers, name, sums[name], want, bytes.Equal(got[name], b))
				}
			}
		}
	}
}
