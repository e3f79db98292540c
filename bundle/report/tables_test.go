package report

import (
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"fitseal/templates"
)

func renderAll(t *testing.T, dir string, formats ...string) map[string]string {
	t.Helper()
	tmpls, err := templates.LoadTables(dir)
	if err != nil {
		t.Fatal(err)
	}
	files, err := RenderTables(tmpls, []Analysis{sealAnalysis(), rainAnalysis()}, formats)
	if err != nil {
		t.Fatal(err)
	}
	out := map[string]string{}
	for _, f := range files {
		out[f.Name] = string(f.Data)
	}
	return out
}

func TestRenderTablesMarkdownRows(t *testing.T) {
	got := renderAll(t, "", "md")
	var names []string
	for n := range got {
		names = append(names, n)
	}
	want := []string{"seal-life-derived.md", "seal-life-parameters.md", "seal-life-ranking.md", "storm_rainfall-derived.md", "storm_rainfall-parameters.md", "storm_rainfall-ranking.md"}
	if !reflect.DeepEqual(sorted(names), want) {
		t.Fatalf("files %v, want %v", sorted(names), want)
	}
	for file, lines := range map[string][]string{
		"seal-life-ranking.md": {
			"**Table: candidate distributions for seal-life (h), ranked by AICc** (n = 36)",
			"| Rank | Family | k | ln L | AICc | Δ | Weight | Support | Adequacy p |",
			"| 1 | weibull | 2 | -181.23 | 366.83 | 0.00 | 0.612 | substantial | 0.415 |",
			"| 2 | gamma | 2 | -181.90 | 368.16 | 1.33 | 0.315 | substantial | – |",
			"| 3 | exponential | 1 | -186.20 | 374.52 | 7.69 | 0.013 | little | 0.004 |",
			"- Not ranked: lognormal: did not converge: iteration cap reached",
		},
		"seal-life-parameters.md": {
			"**Table: parameter estimates for seal-life, with 95 % intervals**",
			"| weibull | shape | 1.812 | 0.310 | 1.250 | 2.490 | profile |",
			"| weibull | scale | 9013 | 850 | 7600 | 11200 | profile |",
			"| exponential | rate | 1.234e-04 | 2.80e-05 | 7.900e-05 | 1.900e-04 | profile |",
		},
		"seal-life-derived.md": {
			"| weibull | quantile 0.1 | 2612 | 1700 | 3400 | profile |",
			"| weibull | P(X > 4000) | 0.8123 | 0.7000 | 0.9000 | profile |",
			"| *model average* | quantile 0.1 | 2580 | 1650 | 3420 | model-averaged (Burnham & Anderson 2002) |",
		},
		"storm_rainfall-ranking.md": {
			"ranked by AIC** (n = 38)",
			"ranked by AIC: AICc is undefined for one family (n ≤ k + 1)",
		},
		"storm_rainfall-derived.md": {
			"with 90 % intervals",
			"| gumbel | return level 100 yr | 52.40 | 45.10 | 61.90 | profile |",
		},
	} {
		for _, l := range lines {
			if !strings.Contains(got[file], l) {
				t.Errorf("%s lacks %q:\n%s", file, l, got[file])
			}
		}
	}
}

