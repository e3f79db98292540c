package report

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"fitseal/runner"
	"fitseal/templates"
)

// TestHundredAnalysesEndToEnd times the whole reading side for a project of
// 100 analyses (one dataset split into 100 groups of 40 values, 4 of them
// non-detects on average, three candidate families each): the runner's
// fits, then every figure (SVG and PNG), every table and the PDF. It runs
// with FITSEAL_LONG=1; the times measured are in its log.
func TestHundredAnalysesEndToEnd(t *testing.T) {
	if os.Getenv("FITSEAL_LONG") != "1" {
		t.Skip("set FITSEAL_LONG=1 to time a 100-analysis report")
	}
	dir := t.TempDir()
	r := rand.New(rand.NewPCG(100, 100))
	var csv strings.Builder
	csv.WriteString("site,value,flag\n")
	for g := range 100 {
		median := 1 + 9*r.Float64()
		for range 40 {
			x := median * math.Exp(0.6*r.NormFloat64())
			if x < 0.5*median {
				fmt.Fprintf(&csv, "S-%03d,%.3f,<\n", g+1, 0.5*median)
				continue
			}
			fmt.Fprintf(&csv, "S-%03d,%.3f,\n", g+1, x)
		}
	}
	os.MkdirAll(filepath.Join(dir, "data"), 0o755)
	os.WriteFile(filepath.Join(dir, "data", "sites.csv"), []byte(csv.String()), 0o644)
	os.WriteFile(filepath.Join(dir, "fitseal.toml"), []byte(`name = "hundred"
[settings]
bootstrap = 0
[[dataset]]
name = "sites"
file = "data/sites.csv"
column = "value"
units = "mg/L"
status_column = "flag"
left = ["<"]
split_by = "site"
[[candidates]]
name = "c"
families = ["lognormal", "gamma", "weibull"]
[[analysis]]
dataset = "sites"
candidates = "c"
quantiles = [0.95]
`), 0o644)
	p, err := runner.Load(filepath.Join(dir, "fitseal.toml"))
	if err != nil {
		t.Fatal(err)
	}
	t0 := time.Now()
	res, err := runner.Run(context.Background(), p, runner.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	t1 := time.Now()
	rep := FromResults(res, Identity{Created: testCreated, ToolVersion: "test"})
	slugs := Slugs(rep.Analyses)
	nfig := 0
	for i := range rep.Analyses {
		figs, err := RenderFigures(slugs[i], FigureInputFor(res, i))
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range figs {
			rep.Analyses[i].Figures = append(rep.Analyses[i].Figures, f.ForPDF())
		}
		nfig += len(figs)
	}
	t2 := time.Now()
	tmpls, _ := templates.LoadTables("")
	tables, err := RenderTables(tmpls, rep.Analyses, []string{"md", "tex"})
	if err != nil {
		t.Fatal(err)
	}
	t3 := time.Now()
	pdf, err := RenderPDF(rep, PDFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	t4 := time.Now()
	t.Logf("%d analyses: fits %v; %d figures (SVG+PNG) %v; %d tables %v; PDF (%d bytes) %v",
		len(rep.Analyses), t1.Sub(t0), nfig, t2.Sub(t1), len(tables), t3.Sub(t2), len(pdf), t4.Sub(t3))
	if len(rep.Analyses) != 100 {
		t.Errorf("%d analyses, want 100", len(rep.Analyses))
	}
	if dir := os.Getenv("FITSEAL_KEEP_PDF"); dir != "" {
		os.WriteFile(filepath.Join(dir, "hundred.pdf"), pdf, 0o644)
	}
}
