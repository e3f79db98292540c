package bundle

import (
	"bytes"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// TestShowInterval: show writes an interval's open end (the profile stays
// above the cut-off as far as it was followed) as "open" with a round
// bracket, a bound not computed as "–", and numbers to six digits.
func TestShowInterval(t *testing.T) {
	for _, c := range []struct {
		lo, hi string
		n      rowNote
		want   string
	}{
		{"0.5051891", "1.25", rowNote{}, "[0.505189, 1.25]"},
		{"0.5051891", "", rowNote{upperOpen: true}, "[0.505189, open)"},
		{"", "3", rowNote{lowerOpen: true}, "(open, 3]"},
		{"", "", rowNote{}, "–"},
		{"", "", rowNote{lowerOpen: true, upperOpen: true}, "(open, open)"},
		{"2", "", rowNote{}, "[2, –]"},
	} {
		if got := interval(c.lo, c.hi, c.n); got != c.want {
			t.Errorf("interval(%q, %q, %+v) = %q, want %q", c.lo, c.hi, c.n, got, c.want)
		}
	}
}

// TestShowGitLine: show names the inputs' own git state beside the tree's,
// so a tree made dirty by an untracked scratch file does not hide that
// every input was committed as used (or does not pass for clean when one
// was not).
func TestShowGitLine(t *testing.T) {
	committed := []GitFile{{Path: "fitseal.toml", State: GitCommitted}, {Path: "data/x.csv", State: GitCommitted}}
	for _, c := range []struct {
		g    GitInfo
		want string
	}{
		{GitInfo{Note: "no git repository holds the project file"}, "git: no git repository holds the project file"},
		{GitInfo{Repository: true, Commit: "abc", Branch: "main", Files: committed}, "git abc on main; every input committed as used"},
		{GitInfo{Repository: true, Commit: "abc", Branch: "main", Dirty: true, Files: committed},
			"git abc on main, uncommitted changes in the working tree; every input committed as used"},
		{GitInfo{Repository: true, Commit: "abc", Branch: "main", Dirty: true,
			Files: []GitFile{{Path: "fitseal.toml", State: GitCommitted}, {Path: "data/x.csv", State: GitModified}}},
			"git abc on main, uncommitted changes in the working tree; inputs not committed as used: data/x.csv (modified)"},
	} {
		if got := gitLine(c.g); got != c.want {
			t.Errorf("gitLine(%+v) =\n %q, want\n %q", c.g, got, c.want)
		}
	}
}

// TestShowFootnote: texts of the footnoted columns longer than inlineLimit
// become markers numbered in the order first seen (row by row, left to
// right), identical texts share a number wherever they stand, shorter
// texts and other columns stay, and every replaced text is returned.
func TestShowFootnote(t *testing.T) {
	const (
		long1 = "profile likelihood (solved for scale)"
		long2 = "model average: Akaike weights, normal interval"
		note  = "a quantile of a discrete family has no profile interval"
	)
	for _, c := range []struct {
		name  string
		rows  [][]string
		cols  []int
		want  [][]string
		notes []string
	}{
		{"nothing long", [][]string{{"weibull", "profile likelihood", ""}, {"gamma", "fixed", "upper: open"}}, []int{1, 2},
			[][]string{{"weibull", "profile likelihood", ""}, {"gamma", "fixed", "upper: open"}}, nil},
		{"repeated text shares one number", [][]string{{"gamma", long1, ""}, {"gamma", long1, ""}, {"weibull", long1, ""}}, []int{1, 2},
			[][]string{{"gamma", "[1]", ""}, {"gamma", "[1]", ""}, {"weibull", "[1]", ""}}, []string{long1}},
		{"row by row, left to right", [][]string{{"a", long1, note}, {"b", long2, note}, {"c", long1, ""}}, []int{1, 2},
			[][]string{{"a", "[1]", "[2]"}, {"b", "[3]", "[2]"}, {"c", "[1]", ""}}, []string{long1, note, long2}},
		{"same text in two columns shares a number", [][]string{{long2, "x"}, {"y", long2}}, []int{0, 1},
			[][]string{{"[1]", "x"}, {"y", "[1]"}}, []string{long2}},
		{"only the named columns", [][]string{{long1, long2}}, []int{1},
			[][]string{{long1, "[1]"}}, []string{long2}},
		{"limit counts characters, not bytes", [][]string{{"≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥"}, {"≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥"}}, []int{0},
			[][]string{{"≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥"}, {"[1]"}}, []string{"≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥≥"}},
		{"short row", [][]string{{"a"}, {"b", note}}, []int{1},
			[][]string{{"a"}, {"b", "[1]"}}, []string{note}},
	} {
		t.Run(c.name, func(t *testing.T) {
			notes := footnote(c.rows, c.cols)
			if !reflect.DeepEqual(c.rows, c.want) || !slices.Equal(notes, c.notes) {
				t.Errorf("footnote:\n rows %q\n want %q\n notes %q\n want %q", c.rows, c.want, notes, c.notes)
			}
		})
	}
}

// TestShowTableWrite: columns two spaces apart by characters (the en dash
// and ≥ are one each), no trailing blanks (an empty last cell leaves none),
// footnotes under the table as "[n] text".
func TestShowTableWrite(t *testing.T) {
	tab := showTable{header: []string{"family", "p_value", "note"}}
	tab.add("negbinomial", "0.97", "6 cells after pooling to expected counts ≥ 5")
	tab.add("poisson", "–", "")
	tab.add("geometric", "0.5", "6 cells after pooling to expected counts ≥ 5")
	var b strings.Builder
	tab.write(&b, "note")
	want := "" +
		"family       p_value  note\n" +
		"negbinomial  0.97     [1]\n" +
		"poisson      –\n" +
		"geometric    0.5      [1]\n" +
		"[1] 6 cells after pooling to expected counts ≥ 5\n"
	if b.String() != want {
		t.Errorf("table:\n%s\nwant:\n%s", b.String(), want)
	}
}

// TestWriteShowFootnotes: show of a bag (invented values) writes each
// table's long methods and notes once, as footnotes numbered per table,
// and keeps every note of fits.csv and results.json.
func TestWriteShowFootnotes(t *testing.T) {
	const (
		ma      = "model average: Akaike weights, unconditional se (Burnham & Anderson 2002 eq. 4.9), normal interval"
		step    = "a quantile of a discrete family is a step function of the parameters: no profile interval"
		notAppl = "not applicable: needs values > 0, the data have the value 0"
		open    = "upper: open: the profile log-likelihood stays above the cut-off out to 1e+17"
		pool    = "5 cells after pooling to expected counts ≥ 5 (common practice)"
	)
	files := map[string]string{
		"fits.csv": "analysis,dataset,family,n,n_censored,k,loglik,aicc,delta,weight,support,criterion,rank,converged,note\n" +
			"d,d,poisson,20,0,1,-40.5,83.2222,0,0.7,substantial,aicc,1,true,\n" +
			"d,d,negbinomial,20,0,2,-40.1,84.9059,1.6837,0.3,substantial,aicc,2,true,\n" +
			"d,d,lognormal,20,0,,,,,,,aicc,,false,\"" + notAppl + "\"\n",
		"parameters.csv": "analysis,family,parameter,estimate,std_error,ci_lower,ci_upper,ci_method,fixed\n" +
			"d,poisson,rate,2.5,0.35,1.9,3.2,profile likelihood,false\n" +
			"d,negbinomial,size,9,12,2,,profile likelihood,false\n" +
			"d,negbinomial,mean,2.5,0.4,1.8,3.3,profile likelihood,false\n",
		"derived.csv": "analysis,family,quantity,argument,estimate,std_error,ci_lower,ci_upper,ci_method\n" +
			"d,poisson,quantile,0.5,2,,,,profile likelihood\n" +
			"d,poisson,exceedance,3,0.24,0.03,0.15,0.36,profile likelihood (solved for rate)\n" +
			"d,negbinomial,quantile,0.5,2,,,,profile likelihood\n" +
			"d,negbinomial,exceedance,3,0.25,0.04,0.14,0.38,profile likelihood (solved for mean)\n" +
			"d,model-average,exceedance,3,0.243,0.05,0.15,0.34,\"" + ma + "\"\n",
		"gof.csv": "analysis,family,statistic,value,p_value,replicates\n" +
			"d,poisson,chisq,4.1,0.3,99\n" +
			"d,negbinomial,chisq,3.9,0.35,99\n",
		"results.json": `{"analyses": [{"name": "d", "missing": 0, "note": "", "fits": [
			{"family": "poisson", "parameters": [{"name": "rate"}]},
			{"family": "negbinomial", "parameters": [{"name": "size", "note": "` + open + `", "ci_upper_open": true}, {"name": "mean"}]},
			{"family": "lognormal"}],
		"derived": [
			{"family": "poisson", "quantity": "quantile", "argument": 0.5, "note": "` + step + `"},
			{"family": "poisson", "quantity": "exceedance", "argument": 3},
			{"family": "negbinomial", "quantity": "quantile", "argument": 0.5, "note": "` + step + `"},
			{"family": "negbinomial", "quantity": "exceedance", "argument": 3},
			{"family": "model-average", "quantity": "exceedance", "argument": 3}],
		"gof": [{"family": "poisson", "statistic": "chisq", "note": "` + pool + `"},
			{"family": "negbinomial", "statistic": "chisq", "note": "` + pool + `"}]}]}`,
	}
	b := &Bag{Name: "counts", Files: map[string][]byte{}}
	for name, content := range files {
		b.Files[PayloadDir+"/results/"+name] = []byte(content)
	}
	var out bytes.Buffer
	if err := WriteShow(&out, b); err != nil {
		t.Fatal(err)
	}
	want := `bundle counts

== d ==
n = 20

ranking by AICc
rank  family       n   k  loglik  aicc     delta   weight  support      converged  note
1     poisson      20  1  -40.5   83.2222  0       0.7     substantial  true
2     negbinomial  20  2  -40.1   84.9059  1.6837  0.3     substantial  true
–     lognormal    20  –  –       –        –       –       –            false      [1]
[1] ` + notAppl + `

parameters
family       parameter  estimate  std_error  interval    method              note
poisson      rate       2.5       0.35       [1.9, 3.2]  profile likelihood
negbinomial  size       9         12         [2, open)   profile likelihood  [1]
negbinomial  mean       2.5       0.4        [1.8, 3.3]  profile likelihood
[1] ` + open + `

derived quantities
family         quantity    argument  estimate  interval      method              note
poisson        quantile    0.5       2         –             profile likelihood  [1]
poisson        exceedance  3         0.24      [0.15, 0.36]  [2]
negbinomial    quantile    0.5       2         –             profile likelihood  [1]
negbinomial    exceedance  3         0.25      [0.14, 0.38]  [3]
model-average  exceedance  3         0.243     [0.15, 0.34]  [4]
[1] ` + step + `
[2] profile likelihood (solved for rate)
[3] profile likelihood (solved for mean)
[4] ` + ma + `

goodness of fit
family       statistic  value  p_value  replicates  note
poisson      chisq      4.1    0.3      99          [1]
negbinomial  chisq      3.9    0.35     99          [1]
[1] ` + pool + `

caution: the top-ranked family is only the best of the candidates tried: check its goodness of fit
and the Q–Q and P–P plots before relying on it. Where these results inform safety or compliance
decisions, they support, and do not replace, the judgement of a licensed professional applying the
local codes and standards.
`
	if out.String() != want {
		t.Errorf("show:\n%s\nwant:\n%s", out.String(), want)
	}
}

// TestBeyondTheData: show cautions against return levels for periods longer
// than the record and quantiles further in a tail than 1/n, once per
// argument whatever the number of families, and says nothing otherwise.
func TestBeyondTheData(t *testing.T) {
	row := func(family, quantity, argument string) map[string]string {
		return map[string]string{"family": family, "quantity": quantity, "argument": argument}
	}
	const tail = ":\nthey rest on the shape of the fitted tail more than on the data, and their intervals may still be too narrow"
	for _, c := range []struct {
		name string
		n    int
		rows []map[string]string
		want string
	}{
		{"within the record", 40, []map[string]string{row("gumbel", "return_level", "10"), row("gumbel", "return_level", "40"), row("gumbel", "quantile", "0.5")}, ""},
		{"periods past the record, each once", 34, []map[string]string{
			row("gumbel", "return_level", "10"), row("gumbel", "return_level", "50"), row("gumbel", "return_level", "100"),
			row("gev", "return_level", "50"), row("gev", "return_level", "100"), row("model-average", "return_level", "100")},
			"caution: the return levels for T = 50, 100 (periods longer than the record of 34 values) lie beyond the data" + tail},
		{"upper and lower tail quantiles", 48, []map[string]string{
			row("gamma", "quantile", "0.95"), row("gamma", "quantile", "0.99"), row("gamma", "quantile", "0.01"), row("gamma", "exceedance", "40")},
			"caution: the quantiles at 0.99, 0.01 (a tail probability below 1/48) lie beyond the data" + tail},
		{"both", 20, []map[string]string{row("gev", "quantile", "0.999"), row("gev", "return_level", "25")},
			"caution: the return levels for T = 25 (periods longer than the record of 20 values) and the quantiles at 0.999 (a tail probability below 1/20) lie beyond the data" + tail},
		{"exceedances only", 5, []map[string]string{row("weibull", "exceedance", "4000")}, ""},
		{"no observations", 0, []map[string]string{row("gumbel", "return_level", "100")}, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := beyondTheData(c.n, c.rows); got != c.want {
				t.Errorf("beyondTheData(%d) =\n%q\nwant\n%q", c.n, got, c.want)
			}
		})
	}
}
