package report

import (
	"bytes"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"codeberg.org/go-fonts/liberation/liberationmonoregular"
	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansitalic"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"github.com/jung-kurt/gofpdf"
	"gonum.org/v1/plot/vg/draw"

	"fitseal/fitters/infer"
	"fitseal/runner"
	"fitseal/templates"
)

// PDFOptions tunes [RenderPDF]; the zero value is what a bundle uses.
type PDFOptions struct {
	// Uncompressed leaves the page content streams readable (for tests).
	Uncompressed bool
	// ContentsFrom is the number of analyses from which a table of contents
	// is added (0: DefaultContentsFrom).
	ContentsFrom int
}

// DefaultContentsFrom: projects with this many analyses or more get a table
// of contents.
const DefaultContentsFrom = 4

// Page geometry (mm, A4 portrait).
const (
	pageW, pageH = 210.0, 297.0
	margin       = 15.0
	bottomMargin = 18.0
	textW        = pageW - 2*margin
	rowH         = 5.2
)

// RenderPDF lays out the summary: a cover with the bundle's identity, a
// table of contents for long projects, the methods and cautions, then one
// section per analysis (data summary, ranking, parameters, derived
// quantities, notes, figures). The bytes depend only on r: the creation
// date is r.Identity.Created and nothing random is written.
func RenderPDF(r *Report, opt PDFOptions) ([]byte, error) {
	d := &doc{f: gofpdf.New("P", "mm", "A4", ""), r: r}
	f := d.f
	f.SetCompression(!opt.Uncompressed)
	f.SetCatalogSort(true)
	// gofpdf takes a zero date as "now"; without a created time the file
	// still must not vary, so it then carries the Unix epoch.
	created := r.Identity.Created
	if created.IsZero() {
		created = time.Unix(0, 0)
	}
	f.SetCreationDate(created.UTC())
	f.SetModificationDate(created.UTC())
	f.SetProducer("fitseal "+r.Identity.ToolVersion, true)
	f.SetCreator("fitseal "+r.Identity.ToolVersion, true)
	f.SetTitle(r.Name+": fitting summary", true)
	f.SetSubject(r.Description, true)
	f.AddUTF8FontFromBytes("sans", "", liberationsansregular.TTF)
	f.AddUTF8FontFromBytes("sans", "B", liberationsansbold.TTF)
	f.AddUTF8FontFromBytes("sans", "I", liberationsansitalic.TTF)
	f.AddUTF8FontFromBytes("mono", "", liberationmonoregular.TTF)
	f.SetMargins(margin, margin, margin)
	f.SetAutoPageBreak(true, bottomMargin)
	f.AliasNbPages("{nb}")
	f.SetFooterFunc(d.footer)

	d.cover()
	from := opt.ContentsFrom
	if from <= 0 {
		from = DefaultContentsFrom
	}
	if len(r.Analyses) >= from {
		d.contents()
	}
	d.methods()
	for i := range r.Analyses {
		d.analysis(i)
	}
	d.resolveContents()
	if err := f.Error(); err != nil {
		return nil, fmt.Errorf("report PDF: %w", err)
	}
	var buf bytes.Buffer
	if err := f.Output(&buf); err != nil {
		return nil, fmt.Errorf("report PDF: %w", err)
	}
	return buf.Bytes(), nil
}

type doc struct {
	f *gofpdf.Fpdf
	r *Report
	// Table of contents: one entry per section, its link and the page it
	// starts on (filled as the sections are laid out).
	toc []tocEntry
}

type tocEntry struct {
	title string
	link  int
	page  int
	alias string
}

func (d *doc) font(style string, size float64) { d.f.SetFont("sans", style, size) }

func (d *doc) footer() {
	f := d.f
	f.SetY(-12)
	f.SetFont("sans", "", 7.5)
	f.SetTextColor(110, 110, 110)
	f.CellFormat(textW/2, 5, d.r.Name+" · fitseal "+d.r.Identity.ToolVersion, "", 0, "L", false, 0, "")
	f.CellFormat(textW/2, 5, fmt.Sprintf("page %d of {nb}", f.PageNo()), "", 0, "R", false, 0, "")
	f.SetTextColor(0, 0, 0)
}

