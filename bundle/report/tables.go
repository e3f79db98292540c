package report

import (
	"bytes"
	"fmt"
	"runtime"
	"slices"
	"strings"

	"fitseal/runner"
	"fitseal/templates"
)

// TableContext is what a table template sees: {{.A}} is the analysis and
// {{.Slug}} its file-name form, used in LaTeX labels (tab:SLUG:ranking).
type TableContext struct {
	A    Analysis
	Slug string
}

// File is one rendered output: its name inside its bundle folder
// (tables/ or figures/) and its bytes.
type File struct {
	Name string
	Data []byte
}

// RenderTables renders every template of a format in formats ("md", "tex")
// for every analysis, into files named SLUG-KIND.FORMAT (e.g.
// "nitrate_MW-1-ranking.tex"), in analysis order, then kind order. Load the
// templates with [templates.LoadTables] (the project's folder first).
func RenderTables(tmpls []*templates.TableTemplate, analyses []Analysis, formats []string) ([]File, error) {
	return RenderTablesOn(runtime.GOMAXPROCS(0), tmpls, analyses, formats)
}

// RenderTablesOn is [RenderTables] on at most workers goroutines (at least
// one); the files do not depend on workers.
func RenderTablesOn(workers int, tmpls []*templates.TableTemplate, analyses []Analysis, formats []string) ([]File, error) {
	slugs := Slugs(analyses)
	var use []*templates.TableTemplate
	var builtin []func([]byte, *Analysis, string) []byte
	for _, t := range tmpls {
		if slices.Contains(formats, t.Format) {
			use = append(use, t)
			builtin = append(builtin, builtinFor(t))
		}
	}
	// Analyses are rendered on workers goroutines (templates may run in parallel,
	// text/template's doc); each lands in its own slot, so the order and
	// the bytes do not depend on the number of cores.
	files := make([][]File, len(analyses))
	err := runner.ForEachErr(workers, len(analyses), func(i int) (err error) {
		files[i], err = renderAnalysis(use, builtin, analyses[i], slugs[i])
		return err
	})
	if err != nil {
		return nil, err
	}
	var out []File
	for i := range analyses {
		out = append(out, files[i]...)
	}
	return out, nil
}

// renderAnalysis renders the templates for one analysis, in kind order:
// through builtin[i] when not nil (tables_builtin.go), else through the
// template.
func renderAnalysis(tmpls []*templates.TableTemplate, builtin []func([]byte, *Analysis, string) []byte, a Analysis, slug string) ([]File, error) {
	out := make([]File, 0, len(tmpls))
	for i, t := range tmpls {
		if render := builtin[i]; render != nil {
			out = append(out, File{Name: slug + "-" + t.Kind + "." + t.Format, Data: render(make([]byte, 0, 2048), &a, slug)})
			continue
		}
		var buf bytes.Buffer
		if err := t.Execute(&buf, TableContext{A: a, Slug: slug}); err != nil {
			return nil, fmt.Errorf("table template %s (%s) for analysis %s: %w", t.Name(), t.Source, a.Name, err)
		}
		out = append(out, File{Name: slug + "-" + t.Kind + "." + t.Format, Data: buf.Bytes()})
	}
	return out, nil
}

// Slugs gives each analysis a file-name form of its name: characters other
// than letters, digits, '.', '_' and '-' become '_' ("nitrate/MW-1" →
// "nitrate_MW-1"); a clash gets "-2", "-3", … in analysis order.
func Slugs(analyses []Analysis) []string {
	out := make([]string, len(analyses))
	seen := map[string]bool{}
	for i, a := range analyses {
		base := slug(a.Name)
		s := base
		for n := 2; seen[s]; n++ {
			s = fmt.Sprintf("%s-%d", base, n)
		}
		seen[s] = true
		out[i] = s
	}
	return out
}

func slug(name string) string {
	s := strings.Map(func(r rune) rune {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '.', r == '_', r == '-':
			return r
		}
		return '_'
	}, name)
	if s == "" || strings.Trim(s, ".") == "" {
		s = "analysis"
	}
	return s
}
