package bundle

import (
	"bytes"
	"encoding/json"
	"fmt"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Kinds of DiffItem.
const (
	DiffInput   = "input"   // an input file added, removed or changed (by SHA-256)
	DiffSetting = "setting" // the effective project (settings, datasets, candidates, analyses, report)
	DiffCode    = "code"    // fitseal's version, Go version, platform or build commit
	DiffGit     = "git"     // the project's git commit, branch or dirty state
	DiffNumber  = "number"  // a number of a result table or results.json (one side may be empty, null or absent)
	DiffText    = "text"    // any other value of a result table or results.json: a criterion, method, note, true or false
	DiffResult  = "result"  // a result file, table row, analysis or fit in one bundle only; a table's header; an unreadable result file
	DiffRecord  = "record"  // run.json unreadable in one bundle
	// Not differences in substance, reported all the same:
	DiffCreated  = "created"  // the created time
	DiffSigner   = "signer"   // the signing key
	DiffRendered = "rendered" // tables, figures, PDF: drawn from all of the above
)

// DiffItem is one thing that differs between bundles A and B.
type DiffItem struct {
	Kind string
	// Substantive is false for what does not change what the bundle says:
	// the created time, the signer, and the rendered files that follow from
	// the inputs, settings, code, numbers, time and signer compared here.
	Substantive bool
	Text        string
}

// Diff compares two bags: inputs by hash, the effective project and
// settings, code version and platform, git provenance, and every number of
// the result tables (rows matched by their keys) — and, reported but not
// counted as differences in substance, the created time, the signer and the
// rendered tables, figures and PDF (which carry the created time and signer,
// and are drawn from the numbers). Where the tables differ, the values of
// results.json that repeat a table cell are counted, not listed again, and
// only its own values are listed, so that each change is listed once.
func Diff(a, b *Bag) []DiffItem {
	var items []DiffItem
	add := func(kind string, substantive bool, format string, args ...any) {
		items = append(items, DiffItem{Kind: kind, Substantive: substantive, Text: fmt.Sprintf(format, args...)})
	}
	pa, pb := a.Payload(), b.Payload()

	for _, p := range unionPaths(pa, pb, func(p string) bool { return strings.HasPrefix(p, "inputs/") }) {
		x, okA := pa[p]
		y, okB := pb[p]
		switch {
		case !okB:
			add(DiffInput, true, "%s/%s: only in A (sha256 %s)", PayloadDir, p, sha256Hex(x))
		case !okA:
			add(DiffInput, true, "%s/%s: only in B (sha256 %s)", PayloadDir, p, sha256Hex(y))
		case sha256Hex(x) != sha256Hex(y):
			add(DiffInput, true, "%s/%s: sha256 %s in A, %s in B%s", PayloadDir, p, sha256Hex(x), sha256Hex(y), changedLines(x, y))
		}
	}

	ra, errA := ParseRunRecord(a.RunJSON())
	rb, errB := ParseRunRecord(b.RunJSON())
	if errA != nil {
		add(DiffRecord, true, "A: %v", errA)
	}
	if errB != nil {
		add(DiffRecord, true, "B: %v", errB)
	}
	if errA == nil && errB == nil {
		ja, _ := json.Marshal(ra.Project)
		jb, _ := json.Marshal(rb.Project)
		ds, _, _ := CompareJSON(RunFile, ja, jb, nil)
		for _, d := range ds {
			add(DiffSetting, true, "project.%s: %s in A, %s in B", d.Column, d.A, d.B)
		}
		for _, f := range fieldDiffs(ra.Tool, rb.Tool) {
			add(DiffCode, true, "tool.%s", f)
		}
		for _, f := range [][3]string{
			{"repository", fmt.Sprint(ra.Git.Repository), fmt.Sprint(rb.Git.Repository)},
			{"commit", ra.Git.Commit, rb.Git.Commit},
			{"branch", ra.Git.Branch, rb.Git.Branch},
			{"dirty", fmt.Sprint(ra.Git.Dirty), fmt.Sprint(rb.Git.Dirty)},
		} {
			if f[1] != f[2] {
				add(DiffGit, true, "git.%s: %s in A, %s in B", f[0], show(f[1]), show(f[2]))
			}
		}
		if !ra.Created.Equal(rb.Created) {
			add(DiffCreated, false, "created: %s in A, %s in B", ra.Created.UTC().Format("2006-01-02T15:04:05Z"), rb.Created.UTC().Format("2006-01-02T15:04:05Z"))
		}
		if ra.Signer.Fingerprint != rb.Signer.Fingerprint {
			add(DiffSigner, false, "signer: %s in A, %s in B", ra.Signer.Fingerprint, rb.Signer.Fingerprint)
		}
	}

	tablesDiffer := false
	var jsonPaths []string
	for _, p := range unionPaths(pa, pb, func(p string) bool { return strings.HasPrefix(p, "results/") }) {
		member := PayloadDir + "/" + p
		x, okA := pa[p]
		y, okB := pb[p]
		if !okA || !okB {
			add(DiffResult, true, "%s: only in %s", member, map[bool]string{true: "A", false: "B"}[okA])
			tablesDiffer = true
			continue
		}
		if strings.HasSuffix(p, ".json") {
			jsonPaths = append(jsonPaths, p)
			continue
		}
		ds, _, err := CompareCSV(member, x, y, nil)
		if err != nil {
			add(DiffResult, true, "%v", err)
			tablesDiffer = true
			continue
		}
		for _, d := range ds {
			add(resultKind(d), true, "%s %s", member, d.Describe("A", "B"))
			tablesDiffer = true
		}
	}
	for _, p := range jsonPaths {
		member := PayloadDir + "/" + p
		ds, _, err := CompareJSON(member, pa[p], pb[p], nil)
		switch {
		case err != nil:
			add(DiffResult, true, "%v", err)
		case len(ds) > 0 && tablesDiffer:
			headers := tableHeaders(pa, pb)
			repeated := 0
			for _, d := range ds {
				if repeatsATable(d.Column, headers) {
					repeated++
					continue
				}
				add(resultKind(d), true, "%s %s: %s in A, %s in B", member, d.Column, d.A, d.B)
			}
			if repeated > 0 {
				add(DiffResult, true, "%s: %s", member, repeatedDifferences(repeated))
			}
		default:
			for _, d := range ds {
				add(resultKind(d), true, "%s %s: %s in A, %s in B", member, d.Column, d.A, d.B)
			}
		}
	}

	var rendered []string
	for _, p := range unionPaths(pa, pb, isRendered) {
		if x, y := pa[p], pb[p]; x == nil || y == nil || sha256Hex(x) != sha256Hex(y) {
			rendered = append(rendered, PayloadDir+"/"+p)
		}
	}
	if len(rendered) > 0 {
		list := strings.Join(rendered, ", ")
		if len(rendered) > 5 {
			list = strings.Join(rendered[:5], ", ") + fmt.Sprintf(", … (%d in all)", len(rendered))
		}
		add(DiffRendered, false, "rendered files that differ: %s", list)
	}
	return items
}

// resultKind labels one difference of a result table or of results.json:
// DiffNumber where both values are numbers, or one is and the other is
// missing (an empty cell, null or absent); DiffResult for a row, an object
// (an analysis or fit) or a header in one version only; DiffText for every
// other value (a criterion, a method, a note, true or false).
func resultKind(d Difference) string {
	if d.Column == "(row)" || d.Column == "(header)" || isObject(d.A) || isObject(d.B) {
		return DiffResult
	}
	na, nb := isNumber(d.A), isNumber(d.B)
	if (na || isNothing(d.A)) && (nb || isNothing(d.B)) && (na || nb) {
		return DiffNumber
	}
	return DiffText
}

// isNumber reports whether a cell or a JSON value's text is a number; a
// JSON string is quoted, so "\"1\"" is not.
func isNumber(s string) bool {
	_, err := strconv.ParseFloat(s, 64)
	return err == nil
}

// isNothing reports whether a cell or a JSON value's text stands for no
// value: an empty cell, null, or a member absent from one version.
func isNothing(s string) bool {
	return s == "" || s == "null" || s == "(absent)"
}

// isObject reports whether a JSON value's text is an object or an array.
func isObject(s string) bool {
	return strings.HasPrefix(s, "{") || strings.HasPrefix(s, "[")
}

func repeatedDifferences(n int) string {
	if n == 1 {
		return "1 difference that repeats a setting, table cell or row listed above"
	}
	return fmt.Sprintf("%d differences that repeat settings, table cells and rows listed above", n)
}

// tableHeaders returns the columns of each result table (by file name) of
// either version.
func tableHeaders(pa, pb map[string][]byte) map[string]map[string]bool {
	h := map[string]map[string]bool{}
	for _, p := range []map[string][]byte{pa, pb} {
		for name := range resultKeys {
			b := p["results/"+name]
			line, _, _ := bytes.Cut(b, []byte("\n"))
			if h[name] == nil {
				h[name] = map[string]bool{}
			}
			for _, c := range strings.Split(strings.TrimSpace(string(line)), ",") {
				h[name][c] = true
			}
		}
	}
	return h
}

// jsonIndex matches an array index or identity in a results.json path.
var jsonIndex = regexp.MustCompile(`\[[^\]]*\]`)

// repeatsATable reports whether a value of results.json at path is also a
// setting (listed from run.json's project), a cell of a result table, or a
// whole row of one (an analysis, fit, parameter, derived quantity or
// statistic added or removed), so that its difference is already listed.
// Values of the record's own (a derived quantity's standard error, the
// dataset summaries) are not, and diff lists them one by one.
func repeatsATable(path string, headers map[string]map[string]bool) bool {
	shape := jsonIndex.ReplaceAllString(path, "[]")
	if strings.HasPrefix(shape, "settings.") {
		return true // the settings are listed from run.json's project
	}
	table, leaf := "", ""
	for _, t := range []struct{ prefix, table string }{
		{"analyses[].fits[].parameters[]", "parameters.csv"},
		{"analyses[].fits[]", "fits.csv"},
		{"analyses[].derived[]", "derived.csv"},
		{"analyses[].gof[]", "gof.csv"},
		{"analyses[]", "fits.csv"},
	} {
		if shape == t.prefix {
			return true // a whole row (or analysis) of one version only
		}
		if rest, ok := strings.CutPrefix(shape, t.prefix+"."); ok {
			if t.table == "fits.csv" {
				rest = strings.TrimPrefix(rest, "optimizer.") // method, iterations, … are fits.csv columns
			}
			if !strings.ContainsAny(rest, ".[") {
				table, leaf = t.table, rest
			}
			break
		}
	}
	switch {
	case table == "":
		return false
	case leaf == "name" && table == "parameters.csv":
		leaf = "parameter"
	case leaf == "name" && table == "fits.csv":
		leaf = "analysis"
	}
	return headers[table][leaf]
}

// maxShownLines is the most lines of a changed input that diff quotes
// from each version.
const maxShownLines = 3

// changedLines says where two versions of a text input differ, for a reader
// who must find the corrected value: the lines between the longest common
// first and last lines, with their numbers in each version and up to
// maxShownLines of each quoted. It is "" for binary files (a NUL byte or
// invalid UTF-8), where the hashes are all diff can show.
func changedLines(a, b []byte) string {
	if !isText(a) || !isText(b) {
		return ""
	}
	la, lb := splitLines(a), splitLines(b)
	p := 0
	for p < len(la) && p < len(lb) && la[p] == lb[p] {
		p++
	}
	q := 0
	for q < len(la)-p && q < len(lb)-p && la[len(la)-1-q] == lb[len(lb)-1-q] {
		q++
	}
	ma, mb := la[p:len(la)-q], lb[p:len(lb)-q]
	switch {
	case len(ma) == 0 && len(mb) == 0:
		return "; the same lines, but only one version ends with a line break"
	case len(ma) == 0:
		return fmt.Sprintf("; %s added in B after line %d: %s", lineSpan(p, len(mb)), p, quoteLines(mb))
	case len(mb) == 0:
		return fmt.Sprintf("; %s of A removed in B: %s", lineSpan(p, len(ma)), quoteLines(ma))
	case len(ma) == len(mb):
		return fmt.Sprintf("; %s: %s in A, %s in B", lineSpan(p, len(ma)), quoteLines(ma), quoteLines(mb))
	}
	return fmt.Sprintf("; %s of A, %s of B: %s in A, %s in B", lineSpan(p, len(ma)), strings.TrimPrefix(strings.TrimPrefix(lineSpan(p, len(mb)), "lines "), "line "), quoteLines(ma), quoteLines(mb))
}

// lineSpan names n lines after line p, 1-based: "line 5" or "lines 5–7".
func lineSpan(p, n int) string {
	if n == 1 {
		return fmt.Sprintf("line %d", p+1)
	}
	return fmt.Sprintf("lines %d–%d", p+1, p+n)
}

func quoteLines(m []string) string {
	if len(m) == 0 {
		return "nothing"
	}
	q := make([]string, 0, maxShownLines+1)
	for i, l := range m {
		if i == maxShownLines {
			q = append(q, fmt.Sprintf("… (%d lines in all)", len(m)))
			break
		}
		q = append(q, strconv.Quote(l))
	}
	return strings.Join(q, " ")
}

func splitLines(b []byte) []string {
	s := strings.TrimSuffix(string(b), "\n")
	if s == "" {
		return nil
	}
	return strings.Split(s, "\n")
}

func isText(b []byte) bool {
	return utf8.Valid(b) && !bytes.ContainsRune(b, 0)
}

func unionPaths(a, b map[string][]byte, keep func(string) bool) []string {
	seen := map[string]bool{}
	var out []string
	for _, m := range []map[string][]byte{a, b} {
		for p := range m {
			if keep(p) && !seen[p] {
				seen[p] = true
				out = append(out, p)
			}
		}
	}
	sort.Strings(out)
	return out
}

// fieldDiffs lists the JSON fields of two values that differ, as
// "NAME: X in A, Y in B".
func fieldDiffs(x, y any) []string {
	a, b := jsonFields(x), jsonFields(y)
	keys := make([]string, 0, len(a)+len(b))
	for k := range a {
		keys = append(keys, k)
	}
	for k := range b {
		if _, ok := a[k]; !ok {
			keys = append(keys, k)
		}
	}
	sort.Strings(keys)
	var out []string
	for _, k := range keys {
		if a[k] != b[k] {
			out = append(out, fmt.Sprintf("%s: %s in A, %s in B", k, show(a[k]), show(b[k])))
		}
	}
	return out
}
