package bundle

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"

	"fitseal/runner"
)

// resultTable is one result CSV read back from a bag.
type resultTable struct {
	header []string
	rows   []map[string]string
	// byAnalysis holds the rows of each analysis, in file order.
	byAnalysis map[string][]map[string]string
}

func readResultTable(b *Bag, name string) (*resultTable, error) {
	member := PayloadDir + "/results/" + name
	data, ok := b.Files[member]
	if !ok {
		return nil, fmt.Errorf("%s is not in the bundle", member)
	}
	recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", member, err)
	}
	if len(recs) == 0 {
		return nil, fmt.Errorf("%s: no header row", member)
	}
	t := &resultTable{header: recs[0], byAnalysis: map[string][]map[string]string{}}
	for _, r := range recs[1:] {
		m := make(map[string]string, len(t.header))
		for i, h := range t.header {
			if i < len(r) {
				m[h] = r[i]
			}
		}
		t.rows = append(t.rows, m)
		t.byAnalysis[m["analysis"]] = append(t.byAnalysis[m["analysis"]], m)
	}
	return t, nil
}

// short writes a number to 6 significant digits for reading; the exact
// value stays in the CSV files and --json.
func short(s string) string {
	if s == "" {
		return "–"
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return s
	}
	return strconv.FormatFloat(x, 'g', 6, 64)
}

// interval writes [lo, hi]; an open end (the profile stays above the
// cut-off as far as it was followed: no bound at this level) is written
// "open" and bracketed as such, a bound not computed "–".
func interval(lo, hi string, n rowNote) string {
	left, right := "[", "]"
	l, h := short(lo), short(hi)
	if n.lowerOpen {
		left, l = "(", "open"
	}
	if n.upperOpen {
		right, h = ")", "open"
	}
	if l == "–" && h == "–" {
		return "–"
	}
	return left + l + ", " + h + right
}

// families is the family column of rows, in order.
func families(rows []map[string]string) []string {
	out := make([]string, len(rows))
	for i, r := range rows {
		out[i] = r["family"]
	}
	return out
}

