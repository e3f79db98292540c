package runner

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"unicode/utf8"

	"fitseal/fitters"
)

// dataset reads one [[dataset]] table.
func (l *loader) dataset(p *Project, t *table) *Dataset {
	d := &Dataset{}
	if v, ok := t.str("name"); ok {
		d.Name = v
		l.checkName(t.key("name"), v, "a dataset")
	} else if t.absent("name") {
		l.errorf(t.key("name"), `add name = "…" to this [[dataset]]`, "is required")
	}
	if v, ok := t.str("file"); ok {
		d.File = v
		l.localPath(p, t.key("file"), v, false)
	} else if t.absent("file") {
		l.errorf(t.key("file"), `add file = "data/….csv", relative to the project file`, "is required")
	}
	d.Column, _ = t.str("column")
	d.Units, _ = t.str("units")
	d.Delimiter = ","
	if v, ok := t.str("delimiter"); ok {
		r, size := utf8.DecodeRuneInString(v)
		switch {
		case v == "" || size != len(v):
			l.errorf(t.key("delimiter"), `use one character, e.g. ";" or "\t"`, "%q is not a single character", v)
		case r == '"' || r == '\r' || r == '\n' || r == utf8.RuneError || r == ' ':
			l.errorf(t.key("delimiter"), `use one character, e.g. ";" or "\t"`, "%q cannot separate CSV fields", v)
		default:
			d.Delimiter = v
		}
	} else if t.absent("delimiter") {
		t.defaulted("delimiter")
	}
	d.StatusColumn, _ = t.str("status_column")
	d.Left, _ = t.strings("left")
	d.Right, _ = t.strings("right")
	d.LowerColumn, _ = t.str("lower_column")
	d.UpperColumn, _ = t.str("upper_column")
	d.TrialsColumn, _ = t.str("trials_column")
	d.SplitBy, _ = t.str("split_by")
	if w, ok := t.sub("where"); ok {
		d.Where = &Where{}
		var okc, oke bool
		d.Where.Column, okc = w.str("column")
		d.Where.Equals, oke = w.str("equals")
		if !okc {
			if _, present := w.m["column"]; !present {
				l.errorf(w.key("column"), `write where = { column = "site", equals = "north" }`, "is required")
			}
		}
		if !oke {
			if _, present := w.m["equals"]; !present {
				l.errorf(w.key("equals"), `write where = { column = "site", equals = "north" }`, "is required")
			}
		}
		w.done()
	}
	d.Missing = append([]string(nil), DefaultMissing...)
	if v, ok := t.strings("missing"); ok {
		d.Missing = v
	} else if t.absent("missing") {
		t.defaulted("missing")
	}
	t.done()
	l.checkDatasetColumns(d, t)
	return d
}

// checkDatasetColumns checks that the columns named describe one way of
// recording the observations.
func (l *loader) checkDatasetColumns(d *Dataset, t *table) {
	interval := d.LowerColumn != "" || d.UpperColumn != ""
	switch {
	case interval && (d.LowerColumn == "" || d.UpperColumn == ""):
		missing := "lower_column"
		if d.UpperColumn == "" {
			missing = "upper_column"
		}
		l.errorf(t.key(missing), "interval-censored data need both lower_column and upper_column", "is missing")
	case interval && d.Column != "":
		l.errorf(t.key("column"), "remove column: interval data take their values from lower_column and upper_column",
			"cannot be given together with lower_column and upper_column")
	case !interval && d.Column == "":
		if t.absent("column") {
			l.errorf(t.key("column"), `add column = "…", the header of the observations`, "is required (or lower_column and upper_column for interval data)")
		}
	}
	if d.StatusColumn != "" && interval {
		l.errorf(t.key("status_column"), "interval bounds already say what is known: use either a status column or lower/upper columns",
			"cannot be combined with lower_column and upper_column")
	}
	if d.StatusColumn != "" && len(d.Left) == 0 && len(d.Right) == 0 {
		l.errorf(t.key("status_column"), `list the codes, e.g. left = ["<"] for non-detects and right = ["+"] for suspensions`,
			"needs left or right: without censoring codes the status column says nothing")
	}
	if d.StatusColumn == "" {
		for _, k := range []string{"left", "right"} {
			if !t.absent(k) {
				l.errorf(t.key(k), `add status_column = "…", the column holding these codes`, "needs status_column")
			}
		}
	}
	codes := map[string]string{}
	for _, side := range []struct {
		key   string
		codes []string
	}{{"left", d.Left}, {"right", d.Right}} {
		for i, c := range side.codes {
			path := fmt.Sprintf("%s[%d]", t.key(side.key), i)
			if c == "" {
				l.errorf(path, "an empty status cell already means an exact observation", "a censoring code cannot be empty")
				continue
			}
			if prev, dup := codes[c]; dup {
				l.errorf(path, "each code must mean one thing", "%q is already listed in %s", c, prev)
				continue
			}
			codes[c] = side.key
		}
	}
	if d.TrialsColumn != "" && (d.StatusColumn != "" || interval) {
		l.errorf(t.key("trials_column"), "binomial-type counts are exact observations: drop the censoring columns",
			"cannot be combined with censoring")
	}
	roles := map[string]string{}
	for _, r := range []struct{ key, col string }{
		{"column", d.Column}, {"status_column", d.StatusColumn}, {"lower_column", d.LowerColumn},
		{"upper_column", d.UpperColumn}, {"trials_column", d.TrialsColumn},
	} {
		if r.col == "" {
			continue
		}
		if prev, dup := roles[r.col]; dup {
			l.errorf(t.key(r.key), "each role needs its own column", "%q is already the %s", r.col, prev)
			continue
		}
		roles[r.col] = r.key
	}
}

