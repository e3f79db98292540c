package bundle

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"maps"
	"slices"
	"strings"
	"testing"
)

// TestChangedLines: a changed text input is shown by the lines that
// differ, numbered as in each version and quoted, so that a corrected value
// can be found without unpacking both bundles; binary inputs get nothing
// beyond their hashes.
func TestChangedLines(t *testing.T) {
	many := func(prefix string, n int) string {
		var b strings.Builder
		for i := range n {
			b.WriteString(prefix + strings.Repeat("x", i) + "\n")
		}
		return b.String()
	}
	cases := []struct {
		name, a, b, want string
	}{
		{"one value corrected",
			"id,hours\nS1,120\nS2,2987\nS3,95\n", "id,hours\nS1,120\nS2,2897\nS3,95\n",
			`; line 3: "S2,2987" in A, "S2,2897" in B`},
		{"rows added at the end",
			"h\n1\n", "h\n1\n2\n3\n",
			`; lines 3–4 added in B after line 2: "2" "3"`},
		{"a row removed from the middle",
			"h\n1\n2\n3\n", "h\n1\n3\n",
			`; line 3 of A removed in B: "2"`},
		{"two lines replaced by three",
			"h\na\nb\nz\n", "h\nc\nd\ne\nz\n",
			`; lines 2–3 of A, 2–4 of B: "a" "b" in A, "c" "d" "e" in B`},
		{"many lines quoted up to the limit",
			"h\n", "h\n" + many("r", 10),
			`; lines 2–11 added in B after line 1: "r" "rx" "rxx" … (10 lines in all)`},
		{"only the final line break differs",
			"h\n1", "h\n1\n",
			"; the same lines, but only one version ends with a line break"},
		{"binary input", "a\x00b", "a\x00c", ""},
		{"not UTF-8", "a\xffb", "a\xffc", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := changedLines([]byte(c.a), []byte(c.b)); got != c.want {
				t.Errorf("got  %s\nwant %s", got, c.want)
			}
		})
	}
}

// TestRepeatsATable: where the result tables differ, diff counts the
// differences of results.json that repeat a setting, a table cell or a row,
// and lists the rest, the record's own values, which no table shows.
func TestRepeatsATable(t *testing.T) {
	headers := map[string]map[string]bool{
		"fits.csv":       {"analysis": true, "dataset": true, "n": true, "loglik": true, "iterations": true},
		"parameters.csv": {"analysis": true, "family": true, "parameter": true, "estimate": true},
		"derived.csv":    {"analysis": true, "family": true, "estimate": true, "ci_lower": true},
		"gof.csv":        {"analysis": true, "family": true, "statistic": true, "value": true},
	}
	cases := []struct {
		path string
		want bool
	}{
		{"analyses[0].fits[1].loglik", true},
		{"analyses[name=a.b/MW-1].fits[family=gev].loglik", true},
		{"analyses[0].fits[1].optimizer.iterations", true},
		{"analyses[0].fits[1].parameters[0].estimate", true},
		{"analyses[0].fits[1].parameters[0].name", true},
		{"analyses[0].derived[2].ci_lower", true},
		{"analyses[0].gof[family=gev, statistic=ks].value", true},
		{"analyses[name=depth]", true},
		{"analyses[0].fits[family=weibull]", true},
		{"analyses[0].derived[family=weibull, quantity=quantile, argument=0.5]", true},
		{"analyses[0].n", true},
		{"analyses[0].name", true},
		{"analyses[0].derived[2].std_error", false},
		{"analyses[0].fits[1].optimizer.reason", false},
		{"analyses[0].fits[1].parameters[0].ci_lower_open", false},
		{"settings.confidence", true},
		{"datasets[name=depth]", false},
		{"datasets[0].missing", false},
	}
	for _, c := range cases {
		if got := repeatsATable(c.path, headers); got != c.want {
			t.Errorf("%s: %v, want %v", c.path, got, c.want)
		}
	}
}