// WriteShow prints a bag's ranking, parameter, derived-quantity and
// goodness-of-fit tables (or why there is none), one block per analysis,
// aligned in columns, after a header naming the bundle, its created time,
// code version and signer. Numbers are shown to six significant digits;
// the result files keep every digit. A method or note longer than
// inlineLimit characters is a numbered footnote under its table (see
// showTable), so that the tables fit a terminal of 100 to 120 columns.
func WriteShow(out io.Writer, b *Bag) error {
	w := bufio.NewWriter(out)
	fits, err := readResultTable(b, "fits.csv")
	if err != nil {
		return err
	}
	params, err := readResultTable(b, "parameters.csv")
	if err != nil {
		return err
	}
	derived, err := readResultTable(b, "derived.csv")
	if err != nil {
		return err
	}
	gof, err := readResultTable(b, "gof.csv")
	if err != nil {
		return err
	}
	notes := readShowNotes(b)
	fmt.Fprintf(w, "bundle %s\n", b.Name)
	if rec, err := ParseRunRecord(b.RunJSON()); err == nil {
		fmt.Fprintf(w, "created %s by fitseal %s (%s)\n", rec.Created.UTC().Format("2006-01-02T15:04:05Z"), rec.Tool.Version, rec.Tool.Platform())
		fmt.Fprintln(w, gitLine(rec.Git))
		fmt.Fprintf(w, "signer %s; seed %d\n", rec.Signer.Fingerprint, rec.MasterSeed)
		if sh := rec.Shard; sh != nil {
			fmt.Fprintf(w, "PARTIAL BUNDLE: shard %d of %d (%d of the plan's %d analyses); 'fitseal merge' joins the shards into the whole\n",
				sh.Index, sh.Count, len(sh.Analyses), sh.PlanAnalyses)
		}
	}
	var order []string
	seen := map[string]bool{}
	for _, r := range fits.rows {
		if a := r["analysis"]; !seen[a] {
			seen[a] = true
			order = append(order, a)
		}
	}
	for _, a := range order {
		fmt.Fprintf(w, "\n== %s ==\n", a)
		crit := ""
		for _, r := range rowsOf(fits, a) {
			if r["criterion"] != "" {
				crit = r["criterion"]
				break
			}
		}
		ranked := slices.Clone(rowsOf(fits, a))
		sort.SliceStable(ranked, func(i, j int) bool { return rankKey(ranked[i]) < rankKey(ranked[j]) })
		if len(ranked) > 0 {
			// The data behind every row: n, how many censored, how many
			// values the file had missing (skipped, counted).
			line := "n = " + ranked[0]["n"]
			if c := ranked[0]["n_censored"]; c != "" && c != "0" {
				line += " (" + c + " censored)"
			}
			if m := notes.missing[a]; m > 0 {
				line += fmt.Sprintf("; %d missing values skipped", m)
			}
			fmt.Fprintln(w, line)
		}
		fmt.Fprintf(w, "\nranking by %s\n", criterionName(crit))
		if n := notes.analysis[a]; n != "" {
			fmt.Fprintln(w, n) // why the criterion differs from the one asked for, …
		}
		ranking := showTable{header: []string{"rank", "family", "n", "k", "loglik", crit, "delta", "weight", "support", "converged", "note"}}
		for _, r := range ranked {
			rank := r["rank"]
			if rank == "" {
				rank = "–"
			}
			ranking.add(rank, r["family"], r["n"], orDash(r["k"]), short(r["loglik"]), short(r[crit]), short(r["delta"]),
				short(r["weight"]), orDash(r["support"]), r["converged"], r["note"])
		}
		ranking.write(w, "note")
		// What the fits' inference notes say of the bootstrap and the
		// intervals (a fallback to profile intervals, a local maximum).
		var fams, remarks []string
		for _, r := range ranked {
			fams = append(fams, r["family"])
			remarks = append(remarks, runner.InferenceRemarks(notes.inference[a][r["family"]]))
		}
		for _, line := range runner.GroupRemarks(fams, remarks) {
			fmt.Fprintln(w, line)
		}
		// The other tables follow the ranking: the top-ranked family first,
		// the model-averaged rows last.
		place := make(map[string]int, len(ranked))
		for i, r := range ranked {
			place[r["family"]] = i
		}
		inRankOrder := func(rows []map[string]string) []map[string]string {
			placeOf := func(r map[string]string) int {
				if i, ok := place[r["family"]]; ok {
					return i
				}
				return len(place)
			}
			rows = slices.Clone(rows)
			sort.SliceStable(rows, func(i, j int) bool { return placeOf(rows[i]) < placeOf(rows[j]) })
			return rows
		}
		if rows := inRankOrder(rowsOf(params, a)); len(rows) > 0 {
			fmt.Fprintln(w, "\nparameters")
			t := showTable{header: []string{"family", "parameter", "estimate", "std_error", "interval", "method", "note"}}
			for _, r := range rows {
				method := r["ci_method"]
				if r["fixed"] == "true" {
					method = "fixed"
				}
				n := notes.rows[rowKey(a, r["family"], r["parameter"])]
				t.add(r["family"], r["parameter"], short(r["estimate"]), short(r["std_error"]),
					interval(r["ci_lower"], r["ci_upper"], n), method, n.note)
			}
			t.write(w, "method", "note")
		}
		if rows := inRankOrder(rowsOf(derived, a)); len(rows) > 0 {
			fmt.Fprintln(w, "\nderived quantities")
			t := showTable{header: []string{"family", "quantity", "argument", "estimate", "interval", "method", "note"}}
			for _, r := range rows {
				arg, _ := strconv.ParseFloat(r["argument"], 64) // derived.csv writes it in shortest form
				n := notes.rows[rowKey(a, r["family"], derivedWhat(r["quantity"], arg))]
				t.add(r["family"], r["quantity"], short(r["argument"]), short(r["estimate"]),
					interval(r["ci_lower"], r["ci_upper"], n), orDash(r["ci_method"]), n.note)
			}
			t.write(w, "method", "note")
			if n, err := strconv.Atoi(ranked[0]["n"]); err == nil {
				if c := beyondTheData(n, rows); c != "" {
					fmt.Fprintln(w, c)
				}
			}
		}
		if rows := inRankOrder(rowsOf(gof, a)); len(rows) > 0 {
			fmt.Fprintln(w, "\ngoodness of fit")
			t := showTable{header: []string{"family", "statistic", "value", "p_value", "replicates", "note"}}
			have := map[string]bool{}
			for _, r := range rows {
				have[r["family"]] = true
				t.add(r["family"], r["statistic"], short(r["value"]), orDash(short(r["p_value"])), r["replicates"],
					notes.rows[rowKey(a, r["family"], "gof "+r["statistic"])].note)
			}
			// A fitted family without a row says why, as when none has one.
			for _, r := range ranked {
				if f := r["family"]; !have[f] {
					if reason, ok := notes.noGOF[a][f]; ok {
						t.add(f, "none", "", "", "", reason)
					}
				}
			}
			t.write(w, "note")
		} else if reasons := notes.gofReasons(a, families(ranked)); len(reasons) > 0 {
			fmt.Fprintf(w, "\ngoodness of fit: none: %s\n", strings.Join(reasons, "; "))
		}
	}
	if len(order) > 0 {
		c := showCaution
		if _, ok := b.Files[PayloadDir+"/report.pdf"]; ok {
			c += " (report.pdf: \"Methods and cautions\")"
		}
		fmt.Fprintln(w, "\n"+c+".")
	}
	return w.Flush()
}

