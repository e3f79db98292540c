package runner

import (
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"strings"
	"testing"
)

// projectWords are the project file's ways of naming things, which the
// messages of `fitseal fit` must not use: table headers, key = value
// lines, the synthetic dataset's name, and keys not written as flags.
var projectWords = regexp.MustCompile(`\[\[|\w = |dataset "data"|(^|[^-])\b(status_column|lower_column|upper_column|trials_column)\b|(needs|in|of) (left|right|missing)\b`)

// TestQuickProjectErrors: every problem the flags of `fitseal fit` can make
// in its synthetic project is named by the flag, and its hint says what to
// do with flags, not with project-file lines.
func TestQuickProjectErrors(t *testing.T) {
	cases := []struct {
		name      string
		d         Dataset
		families  []string
		err, hint string
	}{
		{"no column", Dataset{}, nil,
			"fitseal fit: --column: is required (or --lower_column and --upper_column for interval data)",
			"add --column NAME, the header of the observations"},
		{"status column without codes", Dataset{Column: "x", StatusColumn: "s"}, nil,
			"fitseal fit: --status_column: needs --left or --right: without censoring codes the status column says nothing",
			"list the codes, e.g. --left '<' for non-detects and --right '+' for suspensions"},
		{"codes without status column", Dataset{Column: "x", Left: []string{"<"}}, nil,
			"fitseal fit: --left: needs --status_column",
			"add --status_column NAME, the column holding these codes"},
		{"one code on both sides", Dataset{Column: "x", StatusColumn: "s", Left: []string{"<"}, Right: []string{"<"}}, nil,
			`fitseal fit: --right: "<" is already listed in --left`,
			"each code must mean one thing"},
		{"one column in two roles", Dataset{Column: "x", StatusColumn: "x", Left: []string{"<"}}, nil,
			`fitseal fit: --status_column: "x" is already the --column`,
			"each role needs its own column"},
		{"half an interval", Dataset{LowerColumn: "lo"}, nil,
			"fitseal fit: --upper_column: is missing",
			"interval-censored data need both --lower_column and --upper_column"},
		{"column and interval", Dataset{Column: "x", LowerColumn: "lo", UpperColumn: "hi"}, nil,
			"fitseal fit: --column: cannot be given together with --lower_column and --upper_column",
			"remove --column: interval data take their values from --lower_column and --upper_column"},
		{"status and interval", Dataset{LowerColumn: "lo", UpperColumn: "hi", StatusColumn: "s", Left: []string{"<"}}, nil,
			"fitseal fit: --status_column: cannot be combined with --lower_column and --upper_column",
			"interval bounds already say what is known: use either --status_column or --lower_column and --upper_column"},
		{"trials and censoring", Dataset{Column: "k", TrialsColumn: "n", StatusColumn: "s", Left: []string{"<"}}, []string{"binomial"},
			"fitseal fit: --trials_column: cannot be combined with censoring",
			"binomial-type counts are exact observations: drop the censoring flags"},
		{"trials with a continuous family", Dataset{Column: "k", TrialsColumn: "n"}, []string{"normal"},
			`fitseal fit: --families: --trials_column is given, but "normal" is a continuous family`,
			"use count families such as binomial or betabinomial with --trials_column"},
		{"a family that needs a fixed threshold", Dataset{Column: "x"}, []string{"gumbel", "gpd"},
			"fitseal fit: --families: gpd needs its threshold fixed",
			"add --fixed gpd.threshold=VALUE: gpd models the excesses over it"},
		{"only a family that needs a fixed threshold", Dataset{Column: "x"}, []string{"gpd"},
			"fitseal fit: --families: gpd needs its threshold fixed",
			"add --fixed gpd.threshold=VALUE: gpd models the excesses over it"},
		{"discrete and continuous families", Dataset{Column: "x"}, []string{"normal", "poisson"},
			`fitseal fit: --families: mixes discrete families (poisson) with continuous ones (normal): their likelihoods are not on the same footing`,
			"put count families and continuous families in separate runs of fitseal fit"},
	}
	dir := t.TempDir()
	file := filepath.Join(dir, "x.csv")
	if err := os.WriteFile(file, []byte("x,s,k,n,lo,hi\n1,,1,2,1,2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := QuickProject(QuickSpec{File: file, Dataset: c.d, Families: c.families})
			var pes ProjectErrors
			if !errors.As(err, &pes) {
				t.Fatalf("error %v (%T), want ProjectErrors", err, err)
			}
			if got := pes[0].Error(); got != c.err || pes[0].Hint != c.hint {
				t.Errorf("got  %q\n     hint %q\nwant %q\n     hint %q", got, pes[0].Hint, c.err, c.hint)
			}
			for _, e := range pes {
				if projectWords.MatchString(e.Error()) || projectWords.MatchString(e.Hint) {
					t.Errorf("project-file words in %q (hint %q)", e.Error(), e.Hint)
				}
			}
		})
	}
}

