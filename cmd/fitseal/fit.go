package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"fitseal/runner"
)

func init() {
	commands["fit"] = command{
		summary: "rank families on one CSV column, without project or bundle",
		run:     cmdFit,
	}
}

// fitOptions are the settings of `fitseal fit`.
type fitOptions struct {
	File      string
	Spec      runner.QuickSpec
	Families  string
	Left      string
	Right     string
	Missing   string
	Workers   int
	Discrete  bool
	Criterion string
}

func cmdFit(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	var o fitOptions
	d := &o.Spec.Dataset
	fs := newFlagSet("fit", "FILE.csv", "Fit candidate families to one column of a CSV file by maximum likelihood and\nprint their ranking. Censoring flags are named as the project file's keys\n(--status_column, --lower_column, …); the hyphenated spellings work too.", stderr)
	fs.StringVar(&d.Column, "column", "", "the `NAME` of the column of observations")
	fs.StringVar(&o.Families, "families", "", "comma-separated `LIST` of families (default: every continuous family but gpd, which needs --fixed gpd.threshold=VALUE; or every count family with --discrete or --trials_column)")
	fixed := fixedFlag{}
	fs.Var(fixed, "fixed", "hold a parameter at a value, as the project file's fixed: `FAMILY.PARAMETER=VALUE`, repeated or comma-separated (e.g. gpd.threshold=30, which also adds gpd to the default families)")
	fs.BoolVar(&o.Discrete, "discrete", false, "rank the count families by default")
	fs.StringVar(&o.Criterion, "criterion", "aicc", "ranking criterion: aic, aicc or bic")
	keyFlag(fs, &d.StatusColumn, "status_column", "the `NAME` of the column of censoring codes")
	fs.StringVar(&o.Left, "left", "", "comma-separated codes of left-censored rows (non-detects)")
	fs.StringVar(&o.Right, "right", "", "comma-separated codes of right-censored rows (suspensions)")
	keyFlag(fs, &d.LowerColumn, "lower_column", "the `NAME` of the column of lower bounds of interval-censored values (empty cell = open; every row is interval-censored, lower < upper)")
	keyFlag(fs, &d.UpperColumn, "upper_column", "the `NAME` of the column of upper bounds of interval-censored values (empty cell = open)")
	keyFlag(fs, &d.TrialsColumn, "trials_column", "the `NAME` of the column of each count's number of trials (binomial-type data)")
	fs.StringVar(&d.Delimiter, "delimiter", ",", "field separator, one character")
	fs.StringVar(&o.Missing, "missing", ",NA", "comma-separated cell values skipped as missing (the empty cell is written as nothing)")
	fs.IntVar(&o.Workers, "j", 0, "number of fits run at once, and the most cores used (default: all cores)")
	fs.Bool("q", false, "no progress output (fit has none)")
	pos, err := parseInterleaved(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return fs.argCountError("one CSV file", len(pos))
	}
	o.File = pos[0]
	o.Spec.File = o.File
	o.Spec.Criterion = o.Criterion
	o.Spec.Discrete = o.Discrete
	o.Spec.Families = splitList(o.Families)
	if len(fixed) > 0 {
		o.Spec.Fixed = fixed
	}
	d.Left, d.Right = splitList(o.Left), splitList(o.Right)
	d.Missing = strings.Split(o.Missing, ",")
	return runFit(ctx, o, stdout, stderr)
}

// keyFlag defines a flag named as the project file's key (status_column),
// and its hyphenated spelling (status-column) as the same flag.
func keyFlag(fs *flagSet, p *string, key, usage string) {
	fs.StringVar(p, key, "", usage)
	fs.StringVar(p, strings.ReplaceAll(key, "_", "-"), "", aliasUsage+key+" `NAME`")
}

// fixedFlag collects --fixed FAMILY.PARAMETER=VALUE, repeated or
// comma-separated, as the project file's fixed table; the project loader
// then checks that the family is fitted and the parameter can be fixed.
type fixedFlag map[string]map[string]float64

func (f fixedFlag) String() string {
	var items []string
	for fam, params := range f {
		for p, v := range params {
			items = append(items, fam+"."+p+"="+strconv.FormatFloat(v, 'g', -1, 64))
		}
	}
	sort.Strings(items)
	return strings.Join(items, ",")
}