func (d *doc) cover() {
	f, r := d.f, d.r
	f.AddPage()
	f.SetY(40)
	d.font("", 11)
	f.SetTextColor(90, 90, 90)
	f.CellFormat(textW, 6, "Distribution fitting summary", "", 1, "L", false, 0, "")
	f.SetTextColor(0, 0, 0)
	d.font("B", 22)
	f.MultiCell(textW, 10, r.Name, "", "L", false)
	f.Ln(2)
	if r.Description != "" {
		d.font("", 11)
		f.MultiCell(textW, 5.5, r.Description, "", "L", false)
	}
	f.Ln(8)

	id, s := r.Identity, r.Settings
	bundleLabel := id.BundleIdentityLabel
	if bundleLabel == "" {
		bundleLabel = "Bundle identity (SHA-256 of tagmanifest-sha256.txt)"
	}
	bundle := id.TagManifestSHA256
	if bundle == "" {
		bundle = "(not given)"
	}
	git := "not run from a git repository"
	if id.GitCommit != "" {
		git = id.GitCommit
		if id.GitBranch != "" {
			git += " on " + id.GitBranch
		}
		if id.GitDirty {
			git += ", with uncommitted changes (dirty)"
		} else {
			git += ", clean"
		}
	}
	created := "(not given)"
	if !id.Created.IsZero() {
		created = id.Created.UTC().Format("2006-01-02 15:04:05 UTC")
	}
	bootstrap := "off"
	if s.Bootstrap > 0 {
		bootstrap = strconv.Itoa(s.Bootstrap) + " replicates"
	}
	rows := []struct {
		label, value string
		mono         bool
	}{
		{bundleLabel, bundle, true},
		{"Signer key", orDash(id.SignerFingerprint), true},
		{"Created", created, false},
		{"Git commit", git, id.GitCommit != ""},
		{"Tool", strings.TrimSpace("fitseal " + id.ToolVersion + " " + platform(id)), false},
		{"Master seed", strconv.FormatUint(s.Seed, 10), true},
		{"Criterion", coverCriterion(s.Criterion, r.Analyses), false},
		{"Interval level", templates.Percent(s.Confidence) + " %", false},
		{"Parameter intervals", orDash(s.Intervals), false},
		{"Bootstrap", bootstrap, false},
		{"Analyses", strconv.Itoa(len(r.Analyses)), false},
	}
	const labelW = 62.0
	for _, row := range rows {
		y := f.GetY()
		d.font("B", 9.5)
		f.MultiCell(labelW-2, 5, row.label, "", "L", false)
		yLabel := f.GetY()
		f.SetXY(margin+labelW, y)
		if row.mono {
			f.SetFont("mono", "", 8)
		} else {
			d.font("", 9.5)
		}
		f.MultiCell(textW-labelW, 5, row.value, "", "L", false)
		f.SetY(math.Max(yLabel, f.GetY()) + 1.5)
	}
	f.Ln(6)
	d.font("I", 9)
	f.SetTextColor(70, 70, 70)
	f.MultiCell(textW, 4.6, "Every number in this summary is in the bundle's result tables (data/results/), "+
		"and `fitseal verify` re-runs the analysis from the bundled inputs and compares them. "+
		"Read the methods and cautions before using the results.", "", "L", false)
	f.SetTextColor(0, 0, 0)
}

func platform(id Identity) string {
	var parts []string
	if id.GoVersion != "" {
		parts = append(parts, id.GoVersion)
	}
	if id.Platform != "" {
		parts = append(parts, id.Platform)
	}
	if len(parts) == 0 {
		return ""
	}
	return "(" + strings.Join(parts, ", ") + ")"
}

// coverCriterion is the cover's criterion line: the project's, and where
// analyses ranked by another (an override, or AIC where AICc is undefined)
// how many did, e.g. "AICc (project setting); BIC in 3 of 5 analyses".
func coverCriterion(project string, analyses []Analysis) string {
	counts := map[string]int{}
	var others []string
	for _, a := range analyses {
		if a.Criterion != "" && a.Criterion != project {
			if counts[a.Criterion] == 0 {
				others = append(others, a.Criterion)
			}
			counts[a.Criterion]++
		}
	}
	if len(others) == 0 {
		return CriterionName(project)
	}
	sort.Strings(others)
	out := CriterionName(project) + " (project setting)"
	for _, c := range others {
		word := "analyses"
		if len(analyses) == 1 {
			word = "analysis"
		}
		out += fmt.Sprintf("; %s in %d of %d %s", CriterionName(c), counts[c], len(analyses), word)
	}
	return out
}