// TestDiffLabels: each changed value of the results is labelled by what it
// is: a number (one side may be empty or null), a text (a criterion, a
// note, true or false), or a result row or record only one bundle has.
// Criterion aicc → bic was labelled "number" before.
func TestDiffLabels(t *testing.T) {
	a := sealedBag(t, sealContents(t, runSealProject(t, 2), goldenTool))
	const fits, results = "data/results/fits.csv", "data/results/results.json"
	// setCell sets a cell of a result table's first data row by column name.
	setCell := func(column, value string) func(t *testing.T, files map[string][]byte) {
		return func(t *testing.T, files map[string][]byte) {
			rows, err := csv.NewReader(bytes.NewReader(files[fits])).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			c := slices.Index(rows[0], column)
			if c < 0 {
				t.Fatalf("no column %s in %s", column, fits)
			}
			rows[1][c] = value
			var b bytes.Buffer
			if err := csv.NewWriter(&b).WriteAll(rows); err != nil {
				t.Fatal(err)
			}
			files[fits] = b.Bytes()
		}
	}
	// setJSON sets a value of results.json's first analysis (fit when
	// fit is true).
	setJSON := func(fit bool, key string, value any) func(t *testing.T, files map[string][]byte) {
		return func(t *testing.T, files map[string][]byte) {
			var rec map[string]any
			if err := json.Unmarshal(files[results], &rec); err != nil {
				t.Fatal(err)
			}
			obj := rec["analyses"].([]any)[0].(map[string]any)
			if fit {
				obj = obj["fits"].([]any)[0].(map[string]any)
			}
			obj[key] = value
			files[results], _ = json.Marshal(rec)
		}
	}
	var rec map[string]any
	if err := json.Unmarshal(a.Files[results], &rec); err != nil {
		t.Fatal(err)
	}
	bic := jsonText(rec["analyses"].([]any)[0].(map[string]any)["fits"].([]any)[0].(map[string]any)["bic"])
	tests := []struct {
		name string
		edit func(t *testing.T, files map[string][]byte)
		want string // the one substantive line, "KIND: TEXT"
	}{
		{"criterion of a table row", setCell("criterion", "bic"),
			"text: data/results/fits.csv row 1 (analysis=bearings, family=weibull), column criterion: A aicc, B bic"},
		{"note of a table row", setCell("note", "edited"),
			"text: data/results/fits.csv row 1 (analysis=bearings, family=weibull), column note: A (empty), B edited"},
		{"true or false", setCell("converged", "false"),
			"text: data/results/fits.csv row 1 (analysis=bearings, family=weibull), column converged: A true, B false"},
		{"a count", setCell("n", "24"),
			"number: data/results/fits.csv row 1 (analysis=bearings, family=weibull), column n: A 23, B 24"},
		{"a number emptied", setCell("k", ""),
			"number: data/results/fits.csv row 1 (analysis=bearings, family=weibull), column k: A 2, B (empty)"},
		{"a row in one bundle only", func(t *testing.T, files map[string][]byte) {
			header, rest, _ := bytes.Cut(files[fits], []byte("\n"))
			_, rest, _ = bytes.Cut(rest, []byte("\n"))
			files[fits] = append(append(bytes.Clone(header), '\n'), rest...)
		}, "result: data/results/fits.csv row 1 (analysis=bearings, family=weibull) of A: not in B"},
		{"criterion in results.json", setJSON(false, "criterion", "bic"),
			`text: data/results/results.json analyses[0].criterion: "aicc" in A, "bic" in B`},
		{"a number of results.json made null", setJSON(true, "bic", nil),
			"number: data/results/results.json analyses[0].fits[0].bic: " + bic + " in A, null in B"},
		{"an object in one bundle only", setJSON(false, "extra", map[string]any{"x": 1}),
			`result: data/results/results.json analyses[0].extra: (absent) in A, {"x":1} in B`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b := &Bag{Name: a.Name, Files: maps.Clone(a.Files)}
			tt.edit(t, b.Files)
			var got []string
			for _, it := range Diff(a, b) {
				if it.Substantive {
					got = append(got, it.Kind+": "+it.Text)
				}
			}
			if len(got) != 1 || got[0] != tt.want {
				t.Errorf("got\n%s\nwant\n%s", strings.Join(got, "\n"), tt.want)
			}
		})
	}
}
