package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"fitseal/runner"
)

var (
	footnoteLine = regexp.MustCompile(`^\[(\d+)\] (.*)$`)
	marker       = regexp.MustCompile(`(?:^|  )\[(\d+)\](?:  |$)`)
)

// checkShowLayout checks show's output: no line ends in a blank; each
// table's markers [n] are numbered 1, 2, … in the order first seen, and
// the footnote lines under it are exactly [1] … [k], each text once; and
// every line other than a footnote or the prose line on goodness of fit is
// at most width characters wide.
func checkShowLayout(t *testing.T, show string, width int) {
	t.Helper()
	for i, paragraph := range strings.Split(show, "\n\n") {
		var lines, notes []string
		for _, l := range strings.Split(paragraph, "\n") {
			if strings.HasSuffix(l, " ") {
				t.Errorf("line ends in a blank: %q", l)
			}
			if m := footnoteLine.FindStringSubmatch(l); m != nil {
				if m[1] != strconv.Itoa(len(notes)+1) {
					t.Errorf("paragraph %d: footnote %s follows %d:\n%s", i, m[1], len(notes), paragraph)
				}
				notes = append(notes, m[2])
				continue
			}
			if w := utf8.RuneCountInString(l); w > width && !strings.HasPrefix(l, "goodness of fit: none: ") {
				t.Errorf("line of %d characters, more than %d:\n%s", w, width, l)
			}
			if len(notes) == 0 { // the table's lines; remarks may follow its notes
				lines = append(lines, l)
			}
		}
		seen := 0
		for _, l := range lines {
			for _, m := range marker.FindAllStringSubmatch(l, -1) {
				n, _ := strconv.Atoi(m[1])
				switch {
				case n == seen+1:
					seen = n
				case n > seen:
					t.Errorf("paragraph %d: marker [%d] before [%d]:\n%s", i, n, seen+1, paragraph)
				}
			}
		}
		if seen != len(notes) {
			t.Errorf("paragraph %d: markers up to [%d], %d footnotes:\n%s", i, seen, len(notes), paragraph)
		}
		for a := range notes {
			for b := range a {
				if notes[a] == notes[b] {
					t.Errorf("paragraph %d: footnotes [%d] and [%d] say the same: %s", i, b+1, a+1, notes[a])
				}
			}
		}
	}
}

// checkEveryNote checks that every note and method text of the bundle's
// results (results.json, as show --json prints it), and each fit's reason
// for having no goodness-of-fit statistic, appears in show; it returns how
// many distinct texts there are.
func checkEveryNote(t *testing.T, bundlePath, show string) (texts int) {
	t.Helper()
	var rec struct {
		Results struct {
			Analyses []struct {
				Note string `json:"note"`
				Fits []struct {
					Note       string `json:"note"`
					Inference  string `json:"inference_note"`
					Parameters []struct {
						Note     string `json:"note"`
						CIMethod string `json:"ci_method"`
						Fixed    bool   `json:"fixed"`
					} `json:"parameters"`
				} `json:"fits"`
				Derived []struct {
					Note     string `json:"note"`
					CIMethod string `json:"ci_method"`
				} `json:"derived"`
				GOF []struct {
					Note string `json:"note"`
				} `json:"gof"`
			} `json:"analyses"`
		} `json:"results"`
	}
	if err := json.Unmarshal([]byte(mustCLI(t, 0, "show", "--json", bundlePath)), &rec); err != nil {
		t.Fatal(err)
	}
	want := map[string]bool{}
	for _, a := range rec.Results.Analyses {
		want[a.Note] = true
		for _, f := range a.Fits {
			want[f.Note] = true
			if _, after, ok := strings.Cut(f.Inference, runner.NoGOFNote); ok {
				reason, _, _ := strings.Cut(after, "; ") // why there is no goodness-of-fit row
				want[reason] = true
			}
			for _, p := range f.Parameters {
				want[p.Note] = true
				if !p.Fixed {
					want[p.CIMethod] = true
				}
			}
		}
		for _, d := range a.Derived {
			want[d.Note], want[d.CIMethod] = true, true
		}
		for _, g := range a.GOF {
			want[g.Note] = true
		}
	}
	delete(want, "")
	for text := range want {
		if !strings.Contains(show, text) {
			t.Errorf("show lacks %q", text)
		}
	}
	return len(want)
}