// bound writes an interval bound: "open" where the data do not bound that
// side, "–" where none was computed.
func bound(x float64, open bool) string {
	if open {
		return "open"
	}
	return orDash(templates.Sig(4, x))
}

// blankNotes gathers, beside each table row, its note where the row has a
// blank or open cell (runner.GroupRemarks prints each note once, with the
// rows it concerns).
type blankNotes struct{ rows, notes []string }

// add records row's note when the row has a blank or open cell.
func (b *blankNotes) add(row, note string, blank bool) {
	if blank && note != "" {
		b.rows, b.notes = append(b.rows, row), append(b.notes, note)
	}
}

func orDash(s string) string {
	if s == "" {
		return "–"
	}
	return s
}

// contents reserves the table of contents. Page numbers are written as
// aliases and resolved when every section's page is known.
func (d *doc) contents() {
	f := d.f
	d.toc = append(d.toc, tocEntry{title: "Methods and cautions"})
	for i, a := range d.r.Analyses {
		t := fmt.Sprintf("%d  %s", i+1, a.Name)
		if b := a.Best(); b != "" {
			t += "  (best: " + b + ")"
		}
		d.toc = append(d.toc, tocEntry{title: t})
	}
	f.AddPage()
	d.heading("Contents")
	d.font("", 9.5)
	for i := range d.toc {
		e := &d.toc[i]
		e.link = f.AddLink()
		e.alias = fmt.Sprintf("{toc%06d}", i)
		if f.GetY()+rowH > pageH-bottomMargin {
			f.AddPage()
		}
		d.fitCell(textW-20, rowH, e.title, "L", "", e.link)
		// Left-aligned: the alias is wider than the number that replaces it.
		f.CellFormat(20, rowH, e.alias, "", 1, "L", false, e.link, "")
	}
}

// mark records that section i of the contents starts here.
func (d *doc) mark(i int) {
	if i >= len(d.toc) {
		return
	}
	d.toc[i].page = d.f.PageNo()
	d.f.SetLink(d.toc[i].link, d.f.GetY(), -1)
}

func (d *doc) resolveContents() {
	for _, e := range d.toc {
		d.f.RegisterAlias(e.alias, strconv.Itoa(e.page))
	}
}

func (d *doc) heading(s string) {
	d.font("B", 15)
	d.f.MultiCell(textW, 7.5, s, "", "L", false)
	d.f.Ln(2)
}

func (d *doc) subheading(s string) {
	if d.f.GetY()+rowH*4 > pageH-bottomMargin {
		d.f.AddPage()
	}
	d.f.Ln(2)
	d.font("B", 10.5)
	d.f.CellFormat(textW, 6, s, "", 1, "L", false, 0, "")
}

func (d *doc) paragraph(s string) {
	d.font("", 9.5)
	d.f.MultiCell(textW, 4.6, s, "", "L", false)
	d.f.Ln(1.5)
}

func (d *doc) methods() {
	f := d.f
	f.AddPage()
	d.f.Bookmark("Methods and cautions", 0, 0)
	d.mark(0)
	d.heading("Methods and cautions")
	d.subheading("Methods")
	for _, p := range methodsText(d.r) {
		d.paragraph(p)
	}
	d.subheading("Cautions")
	for _, p := range Cautions {
		d.font("", 9.5)
		x := f.GetX()
		f.CellFormat(5, 4.6, "•", "", 0, "L", false, 0, "")
		f.MultiCell(textW-5, 4.6, p, "", "L", false)
		f.SetX(x)
		f.Ln(1.5)
	}
}

