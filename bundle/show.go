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
	"text/tabwriter"

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

func interval(lo, hi string) string {
	if lo == "" && hi == "" {
		return "–"
	}
	return "[" + short(lo) + ", " + short(hi) + "]"
}

// WriteShow prints a bag's ranking, parameter, derived-quantity and
// goodness-of-fit tables (or why there is none), one block per analysis,
// aligned in columns, after a header naming the bundle, its created time,
// code version and signer. Numbers are shown to six significant digits;
// the result files keep every digit.
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
	noGOF := noGOFReasons(b)
	fmt.Fprintf(w, "bundle %s\n", b.Name)
	if rec, err := ParseRunRecord(b.RunJSON()); err == nil {
		fmt.Fprintf(w, "created %s by fitseal %s (%s)\n", rec.Created.UTC().Format("2006-01-02T15:04:05Z"), rec.Tool.Version, rec.Tool.Platform())
		if rec.Git.Repository {
			dirty := ""
			if rec.Git.Dirty {
				dirty = ", uncommitted changes"
			}
			fmt.Fprintf(w, "git %s on %s%s\n", orNone(rec.Git.Commit), orNone(rec.Git.Branch), dirty)
		} else {
			fmt.Fprintf(w, "git: %s\n", orNone(rec.Git.Note))
		}
		fmt.Fprintf(w, "signer %s; seed %d\n", rec.Signer.Fingerprint, rec.MasterSeed)
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
		fmt.Fprintf(w, "\nranking by %s\n", criterionName(crit))
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "rank\tfamily\tn\tk\tloglik\t"+crit+"\tdelta\tweight\tconverged\tnote")
		ranked := rowsOf(fits, a)
		sort.SliceStable(ranked, func(i, j int) bool { return rankKey(ranked[i]) < rankKey(ranked[j]) })
		for _, r := range ranked {
			rank := r["rank"]
			if rank == "" {
				rank = "–"
			}
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", rank, r["family"], r["n"], orDash(r["k"]),
				short(r["loglik"]), short(r[crit]), short(r["delta"]), short(r["weight"]), r["converged"], r["note"])
		}
		tw.Flush()
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
			tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
			fmt.Fprintln(tw, "family\tparameter\testimate\tstd_error\tinterval\tmethod")
			for _, r := range rows {
				method := r["ci_method"]
				if r["fixed"] == "true" {
					method = "fixed"
				}
				fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\n", r["family"], r["parameter"], short(r["estimate"]), short(r["std_error"]),
					interval(r["ci_lower"], r["ci_upper"]), method)
			}
			tw.Flush()
		}
		if rows := inRankOrder(rowsOf(derived, a)); len(rows) > 0 {
			fmt.Fprintln(w, "\nderived quantities")
			tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
			fmt.Fprintln(tw, "family\tquantity\targument\testimate\tinterval\tmethod")
			for _, r := range rows {
				fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\n", r["family"], r["quantity"], short(r["argument"]), short(r["estimate"]),
					interval(r["ci_lower"], r["ci_upper"]), orDash(r["ci_method"]))
			}
			tw.Flush()
		}
		if rows := inRankOrder(rowsOf(gof, a)); len(rows) > 0 {
			fmt.Fprintln(w, "\ngoodness of fit")
			tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
			fmt.Fprintln(tw, "family\tstatistic\tvalue\tp_value\treplicates")
			for _, r := range rows {
				fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", r["family"], r["statistic"], short(r["value"]), orDash(short(r["p_value"])), r["replicates"])
			}
			tw.Flush()
		} else if reasons := noGOF[a]; len(reasons) > 0 {
			fmt.Fprintf(w, "\ngoodness of fit: none: %s\n", strings.Join(reasons, "; "))
		}
	}
	return w.Flush()
}

// noGOFReasons is, by analysis, why its fits have no goodness-of-fit
// statistic (gof.csv has no row for them): the reasons their inference notes
// in results.json give after runner.NoGOFNote, each once. Nothing when
// results.json cannot be read; show then just prints no reason.
func noGOFReasons(b *Bag) map[string][]string {
	var doc struct {
		Analyses []struct {
			Name string `json:"name"`
			Fits []struct {
				Inference string `json:"inference_note"`
			} `json:"fits"`
		} `json:"analyses"`
	}
	if json.Unmarshal(b.Files[PayloadDir+"/results/"+runner.ResultsFile], &doc) != nil {
		return nil
	}
	out := map[string][]string{}
	for _, a := range doc.Analyses {
		for _, f := range a.Fits {
			i := strings.Index(f.Inference, runner.NoGOFNote)
			if i < 0 {
				continue
			}
			reason, _, _ := strings.Cut(f.Inference[i+len(runner.NoGOFNote):], "; ")
			if !slices.Contains(out[a.Name], reason) {
				out[a.Name] = append(out[a.Name], reason)
			}
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
