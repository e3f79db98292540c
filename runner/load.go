package runner

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"

	"github.com/BurntSushi/toml"
)

// Load reads the project file at path, applies the defaults and checks every
// value. A bad project gives [ProjectErrors] (every problem found, each with
// its key path and line); an unreadable file gives an error that names it
// and the reason ("p: is a directory"), wrapping the cause (errors.Is(err,
// fs.ErrNotExist) for a missing one).
func Load(path string) (*Project, error) {
	src, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, unwrapPathError(err))
	}
	return Parse(path, src)
}

// Parse checks a project file already read; path names it in errors and
// fixes the folder where relative data paths start.
func Parse(path string, src []byte) (*Project, error) {
	l := &loader{file: path, lines: scanKeyLines(src)}
	var raw map[string]any
	if _, err := toml.Decode(string(src), &raw); err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, ProjectErrors{{
				File: path, Line: pe.Position.Line, Key: pe.LastKey,
				Msg:  "not valid TOML: " + pe.Message,
				Hint: "see https://toml.io for the syntax; strings need quotes, tables [name], lists of tables [[name]]",
				Err:  err,
			}}
		}
		return nil, ProjectErrors{{File: path, Msg: "not valid TOML: " + err.Error(), Err: err}}
	}
	p := &Project{File: path, Dir: filepath.Dir(path), Source: src}
	l.project(p, l.newTable("", raw))
	if len(l.errs) > 0 {
		sort.SliceStable(l.errs, func(i, j int) bool {
			li, lj := l.errs[i].Line, l.errs[j].Line
			return li != lj && li > 0 && (lj == 0 || li < lj)
		})
		return nil, l.errs
	}
	p.Defaulted = l.defaulted
	return p, nil
}

// project reads the top level and every table below it.
func (l *loader) project(p *Project, top *table) {
	if name, ok := top.str("name"); ok {
		p.Name = name
		l.checkName(top.key("name"), name, "the project")
	} else if _, present := top.m["name"]; !present {
		l.errorf("name", `add a line such as name = "harbor-pumps-2026" at the top`, "is required: it names the bundle")
	}
	if d, ok := top.str("description"); ok {
		p.Description = d
	}
	settings, ok := top.sub("settings")
	if !ok {
		settings = l.newTable("settings", map[string]any{})
	}
	l.settings(&p.Settings, settings)

	for _, t := range top.tables("dataset") {
		p.Datasets = append(p.Datasets, l.dataset(p, t))
	}
	for _, t := range top.tables("candidates") {
		p.Candidates = append(p.Candidates, l.candidates(t))
	}
	analyses := top.tables("analysis")
	for _, t := range analyses {
		p.Analyses = append(p.Analyses, l.analysis(p, t))
	}
	report, ok := top.sub("report")
	if !ok {
		report = l.newTable("report", map[string]any{})
	}
	l.report(p, &p.Report, report)
	top.done()

	l.unique("dataset", len(p.Datasets), func(i int) string { return p.Datasets[i].Name })
	l.unique("candidates", len(p.Candidates), func(i int) string { return p.Candidates[i].Name })
	l.unique("analysis", len(p.Analyses), func(i int) string { return p.Analyses[i].Name })
	if len(analyses) == 0 && len(l.errs) == 0 {
		l.errorf("analysis", "add an [[analysis]] table naming a dataset and a candidate set", "no analysis: the project has nothing to fit")
	}
}

// unique reports names used twice among the tables of an array.
func (l *loader) unique(array string, n int, name func(int) string) {
	first := map[string]int{}
	for i := 0; i < n; i++ {
		nm := name(i)
		if nm == "" {
			continue
		}
		if j, dup := first[nm]; dup {
			hint := "give each a different name"
			if array == "analysis" {
				hint = "two analyses of one dataset need their own name = \"…\" keys"
			}
			l.errorf(fmt.Sprintf("%s[%d].name", array, i), hint, "%q is already the name of %s[%d]", nm, array, j)
			continue
		}
		first[nm] = i
	}
}

// validName reports whether s is a well-formed name: [a-z0-9._-]+, not "."
// or "..", at most 100 bytes.
func validName(s string) bool {
	if s == "" || s == "." || s == ".." || len(s) > 100 {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '.' || c == '_' || c == '-') {
			return false
		}
	}
	return true
}

func (l *loader) checkName(path, name, what string) {
	if !validName(name) {
		l.errorf(path, "use lower-case letters, digits, '.', '_' and '-' only, e.g. \"seal-life\"",
			"%q is not a valid name for %s", name, what)
	}
}