// Cautions are printed in every summary.
var Cautions = []string{
	"An information criterion compares models fitted to the same observations, and only those. " +
		"Criterion values, Δ and weights of different analyses (other datasets, other wells or groups, " +
		"other subsets or censoring codes) cannot be set against one another.",
	"The top-ranked family is only the best of the candidates that were tried. It can still describe " +
		"the data poorly: look at the adequacy p-values and at the Q–Q, P–P and CDF plots before relying " +
		"on it. A small p-value says the data are unlikely under the model; a large one does not prove the model right.",
	"Do not attach significance tests to a model chosen this way as if it had been fixed in advance: " +
		"choosing among candidates with the same data makes such tests and the intervals of the chosen family " +
		"look more certain than they are. The model-averaged rows carry part of that selection uncertainty.",
	"Return levels for periods much longer than the record, and quantiles far in a tail, rest on the shape " +
		"of the fitted tail more than on the data; their intervals widen accordingly and may still be too narrow.",
	"Where these results inform safety or compliance (design floods, component lives, discharge or " +
		"drinking-water limits), they support, and do not replace, the judgement of a licensed professional " +
		"applying the local codes and standards.",
}

// conditional reports whether any derived row of r is conditional on
// exceeding a threshold (Derived.Given).
func conditional(r *Report) bool {
	for _, a := range r.Analyses {
		for _, d := range a.Derived {
			if d.Given != nil {
				return true
			}
		}
	}
	return false
}

func methodsText(r *Report) []string {
	s := r.Settings
	intervals := map[string]string{
		"profile":   "profile likelihood: the parameter values whose profile log-likelihood lies within half the chi-square quantile (1 degree of freedom) at that level of the maximum (Venzon & Moolgavkar 1988)",
		"wald":      "Wald: the estimate ± the normal quantile times the standard error from the observed information",
		"bootstrap": "studentized parametric bootstrap (bootstrap-t): the model is simulated at the estimates and refitted, and each replicate's estimate, standardised by its own observed-information standard error on the Wald scale, calibrates the interval (Davison & Hinkley 1997, section 5.2.1)",
	}[s.Intervals]
	if intervals == "" {
		intervals = "as named in each table's interval column"
	}
	boot := "Adequacy p-values were not computed (bootstrap = 0); the tables leave them empty."
	if s.Bootstrap > 0 {
		boot = fmt.Sprintf("Adequacy: the goodness-of-fit statistic (Anderson–Darling, Cramér–von Mises or Kolmogorov–Smirnov for complete continuous data, "+
			"chi-square for counts) is compared with its distribution under the fitted model, found by a parametric bootstrap of %d replicates, each "+
			"simulated from the fit and refitted; p = (r + 1)/(B + 1), where r replicates give a statistic at least as large as the data's. "+
			"Data censored in one direction (suspensions alone or non-detects alone) are judged by Kolmogorov–Smirnov and Cramér–von Mises "+
			"against the Kaplan–Meier estimate of the CDF up to the largest observation (Koziol & Green 1976), non-detects by reflection, "+
			"without Anderson–Darling, whose tail weights are unstable where few units are at risk; each of their replicates is censored as the "+
			"data were: a censored value keeps its own limit, an exact one gets a censoring time drawn from the Kaplan–Meier estimate of the "+
			"censoring times beyond it (conditional bootstrap; Davison & Hinkley 1997, section 3.5). Binned data (every value recorded as one of "+
			"disjoint bins) are judged by Pearson's chi-square over the bins, pooled to expected counts of at least 5, each replicate recorded in "+
			"the same bins. Other interval-censored data and data censored in both directions get no adequacy p-value.", s.Bootstrap)
	}
	derived := "Derived quantities. The quantile at lower-tail probability p is the value x with F(x) = p, the inverse CDF at p (p = 0.1 gives the B10 life); the return level for a " +
		"period of T years is the 1 − 1/T quantile of the annual-maximum distribution (Coles 2001); an exceedance probability is " +
		"P(X > t) = 1 − F(t), so the chance of a value at or below t is one minus it. Model-averaged rows combine the ranked " +
		"families with their Akaike weights (Burnham & Anderson 2002, ch. 4)."
	if conditional(r) {
		derived += " A model of the excesses over a fixed threshold u (gpd; weibull3 or lognormal3 with the threshold fixed) describes X given X > u, and its quantities are labelled so: " +
			"its return period T counts values above u, not years, and each of its rows says what the unconditional value needs " +
			"(the chance of exceeding u, or the number of values above u a year)."
	}
	return []string{
		"Fitting. Each candidate family is fitted by maximum likelihood to the same observations. An exact value contributes ln f(x); " +
			"a non-detect (left-censored) ln F(x); a suspension (right-censored) ln S(x) = ln(1 − F(x)); an interval ln(F(u) − F(l)). " +
			"The log-likelihood keeps every constant, so all families of one comparison are on the same footing. A family that cannot take " +
			"the data, or whose fit did not converge, is listed as not ranked, with the reason.",
		"Ranking. AIC = 2k − 2 ln L (Akaike 1974); AICc = AIC + 2k(k + 1)/(n − k − 1) (Hurvich & Tsai 1989); BIC = k ln n − 2 ln L " +
			"(Schwarz 1978), with k free parameters and n observations. Δ is a family's criterion minus the smallest; the Akaike weight is " +
			"exp(−Δ/2) divided by the sum over the ranked families (Burnham & Anderson 2002). The support label restates Δ in the words of " +
			"Burnham & Anderson's rough guide (Δ ≤ 2 substantial, 4–7 considerably less, > 10 essentially none); it is a description, not a test.",
		boot,
		"Intervals at " + templates.Percent(s.Confidence) + " %: " + intervals + ".",
		derived,
		"Figures. Densities (or probability mass functions) of the leading candidates are drawn over a histogram of the exact values; " +
			"the empirical CDF (Kaplan–Meier for suspensions, its reverse for non-detects, Turnbull for other censoring) is set against the fitted CDFs; Q–Q and P–P plots " +
			"show the best candidate, with a 95 % pointwise envelope from 199 samples of the fit (for suspensions or non-detects, samples censored as the data were). " +
			"Binned data (disjoint intervals) have instead, around their empirical CDF, a 95 % pointwise envelope of the cumulative proportions at the bin edges " +
			"from 199 samples of the best fit recorded in the same bins. Other interval-censored data and counts have none.",
	}
}

