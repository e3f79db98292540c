package report

import (
	"crypto/sha256"
	"encoding/hex"
	"strconv"
	"strings"

	"fitseal/templates"
)

// The built-in table templates (templates/tables/*.tmpl) written out in Go.
//
// text/template evaluates every field and helper through reflection, which
// made table rendering a tenth of a whole run's CPU for many small analyses
// (6000 tables for 1000 analyses). Each function below writes exactly the
// bytes its template gives, and is used only for a template whose text has
// the SHA-256 it was written against: an edited template, or a project's
// own, goes through text/template as before. TestBuiltinTablesMatchTemplates
// checks the bytes against the templates on many analyses, and fails when
// a template changes without its function here.
type builtinTable struct {
	// textSHA256 is the hex SHA-256 of the template text this mirrors.
	textSHA256 string
	render     func(b []byte, a *Analysis, slug string) []byte
}

var builtinTables = map[string]builtinTable{
	"ranking.md.tmpl":     {"1d2971091bf0427083eb54c13f2b1b02c59a41d12f329366ceb5aabd605a4d93", rankingMD},
	"ranking.tex.tmpl":    {"b36940ec0a1067388fe484ab0ce02003b83b55466e1a6938326c55e36b0cf819", rankingTeX},
	"parameters.md.tmpl":  {"248f84a68b6696ebde2c378a1fdb8f52ffb631d4b061ff340cc813d5d474bd0f", parametersMD},
	"parameters.tex.tmpl": {"3e6c6c1c9754f0c545883941970e89a6b98e5d4acf0e7a43ef43fdd040d19fc6", parametersTeX},
	"derived.md.tmpl":     {"39d8493836d881bb04301510a06649823bf6a166a27508df14002c30d286590b", derivedMD},
	"derived.tex.tmpl":    {"8d097c99fe413db4e707d57aaf6fbeefdb2a32e35d4a729c9a08a98fe4390994", derivedTeX},
}

// builtinFor returns the Go rendering of t, or nil when t's text is not a
// built-in template's exactly.
func builtinFor(t *templates.TableTemplate) func([]byte, *Analysis, string) []byte {
	bt, ok := builtinTables[t.Name()]
	if !ok {
		return nil
	}
	sum := sha256.Sum256(t.Text)
	if hex.EncodeToString(sum[:]) != bt.textSHA256 {
		return nil
	}
	return bt.render
}

// md is the template helper "md": Markdown table pipes escaped, "–" for "".
func md(b []byte, s string) []byte {
	if s == "" {
		return append(b, "–"...)
	}
	for {
		i := strings.IndexByte(s, '|')
		if i < 0 {
			return append(b, s...)
		}
		b = append(append(b, s[:i]...), `\|`...)
		s = s[i+1:]
	}
}

// num is the template helper "num": "\num{S}", or "{--}" for "".
func num(b []byte, s string) []byte {
	if s == "" {
		return append(b, "{--}"...)
	}
	return append(append(append(b, `\num{`...), s...), '}')
}

func tex(b []byte, s string) []byte { return append(b, templates.TeXEscape(s)...) }

func itoa(b []byte, n int) []byte { return strconv.AppendInt(b, int64(n), 10) }

// The ranking tables take the rows of Analysis.Fitted (Rank > 0) and of
// Analysis.NotRanked (Rank == 0) without building the two slices.

func rankingMD(b []byte, a *Analysis, _ string) []byte {
	cn := a.CriterionName()
	b = append(b, "**Table: candidate distributions for "...)
	b = md(b, a.Name)
	if a.Units != "" {
		b = append(b, " ("...)
		b = append(md(b, a.Units), ')')
	}
	b = append(b, ", ranked by "...)
	b = append(b, cn...)
	b = append(b, "** (n = "...)
	b = append(itoa(b, a.Summary.N), ")\n\n| Rank | Family | k | ln L | "...)
	b = append(b, cn...)
	b = append(b, " | Δ | Weight | Support | Adequacy p |\n|---:|:---|---:|---:|---:|---:|---:|:---|---:|\n"...)
	for _, c := range a.Ranking {
		if c.Rank <= 0 {
			continue
		}
		b = append(itoa(append(b, "| "...), c.Rank), " | "...)
		b = append(md(b, c.Family), " | "...)
		b = append(itoa(b, c.K), " | "...)
		b = append(md(b, templates.Fixed(2, c.LogLik)), " | "...)
		b = append(md(b, templates.Fixed(2, c.Criterion)), " | "...)
		b = append(md(b, templates.Fixed(2, c.Delta)), " | "...)
		b = append(md(b, templates.Fixed(3, c.Weight)), " | "...)
		b = append(md(b, c.Support), " | "...)
		b = append(md(b, templates.Fixed(3, c.AdequacyP)), " |\n"...)
	}
	if a.CriterionNote != "" {
		b = append(append(append(b, '\n'), a.CriterionNote...), '\n')
	}
	for _, c := range a.Ranking {
		if c.Rank != 0 {
			continue
		}
		b = append(append(b, "\n- Not ranked: "...), c.Family...)
		if c.Note != "" {
			b = append(append(b, ": "...), c.Note...)
		}
	}
	return append(b, '\n')
}

