package report

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"fitseal/templates"
)

// Every embedded table template has its Go rendering (tables_builtin.go),
// pinned to the template's text: a template edited without its function
// fails here (and, until fixed, renders through text/template).
func TestBuiltinTablesCoverEmbedded(t *testing.T) {
	tmpls, err := templates.LoadTables("")
	if err != nil {
		t.Fatal(err)
	}
	if len(tmpls) != len(builtinTables) {
		t.Errorf("%d embedded templates, %d built-in renderings", len(tmpls), len(builtinTables))
	}
	for _, tm := range tmpls {
		if builtinFor(tm) == nil {
			t.Errorf("%s has no built-in rendering for its current text: update its function and textSHA256 in tables_builtin.go", tm.Name())
		}
	}
	own := *tmpls[0]
	own.Text = append(append([]byte(nil), own.Text...), '\n')
	if builtinFor(&own) != nil {
		t.Error("a template whose text differs must go through text/template")
	}
}

// The Go renderings give the templates' bytes exactly, on the test
// fixtures and on analyses drawn at random with the awkward cases: names
// with Markdown and LaTeX specials, empty units and notes, unranked rows
// with and without notes, fixed parameters, many interval methods (keys
// past z), NaN, infinities, signed zeros, tiny and huge numbers.
func TestBuiltinTablesMatchTemplates(t *testing.T) {
	tmpls, err := templates.LoadTables("")
	if err != nil {
		t.Fatal(err)
	}
	builtin := make([]func([]byte, *Analysis, string) []byte, len(tmpls))
	viaTemplate := make([]func([]byte, *Analysis, string) []byte, len(tmpls))
	for i, tm := range tmpls {
		builtin[i] = builtinFor(tm)
	}
	analyses := []Analysis{sealAnalysis(), rainAnalysis(), {}}
	mixed := sealAnalysis()
	mixed.Parameters[2].Method = "wald"
	mixed.Parameters = append(mixed.Parameters, Parameter{Family: "gpd", Name: "threshold", Estimate: 30, StdError: math.NaN(), Lower: math.NaN(), Upper: math.NaN(), Fixed: true})
	analyses = append(analyses, mixed)
	r := rand.New(rand.NewPCG(8, 2026))
	for range 300 {
		analyses = append(analyses, randomAnalysis(r))
	}
	slugs := Slugs(analyses)
	for i := range analyses {
		want, err := renderAnalysis(tmpls, viaTemplate, analyses[i], slugs[i])
		if err != nil {
			t.Fatal(err)
		}
		got, err := renderAnalysis(tmpls, builtin, analyses[i], slugs[i])
		if err != nil {
			t.Fatal(err)
		}
		for k := range want {
			if got[k].Name != want[k].Name || !bytes.Equal(got[k].Data, want[k].Data) {
				t.Fatalf("analysis %d, %s: built-in rendering differs from the template:\n--- built-in\n%s\n--- template\n%s", i, want[k].Name, got[k].Data, want[k].Data)
			}
		}
	}
}

var awkward = []string{"", "seal-life", "nitrate/MW_1 (50%)", "a|b||c", `back\slash {x} $y$ #1 & ~^`, "≤ ≥ − ± × → ∞ Δ χ ξ λ μ σ ψ ² – — … ·",
	"<tag>", "trailing |", "Burnham & Anderson 2002", "line\nbreak", "é漢"}

func pick[T any](r *rand.Rand, xs []T) T { return xs[r.IntN(len(xs))] }

func randomFloat(r *rand.Rand) float64 {
	switch r.IntN(10) {
	case 0:
		return math.NaN()
	case 1:
		return pick(r, []float64{math.Inf(1), math.Inf(-1), 0, math.Copysign(0, -1), 5e-324, 1e300, -1e-300})
	case 2:
		return (r.Float64() - 0.5) * math.Pow(10, float64(r.IntN(40)-20))
	case 3:
		return pick(r, []float64{9.9996, 0.00099995, 999999.5, -0.0049, 0.0005, 1e-3, 1e6, 10576})
	}
	return (r.Float64() - 0.3) * math.Pow(10, float64(r.IntN(8)-3))
}