// analysis lays out one analysis's section.
func (d *doc) analysis(i int) {
	f, a := d.f, d.r.Analyses[i]
	f.AddPage()
	title := fmt.Sprintf("%d  %s", i+1, a.Name)
	f.Bookmark(title, 0, 0)
	d.mark(i + 1)
	d.heading(title)

	d.subheading("Data")
	s := a.Summary
	d.table([]column{{"n", 14, "R"}, {"exact", 16, "R"}, {"left-cens.", 19, "R"}, {"right-cens.", 20, "R"},
		{"interval", 16, "R"}, {"missing", 16, "R"}, {"min", 22, "R"}, {"median", 22, "R"}, {"max", 22, "R"}},
		[][]string{{strconv.Itoa(s.N), strconv.Itoa(s.Exact), strconv.Itoa(s.LeftCensored), strconv.Itoa(s.RightCensored),
			strconv.Itoa(s.IntervalCensored), strconv.Itoa(s.Missing), summaryNumber(a, s.Min), summaryNumber(a, s.Median), summaryNumber(a, s.Max)}}, nil)
	d.font("", 8.5)
	units := a.Units
	if units == "" {
		units = "not given"
	}
	kind := "continuous"
	if a.Discrete {
		kind = "counts"
	}
	var counted string
	switch {
	case s.IntervalCensored > 0 && s.LeftCensored+s.RightCensored > 0:
		counted = " Min, median and max are over the recorded values: non-detect limits, suspensions and both finite bounds of each interval."
	case s.IntervalCensored > 0:
		counted = " Min, median and max are over the finite bounds of the intervals (and the exact values)."
	case s.LeftCensored+s.RightCensored > 0:
		counted = " Non-detects and suspensions count at their recorded limits in min, median and max."
	}
	f.MultiCell(textW, 4.4, fmt.Sprintf("Dataset %s; units: %s; data: %s.%s", a.Dataset, units, kind, counted), "", "L", false)

	crit := a.CriterionName()
	d.subheading("Ranking by " + crit)
	var rows [][]string
	for _, c := range a.Fitted() {
		p := templates.Fixed(3, c.AdequacyP)
		if p != "" && c.Statistic != "" {
			p += " (" + statisticAbbreviation(c.Statistic) + ")"
		}
		rows = append(rows, []string{strconv.Itoa(c.Rank), c.Family, strconv.Itoa(c.K), templates.Fixed(2, c.LogLik),
			templates.Fixed(2, c.Criterion), templates.Fixed(2, c.Delta), templates.Fixed(3, c.Weight), c.Support, orDash(p)})
	}
	d.table([]column{{"rank", 11, "R"}, {"family", 27, "L"}, {"k", 8, "R"}, {"ln L", 22, "R"}, {crit, 22, "R"},
		{"Δ" + crit, 18, "R"}, {"weight", 15, "R"}, {"support", 29, "L"}, {"adequacy p", 28, "R"}}, rows, nil)
	var used []string
	for _, c := range a.Fitted() {
		if c.Statistic != "" && !slices.Contains(used, c.Statistic) {
			used = append(used, c.Statistic)
		}
	}
	const weightsNote = " Δ and weights compare the families of this analysis only."
	censored := s.LeftCensored+s.RightCensored+s.IntervalCensored > 0
	unchecked := s.IntervalCensored > 0 || (s.LeftCensored > 0 && s.RightCensored > 0)
	switch {
	case len(used) > 0:
		var parts []string
		for _, u := range used {
			parts = append(parts, statisticAbbreviation(u)+": "+statisticName(u))
		}
		against := ""
		if censored && !slices.Contains(used, infer.ChiSquare) {
			against = ", against the " + KaplanMeierCaption
		}
		d.font("I", 7.5)
		f.MultiCell(textW, 4, "Adequacy p: parametric-bootstrap p-value of the goodness-of-fit statistic ("+strings.Join(parts, "; ")+
			")"+against+"; – where not computed."+weightsNote, "", "L", false)
	case len(a.Fitted()) > 0 && unchecked:
		d.font("I", 7.5)
		f.MultiCell(textW, 4, "Adequacy p: none for these data: "+infer.NotApplicableCensored+
			". Judge the fit by the fitted CDFs against the nonparametric estimate and by the Q–Q and P–P plots."+weightsNote, "", "L", false)
	case len(a.Fitted()) > 0:
		d.font("I", 7.5)
		f.MultiCell(textW, 4, "Adequacy p: none computed (each fit's inference note in results.json says why)."+weightsNote, "", "L", false)
	}
	var notes []string
	if a.CriterionNote != "" {
		notes = append(notes, a.CriterionNote)
	}
	for _, c := range a.NotRanked() {
		n := "Not ranked: " + c.Family
		if c.Note != "" {
			n += ": " + c.Note
		}
		notes = append(notes, n)
	}
	var fams, remarks []string
	for _, c := range a.Fitted() {
		fams, remarks = append(fams, c.Family), append(remarks, c.Remarks)
	}
	notes = append(notes, runner.GroupRemarks(fams, remarks)...)
	for _, c := range a.Fitted() {
		if c.Note != "" {
			notes = append(notes, c.Family+": "+c.Note)
		}
		// A p-value from fewer replicates than were drawn says so.
		if strings.Contains(c.AdequacyNote, "replicates failed") {
			notes = append(notes, c.Family+": adequacy p: "+c.AdequacyNote)
		}
	}
	notes = append(notes, a.Notes...)

	// Why a cell of the parameter or derived tables is blank or open, once
	// per reason, with the rows it concerns.
	var rowNotes blankNotes
	if len(a.Parameters) > 0 {
		d.subheading(fmt.Sprintf("Parameters (%s %% intervals)", a.Level()))
		rows, styles := [][]string(nil), []string(nil)
		for _, p := range a.Parameters {
			se, method := templates.Sig(3, p.StdError), p.Method
			if p.Fixed {
				se, method = "fixed", "fixed"
			}
			rows = append(rows, []string{p.Family, p.Name, templates.Sig(4, p.Estimate), orDash(se),
				bound(p.Lower, p.LowerOpen), bound(p.Upper, p.UpperOpen), orDash(method)})
			rowNotes.add(p.Family+" "+p.Name, p.Note, math.IsNaN(p.Lower) || math.IsNaN(p.Upper) || p.LowerOpen || p.UpperOpen)
			style := ""
			if p.BestFamily {
				style = "B"
			}
			styles = append(styles, style)
		}
		d.table([]column{{"family", 28, "L"}, {"parameter", 26, "L"}, {"estimate", 26, "R"}, {"std. error", 24, "R"},
			{"lower", 25, "R"}, {"upper", 25, "R"}, {"interval", 26, "L"}}, rows, styles)
		d.font("I", 7.5)
		f.CellFormat(textW, 4, "Bold rows: the top-ranked family.", "", 1, "L", false, 0, "")
	}

	if len(a.Derived) > 0 {
		d.subheading(fmt.Sprintf("Derived quantities (%s %% intervals)", a.Level()))
		rows, styles := [][]string(nil), []string(nil)
		for _, q := range a.Derived {
			fam, style := q.Family, ""
			switch {
			case q.IsModelAverage():
				fam, style = "model average", "I"
			case q.BestFamily:
				style = "B"
			}
			rows = append(rows, []string{fam, q.Label(), orDash(q.EstimateText()),
				bound(q.Lower, q.LowerOpen), bound(q.Upper, q.UpperOpen), orDash(q.Method)})
			// A model-averaged row's note (families left out, weights
			// renormalised) is always a caveat worth reading.
			rowNotes.add(fam+" "+q.Label(), q.Note, q.IsModelAverage() || math.IsNaN(q.Estimate) || math.IsNaN(q.Lower) || math.IsNaN(q.Upper) || q.LowerOpen || q.UpperOpen)
			styles = append(styles, style)
		}
		d.table([]column{{"family", 27, "L"}, {"quantity", 35, "L"}, {"estimate", 22, "R"}, {"lower", 22, "R"},
			{"upper", 22, "R"}, {"interval", 52, "L"}}, rows, styles)
		note := "Bold rows: the top-ranked family."
		if slices.ContainsFunc(a.Derived, Derived.IsModelAverage) {
			note = "Bold rows: the top-ranked family; italic rows: averaged over the ranked families by their Akaike weights."
		}
		d.font("I", 7.5)
		f.CellFormat(textW, 4, note, "", 1, "L", false, 0, "")
	}

	notes = append(notes, runner.GroupRemarks(rowNotes.rows, rowNotes.notes)...)
	if len(notes) > 0 {
		d.subheading("Notes")
		for _, n := range notes {
			d.font("", 8.5)
			x := f.GetX()
			f.CellFormat(4, 4.4, "–", "", 0, "L", false, 0, "")
			f.MultiCell(textW-4, 4.4, n, "", "L", false)
			f.SetX(x)
		}
	}

	if len(a.Figures) > 0 {
		// Keep the heading with the first row of figures.
		if f.GetY()+8+(textW-6)/2*float64(figureHeight)/float64(figureWidth)+10 > pageH-bottomMargin {
			f.AddPage()
		}
		d.subheading("Figures")
		d.figures(i, a.Figures)
	}
}