func rankingTeX(b []byte, a *Analysis, slug string) []byte {
	cn := a.CriterionName()
	b = append(b, "% fitseal: candidate distributions for "...)
	b = append(b, a.Name...)
	b = append(b, ", ranked by "...)
	b = append(b, cn...)
	b = append(b, ".\n% Needs \\usepackage{booktabs} and \\usepackage{siunitx}; \\input this file.\n\\begin{table}[htbp]\n  \\centering\\small\n  \\setlength{\\tabcolsep}{3.5pt}\n  \\caption{Candidate distributions for "...)
	b = tex(b, a.Name)
	if a.Units != "" {
		b = append(b, " ("...)
		b = append(tex(b, a.Units), ')')
	}
	b = append(b, ", ranked by "...)
	b = append(b, cn...)
	b = append(itoa(append(b, " ($n = "...), a.Summary.N), "$).}\n  \\label{tab:"...)
	b = append(b, slug...)
	b = append(b, ":ranking}\n  \\begin{tabular}{rlrrrrrp{2cm}r}\n    \\toprule\n    Rank & Family & $k$ & $\\ln L$ & "...)
	b = append(b, cn...)
	b = append(b, " & $\\Delta$ & Weight & Support & Adeq.\\ $p$ \\\\\n    \\midrule"...)
	notRanked := 0
	for _, c := range a.Ranking {
		if c.Rank == 0 {
			notRanked++
		}
		if c.Rank <= 0 {
			continue
		}
		b = append(itoa(append(b, "\n    "...), c.Rank), " & "...)
		b = append(tex(b, c.Family), " & "...)
		b = append(itoa(b, c.K), " & "...)
		b = append(num(b, templates.Fixed(2, c.LogLik)), " & "...)
		b = append(num(b, templates.Fixed(2, c.Criterion)), " & "...)
		b = append(num(b, templates.Fixed(2, c.Delta)), " & "...)
		b = append(num(b, templates.Fixed(3, c.Weight)), " & "...)
		if c.Support != "" {
			b = append(tex(append(b, `{\raggedright `...), c.Support), `\par}`...)
		}
		b = append(b, " & "...)
		b = append(num(b, templates.Fixed(3, c.AdequacyP)), ` \\`...)
	}
	b = append(b, "\n    \\bottomrule\n  \\end{tabular}"...)
	if a.CriterionNote != "" || notRanked > 0 {
		b = append(b, "\n  \\par\\smallskip\\footnotesize"...)
		if a.CriterionNote != "" {
			b = tex(append(b, "\n  "...), a.CriterionNote)
		}
		for _, c := range a.Ranking {
			if c.Rank != 0 {
				continue
			}
			b = tex(append(b, "\n  Not ranked: "...), c.Family)
			if c.Note != "" {
				b = tex(append(b, ": "...), c.Note)
			}
			b = append(b, '.')
		}
	}
	return append(b, "\n\\end{table}\n"...)
}

func parametersMD(b []byte, a *Analysis, _ string) []byte {
	b = append(b, "**Table: parameter estimates for "...)
	b = md(b, a.Name)
	b = append(b, ", with "...)
	b = append(b, a.Level()...)
	b = append(b, " % intervals**\n\n| Family | Parameter | Estimate | Std. error | Lower | Upper | Interval |\n|:---|:---|---:|---:|---:|---:|:---|\n"...)
	for i := range a.Parameters {
		p := &a.Parameters[i]
		b = append(md(append(b, "| "...), p.Family), " | "...)
		b = append(md(b, p.Name), " | "...)
		b = append(md(b, templates.Sig(4, p.Estimate)), " | "...)
		if p.Fixed {
			b = append(b, "fixed"...)
		} else {
			b = md(b, templates.Sig(3, p.StdError))
		}
		b = append(b, " | "...)
		b = append(md(b, templates.Sig(4, p.Lower)), " | "...)
		b = append(md(b, templates.Sig(4, p.Upper)), " | "...)
		if p.Fixed {
			b = append(b, "fixed"...)
		} else {
			b = md(b, p.Method)
		}
		b = append(b, " |\n"...)
	}
	return b
}