// showCaution ends every show: the two cautions of report.pdf's "Methods and
// cautions" that matter most to someone acting on the numbers printed.
const showCaution = "caution: the top-ranked family is only the best of the candidates tried: check its goodness of fit\n" +
	"and the Q–Q and P–P plots before relying on it. Where these results inform safety or compliance\n" +
	"decisions, they support, and do not replace, the judgement of a licensed professional applying the\n" +
	"local codes and standards"

// beyondTheData is a caution line for the derived rows of an analysis of n
// observations that lie beyond its data: return levels for a period T > n
// (longer than the record, for annual maxima) and quantiles whose tail
// probability, p or 1 − p, is below 1/n. Such values rest on the shape of
// the fitted tail more than on the data. "" when there are none.
func beyondTheData(n int, rows []map[string]string) string {
	if n <= 0 {
		return ""
	}
	var periods, quantiles []string
	seen := map[string]bool{}
	for _, r := range rows {
		x, err := strconv.ParseFloat(r["argument"], 64)
		key := r["quantity"] + " " + r["argument"]
		if err != nil || seen[key] {
			continue
		}
		seen[key] = true
		switch r["quantity"] {
		case "return_level":
			if x > float64(n) {
				periods = append(periods, short(r["argument"]))
			}
		case "quantile":
			if min(x, 1-x)*float64(n) < 1 {
				quantiles = append(quantiles, short(r["argument"]))
			}
		}
	}
	var what []string
	if len(periods) > 0 {
		what = append(what, fmt.Sprintf("return levels for T = %s (periods longer than the record of %d values)", strings.Join(periods, ", "), n))
	}
	if len(quantiles) > 0 {
		what = append(what, fmt.Sprintf("quantiles at %s (a tail probability below 1/%d)", strings.Join(quantiles, ", "), n))
	}
	if len(what) == 0 {
		return ""
	}
	return "caution: the " + strings.Join(what, " and the ") + " lie beyond the data:\n" +
		"they rest on the shape of the fitted tail more than on the data, and their intervals may still be too narrow"
}

// gitLine is show's line on the git state: the commit and branch, whether
// the working tree had uncommitted changes, and the inputs' own state, which
// the tree's does not tell (a tree with an untracked scratch file is dirty
// while every input is committed as used).
func gitLine(g GitInfo) string {
	if !g.Repository {
		return "git: " + orNone(g.Note)
	}
	dirty := ""
	if g.Dirty {
		dirty = ", uncommitted changes in the working tree"
	}
	inputs := "; every input committed as used"
	if u := g.Uncommitted(); len(u) > 0 {
		inputs = "; inputs not committed as used: " + strings.Join(u, ", ")
	}
	return fmt.Sprintf("git %s on %s%s%s", orNone(g.Commit), orNone(g.Branch), dirty, inputs)
}

// showNotes is what show takes from results.json beside the CSV files:
// each analysis's count of missing values, each fit's reason for having no
// goodness-of-fit statistic (after runner.NoGOFNote in its inference note),
// and the notes (and open interval ends) of the parameter, derived and
// goodness-of-fit rows, which the CSV files do not carry. Empty when results.json cannot be read; show then
// prints the CSV files' contents alone.
type showNotes struct {
	missing   map[string]int               // by analysis
	analysis  map[string]string            // the analysis's own note, by analysis
	inference map[string]map[string]string // analysis → family → inference note
	noGOF     map[string]map[string]string // analysis → family → reason
	rows      map[string]rowNote           // by rowKey
}

