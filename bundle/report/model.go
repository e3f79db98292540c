// Package report turns fitted results into what people read: publication
// tables (Markdown and LaTeX, from text/template templates), figures (SVG
// and PNG, with gonum/plot) and the PDF summary (with gofpdf).
//
// Its input is the plain data model in this file, independent of the
// runner's types: the caller fills a [Report] (or lets [FromResults] and
// [FigureInputFor] fill it from a run's results) and calls [RenderTables],
// [RenderFigures] and [RenderPDF]. Every output is deterministic: the same
// Report gives the same bytes. docs/REPORT.md shows the calls in order.
package report

import (
	"math"
	"strconv"
	"strings"
	"time"

	"gonum.org/v1/plot"

	"fitseal/templates"
)

// Report is everything the summary shows about one run.
type Report struct {
	Name        string // the project's name
	Description string
	Identity    Identity
	Settings    Settings
	Analyses    []Analysis
}

// Identity ties the report to its bundle and to the code that made it.
type Identity struct {
	// TagManifestSHA256 is the hex SHA-256 of tagmanifest-sha256.txt: the
	// bundle's identity. Empty when the PDF is rendered before sealing.
	TagManifestSHA256 string
	// BundleIdentityLabel says what TagManifestSHA256 is the hash of, when
	// the caller hashes something else (default: "Bundle identity (SHA-256
	// of tagmanifest-sha256.txt)").
	BundleIdentityLabel string
	SignerFingerprint   string // "SHA256:…" of the signing key
	Created             time.Time
	GitCommit           string // empty: not run from a git repository
	GitBranch           string
	GitDirty            bool // uncommitted changes to the inputs or project file
	ToolVersion         string
	GoVersion           string
	Platform            string // GOOS/GOARCH
}

// Settings are the run's recorded settings shown on the cover.
type Settings struct {
	Seed       uint64
	Criterion  string // "aic", "aicc" or "bic"
	Confidence float64
	Intervals  string // "wald", "profile" or "bootstrap"
	Bootstrap  int    // replicates; 0 = off
}

// Analysis is one analysis of one dataset (or one group of a split dataset).
// Floats that do not apply are NaN.
type Analysis struct {
	Name     string // e.g. "nitrate/MW-1"
	Dataset  string
	Units    string
	Discrete bool
	// Criterion is the one the ranking used ("aicc", or "aic" where AICc
	// was undefined); CriterionNote says why it differs from the project's.
	Criterion     string
	CriterionNote string
	Confidence    float64
	Summary       DataSummary
	// Ranking has one row per candidate family, fitted ones by rank, then
	// the inapplicable and non-converged ones (Rank 0).
	Ranking    []Candidate
	Parameters []Parameter
	Derived    []Derived
	// Notes are further remarks a reader needs (inapplicable families are
	// listed from Ranking; these are extra).
	Notes   []string
	Figures []Figure // embedded in the PDF in this order
}

// DataSummary describes the observations one analysis fitted.
type DataSummary struct {
	N                int // observations of every kind
	Exact            int
	LeftCensored     int // non-detects
	RightCensored    int // suspensions
	IntervalCensored int
	Missing          int     // cells skipped as missing
	Min, Median, Max float64 // of the recorded values (censored ones at their recorded value)
}

// Candidate is one family's row of the ranking.
type Candidate struct {
	Family    string
	Rank      int // 1 = best; 0 = not ranked (inapplicable or not converged)
	K         int
	LogLik    float64
	Criterion float64 // the value of the analysis's criterion
	Delta     float64
	Weight    float64
	Support   string // plain-language band of Δ, e.g. "substantial"
	// Statistic names the adequacy check ("ad", "cvm", "ks", "chisq") and
	// AdequacyP is its bootstrap p-value (NaN when not computed).
	Statistic string
	AdequacyP float64
	// AdequacyNote is the statistic's note (failed replicates, pooling).
	AdequacyNote string
	// Remarks are the fit's inference remarks (runner.InferenceRemarks):
	// a fallback to profile intervals, a local maximum, a failed bootstrap.
	Remarks   string
	Converged bool
	Note      string // why not fitted or not converged, or a remark
}