// TestQuickDataErrors: reading the data file of `fitseal fit`, the errors
// and hints name its flags; reading a project's dataset, its keys.
func TestQuickDataErrors(t *testing.T) {
	cases := []struct {
		name              string
		d                 Dataset
		csv               string
		fitErr, fitHint   string
		projErr, projHint string
	}{
		{"no such column", Dataset{Column: "y"}, "x\n1\n",
			`x.csv line 1: no column "y" (named by --column)`, `did you mean "x"?`,
			`x.csv line 1: no column "y" (named by column in dataset "life")`, `did you mean "x"?`},
		{"unknown status code", Dataset{Column: "x", StatusColumn: "s", Left: []string{"<"}}, "x,s\n1,?\n",
			`x.csv line 2, column "s": unknown status code "?" (left: "<"; right: none)`, "list it in --left or --right, or leave the cell empty for an exact value",
			`x.csv line 2, column "s": unknown status code "?" (left: "<"; right: none)`, `list it in left or right of dataset "life", or leave the cell empty for an exact value`},
		{"blank line", Dataset{Column: "x", Missing: []string{"NA"}}, "x\n1\n\n",
			`x.csv line 3: the line is blank, and an empty cell is not a missing value (missing: "NA")`, `remove the line, or add "" to --missing to count blank lines as missing rows`,
			`x.csv line 3: the line is blank, and an empty cell is not a missing value (missing: "NA")`, `remove the line, or add "" to missing in dataset "life" to count blank lines as missing rows`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for _, fit := range []bool{true, false} {
				d := c.d
				d.Name, d.fitFlags = "life", fit
				_, err := ReadCSV("x.csv", strings.NewReader(c.csv), &d)
				var de *DataError
				if !errors.As(err, &de) {
					t.Fatalf("error %v (%T), want *DataError", err, err)
				}
				want, hint := c.projErr, c.projHint
				if fit {
					want, hint = c.fitErr, c.fitHint
				}
				if de.Error() != want || de.Hint != hint {
					t.Errorf("fit command %v: got %q, hint %q\nwant %q, hint %q", fit, de.Error(), de.Hint, want, hint)
				}
			}
		})
	}
}

// TestQuickDefaultFamilies: without --families, fit ranks every family of
// the data's kind that it can fit with nothing fixed: gpd, which needs its
// threshold fixed, is left out rather than listed as not applicable with a
// project file's remedy.
func TestQuickDefaultFamilies(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "x.csv")
	if err := os.WriteFile(file, []byte("x,n\n1,3\n2,3\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		d    Dataset
		want []string
	}{
		{"continuous", Dataset{Column: "x"}, []string{"normal", "lognormal", "exponential", "gamma", "weibull", "gumbel", "gev",
			"logistic", "loglogistic", "invgauss", "pareto", "beta", "studentt", "weibull3", "lognormal3"}},
		{"counts", Dataset{Column: "x", TrialsColumn: "n"}, []string{"poisson", "negbinomial", "geometric", "binomial", "betabinomial"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			p, err := QuickProject(QuickSpec{File: file, Dataset: c.d})
			if err != nil {
				t.Fatal(err)
			}
			if got := p.Candidates[0].Families; !reflect.DeepEqual(got, c.want) {
				t.Errorf("families %v, want %v", got, c.want)
			}
		})
	}
}