// rowNote is a parameter or derived row's note and open interval ends.
type rowNote struct {
	note                 string
	lowerOpen, upperOpen bool
}

// rowKey names a parameter row (what = the parameter), a derived row
// (what = quantity and argument, as results.json and derived.csv write them)
// or a goodness-of-fit row (what = "gof " and the statistic).
func rowKey(analysis, family, what string) string {
	return analysis + "\x00" + family + "\x00" + what
}

// derivedWhat is rowKey's what of a derived row.
func derivedWhat(quantity string, argument float64) string {
	return quantity + " " + strconv.FormatFloat(argument, 'g', -1, 64)
}

func readShowNotes(b *Bag) showNotes {
	type interval struct {
		Note      string `json:"note"`
		LowerOpen bool   `json:"ci_lower_open"`
		UpperOpen bool   `json:"ci_upper_open"`
	}
	var doc struct {
		Analyses []struct {
			Name    string `json:"name"`
			Missing int    `json:"missing"`
			Note    string `json:"note"`
			Fits    []struct {
				Family     string `json:"family"`
				Inference  string `json:"inference_note"`
				Parameters []struct {
					Name string `json:"name"`
					interval
				} `json:"parameters"`
			} `json:"fits"`
			Derived []struct {
				Family   string  `json:"family"`
				Quantity string  `json:"quantity"`
				Argument float64 `json:"argument"`
				interval
			} `json:"derived"`
			GOF []struct {
				Family    string `json:"family"`
				Statistic string `json:"statistic"`
				Note      string `json:"note"`
			} `json:"gof"`
		} `json:"analyses"`
	}
	out := showNotes{missing: map[string]int{}, analysis: map[string]string{}, inference: map[string]map[string]string{}, noGOF: map[string]map[string]string{}, rows: map[string]rowNote{}}
	if json.Unmarshal(b.Files[PayloadDir+"/results/"+runner.ResultsFile], &doc) != nil {
		return out
	}
	for _, a := range doc.Analyses {
		out.missing[a.Name] = a.Missing
		out.analysis[a.Name] = a.Note
		out.inference[a.Name] = map[string]string{}
		for _, f := range a.Fits {
			out.inference[a.Name][f.Family] = f.Inference
			if i := strings.Index(f.Inference, runner.NoGOFNote); i >= 0 {
				reason, _, _ := strings.Cut(f.Inference[i+len(runner.NoGOFNote):], "; ")
				if out.noGOF[a.Name] == nil {
					out.noGOF[a.Name] = map[string]string{}
				}
				out.noGOF[a.Name][f.Family] = reason
			}
			for _, p := range f.Parameters {
				out.rows[rowKey(a.Name, f.Family, p.Name)] = rowNote{p.Note, p.LowerOpen, p.UpperOpen}
			}
		}
		for _, d := range a.Derived {
			out.rows[rowKey(a.Name, d.Family, derivedWhat(d.Quantity, d.Argument))] = rowNote{d.Note, d.LowerOpen, d.UpperOpen}
		}
		for _, g := range a.GOF {
			out.rows[rowKey(a.Name, g.Family, "gof "+g.Statistic)] = rowNote{note: g.Note}
		}
	}
	return out
}

// gofReasons is the distinct reasons, in family order, why the given
// families of an analysis have no goodness-of-fit statistic.
func (n showNotes) gofReasons(analysis string, families []string) []string {
	var out []string
	for _, f := range families {
		if r, ok := n.noGOF[analysis][f]; ok && !slices.Contains(out, r) {
			out = append(out, r)
		}
	}
	return out
}

// rankKey orders fitted rows by rank, then the unranked ones.
func rankKey(r map[string]string) int {
	if n, err := strconv.Atoi(r["rank"]); err == nil && n > 0 {
		return n
	}
	return 1 << 30
}

func criterionName(c string) string {
	switch c {
	case "aic":
		return "AIC"
	case "aicc":
		return "AICc"
	case "bic":
		return "BIC"
	}
	return c
}

func orDash(s string) string {
	if s == "" {
		return "–"
	}
	return s
}

