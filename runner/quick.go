package runner

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"fitseal/fitters"
)

// QuickSpec describes a one-file look without a project file (`fitseal
// fit`): the data file, how to read it, and the families to rank.
type QuickSpec struct {
	// File is the CSV file's path.
	File string
	// Dataset says how to read it; Name and File are ignored, and a nil
	// Missing takes the default.
	Dataset Dataset
	// Families to rank; empty means every family of the data's kind
	// (count families when Discrete or a trials column is given).
	Families  []string
	Discrete  bool
	Criterion string
	// Fixed holds parameters held at a value, by family then parameter
	// (the project file's fixed = { gpd = { threshold = 30.0 } }); a family
	// fixed here joins the default list.
	Fixed map[string]map[string]float64
}

// QuickProject builds and checks a one-analysis project from spec, with the
// same rules as a project file. Its errors name command-line flags instead
// of key paths (a key such as dataset[0].status_column becomes
// --status_column), and their hints give flags instead of project-file
// lines; so do the errors of reading its data file.
func QuickProject(spec QuickSpec) (*Project, error) {
	if _, err := os.Stat(spec.File); err != nil {
		return nil, &DataError{File: spec.File, Msg: fmt.Sprintf("cannot be read: %v", unwrapPathError(err)), Err: err}
	}
	d := spec.Dataset
	ds := map[string]any{"name": "data", "file": filepath.Base(spec.File)}
	put := func(k, v string) {
		if v != "" {
			ds[k] = v
		}
	}
	putList := func(k string, v []string) {
		if v != nil {
			l := make([]any, len(v))
			for i, s := range v {
				l[i] = s
			}
			ds[k] = l
		}
	}
	put("column", d.Column)
	put("status_column", d.StatusColumn)
	put("lower_column", d.LowerColumn)
	put("upper_column", d.UpperColumn)
	put("trials_column", d.TrialsColumn)
	put("delimiter", d.Delimiter)
	put("split_by", d.SplitBy)
	putList("left", d.Left)
	putList("right", d.Right)
	putList("missing", d.Missing)
	if d.Where != nil {
		ds["where"] = map[string]any{"column": d.Where.Column, "equals": d.Where.Equals}
	}
	// A family that must have a parameter fixed (gpd's threshold) is left
	// out of the default list unless --fixed gives it, and refused by name
	// when asked for without it.
	needsFixed := func(name string) []string {
		var missing []string
		if f, ok := fitters.Lookup(name); ok {
			_, required := fitters.FixableParameters(f)
			for _, r := range required {
				if _, given := spec.Fixed[name][r]; !given {
					missing = append(missing, r)
				}
			}
		}
		return missing
	}
	var refused ProjectErrors
	var families []string
	if len(spec.Families) == 0 {
		kind := fitters.Continuous
		if spec.Discrete || d.TrialsColumn != "" {
			kind = fitters.Discrete
		}
		for _, f := range fitters.Families() {
			_, asked := spec.Fixed[f.Name()]
			if (f.Kind() == kind || asked) && needsFixed(f.Name()) == nil {
				families = append(families, f.Name())
			}
		}
	}
	for _, name := range spec.Families {
		if req := needsFixed(name); req != nil {
			refused = append(refused, &ProjectError{File: "fitseal fit", Key: "--families",
				Msg:  fmt.Sprintf("%s needs its %s fixed", name, strings.Join(req, " and ")),
				Hint: fmt.Sprintf("add --fixed %s.%s=VALUE: %s models the excesses over it", name, req[0], name)})
			continue
		}
		families = append(families, name)
	}
	fams := make([]any, len(families))
	for i, f := range families {
		fams[i] = f
	}
	set := map[string]any{"name": "families", "families": fams}
	if len(spec.Fixed) > 0 {
		fixed := map[string]any{}
		for fam, params := range spec.Fixed {
			ps := map[string]any{}
			for k, v := range params {
				ps[k] = v
			}
			fixed[fam] = ps
		}
		set["fixed"] = fixed
	}
	analysis := map[string]any{"name": "data", "dataset": "data", "candidates": "families"}
	if spec.Criterion != "" {
		analysis["criterion"] = spec.Criterion
	}
	raw := map[string]any{
		"name":       "fit",
		"dataset":    []map[string]any{ds},
		"candidates": []map[string]any{set},
		"analysis":   []map[string]any{analysis},
	}
	l := &loader{file: "fitseal fit", lines: keyLines{}}
	p := &Project{File: spec.File, Dir: filepath.Dir(spec.File)}
	l.project(p, l.newTable("", raw))
	if len(l.errs) > 0 || len(refused) > 0 {
		for _, e := range l.errs {
			if len(refused) > 0 && e.Key == "candidates[0].families" && e.Msg == "is empty" {
				continue // every family asked for was refused above
			}
			e.Key = flagOfKey(e.Key)
			e.Msg = fitWords.Replace(e.Msg)
			e.Hint = fitWords.Replace(e.Hint)
			refused = append(refused, e)
		}
		return nil, refused
	}
	p.Defaulted = l.defaulted
	p.Datasets[0].fitFlags = true
	p.Datasets[0].shownAs = spec.File
	return p, nil
}

// fitWords rewords the project loader's messages and hints about the one
// dataset, candidate set and analysis that `fitseal fit` makes for its
// flags: keys become flags, project-file lines become flags with values
// (TestQuickProjectErrors holds every message the flags can reach to it).
var fitWords = strings.NewReplacer(
	"[[dataset]]", "data file",
	`left = ["<"] for non-detects and right = ["+"] for suspensions`, `--left '<' for non-detects and --right '+' for suspensions`,
	`add status_column = "…"`, "add --status_column NAME",
	`add column = "…"`, "add --column NAME",
	"remove column:", "remove --column:",
	"lower_column and upper_column", "--lower_column and --upper_column",
	"lower/upper columns", "--lower_column and --upper_column",
	"a status column", "--status_column",
	"separate [[candidates]] sets", "separate runs of fitseal fit",
	`dataset "data" has a trials_column`, "--trials_column is given",
	"with a trials_column", "with --trials_column",
	"needs left or right", "needs --left or --right",
	"needs status_column", "needs --status_column",
	"listed in left", "listed in --left",
	"listed in right", "listed in --right",
	"is already the column", "is already the --column",
	"is already the status_column", "is already the --status_column",
	"is already the lower_column", "is already the --lower_column",
	"is already the upper_column", "is already the --upper_column",
	"drop the censoring columns", "drop the censoring flags",
	"fix parameters only of families listed in this set's families", "fix parameters only of families given to --families (or leave --families out)",
	"; remove this entry", "; remove it from --fixed",
	"is not among this set's families", "is not among --families",
)

// flagOfKey names the command-line flag that set a key of the synthetic
// project: "dataset[0].status_column" → "--status_column".
func flagOfKey(key string) string {
	k := key
	if i := strings.LastIndexByte(k, '.'); i >= 0 {
		k = k[i+1:]
	}
	if i := strings.IndexByte(k, '['); i >= 0 {
		k = k[:i]
	}
	switch k {
	case "file":
		return "FILE"
	case "candidates":
		return "--families"
	}
	if strings.HasPrefix(key, "candidates[0].fixed") {
		return "--fixed"
	}
	return "--" + k
}

// IsInputError reports whether err is a problem of the user's input (a
// project or data error) rather than of the machine.
func IsInputError(err error) bool {
	var pes ProjectErrors
	var pe *ProjectError
	var de *DataError
	return errors.As(err, &pes) || errors.As(err, &pe) || errors.As(err, &de)
}