// TestQuickFixed: --fixed holds parameters as the project file's fixed
// does: gpd with its threshold joins the default list (in catalogue order)
// and may be asked for; a parameter that cannot be fixed, a misspelt one or
// a family left out of --families is an error naming --fixed.
func TestQuickFixed(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "x.csv")
	if err := os.WriteFile(file, []byte("x\n31\n35\n40\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	gpd30 := map[string]map[string]float64{"gpd": {"threshold": 30}}
	for _, c := range []struct {
		name      string
		families  []string
		fixed     map[string]map[string]float64
		want      []string // the families, when no error
		err, hint string
	}{
		{"gpd asked for with its threshold", []string{"gpd", "exponential"}, gpd30, []string{"gpd", "exponential"}, "", ""},
		{"gpd with its threshold joins the defaults", nil, gpd30, []string{"normal", "lognormal", "exponential", "gamma", "weibull", "gumbel", "gev",
			"logistic", "loglogistic", "invgauss", "pareto", "gpd", "beta", "studentt", "weibull3", "lognormal3"}, "", ""},
		{"a threshold family's threshold", []string{"weibull3"}, map[string]map[string]float64{"weibull3": {"threshold": 30}}, []string{"weibull3"}, "", ""},
		{"a parameter that cannot be fixed", []string{"gev"}, map[string]map[string]float64{"gev": {"shape": 0}}, nil,
			"fitseal fit: --fixed: gev's shape cannot be fixed", "gev has no parameter that can be fixed (those that can: gpd's threshold, weibull3's threshold, lognormal3's threshold); remove it from --fixed"},
		{"a misspelt parameter", []string{"gpd"}, map[string]map[string]float64{"gpd": {"treshold": 30}}, nil,
			"fitseal fit: --families: gpd needs its threshold fixed", "add --fixed gpd.threshold=VALUE: gpd models the excesses over it"},
		{"a family not asked for", []string{"exponential"}, gpd30, nil,
			`fitseal fit: --fixed: "gpd" is not among --families`, "fix parameters only of families given to --families (or leave --families out)"},
	} {
		t.Run(c.name, func(t *testing.T) {
			p, err := QuickProject(QuickSpec{File: file, Dataset: Dataset{Column: "x"}, Families: c.families, Fixed: c.fixed})
			if c.err == "" {
				if err != nil {
					t.Fatal(err)
				}
				if got := p.Candidates[0].Families; !reflect.DeepEqual(got, c.want) {
					t.Errorf("families %v, want %v", got, c.want)
				}
				if got := p.Candidates[0].Fixed; !reflect.DeepEqual(got, c.fixed) {
					t.Errorf("fixed %v, want %v", got, c.fixed)
				}
				return
			}
			var pes ProjectErrors
			if !errors.As(err, &pes) {
				t.Fatalf("error %v (%T), want ProjectErrors", err, err)
			}
			if got := pes[0].Error(); got != c.err || pes[0].Hint != c.hint {
				t.Errorf("got  %q\n     hint %q\nwant %q\n     hint %q", got, pes[0].Hint, c.err, c.hint)
			}
			for _, e := range pes {
				if projectWords.MatchString(e.Error()) || projectWords.MatchString(e.Hint) {
					t.Errorf("project-file words in %q (hint %q)", e.Error(), e.Hint)
				}
			}
		})
	}
}