// rowsOf is the rows of one analysis, in file order.
func rowsOf(t *resultTable, analysis string) []map[string]string {
	return t.byAnalysis[analysis]
}

// ShowRecord is what `show --json` prints: the bundle's results.json and
// the essentials of its run.json.
type ShowRecord struct {
	Bundle string          `json:"bundle"`
	Run    *RunEssentials  `json:"run"`
	Result json.RawMessage `json:"results"`
}

// RunEssentials are the parts of run.json a reader of the results needs.
type RunEssentials struct {
	Created    string      `json:"created"`
	Tool       Tool        `json:"tool"`
	Git        GitInfo     `json:"git"`
	Signer     SignerInfo  `json:"signer"`
	MasterSeed uint64      `json:"master_seed"`
	Inputs     []InputFile `json:"inputs"`
}

// ShowJSON is the machine-readable record of a bag (ShowRecord), indented,
// with a final newline.
func ShowJSON(b *Bag) ([]byte, error) {
	res, ok := b.Files[PayloadDir+"/results/results.json"]
	if !ok {
		return nil, fmt.Errorf("%s/results/results.json is not in the bundle", PayloadDir)
	}
	if !json.Valid(res) {
		return nil, fmt.Errorf("%s/results/results.json is not valid JSON", PayloadDir)
	}
	rec, err := ParseRunRecord(b.RunJSON())
	if err != nil {
		return nil, err
	}
	out := ShowRecord{Bundle: b.Name, Result: res, Run: &RunEssentials{
		Created: rec.Created.UTC().Format("2006-01-02T15:04:05Z"), Tool: rec.Tool, Git: rec.Git,
		Signer: rec.Signer, MasterSeed: rec.MasterSeed, Inputs: rec.Inputs,
	}}
	js, err := json.MarshalIndent(out, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(js, '\n'), nil
}

// inlineLimit is the longest method or note text, in characters, that show
// writes in its cell. A longer one ("profile likelihood (solved for
// scale)", the model average's method, most notes) would widen every row of
// its table and is mostly the same on many rows, so it becomes a footnote;
// a shorter one ("profile likelihood", "fixed", "wald (log scale)") stays,
// as a marker would save next to nothing and cost the reader a look down.
const inlineLimit = 20

// showTable is one of show's tables: a header and rows of cells, written
// aligned in columns two spaces apart, without trailing blanks.
type showTable struct {
	header []string
	rows   [][]string
}

func (t *showTable) add(cells ...string) { t.rows = append(t.rows, cells) }

// write writes the table with the long texts of the named columns moved to
// footnotes (footnote), one line "[n] text" each under the table.
func (t *showTable) write(w io.Writer, footnoted ...string) {
	var cols []int
	for i, h := range t.header {
		if slices.Contains(footnoted, h) {
			cols = append(cols, i)
		}
	}
	texts := footnote(t.rows, cols)
	lines := append([][]string{t.header}, t.rows...)
	width := make([]int, len(t.header))
	for _, l := range lines {
		for i, c := range l {
			width[i] = max(width[i], utf8.RuneCountInString(c))
		}
	}
	var b strings.Builder
	for _, l := range lines {
		b.Reset()
		for i, c := range l {
			b.WriteString(c)
			if i < len(l)-1 {
				b.WriteString(strings.Repeat(" ", width[i]-utf8.RuneCountInString(c)+2))
			}
		}
		fmt.Fprintln(w, strings.TrimRight(b.String(), " "))
	}
	for i, text := range texts {
		fmt.Fprintf(w, "[%d] %s\n", i+1, text)
	}
}

// footnote replaces each cell of the given columns whose text is longer
// than inlineLimit characters with the marker "[n]" and returns the texts
// so replaced, text n-1 for marker [n]: numbered in the order first seen,
// row by row and left to right in a row, identical texts sharing a number.
// Every text replaced is returned, so nothing is lost.
func footnote(rows [][]string, cols []int) []string {
	var texts []string
	number := map[string]int{}
	for _, r := range rows {
		for _, c := range cols {
			if c >= len(r) || utf8.RuneCountInString(r[c]) <= inlineLimit {
				continue
			}
			n, ok := number[r[c]]
			if !ok {
				texts = append(texts, r[c])
				n = len(texts)
				number[r[c]] = n
			}
			r[c] = fmt.Sprintf("[%d]", n)
		}
	}
	return texts
}
