package runner

import (
	"crypto/sha256"
	"encoding/hex"
	"math"
	"strconv"
	"sync"
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

// resultFile renders one result file from a run of consecutive analyses:
// first adds what precedes the first analysis's rows (the CSV header, the
// head of results.json), last what follows the final one; the parts of a
// split list, joined in order, are the file rendered whole.
type resultFile struct {
	name string
	part func(r *Results, as []*AnalysisResult, first, last bool) []byte
}

// resultFiles are the result files, largest first (results.json is about
// twice the four tables together), so that its parts are handed out first.
var resultFiles = []resultFile{
	{ResultsFile, (*Results).resultsJSON},
	{FitsFile, (*Results).fitsCSV},
	{ParametersFile, (*Results).parametersCSV},
	{GOFFile, (*Results).gofCSV},
	{DerivedFile, (*Results).derivedCSV},
}

// partsPerWorker is how many parts each result file is split into per
// worker: enough that no worker is left with a large file alone at the end.
const partsPerWorker = 4

// FilesOn is [Results.Files] with the files written on at most workers
// goroutines at once: with more than one, each file is rendered in parts of
// consecutive analyses (results.json's first) and the parts are joined, so
// that results.json, half of the bytes, does not end on one core while the
// others wait. The bytes do not depend on workers.
func (r *Results) FilesOn(workers int) (map[string][]byte, error) {
	files, _ := r.files(workers, false)
	return files, nil
}

// HashedFilesOn is [Results.FilesOn] with each file's hex SHA-256, taken
// from its parts while they are joined (results.json, the largest, is
// hashed on one worker while the others join the parts), so that the
// caller need not read the bytes again.
func (r *Results) HashedFilesOn(workers int) (files map[string][]byte, sums map[string]string, err error) {
	files, sums = r.files(workers, true)
	return files, sums, nil
}

// files renders the result files on workers goroutines, and their hex
// SHA-256s when hash is set.
func (r *Results) files(workers int, hash bool) (map[string][]byte, map[string]string) {
	parts := 1
	if workers > 1 {
		parts = max(1, min(len(r.Analyses), partsPerWorker*workers))
	}
	n := len(r.Analyses)
	pieces := make([][]byte, len(resultFiles)*parts)
	ForEach(workers, len(pieces), func(t int) {
		f, k := t/parts, t%parts
		pieces[t] = resultFiles[f].part(r, r.Analyses[k*n/parts:(k+1)*n/parts], k == 0, k == parts-1)
	})
	joined, sums := joinParts(workers, pieces, parts, hash)
	out := make(map[string][]byte, len(resultFiles))
	var outSums map[string]string
	if hash {
		outSums = make(map[string]string, len(resultFiles))
	}
	for f, rf := range resultFiles {
		out[rf.name] = joined[f]
		if hash {
			outSums[rf.name] = hex.EncodeToString(sums[f][:])
		}
	}
	return out, outSums
}

// joinParts joins each run of parts consecutive pieces (one file's parts in
// order) into one buffer of their exact size; a file of a single part is
// that part. With hash, it also takes each file's SHA-256 from its pieces.
// The work is spread over the workers: each file's hash is one task, the
// largest file's first, and each piece's copy another, so that results.json,
// half of the bytes, is neither copied nor hashed on one core while the
// others wait.
func joinParts(workers int, pieces [][]byte, parts int, hash bool) ([][]byte, [][sha256.Size]byte) {
	files := len(pieces) / parts
	joined := make([][]byte, files)
	offset := make([]int, len(pieces))
	size := make([]int, files)
	for f := range files {
		if parts == 1 {
			joined[f] = pieces[f]
			continue
		}
		for k := range parts {
			offset[f*parts+k] = size[f]
			size[f] += len(pieces[f*parts+k])
		}
	}
	// Each joined buffer is made by the first of its copies to run (the
	// others wait for it), so that zeroing 12 MB of reused heap for
	// results.json is not done on one goroutine before any copy starts.
	made := make([]sync.Once, files)
	var sums [][sha256.Size]byte
	hashes := 0
	if hash {
		sums = make([][sha256.Size]byte, files)
		hashes = files
	}
	copies := len(pieces)
	if parts == 1 {
		copies = 0
	}
	// Files are in resultFiles order, largest first, so the hash of the
	// largest is handed out first.
	ForEach(workers, hashes+copies, func(t int) {
		if t < hashes {
			h := sha256.New()
			for _, p := range pieces[t*parts : (t+1)*parts] {
				h.Write(p)
			}
			h.Sum(sums[t][:0])
			return
		}
		t -= hashes
		f := t / parts
		made[f].Do(func() { joined[f] = make([]byte, size[f]) })
		copy(joined[f][offset[t]:], pieces[t])
	})
	return joined, sums
}

// resultsJSON is results.json (layout: document_json.go) for the analyses
// as (a part: see resultFile), as appendDocument writes the whole document.
func (r *Results) resultsJSON(as []*AnalysisResult, first, last bool) []byte {
	// A little over the size, so that the buffer grows once at most: the
	// 1000-analysis bench (9 families, 3 GOF rows each) takes about 925
	// bytes per fit with its parameters and 110 per GOF row; twice the
	// size would be zeroed for nothing when the heap's memory is reused.
	size := 16
	var head docRoot
	if first {
		head = r.documentHead()
		size += 4096
		for _, d := range head.Datasets {
			size += 100 * len(d.Groups)
		}
	}
	for _, a := range as {
		size += 500 + len(a.Name) + 1100*len(a.Comparison.Rows) + 300*len(a.Derived) + 160*len(a.GOF)
	}
	b := make([]byte, 0, size)
	if first {
		b = append(appendDocumentHead(b, &head), '[')
	}
	for i, a := range as {
		da := docAnalysisOf(a)
		b = appendAnalysisItem(b, &da, first && i == 0)
	}
	if last {
		b = append(b, documentTail...)
	}
	return b
}

func (r *Results) fitsCSV(as []*AnalysisResult, first, _ bool) []byte {
	rows := 0
	for _, a := range as {
		rows += len(a.Comparison.Rows)
	}
	t := newCSVTable(FitsHeader, first, 256*rows+512)
	for _, a := range as {
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

func (r *Results) parametersCSV(as []*AnalysisResult, first, _ bool) []byte {
	rows := 0
	for _, a := range as {
		for _, ps := range a.Parameters {
			rows += len(ps)
		}
	}
	t := newCSVTable(ParametersHeader, first, 160*rows+512)
	for _, a := range as {
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

func (r *Results) derivedCSV(as []*AnalysisResult, first, _ bool) []byte {
	rows := 0
	for _, a := range as {
		rows += len(a.Derived)
	}
	t := newCSVTable(DerivedHeader, first, 160*rows+512)
	for _, a := range as {
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

func (r *Results) gofCSV(as []*AnalysisResult, first, _ bool) []byte {
	rows := 0
	for _, a := range as {
		rows += len(a.GOF)
	}
	t := newCSVTable(GOFHeader, first, 100*rows+512)
	for _, a := range as {
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