func (l *loader) settings(s *Settings, t *table) {
	s.Seed = DefaultSeed
	if v, ok := t.integer("seed"); ok {
		if v < 0 {
			l.errorf(t.key("seed"), "use a non-negative integer such as 20261202", "%d is negative", v)
		}
		s.Seed = uint64(v)
	} else if t.absent("seed") {
		t.defaulted("seed")
	}
	s.Criterion = l.choice(t, "criterion", DefaultCriterion, Criteria)
	s.Confidence = DefaultConfidence
	if v, ok := t.number("confidence"); ok {
		if !(v > 0 && v < 1) {
			l.errorf(t.key("confidence"), "write it as a probability, e.g. 0.95 for 95 %", "%v is not in (0, 1)", v)
		}
		s.Confidence = v
	} else if t.absent("confidence") {
		t.defaulted("confidence")
	}
	s.Intervals = l.choice(t, "intervals", DefaultIntervals, IntervalMethods)
	s.Bootstrap = DefaultBootstrap
	if v, ok := t.integer("bootstrap"); ok {
		if v < 0 || v > 1_000_000 {
			l.errorf(t.key("bootstrap"), "use 0 to turn the bootstrap off, or a replicate count such as 999", "%d is not between 0 and 1000000", v)
		} else {
			s.Bootstrap = int(v)
		}
	} else if t.absent("bootstrap") {
		t.defaulted("bootstrap")
	}
	if s.Intervals == "bootstrap" && s.Bootstrap == 0 {
		l.errorf(t.key("intervals"), "set bootstrap to a replicate count such as 999, or choose intervals = \"profile\"",
			"bootstrap intervals need replicates, but bootstrap = 0")
	}
	s.Tolerance = DefaultTolerance
	if v, ok := t.number("tolerance"); ok {
		if !(v > 0 && v < 1) {
			l.errorf(t.key("tolerance"), "a relative tolerance such as 1e-10", "%v is not in (0, 1)", v)
		}
		s.Tolerance = v
	} else if t.absent("tolerance") {
		t.defaulted("tolerance")
	}
	s.MaxIterations = DefaultMaxIterations
	if v, ok := t.integer("max_iterations"); ok {
		if v < 1 || v > 10_000_000 {
			l.errorf(t.key("max_iterations"), "use a positive count such as 2000", "%d is not between 1 and 10000000", v)
		} else {
			s.MaxIterations = int(v)
		}
	} else if t.absent("max_iterations") {
		t.defaulted("max_iterations")
	}
	if v, ok := t.boolean("require_clean_git"); ok {
		s.RequireCleanGit = v
	} else if t.absent("require_clean_git") {
		t.defaulted("require_clean_git")
	}
	t.done()
}

// choice reads a string key that must be one of choices.
func (l *loader) choice(t *table, k, def string, choices []string) string {
	v, ok := t.str(k)
	if !ok {
		if t.absent(k) {
			t.defaulted(k)
		}
		return def
	}
	for _, c := range choices {
		if v == c {
			return v
		}
	}
	hint := didYouMean(v, choices)
	if hint == "" {
		hint = "choose one of: " + joinQuoted(choices)
	}
	l.errorf(t.key(k), hint, "%q is not one of %s", v, joinQuoted(choices))
	return def
}

func (l *loader) report(p *Project, r *Report, t *table) {
	r.PDF, r.Figures = true, true
	if v, ok := t.boolean("pdf"); ok {
		r.PDF = v
	} else if t.absent("pdf") {
		t.defaulted("pdf")
	}
	if v, ok := t.boolean("figures"); ok {
		r.Figures = v
	} else if t.absent("figures") {
		t.defaulted("figures")
	}
	r.Tables = append([]string(nil), TableFormats...)
	if v, ok := t.strings("tables"); ok {
		r.Tables = v
		seen := map[string]bool{}
		for i, f := range v {
			path := fmt.Sprintf("%s[%d]", t.key("tables"), i)
			if !contains(TableFormats, f) {
				l.errorf(path, "CSV is always written; choose among: "+joinQuoted(TableFormats), "%q is not a table format", f)
			} else if seen[f] {
				l.errorf(path, "list each format once", "%q is listed twice", f)
			}
			seen[f] = true
		}
	} else if t.absent("tables") {
		t.defaulted("tables")
	}
	if v, ok := t.str("templates"); ok {
		r.Templates = v
		l.localPath(p, t.key("templates"), v, true)
	}
	t.done()
}

// localPath checks that rel is a relative path inside the project folder
// naming an existing file (or folder, when dir is set).
func (l *loader) localPath(p *Project, key, rel string, dir bool) {
	if rel == "" {
		l.errorf(key, "", "is empty")
		return
	}
	native := filepath.FromSlash(rel)
	if !filepath.IsLocal(native) {
		l.errorf(key, "move it into the project folder and give its path relative to "+p.File,
			"%q is not a path inside the project folder: the bundle keeps inputs at their project-relative paths", rel)
		return
	}
	fi, err := os.Stat(filepath.Join(p.Dir, native))
	switch {
	case err != nil:
		l.errorf(key, "paths are relative to the folder of "+p.File, "%q cannot be read: %v", rel, unwrapPathError(err))
	case dir && !fi.IsDir():
		l.errorf(key, "", "%q is not a folder", rel)
	case !dir && !fi.Mode().IsRegular():
		l.errorf(key, "", "%q is not a regular file", rel)
	}
}

func unwrapPathError(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}