// candidates reads one [[candidates]] table.
func (l *loader) candidates(t *table) *CandidateSet {
	c := &CandidateSet{}
	if v, ok := t.str("name"); ok {
		c.Name = v
		l.checkName(t.key("name"), v, "a candidate set")
	} else if t.absent("name") {
		l.errorf(t.key("name"), `add name = "…" to this [[candidates]]`, "is required")
	}
	known := familyNames()
	familyPath := map[string]string{} // a listed family's key path
	if v, ok := t.strings("families"); ok {
		if len(v) == 0 {
			l.errorf(t.key("families"), "list at least one family; 'fitseal families' prints them", "is empty")
		}
		seen := map[string]bool{}
		kinds := map[fitters.Kind][]string{}
		for i, name := range v {
			path := fmt.Sprintf("%s[%d]", t.key("families"), i)
			f, ok := fitters.Lookup(name)
			switch {
			case !ok:
				hint := didYouMean(name, known)
				if hint == "" {
					hint = "'fitseal families' lists the families"
				}
				l.errorf(path, hint, "%q is not a family", name)
				continue
			case seen[name]:
				l.errorf(path, "list each family once", "%q is listed twice", name)
				continue
			}
			seen[name] = true
			familyPath[name] = path
			c.Families = append(c.Families, name)
			kinds[f.Kind()] = append(kinds[f.Kind()], name)
		}
		if len(kinds) > 1 {
			l.errorf(t.key("families"), "put count families and continuous families in separate [[candidates]] sets",
				"mixes discrete families (%s) with continuous ones (%s): their likelihoods are not on the same footing",
				joinQuoted(kinds[fitters.Discrete]), joinQuoted(kinds[fitters.Continuous]))
		}
	} else if t.absent("families") {
		l.errorf(t.key("families"), `add families = ["weibull", "lognormal", …]`, "is required")
	}
	if ft, ok := t.sub("fixed"); ok {
		c.Fixed = map[string]map[string]float64{}
		for _, fam := range sortedKeys(ft.m) {
			pt, ok := ft.sub(fam)
			if !ok {
				continue
			}
			f, known := fitters.Lookup(fam)
			if !contains(c.Families, fam) {
				hint := didYouMean(fam, c.Families)
				if hint == "" {
					hint = "fix parameters only of families listed in this set's families"
				}
				l.errorf(pt.path, hint, "%q is not among this set's families", fam)
				continue
			}
			vals := map[string]float64{}
			for _, param := range sortedKeys(pt.m) {
				x, ok := pt.number(param)
				if !ok {
					continue
				}
				path := pt.key(param)
				if known && !contains(f.Parameters(), param) {
					hint := didYouMean(param, f.Parameters())
					if hint == "" {
						hint = fmt.Sprintf("the parameters of %s are: %s", fam, joinQuoted(f.Parameters()))
					}
					l.errorf(path, hint, "%s has no parameter %q", fam, param)
					continue
				}
				if fixable, _ := fitters.FixableParameters(f); known && !contains(fixable, param) {
					l.errorf(path, fixableHint(fam, fixable), "%s's %s cannot be fixed", fam, param)
					continue
				}
				if math.IsNaN(x) || math.IsInf(x, 0) {
					l.errorf(path, "", "%v is not a finite number", x)
					continue
				}
				vals[param] = x
			}
			c.Fixed[fam] = vals
		}
	}
	// A family that must have a parameter fixed (gpd's threshold) is
	// refused here, not listed as inapplicable in every analysis.
	for _, fam := range c.Families {
		f, _ := fitters.Lookup(fam)
		_, required := fitters.FixableParameters(f)
		for _, param := range required {
			if !hasFixed(t, fam, param) {
				l.errorf(familyPath[fam],
					fmt.Sprintf("add fixed = { %s = { %s = … } } to this [[candidates]]: %s models the excesses over it", fam, param, fam),
					"%s needs its %s fixed", fam, param)
			}
		}
	}
	t.done()
	return c
}

// hasFixed reports whether t's fixed.FAM.PARAM is given (a value refused
// as not a number is reported as such, not also as missing).
func hasFixed(t *table, fam, param string) bool {
	ft, ok := t.m["fixed"].(map[string]any)
	if !ok {
		return false
	}
	pt, ok := ft[fam].(map[string]any)
	if !ok {
		return false
	}
	_, present := pt[param]
	return present
}

