package report

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"fitseal/fitters"
)

// figuresOf renders an input's figures for embedding.
func figuresOf(t testing.TB, in FigureInput) []Figure {
	t.Helper()
	figs, err := RenderFigures(slug(in.Analysis), in)
	if err != nil {
		t.Fatal(err)
	}
	out := make([]Figure, len(figs))
	for i, f := range figs {
		out[i] = f.ForPDF()
	}
	return out
}

var (
	fixtureOnce    sync.Once
	fixtureFigures [][]Figure
)

// testReport builds a report of n analyses cycling through the seal, rain
// and defect fixtures; figures are rendered once per fixture and reused.
func testReport(t testing.TB, n int) *Report {
	fixtureOnce.Do(func() {
		fixtureFigures = [][]Figure{figuresOf(t, sealFigures(1)), figuresOf(t, rainFigures()), figuresOf(t, defectFigures())}
	})
	seal, rain := sealAnalysis(), rainAnalysis()
	seal.Figures = fixtureFigures[0]
	rain.Figures = fixtureFigures[1]
	defects := Analysis{Name: "defects", Dataset: "defects", Units: "defects per batch", Discrete: true, Criterion: "aicc", Confidence: 0.95,
		Summary: DataSummary{N: 60, Exact: 60, Min: 0, Median: 2, Max: 12},
		Ranking: []Candidate{{Family: "negbinomial", Rank: 1, K: 2, LogLik: -120.5, Criterion: 245.2, Delta: 0, Weight: 0.98, Support: "substantial", Statistic: "chisq", AdequacyP: 0.31, Converged: true},
			{Family: "poisson", Rank: 2, K: 1, LogLik: -126.4, Criterion: 254.9, Delta: 9.7, Weight: 0.02, Support: "little", Statistic: "chisq", AdequacyP: 0.01, Converged: true}},
		Figures: fixtureFigures[2]}
	base := []Analysis{seal, rain, defects}
	r := &Report{
		Name:        "millbrook-asset-review",
		Description: "Demo with invented data: seal lives, storm rainfall, well nitrate and inspection defects.",
		Identity: Identity{
			TagManifestSHA256: strings.Repeat("3f9a", 16), SignerFingerprint: "SHA256:6bq0uZ1c0qJ1ZyT0yI8cVZ0o0k8XxkXo7jv0iSvx2mM",
			Created: testCreated, GitCommit: "0123456789abcdef0123456789abcdef01234567", GitBranch: "main", GitDirty: true,
			ToolVersion: "0.1.0", GoVersion: "go1.26.8", Platform: "linux/amd64",
		},
		Settings: Settings{Seed: 20261202, Criterion: "aicc", Confidence: 0.95, Intervals: "profile", Bootstrap: 199},
	}
	for i := range n {
		a := base[i%3]
		if n > 3 {
			a.Name = fmt.Sprintf("%s/G-%03d", a.Name, i+1)
		}
		r.Analyses = append(r.Analyses, a)
	}
	return r
}