type column struct {
	head  string
	w     float64
	align string
}

// table draws a booktabs-style table: rules above and below the header and
// at the end, no vertical lines. A row that would cross the bottom margin
// starts a new page with the header repeated. styles (optional) sets each
// row's font style.
func (d *doc) table(cols []column, rows [][]string, styles []string) {
	f := d.f
	x0 := margin
	width := 0.0
	for _, c := range cols {
		width += c.w
	}
	header := func() {
		f.SetLineWidth(0.35)
		f.Line(x0, f.GetY(), x0+width, f.GetY())
		f.SetX(x0)
		d.font("B", 8.5)
		for _, c := range cols {
			d.fitCell(c.w, rowH+0.6, c.head, c.align, "B", 0)
		}
		f.Ln(rowH + 0.6)
		f.SetLineWidth(0.2)
		f.Line(x0, f.GetY(), x0+width, f.GetY())
	}
	if f.GetY()+2*rowH+2 > pageH-bottomMargin {
		f.AddPage()
	}
	header()
	const lineH = 3.8
	for i, row := range rows {
		style := ""
		if i < len(styles) {
			style = styles[i]
		}
		// Text columns wrap onto further lines; number columns shrink.
		d.font(style, 8.5)
		wrapped := make([][]string, len(cols))
		lines := 1
		for j, c := range cols {
			if j < len(row) && c.align == "L" && f.GetStringWidth(row[j]) > c.w-1.6 {
				wrapped[j] = f.SplitText(row[j], c.w-1.6)
				lines = max(lines, len(wrapped[j]))
			}
		}
		h := rowH + float64(lines-1)*lineH
		if f.GetY()+h+1 > pageH-bottomMargin {
			f.SetLineWidth(0.35)
			f.Line(x0, f.GetY(), x0+width, f.GetY())
			f.AddPage()
			header()
		}
		y, x := f.GetY(), x0
		for j, c := range cols {
			cell := ""
			if j < len(row) {
				cell = row[j]
			}
			d.font(style, 8.5)
			if wrapped[j] != nil {
				for k, l := range wrapped[j] {
					f.SetXY(x, y+(rowH-lineH)/2+float64(k)*lineH)
					f.CellFormat(c.w, lineH, l, "", 0, c.align, false, 0, "")
				}
			} else {
				f.SetXY(x, y)
				d.fitCell(c.w, rowH, cell, c.align, style, 0)
			}
			x += c.w
		}
		f.SetXY(x0, y+h)
	}
	f.SetLineWidth(0.35)
	f.Line(x0, f.GetY(), x0+width, f.GetY())
	f.SetLineWidth(0.2)
	f.Ln(1)
}