func randomAnalysis(r *rand.Rand) Analysis {
	methods := []string{"profile", "wald", "bootstrap-t (log scale, B = 40)", "model-averaged (Burnham & Anderson 2002)", "a|b", ""}
	if r.IntN(5) == 0 {
		for i := range 30 {
			methods = append(methods, fmt.Sprintf("method %d", i))
		}
	}
	a := Analysis{Name: pick(r, awkward), Units: pick(r, awkward), Criterion: pick(r, []string{"aic", "aicc", "bic", "AICc", "other"}),
		CriterionNote: pick(r, awkward), Confidence: pick(r, []float64{0.95, 0.9, 0.975, 0.5, math.NaN()}),
		Summary: DataSummary{N: r.IntN(5000)}}
	for i := range r.IntN(10) {
		c := Candidate{Family: pick(r, awkward), Rank: r.IntN(5) - 1, K: r.IntN(4), LogLik: randomFloat(r), Criterion: randomFloat(r),
			Delta: randomFloat(r), Weight: randomFloat(r), Support: pick(r, awkward), AdequacyP: randomFloat(r), Note: pick(r, awkward)}
		if i == 0 {
			c.Rank = 1
		}
		a.Ranking = append(a.Ranking, c)
	}
	for range r.IntN(12) {
		a.Parameters = append(a.Parameters, Parameter{Family: pick(r, awkward), Name: pick(r, awkward), Estimate: randomFloat(r),
			StdError: randomFloat(r), Lower: randomFloat(r), Upper: randomFloat(r), Method: pick(r, methods), Fixed: r.IntN(4) == 0})
	}
	if r.IntN(3) == 0 { // one shared method: named in the caption
		for i := range a.Parameters {
			a.Parameters[i].Method = "wald"
		}
	}
	for range r.IntN(12) {
		fam := pick(r, awkward)
		if r.IntN(3) == 0 {
			fam = ModelAverage
		}
		d := Derived{Family: fam, Quantity: pick(r, []string{Quantile, ReturnLevel, Exceedance, "other_$"}),
			Argument: randomFloat(r), Estimate: randomFloat(r), Lower: randomFloat(r), Upper: randomFloat(r), Method: pick(r, methods),
			Count: r.IntN(2) == 0}
		if d.Count && r.IntN(2) == 0 {
			d.Estimate = float64(r.IntN(40)) // a count family's whole quantile
		}
		if r.IntN(4) == 0 {
			u := randomFloat(r)
			d.Given = &u // conditional on exceeding a threshold (gpd)
		}
		a.Derived = append(a.Derived, d)
	}
	return a
}

// BenchmarkRenderTables renders the six built-in tables of 100 analyses,
// through the Go renderings and through text/template.
func BenchmarkRenderTables(b *testing.B) {
	tmpls, err := templates.LoadTables("")
	if err != nil {
		b.Fatal(err)
	}
	r := rand.New(rand.NewPCG(1, 1))
	analyses := make([]Analysis, 100)
	for i := range analyses {
		a := sealAnalysis()
		a.Name = fmt.Sprintf("bench/s%04d", i)
		for k := range a.Ranking {
			a.Ranking[k].LogLik += r.Float64()
		}
		analyses[i] = a
	}
	slugs := Slugs(analyses)
	for _, mode := range []string{"builtin", "template"} {
		fns := make([]func([]byte, *Analysis, string) []byte, len(tmpls))
		if mode == "builtin" {
			for i, tm := range tmpls {
				fns[i] = builtinFor(tm)
			}
		}
		b.Run(mode, func(b *testing.B) {
			b.ReportAllocs()
			for range b.N {
				for i := range analyses {
					if _, err := renderAnalysis(tmpls, fns, analyses[i], slugs[i]); err != nil {
						b.Fatal(err)
					}
				}
			}
		})
	}
}

// TestDerivedEstimateText: a count family's quantile or return level is the
// whole number it is ("3", not "3.000"); probabilities and continuous
// families keep four significant digits; no estimate prints as "".
func TestDerivedEstimateText(t *testing.T) {
	for _, c := range []struct {
		d    Derived
		want string
	}{
		{Derived{Count: true, Quantity: Quantile, Estimate: 3}, "3"},
		{Derived{Count: true, Quantity: ReturnLevel, Estimate: 12}, "12"},
		{Derived{Count: true, Quantity: Exceedance, Estimate: 0.25}, "0.2500"},
		{Derived{Quantity: Quantile, Estimate: 3}, "3.000"},
		{Derived{Count: true, Quantity: Quantile, Estimate: math.NaN()}, ""},
		{Derived{Count: true, Family: ModelAverage, Quantity: Quantile, Estimate: 2.75}, "2.750"},
	} {
		if got := c.d.EstimateText(); got != c.want {
			t.Errorf("%+v: EstimateText() = %q, want %q", c.d, got, c.want)
		}
	}
}