func TestRenderPDFDeterministic(t *testing.T) {
	r := testReport(t, 3)
	a, err := RenderPDF(r, PDFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	b, err := RenderPDF(testReport(t, 3), PDFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a, b) {
		t.Fatal("two renderings of the same report differ")
	}
	if !bytes.Contains(a, []byte("/CreationDate (D:20261202030405")) {
		t.Error("the creation date is not the report's created time")
	}
	if bytes.Contains(a, []byte("/ID")) {
		t.Error("the PDF carries a file identifier; it must hold nothing random")
	}
	if dir := os.Getenv("FITSEAL_KEEP_PDF"); dir != "" {
		os.WriteFile(filepath.Join(dir, "report-3.pdf"), a, 0o644)
	}
}

func pdftotext(t *testing.T, pdf []byte, pages ...string) string {
	t.Helper()
	bin, err := exec.LookPath("pdftotext")
	if err != nil {
		t.Skip("pdftotext (Debian's poppler-utils) is not installed")
	}
	file := filepath.Join(t.TempDir(), "r.pdf")
	if err := os.WriteFile(file, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	args := append(append([]string{"-layout"}, pages...), file, "-")
	out, err := exec.Command(bin, args...).Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	return string(out)
}

func TestRenderPDFText(t *testing.T) {
	r := testReport(t, 5)
	pdf, err := RenderPDF(r, PDFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	text := pdftotext(t, pdf)
	flat := strings.Join(strings.Fields(text), " ")
	for _, want := range []string{
		"millbrook-asset-review", "Distribution fitting summary", strings.Repeat("3f9a", 16),
		"SHA256:6bq0uZ1c0qJ1ZyT0yI8cVZ0o0k8XxkXo7jv0iSvx2mM", "2026-12-02 03:04:05 UTC",
		"0123456789abcdef0123456789abcdef01234567 on main, with uncommitted changes (dirty)", "fitseal 0.1.0", "20261202",
		"Contents", "Methods and cautions",
		"same observations", "only the best of the candidates that were tried", "Do not attach significance tests",
		"licensed professional", "Burnham & Anderson 2002",
		"Ranking by AICc", "ΔAICc", "Ranking by AIC ", "ranked by AIC: AICc is undefined",
		"Not ranked: lognormal: did not converge: iteration cap reached",
		"0.415 (AD)", "P(X > 4000)", "model average", "return level 100 yr",
		"page 1 of", "Bold rows: the top-ranked family.",
	} {
		if !strings.Contains(flat, want) {
			t.Errorf("report text lacks %q", want)
		}
	}
	for _, a := range r.Analyses {
		if !strings.Contains(flat, a.Name) {
			t.Errorf("report text lacks analysis %s", a.Name)
		}
	}
	// The contents give each analysis the page its section starts on.
	pages := strings.Split(text, "\f")
	for i, a := range r.Analyses {
		m := regexp.MustCompile(regexp.QuoteMeta(fmt.Sprintf("%d %s", i+1, a.Name)) + `.*?(\d+)\s*$`).FindStringSubmatch(strings.Join(strings.Fields(pageLine(pages[1], a.Name)), " "))
		if m == nil {
			t.Errorf("contents line for %s not found", a.Name)
			continue
		}
		p, _ := strconv.Atoi(m[1])
		if p < 1 || p > len(pages) || !strings.Contains(pages[p-1], fmt.Sprintf("%d  %s", i+1, a.Name)) && !strings.Contains(strings.Join(strings.Fields(pages[p-1]), " "), fmt.Sprintf("%d %s", i+1, a.Name)) {
			t.Errorf("contents send %s to page %d, which does not start it", a.Name, p)
		}
	}
}

func pageLine(page, name string) string {
	for _, l := range strings.Split(page, "\n") {
		if strings.Contains(l, name) {
			return l
		}
	}
	return ""
}

// TestRenderPDFHundredAnalyses measures the layout of a 100-analysis report
// (figures rendered once and reused; figure rendering is measured in
// BenchmarkRenderFigures). FITSEAL_KEEP_PDF=DIR keeps the file.
func TestRenderPDFHundredAnalyses(t *testing.T) {
	r := testReport(t, 100)
	start := time.Now()
	pdf, err := RenderPDF(r, PDFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	took := time.Since(start)
	t.Logf("100 analyses: %d bytes in %v", len(pdf), took)
	if took > 60*time.Second {
		t.Errorf("100 analyses took %v; the report must stay fast", took)
	}
	if dir := os.Getenv("FITSEAL_KEEP_PDF"); dir != "" {
		os.WriteFile(filepath.Join(dir, "report-100.pdf"), pdf, 0o644)
	}
	text := pdftotext(t, pdf, "-f", "1", "-l", "4") // the cover and the contents
	for _, a := range []string{"seal-life/G-001", "storm_rainfall/G-050", "defects/G-099"} {
		if !strings.Contains(text, a) {
			t.Errorf("no %s in the 100-analysis report", a)
		}
	}
}

func BenchmarkRenderFigures(b *testing.B) {
	in := sealFigures(1)
	for b.Loop() {
		if _, err := RenderFigures("x", in); err != nil {
			b.Fatal(err)
		}
	}
}

// TestRenderPDFEmbedsPNGOnlyFigure: a figure given only as PNG bytes (not
// drawn by RenderFigures) is embedded as an image.
func TestRenderPDFEmbedsPNGOnlyFigure(t *testing.T) {
	figs, err := RenderFigures("x", rainFigures())
	if err != nil {
		t.Fatal(err)
	}
	a := rainAnalysis()
	a.Figures = []Figure{{Name: "x.png", Caption: "a PNG-only figure", PNG: figs[0].PNG}}
	r := &Report{Name: "png-only", Identity: Identity{Created: testCreated}, Analyses: []Analysis{a}}
	pdf, err := RenderPDF(r, PDFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(pdf, []byte("/Subtype /Image")) {
		t.Error("the PNG was not embedded")
	}
	a.Figures[0].PNG = []byte("not a png")
	if _, err := RenderPDF(&Report{Name: "bad", Analyses: []Analysis{a}}, PDFOptions{}); err == nil {
		t.Error("a broken PNG must be an error")
	}
}

// TestRenderPDFContentStream checks the text without poppler: with
// compression off, gofpdf writes text in the embedded fonts as UTF-16BE
// strings in the page content, so each phrase that sits on one line can be
// found byte for byte.
func TestRenderPDFContentStream(t *testing.T) {
	r := testReport(t, 5)
	pdf, err := RenderPDF(r, PDFOptions{Uncompressed: true})
	if err != nil {
		t.Fatal(err)
	}
	utf16 := func(s string) []byte {
		var b []byte
		for _, c := range s {
			if c > 0xffff {
				t.Fatalf("%q: outside the basic plane", s)
			}
			b = append(b, byte(c>>8), byte(c))
		}
		return b
	}
	want := []string{"Methods and cautions", "Cautions", "licensed", "professional", "Ranking by AICc", "ΔAICc", "Ranking by AIC", "Contents"}
	for _, a := range r.Analyses {
		want = append(want, a.Name)
	}
	for _, w := range want {
		if !bytes.Contains(pdf, utf16(w)) {
			t.Errorf("page content lacks %q", w)
		}
	}
	if bytes.Contains(pdf, utf16("seal-life/G-006")) {
		t.Error("the search finds an analysis the report does not have")
	}
}

func TestRenderPDFWithoutCreatedTime(t *testing.T) {
	r := &Report{Name: "no-time", Analyses: []Analysis{rainAnalysis()}}
	a, err := RenderPDF(r, PDFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	time.Sleep(1100 * time.Millisecond) // a clock-based date would now differ
	b, _ := RenderPDF(r, PDFOptions{})
	if !bytes.Equal(a, b) || !bytes.Contains(a, []byte("/CreationDate (D:19700101000000")) {
		t.Error("without a created time the PDF must carry the epoch, not the clock")
	}
}

// TestDataSummarySentence: the sentence under the data summary explains
// what min, median and max are taken over only where the data are
// censored: nothing for complete data (counts included), the recorded
// limits for non-detects and suspensions, the finite bounds for intervals.
func TestDataSummarySentence(t *testing.T) {
	for _, c := range []struct {
		name    string
		summary DataSummary
		want    string
		not     string
	}{
		{"complete", DataSummary{N: 5, Exact: 5}, "data: continuous.", "Min, median"},
		{"suspensions", DataSummary{N: 5, Exact: 3, RightCensored: 2}, "Non-detects and suspensions count at their recorded limits", "intervals"},
		{"intervals", DataSummary{N: 5, IntervalCensored: 5}, "finite bounds of the intervals", "suspensions"},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := &Report{Name: "p", Analyses: []Analysis{{Name: "a", Dataset: "a", Summary: c.summary}}}
			pdf, err := RenderPDF(r, PDFOptions{})
			if err != nil {
				t.Fatal(err)
			}
			text := strings.Join(strings.Fields(pdftotext(t, pdf)), " ")
			_, text, _ = strings.Cut(text, "Dataset a;") // the analysis's data sentence
			text, _, _ = strings.Cut(text, "Ranking")
			if !strings.Contains(text, c.want) || strings.Contains(text, c.not) {
				t.Errorf("the data sentence: want %q and not %q in:\n%s", c.want, c.not, text)
			}
		})
	}
}

// TestCoverCriterion: the cover names the project's criterion, and how many
// analyses ranked by another (an analysis's override, or AIC where AICc is
// undefined), so a cover reading "AICc" never hides that every analysis
// used BIC.
func TestCoverCriterion(t *testing.T) {
	an := func(crits ...string) []Analysis {
		var out []Analysis
		for _, c := range crits {
			out = append(out, Analysis{Criterion: c})
		}
		return out
	}
	for _, c := range []struct {
		project  string
		analyses []Analysis
		want     string
	}{
		{"aicc", an("aicc", "aicc"), "AICc"},
		{"aicc", an("bic", "bic"), "AICc (project setting); BIC in 2 of 2 analyses"},
		{"aicc", an("aicc", "aic", "bic", "bic"), "AICc (project setting); AIC in 1 of 4 analyses; BIC in 2 of 4 analyses"},
		{"bic", an("aic"), "BIC (project setting); AIC in 1 of 1 analysis"},
	} {
		if got := coverCriterion(c.project, c.analyses); got != c.want {
			t.Errorf("coverCriterion(%q, …) = %q, want %q", c.project, got, c.want)
		}
	}
}

// TestSummariseOpenIntervals: an interval open at one end is counted as the
// non-detect (−∞, u] or suspension (l, +∞) it is, not as interval-censored.
func TestSummariseOpenIntervals(t *testing.T) {
	inf := math.Inf(1)
	d := &fitters.Data{Exact: []float64{2}, Lower: []float64{-inf, 1, 3, -inf}, Upper: []float64{1.5, inf, 4, inf}}
	s := summarise(d, 0)
	if s.N != 5 || s.Exact != 1 || s.LeftCensored != 1 || s.RightCensored != 1 || s.IntervalCensored != 2 {
		t.Errorf("summary %+v: want n 5, exact 1, left 1, right 1, interval 2 (one bounded, one open both ways)", s)
	}
}

// TestPDFNotesCaveats: the Notes say when an adequacy p rests on fewer
// replicates than were drawn, and carry a model-averaged row's note (the
// families left out and the weights renormalised) even when its cells are
// filled.
func TestPDFNotesCaveats(t *testing.T) {
	a := Analysis{Name: "a", Dataset: "a", Criterion: "aic", Confidence: 0.95, Summary: DataSummary{N: 30, Exact: 30},
		Ranking: []Candidate{
			{Family: "gpd", Rank: 1, K: 2, LogLik: -10, Criterion: 24, Weight: 0.7, Support: "substantial", Converged: true,
				Statistic: "ad", AdequacyP: 1, AdequacyNote: "27 of 49 replicates failed and are left out (refit did not converge)"},
			{Family: "weibull", Rank: 2, K: 2, LogLik: -11, Criterion: 26, Delta: 2, Weight: 0.3, Support: "substantial", Converged: true, AdequacyP: math.NaN()},
		},
		Derived: []Derived{{Family: ModelAverage, Quantity: Exceedance, Argument: 5, Estimate: 0.2, Lower: 0.1, Upper: 0.3,
			Method: "model average", Note: "left out for want of an estimate or standard error: gpd; weights renormalised"}},
	}
	pdf, err := RenderPDF(&Report{Name: "p", Analyses: []Analysis{a}}, PDFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Join(strings.Fields(pdftotext(t, pdf)), " ")
	for _, want := range []string{"gpd: adequacy p: 27 of 49 replicates failed",
		"model average P(X > 5): left out for want of an estimate or standard error: gpd; weights renormalised"} {
		if !strings.Contains(text, want) {
			t.Errorf("the PDF's Notes lack %q", want)
		}
	}
}