// fitCell writes s in a cell of width w without clipping: the font shrinks
// (to 6 pt at least) until s fits, and past that s is cut with "…".
func (d *doc) fitCell(w, h float64, s, align, style string, link int) {
	f := d.f
	size, _ := f.GetFontSize()
	avail := w - 1.6
	cur := size
	for f.GetStringWidth(s) > avail && cur > 6 {
		cur -= 0.5
		f.SetFontSize(cur)
	}
	if f.GetStringWidth(s) > avail {
		r := []rune(s)
		for len(r) > 1 && f.GetStringWidth(string(r)+"…") > avail {
			r = r[:len(r)-1]
		}
		s = string(r) + "…"
	}
	f.CellFormat(w, h, s, "", 0, align, false, link, "")
	f.SetFontSize(size)
}

// figures places the figures two to a row, each with its caption beneath:
// as vector graphics when drawn by RenderFigures, else as the PNG.
func (d *doc) figures(i int, figs []Figure) {
	f := d.f
	const gap = 6.0
	w := (textW - gap) / 2
	for j := 0; j < len(figs); j += 2 {
		pair := figs[j:min(j+2, len(figs))]
		heights := make([]float64, len(pair))
		rowHt := 0.0
		for k, fig := range pair {
			h := w * float64(figureHeight) / float64(figureWidth)
			if fig.plot == nil {
				info := f.RegisterImageOptionsReader(fmt.Sprintf("a%d-f%d", i, j+k), gofpdf.ImageOptions{ImageType: "PNG"}, bytes.NewReader(fig.PNG))
				if f.Err() {
					return
				}
				h = w * info.Height() / info.Width()
			}
			heights[k] = h
			d.font("I", 7.5)
			capH := float64(len(f.SplitText(fig.Caption, w))) * 3.6
			rowHt = math.Max(rowHt, h+capH+2)
		}
		if f.GetY()+rowHt > pageH-bottomMargin {
			f.AddPage()
		}
		y := f.GetY()
		for k, fig := range pair {
			x := margin + float64(k)*(w+gap)
			if fig.plot != nil {
				fig.plot.Draw(draw.New(newPDFCanvas(f, x, y, w, figureWidth, figureHeight)))
				f.SetLineWidth(0.2)
				f.SetDrawColor(0, 0, 0)
				f.SetFillColor(255, 255, 255)
			} else {
				f.ImageOptions(fmt.Sprintf("a%d-f%d", i, j+k), x, y, w, heights[k], false, gofpdf.ImageOptions{ImageType: "PNG"}, 0, "")
			}
			f.SetXY(x, y+heights[k]+0.8)
			d.font("I", 7.5)
			f.MultiCell(w, 3.6, fig.Caption, "", "L", false)
		}
		f.SetXY(margin, y+rowHt+2)
	}
}

// summaryNumber prints a data summary value as recorded: up to six
// significant digits without padding (0.2, 26.75, 10576).
func summaryNumber(_ Analysis, x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "–"
	}
	return strconv.FormatFloat(x, 'g', 6, 64)
}

// KaplanMeierCaption says, under a ranking of censored data, what their
// adequacy p-values are computed against and how.
const KaplanMeierCaption = "Kaplan–Meier estimate of the CDF (censored data), each replicate censored as the data were (conditional bootstrap)"

// statisticAbbreviation is the adequacy statistic's short name in tables.
func statisticAbbreviation(s string) string {
	switch s {
	case "ad":
		return "AD"
	case "cvm":
		return "CvM"
	case "ks":
		return "KS"
	case "chisq":
		return "χ²"
	}
	return s
}