func parametersTeX(b []byte, a *Analysis, slug string) []byte {
	m := a.CommonParameterMethod()
	var notes []MethodNote
	if m == "" {
		notes = a.ParameterMethods()
	}
	b = append(b, "% fitseal: parameter estimates for "...)
	b = append(b, a.Name...)
	b = append(b, ".\n% Needs \\usepackage{booktabs} and \\usepackage{siunitx}; \\input this file.\n\\begin{table}[htbp]\n  \\centering\\small\n  \\setlength{\\tabcolsep}{3.5pt}\n  \\caption{Parameter estimates for "...)
	b = tex(b, a.Name)
	b = append(b, ", with "...)
	b = append(b, a.Level()...)
	b = append(b, `\,\% `...)
	if m != "" {
		b = append(tex(b, m), ' ')
	}
	b = append(b, "intervals.}\n  \\label{tab:"...)
	b = append(b, slug...)
	b = append(b, ":parameters}\n  \\begin{tabular}{llrrrr"...)
	if m == "" {
		b = append(b, 'c')
	}
	b = append(b, "}\n    \\toprule\n    Family & Parameter & Estimate & SE & Lower & Upper"...)
	if m == "" {
		b = append(b, " & Int."...)
	}
	b = append(b, " \\\\\n    \\midrule"...)
	for i := range a.Parameters {
		p := &a.Parameters[i]
		b = append(tex(append(b, "\n    "...), p.Family), " & "...)
		b = append(tex(b, p.Name), " & "...)
		b = append(num(b, templates.Sig(4, p.Estimate)), " & "...)
		if p.Fixed {
			b = append(b, "fixed"...)
		} else {
			b = num(b, templates.Sig(3, p.StdError))
		}
		b = append(b, " & "...)
		b = append(num(b, templates.Sig(4, p.Lower)), " & "...)
		b = num(b, templates.Sig(4, p.Upper))
		if m == "" {
			b = append(b, " & "...)
			if p.Fixed {
				b = append(b, "fixed"...)
			} else {
				b = append(b, keyOf(notes, p.Method)...)
			}
		}
		b = append(b, ` \\`...)
	}
	b = append(b, "\n    \\bottomrule\n  \\end{tabular}"...)
	b = methodFootnote(b, notes)
	return append(b, "\n\\end{table}\n"...)
}

// methodFootnote writes the interval-method key below a LaTeX table, when
// there is one.
func methodFootnote(b []byte, notes []MethodNote) []byte {
	if len(notes) == 0 {
		return b
	}
	b = append(b, "\n  \\par\\smallskip\\footnotesize\n  Int.: interval method,"...)
	for i, n := range notes {
		if i > 0 {
			b = append(b, ';')
		}
		b = append(append(append(b, " ("...), n.Key...), ") "...)
		b = tex(b, n.Method)
	}
	return append(b, '.')
}

func derivedMD(b []byte, a *Analysis, _ string) []byte {
	b = append(b, "**Table: derived quantities for "...)
	b = md(b, a.Name)
	if a.Units != "" {
		b = append(b, " ("...)
		b = append(md(b, a.Units), ')')
	}
	b = append(b, ", with "...)
	b = append(b, a.Level()...)
	b = append(b, " % intervals**\n\n| Family | Quantity | Estimate | Lower | Upper | Interval |\n|:---|:---|---:|---:|---:|:---|\n"...)
	for i := range a.Derived {
		d := &a.Derived[i]
		b = append(b, "| "...)
		if d.IsModelAverage() {
			b = append(b, "*model average*"...)
		} else {
			b = md(b, d.Family)
		}
		b = append(b, " | "...)
		b = append(md(b, d.Label()), " | "...)
		b = append(md(b, d.EstimateText()), " | "...)
		b = append(md(b, templates.Sig(4, d.Lower)), " | "...)
		b = append(md(b, templates.Sig(4, d.Upper)), " | "...)
		b = append(md(b, d.Method), " |\n"...)
	}
	return b
}

func derivedTeX(b []byte, a *Analysis, slug string) []byte {
	notes := a.DerivedMethods()
	b = append(b, "% fitseal: derived quantities for "...)
	b = append(b, a.Name...)
	b = append(b, ".\n% Needs \\usepackage{booktabs} and \\usepackage{siunitx}; \\input this file.\n\\begin{table}[htbp]\n  \\centering\\small\n  \\setlength{\\tabcolsep}{3pt}\n  \\caption{Derived quantities for "...)
	b = tex(b, a.Name)
	if a.Units != "" {
		b = append(b, " ("...)
		b = append(tex(b, a.Units), ')')
	}
	b = append(b, ", with "...)
	b = append(b, a.Level()...)
	b = append(b, "\\,\\% intervals.}\n  \\label{tab:"...)
	b = append(b, slug...)
	b = append(b, ":derived}\n  \\begin{tabular}{llrrrc}\n    \\toprule\n    Family & Quantity & Estimate & Lower & Upper & Int. \\\\\n    \\midrule"...)
	for i := range a.Derived {
		d := &a.Derived[i]
		b = append(b, "\n    "...)
		if d.IsModelAverage() {
			b = append(b, `\emph{model average}`...)
		} else {
			b = tex(b, d.Family)
		}
		b = append(b, " & "...)
		b = append(append(b, d.TeXLabel()...), " & "...)
		b = append(num(b, d.EstimateText()), " & "...)
		b = append(num(b, templates.Sig(4, d.Lower)), " & "...)
		b = append(num(b, templates.Sig(4, d.Upper)), " & "...)
		b = append(append(b, keyOf(notes, d.Method)...), ` \\`...)
	}
	b = append(b, "\n    \\bottomrule\n  \\end{tabular}"...)
	b = methodFootnote(b, notes)
	return append(b, "\n\\end{table}\n"...)
}