func (f fixedFlag) Set(s string) error {
	for _, item := range splitList(s) {
		key, value, hasValue := strings.Cut(item, "=")
		fam, param, hasParam := strings.Cut(strings.TrimSpace(key), ".")
		if !hasValue || !hasParam || fam == "" || param == "" {
			return fmt.Errorf("%q is not FAMILY.PARAMETER=VALUE (e.g. gpd.threshold=30)", item)
		}
		x, err := strconv.ParseFloat(strings.TrimSpace(value), 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("%q: %q is not a finite number", item, strings.TrimSpace(value))
		}
		if f[fam] == nil {
			f[fam] = map[string]float64{}
		}
		if _, twice := f[fam][param]; twice {
			return fmt.Errorf("%s.%s is given twice", fam, param)
		}
		f[fam][param] = x
	}
	return nil
}

// splitList splits a comma-separated flag value; "" gives nil.
func splitList(s string) []string {
	if strings.TrimSpace(s) == "" {
		return nil
	}
	parts := strings.Split(s, ",")
	for i := range parts {
		parts[i] = strings.TrimSpace(parts[i])
	}
	return parts
}

// runFit fits and prints the ranking table.
func runFit(ctx context.Context, o fitOptions, stdout, stderr io.Writer) error {
	defer useCores(o.Workers)()
	p, err := runner.QuickProject(o.Spec)
	if err != nil {
		return inputError(err)
	}
	limitMemoryForFile(o.File)
	adviseHugeHeapFor(heapPerInputByte, o.File)
	res, err := runner.Run(ctx, p, runner.RunOptions{Workers: o.Workers, RankOnly: true})
	if err != nil {
		if errors.Is(err, context.Canceled) {
			return fmt.Errorf("interrupted")
		}
		return inputError(err)
	}
	return printRanking(stdout, o.File, res.Analyses[0], res.Data["data"])
}

// printRanking writes the ranked families first, then those that did not
// converge, then those that do not apply, each with its note. Numbers are
// rounded for reading; `fitseal run` writes them in full.
func printRanking(w io.Writer, file string, a *runner.AnalysisResult, dd *runner.DatasetData) error {
	c := a.Comparison
	d := &a.Group.Data
	fmt.Fprintf(w, "%s: n = %d", file, d.N())
	if n := d.NCensored(); n > 0 {
		fmt.Fprintf(w, " (%d left-, %d right-, %d interval-censored)", len(d.Left), len(d.Right), len(d.Lower))
	}
	if dd != nil && dd.Missing > 0 {
		fmt.Fprintf(w, ", %d missing skipped", dd.Missing)
		if blank := blankLines(dd); blank != "" {
			fmt.Fprintf(w, " (%s)", blank)
		}
	}
	fmt.Fprintf(w, "; ranked by %s", criterionLabel[string(c.Criterion)])
	if c.Note != "" {
		fmt.Fprintf(w, " (%s)", c.Note)
	}
	fmt.Fprintln(w)
	order := make([]int, len(c.Rows))
	for i := range order {
		order[i] = i
	}
	group := func(i int) int {
		switch r := c.Rows[i]; {
		case r.Rank > 0:
			return r.Rank
		case r.Inapplicable == "":
			return 1 << 20
		default:
			return 1 << 21
		}
	}
	sort.SliceStable(order, func(a, b int) bool { return group(order[a]) < group(order[b]) })
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "rank\tfamily\tk\tloglik\tAIC\tAICc\tBIC\tdelta\tweight\testimates\tnote")
	for _, i := range order {
		r := c.Rows[i]
		rank, k, ll, est := "-", "", "", ""
		if r.Rank > 0 {
			rank = strconv.Itoa(r.Rank)
		}
		if f := r.Fit; f != nil && f.Converged {
			k = strconv.Itoa(f.K)
			ll = round(f.LogLik, 3)
			parts := make([]string, len(f.Parameters))
			for j, name := range f.Parameters {
				parts[j] = name + "=" + strconv.FormatFloat(f.Estimates[j], 'g', 6, 64)
			}
			est = strings.Join(parts, " ")
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", rank, r.Family, k, ll,
			round(r.AIC, 3), round(r.AICc, 3), round(r.BIC, 3), round(r.Delta, 3), round(r.Weight, 4), est, r.Note)
	}
	return tw.Flush()
}

// criterionLabel writes each criterion as the literature does.
var criterionLabel = map[string]string{"aic": "AIC", "aicc": "AICc", "bic": "BIC"}

func round(x float64, digits int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	return strconv.FormatFloat(x, 'f', digits, 64)
}