func TestRenderTablesLaTeX(t *testing.T) {
	got := renderAll(t, "", "tex")
	r := got["storm_rainfall-ranking.tex"]
	for _, l := range []string{
		`\caption{Candidate distributions for storm\_rainfall (mm), ranked by AIC ($n = 38$).}`,
		`\label{tab:storm_rainfall:ranking}`,
		`\toprule`, `\midrule`, `\bottomrule`,
		`1 & gumbel & 2 & \num{-130.10} & \num{264.20} & \num{0.00} & \num{0.700} & {\raggedright substantial\par} & \num{0.600} \\`,
	} {
		if !strings.Contains(r, l) {
			t.Errorf("ranking.tex lacks %q:\n%s", l, r)
		}
	}
	s := got["seal-life-ranking.tex"]
	if !strings.Contains(s, `2 & gamma & 2 & \num{-181.90} & \num{368.16} & \num{1.33} & \num{0.315} & {\raggedright substantial\par} & {--} \\`) {
		t.Errorf("a missing p-value must be {--}:\n%s", s)
	}
	p := got["seal-life-parameters.tex"]
	if !strings.Contains(p, `with 95\,\% profile intervals.}`) || strings.Contains(p, "Interval") {
		t.Errorf("one interval method must be named in the caption, not on every row:\n%s", p)
	}
	mixed := sealAnalysis()
	mixed.Parameters[2].Method = "wald"
	mixed.Parameters = append(mixed.Parameters, Parameter{Family: "gpd", Name: "threshold", Estimate: 30, StdError: math.NaN(), Lower: math.NaN(), Upper: math.NaN(), Fixed: true})
	tmpls, _ := templates.LoadTables("")
	files, err := RenderTables(tmpls, []Analysis{mixed}, []string{"tex"})
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if f.Name == "seal-life-parameters.tex" {
			for _, want := range []string{"& Upper & Int. \\\\", `\num{1.900e-04} & b \\`, `gpd & threshold & \num{30.00} & fixed & {--} & {--} & fixed \\`, `Int.: interval method, (a) profile; (b) wald.`} {
				if !strings.Contains(string(f.Data), want) {
					t.Errorf("mixed methods: parameters.tex lacks %q:\n%s", want, f.Data)
				}
			}
		}
	}
	d := got["seal-life-derived.tex"]
	for _, l := range []string{`\emph{model average} & quantile $p = 0.1$ & \num{2580} & \num{1650} & \num{3420} & b \\`, `$P(X > 4000)$ & \num{0.8123}`,
		`Int.: interval method, (a) profile; (b) model-averaged (Burnham \& Anderson 2002).`} {
		if !strings.Contains(d, l) {
			t.Errorf("derived.tex lacks %q:\n%s", l, d)
		}
	}
	// Braces must balance in every LaTeX table, or \input breaks a thesis.
	for name, body := range got {
		if strings.Count(body, "{")-strings.Count(body, `\{`) != strings.Count(body, "}")-strings.Count(body, `\}`) {
			t.Errorf("%s: unbalanced braces", name)
		}
	}
}

func TestRenderTablesProjectTemplate(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "ranking.md.tmpl"), []byte("best of {{.A.Name}}: {{.A.Best}}\n"), 0o644)
	got := renderAll(t, dir, "md")
	if got["seal-life-ranking.md"] != "best of seal-life: weibull\n" {
		t.Errorf("project template not used: %q", got["seal-life-ranking.md"])
	}
	if !strings.Contains(got["seal-life-parameters.md"], "| weibull | shape |") {
		t.Error("embedded parameters template not used beside the project's own")
	}
	os.WriteFile(filepath.Join(dir, "ranking.md.tmpl"), []byte("{{.A.NoSuchField}}\n"), 0o644)
	tmpls, _ := templates.LoadTables(dir)
	if _, err := RenderTables(tmpls, []Analysis{sealAnalysis()}, []string{"md"}); err == nil || !strings.Contains(err.Error(), filepath.Join(dir, "ranking.md.tmpl")) {
		t.Errorf("a failing project template must name its file: %v", err)
	}
}

func TestSlugs(t *testing.T) {
	got := Slugs([]Analysis{{Name: "nitrate/MW-1"}, {Name: "nitrate_MW-1"}, {Name: "a b"}, {Name: ".."}, {Name: "nitrate/MW-1"}})
	want := []string{"nitrate_MW-1", "nitrate_MW-1-2", "a_b", "analysis", "nitrate_MW-1-3"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("Slugs = %v, want %v", got, want)
	}
}

func sorted(s []string) []string {
	out := append([]string(nil), s...)
	for i := range out {
		for j := i + 1; j < len(out); j++ {
			if out[j] < out[i] {
				out[i], out[j] = out[j], out[i]
			}
		}
	}
	return out
}