// TestShowFootnotesKeepEveryNote: on a project whose results carry many
// notes (gpd's conditional quantities, counts with different numbers of
// trials, a fit at its limiting family without a goodness-of-fit row, a
// family that cannot take a 0, an infinite statistic; invented data), show writes long methods and notes as
// footnotes per table, numbered in order and shared, keeps every text of
// the results, fits its tables in 120 columns, and gives the same bytes
// each time.
func TestShowFootnotesKeepEveryNote(t *testing.T) {
	t.Setenv("SOURCE_DATE_EPOCH", "1764633600")
	dir := t.TempDir()
	write := func(name, content string) {
		t.Helper()
		os.MkdirAll(filepath.Dir(filepath.Join(dir, name)), 0o755)
		if err := os.WriteFile(filepath.Join(dir, name), []byte(content), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("fitseal.toml", `name = "many-notes"
[settings]
bootstrap = 19
[[dataset]]
name = "peaks"
file = "data/peaks.csv"
column = "peak"
[[dataset]]
name = "hits"
file = "data/hits.csv"
column = "k"
trials_column = "n"
[[dataset]]
name = "zeros"
file = "data/zeros.csv"
column = "x"
[[candidates]]
name = "excess"
families = ["gpd", "exponential"]
fixed = { gpd = { threshold = 30.0 } }
[[candidates]]
name = "hits"
families = ["binomial", "betabinomial"]
[[candidates]]
name = "zeros"
families = ["exponential", "lognormal", "normal"]
[[analysis]]
dataset = "peaks"
candidates = "excess"
quantiles = [0.9]
thresholds = [60.0]
[[analysis]]
dataset = "hits"
candidates = "hits"
quantiles = [0.5]
thresholds = [3.0]
[[analysis]]
dataset = "zeros"
candidates = "zeros"
quantiles = [0.5]
`)
	write("data/peaks.csv", "peak\n30.4\n31.2\n32.9\n33.1\n34.8\n35.5\n36.0\n37.7\n39.3\n40.1\n41.8\n43.6\n45.0\n47.2\n50.9\n53.3\n58.4\n64.1\n71.9\n88.5\n")
	write("data/hits.csv", "k,n\n1,8\n3,12\n0,9\n2,15\n4,20\n1,10\n5,18\n2,11\n0,8\n3,14\n6,19\n2,9\n1,12\n3,16\n2,10\n")
	write("data/zeros.csv", "x\n0\n0.4\n1.3\n0.2\n2.8\n0.9\n0\n1.7\n0.6\n3.4\n0.1\n1.1\n")
	key := filepath.Join(dir, "key")
	mustCLI(t, 0, "keygen", "-o", key)
	out := filepath.Join(dir, "b.tar.gz")
	mustCLI(t, 0, "run", "-q", "--key", key, "-o", out, filepath.Join(dir, "fitseal.toml"))
	show := mustCLI(t, 0, "show", out)
	if again := mustCLI(t, 0, "show", out); again != show {
		t.Errorf("show differs between two calls:\n%s\n---\n%s", show, again)
	}
	checkShowLayout(t, show, 120)
	if n := checkEveryNote(t, out, show); n < 8 {
		t.Errorf("the results carry %d distinct notes and methods; the test needs more to mean something", n)
	}
	// The notes this project is made to give, each once per table.
	for _, want := range []string{
		"\n[1] not applicable: needs values > 0, the data have the value 0\n",
		"\n[1] the observations have different numbers of trials, so the quantity has no single value: not given\n",
		"given X > 30: gpd models the excesses over its threshold 30",
	} {
		if c := strings.Count(show, want); c != 1 {
			t.Errorf("show has %q %d times, want once:\n%s", want, c, show)
		}
	}
	// In the peaks' derived table, gpd's rows share one marker for their
	// method, and their notes (each quantity's own rule for an
	// unconditional value) have one each.
	var gpd []string
	for _, l := range strings.Split(show, "\n") {
		if f := strings.Fields(l); len(f) > 2 && f[0] == "gpd" && (f[1] == "quantile" || f[1] == "exceedance") {
			gpd = append(gpd, strings.Join(f[len(f)-2:], " "))
		}
	}
	marks := regexp.MustCompile(`^(\[\d+\]) (\[\d+\])$`)
	var m [2][]string
	for i := range min(len(gpd), 2) {
		m[i] = marks.FindStringSubmatch(gpd[i])
	}
	if len(gpd) != 2 || m[0] == nil || m[1] == nil || m[0][1] != m[1][1] || m[0][2] == m[1][2] {
		t.Errorf("gpd's derived rows end in %q, want one method marker on both and a note marker of each:\n%s", gpd, show)
	}
}