// Parameter is one parameter estimate with its interval.
type Parameter struct {
	Family     string
	Name       string
	Estimate   float64
	StdError   float64
	Lower      float64
	Upper      float64
	Method     string // "profile", "wald", "bootstrap"
	Fixed      bool
	BestFamily bool // belongs to the top-ranked family
	// LowerOpen and UpperOpen mark a side the data do not bound; Note says
	// why a value or bound is missing or open.
	LowerOpen, UpperOpen bool
	Note                 string
}

// Quantities of [Derived].
const (
	Quantile    = "quantile"
	ReturnLevel = "return_level"
	Exceedance  = "exceedance"
)

// ModelAverage is the family name of the Akaike-weighted rows.
const ModelAverage = "model-average"

// Derived is a percentile, return level or exceedance probability.
type Derived struct {
	Family     string // or ModelAverage
	Quantity   string // Quantile, ReturnLevel or Exceedance
	Argument   float64
	Estimate   float64
	Lower      float64
	Upper      float64
	Method     string
	BestFamily bool // belongs to the top-ranked family
	// LowerOpen and UpperOpen mark a side the data do not bound; Note says
	// why a value or bound is missing or open.
	LowerOpen, UpperOpen bool
	Note                 string
	// Given is the threshold u of a family that models the excesses over
	// it (gpd): its quantities are of X given X > u. Nil otherwise.
	Given *float64
	// Count is true for a count family's row: its quantiles are whole.
	Count bool
}

// EstimateText is the estimate as the tables print it: a count family's
// quantile or return level as the whole number it is, else to four
// significant digits.
func (d Derived) EstimateText() string {
	if d.Count && d.Quantity != Exceedance && d.Estimate == math.Trunc(d.Estimate) && math.Abs(d.Estimate) < 1e15 {
		return strconv.FormatFloat(d.Estimate, 'f', 0, 64)
	}
	return templates.Sig(4, d.Estimate)
}

// Figure is a rendered figure for the PDF with its caption. A figure made
// by [RenderFigures] (via [RenderedFigure.ForPDF]) is drawn as vector
// graphics; one that only has PNG bytes is embedded as an image, and then
// the PDF's bytes can vary between runs when several images share a pixel
// width (gofpdf orders such images by map iteration).
type Figure struct {
	Name    string // file name in the bundle, e.g. "seal-life-density.png"
	Caption string
	PNG     []byte
	plot    *plot.Plot
}

// CriterionName is the criterion as printed: "AIC", "AICc" or "BIC".
func CriterionName(c string) string {
	switch strings.ToLower(c) {
	case "aicc":
		return "AICc"
	case "aic":
		return "AIC"
	case "bic":
		return "BIC"
	}
	return c
}

// CriterionName is the analysis's criterion as printed.
func (a Analysis) CriterionName() string { return CriterionName(a.Criterion) }

// Level is the interval level as a percentage ("95").
func (a Analysis) Level() string { return templates.Percent(a.Confidence) }

// Fitted returns the ranked rows.
func (a Analysis) Fitted() []Candidate {
	var out []Candidate
	for _, c := range a.Ranking {
		if c.Rank > 0 {
			out = append(out, c)
		}
	}
	return out
}

// NotRanked returns the rows that were not ranked: inapplicable families
// and fits that did not converge.
func (a Analysis) NotRanked() []Candidate {
	var out []Candidate
	for _, c := range a.Ranking {
		if c.Rank == 0 {
			out = append(out, c)
		}
	}
	return out
}

// CommonParameterMethod returns the interval method shared by every
// estimated (not fixed) parameter, or "" when they differ; tables then name
// it once in the caption instead of on every row.
func (a Analysis) CommonParameterMethod() string {
	m := ""
	for _, p := range a.Parameters {
		if p.Fixed {
			continue
		}
		if m == "" {
			m = p.Method
		} else if p.Method != m {
			return ""
		}
	}
	return m
}

// MethodNote pairs an interval method with the key a LaTeX table prints
// for it in a narrow column ("a", "b", …), the text going below the table.
type MethodNote struct {
	Key, Method string
}

