package runner

import (
	"fmt"
	"path/filepath"
	"sort"
)

// Project is a loaded and checked project file with every default applied:
// each field holds the effective value that a run uses.
type Project struct {
	// File is the project file's path as given; Dir is its folder, where
	// relative data paths start.
	File string `json:"-"`
	Dir  string `json:"-"`
	// Source is the project file, byte for byte.
	Source []byte `json:"-"`

	Name        string          `json:"name"`
	Description string          `json:"description"`
	Settings    Settings        `json:"settings"`
	Datasets    []*Dataset      `json:"datasets"`
	Candidates  []*CandidateSet `json:"candidates"`
	Analyses    []*Analysis     `json:"analyses"`
	Report      Report          `json:"report"`

	// Defaulted lists the key paths that took their default value, so a
	// record shows which settings the user chose and which the tool did.
	Defaulted []string `json:"defaulted"`
}

// Settings are the project's [settings] table, defaults applied.
type Settings struct {
	Seed            uint64  `json:"seed"`
	Criterion       string  `json:"criterion"`
	Confidence      float64 `json:"confidence"`
	Intervals       string  `json:"intervals"`
	Bootstrap       int     `json:"bootstrap"`
	Tolerance       float64 `json:"tolerance"`
	MaxIterations   int     `json:"max_iterations"`
	RequireCleanGit bool    `json:"require_clean_git"`
}

// Defaults of the specification's project file.
const (
	DefaultSeed          = 1
	DefaultCriterion     = "aicc"
	DefaultConfidence    = 0.95
	DefaultIntervals     = "profile"
	DefaultBootstrap     = 999
	DefaultTolerance     = 1e-10
	DefaultMaxIterations = 2000
)

// DefaultMissing are the cells skipped as missing when a dataset gives no
// `missing` list.
var DefaultMissing = []string{"", "NA"}

// Criteria, interval methods and table formats the project file accepts.
var (
	Criteria        = []string{"aic", "aicc", "bic"}
	IntervalMethods = []string{"wald", "profile", "bootstrap"}
	TableFormats    = []string{"md", "tex"}
)

// Dataset is one [[dataset]] table: where the observations are and how they
// were recorded.
type Dataset struct {
	Name   string `json:"name"`
	File   string `json:"file"` // relative to the project file, slash-separated
	Column string `json:"column,omitempty"`
	Units  string `json:"units,omitempty"`
	// Delimiter is the field separator (default ",").
	Delimiter string `json:"delimiter"`
	// StatusColumn censors rows by code: Left codes are non-detects (the
	// value is at or below the recorded one), Right codes suspensions.
	StatusColumn string   `json:"status_column,omitempty"`
	Left         []string `json:"left,omitempty"`
	Right        []string `json:"right,omitempty"`
	// LowerColumn and UpperColumn give interval-censored data; an empty cell
	// is an open bound.
	LowerColumn  string `json:"lower_column,omitempty"`
	UpperColumn  string `json:"upper_column,omitempty"`
	TrialsColumn string `json:"trials_column,omitempty"`
	SplitBy      string `json:"split_by,omitempty"`
	Where        *Where `json:"where,omitempty"`
	// Missing cells of the observation columns are skipped and counted.
	Missing []string `json:"missing"`

	// fitFlags is set for the dataset of `fitseal fit` (QuickProject): the
	// errors of reading it name that command's flags, not the keys of a
	// project file's dataset.
	fitFlags bool
	// shownAs, when set, is how errors name the data file: `fitseal fit`
	// names it as the user typed it, not relative to its own folder.
	shownAs string
}

// setting names one of the dataset's settings for a message: the
// project-file key of this dataset (`missing in dataset "life"`), or the
// flag of `fitseal fit` that gave it (`--missing`).
// errorName is the data file as errors name it.
func (d *Dataset) errorName() string {
	if d.shownAs != "" {
		return d.shownAs
	}
	return d.File
}

func (d *Dataset) setting(key string) string {
	if d.fitFlags {
		return "--" + key
	}
	return fmt.Sprintf("%s in dataset %q", key, d.Name)
}

// Where keeps only the rows whose Column cell is exactly Equals.
type Where struct {
	Column string `json:"column"`
	Equals string `json:"equals"`
}

// Interval reports whether the dataset is interval-censored (lower and upper
// columns instead of one observation column).
func (d *Dataset) Interval() bool { return d.LowerColumn != "" }

// Path returns the dataset file's path on this system.
func (d *Dataset) Path(p *Project) string {
	return filepath.Join(p.Dir, filepath.FromSlash(d.File))
}

// CandidateSet is one [[candidates]] table: the families compared together,
// with any parameters held fixed, by family then parameter name.
type CandidateSet struct {
	Name     string                        `json:"name"`
	Families []string                      `json:"families"`
	Fixed    map[string]map[string]float64 `json:"fixed,omitempty"`
}

// Analysis is one [[analysis]] table: a dataset, its candidates, and the
// derived quantities wanted. A split dataset expands into one analysis per
// group when the plan is made.
type Analysis struct {
	Name          string    `json:"name"`
	Dataset       string    `json:"dataset"`
	Candidates    string    `json:"candidates"`
	Criterion     string    `json:"criterion"`
	Quantiles     []float64 `json:"quantiles"`
	ReturnPeriods []float64 `json:"return_periods"`
	Thresholds    []float64 `json:"thresholds"`
}

// Report is the [report] table.
type Report struct {
	PDF       bool     `json:"pdf"`
	Figures   bool     `json:"figures"`
	Tables    []string `json:"tables"`
	Templates string   `json:"templates,omitempty"`
}

// Dataset returns the dataset of the given name, or nil.
func (p *Project) Dataset(name string) *Dataset {
	for _, d := range p.Datasets {
		if d.Name == name {
			return d
		}
	}
	return nil
}

// CandidateSet returns the candidate set of the given name, or nil.
func (p *Project) CandidateSet(name string) *CandidateSet {
	for _, c := range p.Candidates {
		if c.Name == name {
			return c
		}
	}
	return nil
}

// InputFiles returns the project-relative paths (slash-separated) of every
// data file the project reads, sorted and without repeats; the project file
// itself is not among them.
func (p *Project) InputFiles() []string {
	seen := map[string]bool{}
	var out []string
	for _, d := range p.Datasets {
		f := filepath.ToSlash(filepath.Clean(filepath.FromSlash(d.File)))
		if !seen[f] {
			seen[f] = true
			out = append(out, f)
		}
	}
	sort.Strings(out)
	return out
}
