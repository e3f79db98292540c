package report_test

import (
	"fmt"
	"math"

	"fitseal/bundle/report"
	"fitseal/templates"
)

// A ranking table in Markdown from the built-in templates. The numbers are
// made up for the example.
func ExampleRenderTables() {
	a := report.Analysis{
		Name: "storm-rainfall", Units: "mm", Criterion: "aicc", Confidence: 0.95,
		Summary: report.DataSummary{N: 38},
		Ranking: []report.Candidate{
			{Family: "gumbel", Rank: 1, K: 2, LogLik: -133.36, Criterion: 271.07, Delta: 0, Weight: 0.746, Support: "substantial", AdequacyP: 0.595},
			{Family: "gev", Rank: 2, K: 3, LogLik: -133.26, Criterion: 273.22, Delta: 2.15, Weight: 0.254, Support: "less", AdequacyP: math.NaN()},
		},
	}
	tmpls, err := templates.LoadTables("") // or the project's [report] templates folder
	if err != nil {
		panic(err)
	}
	files, err := report.RenderTables(tmpls, []report.Analysis{a}, []string{"md"})
	if err != nil {
		panic(err)
	}
	for _, f := range files {
		if f.Name == "storm-rainfall-ranking.md" {
			fmt.Print(string(f.Data))
		}
	}
	// Output:
	// **Table: candidate distributions for storm-rainfall (mm), ranked by AICc** (n = 38)
	//
	// | Rank | Family | k | ln L | AICc | Δ | Weight | Support | Adequacy p |
	// |---:|:---|---:|---:|---:|---:|---:|:---|---:|
	// | 1 | gumbel | 2 | -133.36 | 271.07 | 0.00 | 0.746 | substantial | 0.595 |
	// | 2 | gev | 3 | -133.26 | 273.22 | 2.15 | 0.254 | less | – |
}
