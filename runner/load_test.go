package runner

import (
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"
)

// goodProject is a small valid project; the broken cases below edit it.
const goodProject = `name = "pumps"

[settings]
seed = 7
criterion = "bic"

[[dataset]]
name = "life"
file = "data/life.csv"
column = "hours"
status_column = "state"
right = ["+"]

[[candidates]]
name = "lifetime"
families = ["normal"]

[[analysis]]
dataset = "life"
candidates = "lifetime"
quantiles = [0.1, 0.5]
return_periods = [10, 100]
`

// writeProject puts src and a small data file into a fresh folder and
// returns the project file's path.
func writeProject(t *testing.T, src string) string {
	t.Helper()
	dir := t.TempDir()
	if err := os.MkdirAll(filepath.Join(dir, "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "data", "life.csv"), []byte("hours,state\n1,\n2,+\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "fitseal.toml")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestLoadGoodProjectAppliesDefaults(t *testing.T) {
	p, err := Load(writeProject(t, goodProject))
	if err != nil {
		t.Fatal(err)
	}
	want := Settings{Seed: 7, Criterion: "bic", Confidence: 0.95, Intervals: "profile", Bootstrap: 999,
		Tolerance: 1e-10, MaxIterations: 2000}
	if p.Settings != want {
		t.Errorf("settings = %+v, want %+v", p.Settings, want)
	}
	a := p.Analyses[0]
	if a.Name != "life" || a.Criterion != "bic" {
		t.Errorf("analysis name %q criterion %q, want the dataset's name and the project's criterion", a.Name, a.Criterion)
	}
	if !reflect.DeepEqual(a.ReturnPeriods, []float64{10, 100}) {
		t.Errorf("return periods %v (integers must be accepted)", a.ReturnPeriods)
	}
	if d := p.Datasets[0]; d.Delimiter != "," || !reflect.DeepEqual(d.Missing, []string{"", "NA"}) {
		t.Errorf("dataset defaults: delimiter %q missing %q", d.Delimiter, d.Missing)
	}
	if !p.Report.PDF || !p.Report.Figures || !reflect.DeepEqual(p.Report.Tables, []string{"md", "tex"}) {
		t.Errorf("report defaults: %+v", p.Report)
	}
	for _, k := range []string{"settings.confidence", "settings.bootstrap", "settings.tolerance", "analysis[0].name", "analysis[0].criterion", "dataset[0].missing", "report.pdf"} {
		if !contains(p.Defaulted, k) {
			t.Errorf("Defaulted %v lacks %s", p.Defaulted, k)
		}
	}
	if contains(p.Defaulted, "settings.seed") || contains(p.Defaulted, "settings.criterion") {
		t.Errorf("Defaulted %v lists keys that were set", p.Defaulted)
	}
	if got := p.InputFiles(); !reflect.DeepEqual(got, []string{"data/life.csv"}) {
		t.Errorf("InputFiles = %v", got)
	}
}

func TestLoadBrokenProjects(t *testing.T) {
	cases := []struct {
		name string
		edit func(string) string
		key  string // the key path the error must name
		line int    // the line it must point at (0: not checked)
		msg  string // a piece of the message
		hint string // a piece of the hint
	}{
		{"unknown key in array table", rep(`column = "hours"`, `colum = "hours"`), "dataset[0].colum", 10, "unknown key", `did you mean "column"?`},
		{"unknown top-level table", app("\n[setings]\nseed = 1\n"), "setings", 24, "unknown key", `did you mean "settings"?`},
		{"unknown settings key", rep(`seed = 7`, `sed = 7`), "settings.sed", 4, "unknown key", `"seed"`},
		{"bad criterion", rep(`criterion = "bic"`, `criterion = "aiccc"`), "settings.criterion", 5, `"aiccc" is not one of`, `did you mean "aicc"?`},
		{"confidence of one", rep(`seed = 7`, "seed = 7\nconfidence = 1"), "settings.confidence", 5, "not in (0, 1)", ""},
		{"negative bootstrap", rep(`seed = 7`, "seed = 7\nbootstrap = -1"), "settings.bootstrap", 5, "not between 0 and", ""},
		{"zero tolerance", rep(`seed = 7`, "seed = 7\ntolerance = 0.0"), "settings.tolerance", 5, "not in (0, 1)", ""},
		{"zero iterations", rep(`seed = 7`, "seed = 7\nmax_iterations = 0"), "settings.max_iterations", 5, "not between 1", ""},
		{"seed of wrong type", rep(`seed = 7`, `seed = "seven"`), "settings.seed", 4, "is a string; it must be an integer",
			"write it as a whole number, without quotes or a decimal point, e.g. seed = 20261202"},
		{"bootstrap quoted", rep(`seed = 7`, "seed = 7\nbootstrap = \"999\""), "settings.bootstrap", 5, "is a string; it must be an integer",
			"remove the quotes: bootstrap = 999"},
		{"bootstrap not whole", rep(`seed = 7`, "seed = 7\nbootstrap = 99.5"), "settings.bootstrap", 5, "is a float; it must be an integer",
			"write it as a whole number, without quotes or a decimal point, e.g. bootstrap = 999"},
		{"confidence quoted", rep(`seed = 7`, "seed = 7\nconfidence = \"0.9\""), "settings.confidence", 5, "is a string; it must be a number",
			"remove the quotes: confidence = 0.9"},
		{"criterion not quoted", rep(`criterion = "bic"`, `criterion = 3`), "settings.criterion", 5, "is an integer; it must be a string",
			`write it in double quotes, e.g. criterion = "aicc"`},
		{"require_clean_git as a word", rep(`seed = 7`, "seed = 7\nrequire_clean_git = \"yes\""), "settings.require_clean_git", 5, "is a string; it must be true or false",
			"write true or false, without quotes, e.g. require_clean_git = false"},
		{"missing code not a string", rep(`right = ["+"]`, "right = [\"+\"]\nmissing = [\"\", 3]"), "dataset[0].missing[1]", 13, "is an integer; it must be a string",
			`write each element in double quotes, e.g. missing = ["", "NA"]`},
		{"quantiles not a list", rep(`quantiles = [0.1, 0.5]`, `quantiles = 0.5`), "analysis[0].quantiles", 21, "is a float; it must be an array of numbers",
			"write a list of numbers in brackets, e.g. quantiles = [0.1, 0.5]"},
		{"bootstrap intervals without replicates", rep(`seed = 7`, "seed = 7\nintervals = \"bootstrap\"\nbootstrap = 0"), "settings.intervals", 5, "need replicates", ""},
		{"quantile above one", rep(`[0.1, 0.5]`, `[0.1, 1.5]`), "analysis[0].quantiles[1]", 21, "1.5 is not in (0, 1)", ""},
		{"return period one", rep(`[10, 100]`, `[1, 100]`), "analysis[0].return_periods[0]", 22, "greater than 1", ""},
		{"duplicate quantile", rep(`[0.1, 0.5]`, `[0.5, 0.5]`), "analysis[0].quantiles[1]", 21, "listed twice", ""},
		{"bad project name", rep(`name = "pumps"`, `name = "Pumps 2026"`), "name", 1, "not a valid name", "lower-case"},
		{"missing project name", rep(`name = "pumps"`, ``), "name", 0, "is required", "name ="},
		{"unknown family", rep(`["normal"]`, `["normall"]`), "candidates[0].families[0]", 16, `"normall" is not a family`, `did you mean "normal"?`},
		{"duplicate family", rep(`["normal"]`, `["normal", "normal"]`), "candidates[0].families[1]", 16, "listed twice", ""},
		{"dangling dataset reference", rep(`dataset = "life"`, `dataset = "lif"`), "analysis[0].dataset", 19, `no [[dataset]] is named "lif"`, `did you mean "life"?`},
		{"dangling candidates reference", rep(`candidates = "lifetime"`, `candidates = "other"`), "analysis[0].candidates", 20, `no [[candidates]] set`, `lifetime`},
		{"status column without codes", rep(`right = ["+"]`, ``), "dataset[0].status_column", 11, "needs left or right", ""},
		{"codes without status column", rep(`status_column = "state"`, ``), "dataset[0].right", 0, "needs status_column", ""},
		{"empty censoring code", rep(`right = ["+"]`, `right = [""]`), "dataset[0].right[0]", 12, "cannot be empty", ""},
		{"code on both sides", rep(`right = ["+"]`, "right = [\"+\"]\nleft = [\"+\"]"), "dataset[0].right[0]", 0, "already listed", ""},
		{"missing data file", rep(`data/life.csv`, `data/lives.csv`), "dataset[0].file", 9, "cannot be read", ""},
		{"data file outside the project", rep(`data/life.csv`, `../life.csv`), "dataset[0].file", 9, "not a path inside the project folder", ""},
		{"interval with column", rep(`status_column = "state"`+"\n"+`right = ["+"]`, "lower_column = \"lo\"\nupper_column = \"hi\""), "dataset[0].column", 10, "cannot be given together", ""},
		{"half an interval", rep(`column = "hours"`+"\n"+`status_column = "state"`+"\n"+`right = ["+"]`, "lower_column = \"lo\""), "dataset[0].upper_column", 0, "is missing", ""},
		{"two delimiter characters", rep(`column = "hours"`, "column = \"hours\"\ndelimiter = \";;\""), "dataset[0].delimiter", 11, "not a single character", ""},
		{"duplicate dataset name", app("\n[[dataset]]\nname = \"life\"\nfile = \"data/life.csv\"\ncolumn = \"hours\"\n"), "dataset[1].name", 25, "already the name of dataset[0]", ""},
		{"duplicate analysis name", app("\n[[analysis]]\ndataset = \"life\"\ncandidates = \"lifetime\"\n"), "analysis[1].name", 24, `"life" is already the name of analysis[0]`, "own name"},
		{"mixed kinds", rep(`["normal"]`, `["normal", "poisson"]`), "candidates[0].families", 16, "mixes discrete families", "separate"},
		{"fixed of a family not in the set", rep(`families = ["normal"]`, "families = [\"normal\"]\nfixed = { gev = { shape = 0.0 } }"), "candidates[0].fixed.gev", 17, "not among this set's families", ""},
		{"fixed unknown parameter", rep(`families = ["normal"]`, "families = [\"normal\"]\nfixed = { normal = { sigm = 1.0 } }"), "candidates[0].fixed.normal.sigm", 17, `normal has no parameter "sigm"`, `did you mean "sigma"?`},
		{"fixed parameter that cannot be fixed", rep(`families = ["normal"]`, "families = [\"normal\", \"gev\"]\nfixed = { gev = { shape = 0.0 } }"), "candidates[0].fixed.gev.shape", 17, "gev's shape cannot be fixed", "gpd's threshold, weibull3's threshold, lognormal3's threshold"},
		{"fixed shape of a threshold family", rep(`families = ["normal"]`, "families = [\"weibull3\"]\nfixed = { weibull3 = { shape = 2.0 } }"), "candidates[0].fixed.weibull3.shape", 17, "weibull3's shape cannot be fixed", "only the threshold of weibull3 can be fixed"},
		{"gpd without its threshold", rep(`families = ["normal"]`, `families = ["normal", "gpd"]`), "candidates[0].families[1]", 16, "gpd needs its threshold fixed", "fixed = { gpd = { threshold = … } }"},
		{"gpd with another parameter fixed only", rep(`families = ["normal"]`, "families = [\"gpd\"]\nfixed = { gpd = { shape = 0.1 } }"), "candidates[0].families[0]", 16, "gpd needs its threshold fixed", ""},
		{"unknown report table format", app("\n[report]\ntables = [\"html\"]\n"), "report.tables[0]", 25, `"html" is not a table format`, ""},
		{"no analysis", func(s string) string { return s[:strings.Index(s, "[[analysis]]")] }, "analysis", 0, "nothing to fit", ""},
		{"invalid TOML", rep(`seed = 7`, `seed = = 7`), "settings.seed", 4, "not valid TOML", ""},
		{"trials with a continuous family", rep(`status_column = "state"`+"\n"+`right = ["+"]`, `trials_column = "state"`), "analysis[0].candidates", 0, "continuous family", ""},
		{"where without equals", rep(`column = "hours"`, "column = \"hours\"\nwhere = { column = \"site\" }"), "dataset[0].where.equals", 11, "is required", ""},
		{"analysis array element of wrong type", rep(`quantiles = [0.1, 0.5]`, `quantiles = [0.1, "half"]`), "analysis[0].quantiles[1]", 21, "is a string; it must be a number",
			"write each element as a number, without quotes, e.g. quantiles = [0.1, 0.5]"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := writeProject(t, c.edit(goodProject))
			_, err := Load(path)
			var pes ProjectErrors
			if !errors.As(err, &pes) {
				t.Fatalf("error %v (%T), want ProjectErrors", err, err)
			}
			var found *ProjectError
			for _, e := range pes {
				if e.Key == c.key && strings.Contains(e.Msg, c.msg) {
					found = e
				}
			}
			if found == nil {
				t.Fatalf("no error for key %q with %q; got:\n%v", c.key, c.msg, err)
			}
			if c.line != 0 && found.Line != c.line {
				t.Errorf("line %d, want %d: %v", found.Line, c.line, found)
			}
			if !strings.Contains(found.Hint, c.hint) {
				t.Errorf("hint %q lacks %q", found.Hint, c.hint)
			}
			if !strings.HasPrefix(found.Error(), path) {
				t.Errorf("message %q does not start with the file", found.Error())
			}
		})
	}
}

func rep(old, new string) func(string) string {
	return func(s string) string {
		if !strings.Contains(s, old) {
			panic("test edit does not apply: " + old)
		}
		return strings.Replace(s, old, new, 1)
	}
}

func app(tail string) func(string) string { return func(s string) string { return s + tail } }

func TestScanKeyLines(t *testing.T) {
	src := `name = "x"   # top
[settings]
seed = 1
[[dataset]]
name = "a"
where = { column = "site", equals = "n" }
families = [
  "a = b",
  "c",
]
[[dataset]]
name = "b"
[dataset.where]
column = "w"
s = """
fake = 1
"""
after = 2
`
	kl := scanKeyLines([]byte(src))
	for path, want := range map[string]int{
		"name": 1, "settings.seed": 3, "dataset[0].name": 5, "dataset[0].where.column": 6,
		"dataset[1].name": 12, "dataset[1].where.column": 14, "dataset[1].where.after": 18,
		"dataset[0].families[1]": 7, "dataset[1]": 11, "nothing.here": 0,
	} {
		if got := kl.line(path); got != want {
			t.Errorf("line(%q) = %d, want %d", path, got, want)
		}
	}
}

// TestKeyExamplesAreTOML: the examples that wrong-type hints show are
// valid TOML values of the key (strings quoted, lists in brackets).
func TestKeyExamplesAreTOML(t *testing.T) {
	for k, ex := range keyExamples {
		var v map[string]any
		if _, err := toml.Decode(k+" = "+ex, &v); err != nil {
			t.Errorf("%s = %s: %v", k, ex, err)
		}
	}
}