// DerivedMethods lists the interval methods of the derived quantities, in
// order of first use, each with its key.
func (a Analysis) DerivedMethods() []MethodNote {
	var ms []string
	for _, d := range a.Derived {
		ms = append(ms, d.Method)
	}
	return methodNotes(ms)
}

// DerivedMethodKey returns the key of a derived quantity's interval method.
func (a Analysis) DerivedMethodKey(method string) string {
	return keyOf(a.DerivedMethods(), method)
}

// ParameterMethods lists the interval methods of the estimated parameters,
// in order of first use, each with its key.
func (a Analysis) ParameterMethods() []MethodNote {
	var ms []string
	for _, p := range a.Parameters {
		if !p.Fixed {
			ms = append(ms, p.Method)
		}
	}
	return methodNotes(ms)
}

// ParameterMethodKey returns the key of a parameter's interval method.
func (a Analysis) ParameterMethodKey(method string) string {
	return keyOf(a.ParameterMethods(), method)
}

func methodNotes(methods []string) []MethodNote {
	var out []MethodNote
	seen := map[string]bool{}
	for _, m := range methods {
		if m == "" || seen[m] {
			continue
		}
		seen[m] = true
		out = append(out, MethodNote{Key: methodKey(len(out)), Method: m})
	}
	return out
}

// methodKey is a, b, …, z, aa, ab, …
func methodKey(i int) string {
	if i < 26 {
		return string(rune('a' + i))
	}
	return methodKey(i/26-1) + string(rune('a'+i%26))
}

func keyOf(notes []MethodNote, method string) string {
	for _, n := range notes {
		if n.Method == method {
			return n.Key
		}
	}
	return ""
}

// Best returns the top-ranked family's name, or "".
func (a Analysis) Best() string {
	for _, c := range a.Ranking {
		if c.Rank == 1 {
			return c.Family
		}
	}
	return ""
}

// Label describes a derived quantity in plain text:
// "quantile 0.1", "return level 100 yr", "P(X > 4000)". A quantity of a
// family of excesses over u (Given) is conditional on X > u, and so
// labelled: "quantile 0.9 (X > 30)", "P(X > 50 | X > 30)", and "return
// level 100 (X > 30)", whose period counts values above u, not years.
func (d Derived) Label() string {
	given := ""
	if d.Given != nil {
		given = " | X > " + g(*d.Given)
	}
	switch d.Quantity {
	case Quantile:
		if given != "" {
			return "quantile " + g(d.Argument) + " (X > " + g(*d.Given) + ")"
		}
		return "quantile " + g(d.Argument)
	case ReturnLevel:
		if given != "" {
			return "return level " + g(d.Argument) + " (X > " + g(*d.Given) + ")"
		}
		return "return level " + g(d.Argument) + " yr"
	case Exceedance:
		return "P(X > " + g(d.Argument) + given + ")"
	}
	return d.Quantity + " " + g(d.Argument)
}

// TeXLabel describes a derived quantity for LaTeX.
func (d Derived) TeXLabel() string {
	given := ""
	if d.Given != nil {
		given = ` \mid X > ` + g(*d.Given)
	}
	switch d.Quantity {
	case Quantile:
		if given != "" {
			return `quantile $p = ` + g(d.Argument) + `$ ($X > ` + g(*d.Given) + `$)`
		}
		return `quantile $p = ` + g(d.Argument) + `$`
	case ReturnLevel:
		if given != "" {
			return `return level $T = ` + g(d.Argument) + `$ ($X > ` + g(*d.Given) + `$)`
		}
		return `return level $T = ` + g(d.Argument) + `$\,yr`
	case Exceedance:
		return `$P(X > ` + g(d.Argument) + given + `)$`
	}
	return templates.TeXEscape(d.Quantity) + " " + g(d.Argument)
}

// IsModelAverage reports whether the row is Akaike-weighted.
func (d Derived) IsModelAverage() bool { return d.Family == ModelAverage }

// Statistic labels as printed.
func statisticName(s string) string {
	switch s {
	case "ad":
		return "Anderson–Darling"
	case "cvm":
		return "Cramér–von Mises"
	case "ks":
		return "Kolmogorov–Smirnov"
	case "chisq":
		return "chi-square"
	}
	return s
}

func g(x float64) string {
	if math.IsNaN(x) {
		return ""
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}