// fixableHint says which parameters of fam may be fixed, or that none may.
func fixableHint(fam string, fixable []string) string {
	if len(fixable) == 0 {
		var all []string
		for _, f := range fitters.Families() {
			p, _ := fitters.FixableParameters(f)
			for _, name := range p {
				all = append(all, f.Name()+"'s "+name)
			}
		}
		return fmt.Sprintf("%s has no parameter that can be fixed (those that can: %s); remove this entry", fam, strings.Join(all, ", "))
	}
	return fmt.Sprintf("only the %s of %s can be fixed; remove this entry", strings.Join(fixable, " and "), fam)
}

// analysis reads one [[analysis]] table and resolves its references.
func (l *loader) analysis(p *Project, t *table) *Analysis {
	a := &Analysis{}
	if v, ok := t.str("dataset"); ok {
		a.Dataset = v
		if p.Dataset(v) == nil {
			l.errorf(t.key("dataset"), hintAmong(v, datasetNames(p), "dataset"), "no [[dataset]] is named %q", v)
		}
	} else if t.absent("dataset") {
		l.errorf(t.key("dataset"), `add dataset = "…", the name of a [[dataset]]`, "is required")
	}
	if v, ok := t.str("name"); ok {
		a.Name = v
		l.checkName(t.key("name"), v, "an analysis")
	} else if t.absent("name") {
		a.Name = a.Dataset
		t.defaulted("name")
	}
	if v, ok := t.str("candidates"); ok {
		a.Candidates = v
		if p.CandidateSet(v) == nil {
			l.errorf(t.key("candidates"), hintAmong(v, candidateNames(p), "candidates"), "no [[candidates]] set is named %q", v)
		}
	} else if t.absent("candidates") {
		l.errorf(t.key("candidates"), `add candidates = "…", the name of a [[candidates]] set`, "is required")
	}
	if !t.absent("criterion") {
		a.Criterion = l.choice(t, "criterion", p.Settings.Criterion, Criteria)
	} else {
		t.read["criterion"] = true
		t.defaulted("criterion")
		a.Criterion = p.Settings.Criterion
	}
	a.Quantiles = l.probabilities(t, "quantiles", "a lower-tail probability such as 0.1 for the B10 life", func(x float64) bool { return x > 0 && x < 1 }, "is not in (0, 1)")
	a.ReturnPeriods = l.probabilities(t, "return_periods", "a return period T in years (or blocks), greater than 1, e.g. 100", func(x float64) bool { return x > 1 && !math.IsInf(x, 0) }, "is not a return period greater than 1")
	a.Thresholds = l.probabilities(t, "thresholds", "a finite value of the observations", func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }, "is not a finite number")
	t.done()
	if ds, cs := p.Dataset(a.Dataset), p.CandidateSet(a.Candidates); ds != nil && cs != nil && ds.TrialsColumn != "" {
		for _, name := range cs.Families {
			if f, ok := fitters.Lookup(name); ok && f.Kind() == fitters.Continuous {
				l.errorf(t.key("candidates"), "use count families such as binomial or betabinomial with a trials_column",
					"dataset %q has a trials_column, but %q is a continuous family", ds.Name, name)
				break
			}
		}
	}
	return a
}

// probabilities reads a list of numbers that must each pass ok; duplicates
// are refused so that every derived row is named once.
func (l *loader) probabilities(t *table, k, hint string, ok func(float64) bool, bad string) []float64 {
	v, present := t.numbers(k)
	if !present {
		return []float64{}
	}
	seen := map[float64]bool{}
	for i, x := range v {
		path := fmt.Sprintf("%s[%d]", t.key(k), i)
		switch {
		case !ok(x):
			l.errorf(path, "each must be "+hint, "%v %s", x, bad)
		case seen[x]:
			l.errorf(path, "list each value once", "%v is listed twice", x)
		}
		seen[x] = true
	}
	return v
}

func hintAmong(s string, names []string, table string) string {
	if h := didYouMean(s, names); h != "" {
		return h
	}
	if len(names) == 0 {
		return fmt.Sprintf("the project has no [[%s]] tables yet", table)
	}
	return fmt.Sprintf("the [[%s]] names are: %s", table, joinQuoted(names))
}

func datasetNames(p *Project) []string {
	out := make([]string, 0, len(p.Datasets))
	for _, d := range p.Datasets {
		out = append(out, d.Name)
	}
	return out
}

func candidateNames(p *Project) []string {
	out := make([]string, 0, len(p.Candidates))
	for _, c := range p.Candidates {
		out = append(out, c.Name)
	}
	return out
}

func familyNames() []string {
	fs := fitters.Families()
	out := make([]string, len(fs))
	for i, f := range fs {
		out[i] = f.Name()
	}
	return out
}

func sortedKeys[V any](m map[string]V) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
