package templates

import (
	"bytes"
	"encoding/csv"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"
)

// specProject mirrors every key of the project file in SPEC.md, and no
// other; decoding the scaffold into it and finding no undecoded key shows
// the demo uses only the specification's keys.
type specProject struct {
	Name        string `toml:"name"`
	Description string `toml:"description"`
	Settings    struct {
		Seed            uint64  `toml:"seed"`
		Criterion       string  `toml:"criterion"`
		Confidence      float64 `toml:"confidence"`
		Intervals       string  `toml:"intervals"`
		Bootstrap       int     `toml:"bootstrap"`
		Tolerance       float64 `toml:"tolerance"`
		MaxIterations   int     `toml:"max_iterations"`
		RequireCleanGit bool    `toml:"require_clean_git"`
	} `toml:"settings"`
	Dataset []struct {
		Name         string   `toml:"name"`
		File         string   `toml:"file"`
		Column       string   `toml:"column"`
		Units        string   `toml:"units"`
		Delimiter    string   `toml:"delimiter"`
		StatusColumn string   `toml:"status_column"`
		Left         []string `toml:"left"`
		Right        []string `toml:"right"`
		LowerColumn  string   `toml:"lower_column"`
		UpperColumn  string   `toml:"upper_column"`
		TrialsColumn string   `toml:"trials_column"`
		SplitBy      string   `toml:"split_by"`
		Where        struct {
			Column string `toml:"column"`
			Equals string `toml:"equals"`
		} `toml:"where"`
		Missing []string `toml:"missing"`
	} `toml:"dataset"`
	Candidates []struct {
		Name     string                        `toml:"name"`
		Families []string                      `toml:"families"`
		Fixed    map[string]map[string]float64 `toml:"fixed"`
	} `toml:"candidates"`
	Analysis []struct {
		Name          string    `toml:"name"`
		Dataset       string    `toml:"dataset"`
		Candidates    string    `toml:"candidates"`
		Criterion     string    `toml:"criterion"`
		Quantiles     []float64 `toml:"quantiles"`
		ReturnPeriods []float64 `toml:"return_periods"`
		Thresholds    []float64 `toml:"thresholds"`
	} `toml:"analysis"`
	Report struct {
		PDF       bool     `toml:"pdf"`
		Figures   bool     `toml:"figures"`
		Tables    []string `toml:"tables"`
		Templates string   `toml:"templates"`
	} `toml:"report"`
}

func TestScaffoldUsesOnlySpecKeys(t *testing.T) {
	dir := t.TempDir()
	if _, err := WriteScaffold(dir); err != nil {
		t.Fatal(err)
	}
	var p specProject
	md, err := toml.DecodeFile(filepath.Join(dir, "fitseal.toml"), &p)
	if err != nil {
		t.Fatal(err)
	}
	if u := md.Undecoded(); len(u) > 0 {
		t.Errorf("keys outside SPEC.md: %v", u)
	}
	if !strings.Contains(strings.ToLower(p.Description), "invented") {
		t.Errorf("description %q must say the data are invented", p.Description)
	}

	// Every dataset file exists, has the named columns, and every status
	// code is one the project lists (SPEC: other codes are errors).
	for _, d := range p.Dataset {
		raw, err := os.ReadFile(filepath.Join(dir, filepath.FromSlash(d.File)))
		if err != nil {
			t.Fatalf("dataset %s: %v", d.Name, err)
		}
		rows, err := csv.NewReader(bytes.NewReader(raw)).ReadAll()
		if err != nil {
			t.Fatalf("%s: %v", d.File, err)
		}
		col := func(name string) int {
			i := slices.Index(rows[0], name)
			if i < 0 && name != "" {
				t.Fatalf("%s: no column %q in header %v", d.File, name, rows[0])
			}
			return i
		}
		col(d.Column)
		col(d.SplitBy)
		if d.StatusColumn != "" {
			s := col(d.StatusColumn)
			for line, r := range rows[1:] {
				if c := r[s]; c != "" && !slices.Contains(d.Left, c) && !slices.Contains(d.Right, c) {
					t.Errorf("%s:%d: status %q is neither left nor right", d.File, line+2, c)
				}
			}
		}
	}

	want := map[string]struct {
		families                  []string
		quantiles, periods, thres []float64
	}{
		"seal-life":      {[]string{"weibull", "lognormal", "gamma", "exponential"}, []float64{0.1, 0.5}, nil, []float64{4000}},
		"storm-rainfall": {[]string{"gumbel", "gev"}, nil, []float64{10, 50, 100}, nil},
		"nitrate":        {[]string{"lognormal", "gamma", "weibull"}, []float64{0.95}, nil, []float64{11.3}},
		"defects":        {[]string{"poisson", "negbinomial"}, []float64{0.5, 0.95}, nil, []float64{5}},
	}
	if len(p.Analysis) != len(want) {
		t.Fatalf("%d analyses, want %d", len(p.Analysis), len(want))
	}
	for _, a := range p.Analysis {
		w, ok := want[a.Name]
		if !ok {
			t.Errorf("unexpected analysis %q", a.Name)
			continue
		}
		var fams []string
		for _, c := range p.Candidates {
			if c.Name == a.Candidates {
				fams = c.Families
			}
		}
		if !reflect.DeepEqual(fams, w.families) || !reflect.DeepEqual(a.Quantiles, w.quantiles) ||
			!reflect.DeepEqual(a.ReturnPeriods, w.periods) || !reflect.DeepEqual(a.Thresholds, w.thres) {
			t.Errorf("analysis %s: families %v quantiles %v periods %v thresholds %v", a.Name, fams, a.Quantiles, a.ReturnPeriods, a.Thresholds)
		}
	}
}

func TestWriteScaffoldRefusesToOverwrite(t *testing.T) {
	dir := t.TempDir()
	// One file in the way: nothing at all may be written.
	if err := os.MkdirAll(filepath.Join(dir, "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	mine := []byte("year,mm\n2001,3\n")
	if err := os.WriteFile(filepath.Join(dir, "data", "rainfall_maxima.csv"), mine, 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := WriteScaffold(dir)
	var exists *ExistsError
	if !errors.As(err, &exists) {
		t.Fatalf("got %v, want *ExistsError", err)
	}
	if !reflect.DeepEqual(exists.Paths, []string{"data/rainfall_maxima.csv"}) {
		t.Errorf("ExistsError.Paths = %v", exists.Paths)
	}
	var left []string
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			rel, _ := filepath.Rel(dir, p)
			left = append(left, filepath.ToSlash(rel))
		}
		return err
	})
	if !reflect.DeepEqual(left, []string{"data/rainfall_maxima.csv"}) {
		t.Errorf("files after a refused init: %v; want only the user's own", left)
	}
	if got, _ := os.ReadFile(filepath.Join(dir, "data", "rainfall_maxima.csv")); !bytes.Equal(got, mine) {
		t.Error("the user's file was changed")
	}

	// A clean folder gets every file, and a second init is refused whole.
	clean := filepath.Join(t.TempDir(), "new", "project")
	written, err := WriteScaffold(clean)
	if err != nil {
		t.Fatal(err)
	}
	wantFiles := []string{".gitignore", "README.txt", "data/defects.csv", "data/nitrate.csv", "data/rainfall_maxima.csv", "data/seal_life.csv", "fitseal.toml"}
	if !reflect.DeepEqual(written, wantFiles) {
		t.Errorf("written %v, want %v", written, wantFiles)
	}
	gi, _ := os.ReadFile(filepath.Join(clean, ".gitignore"))
	if !strings.Contains(string(gi), "bundles/") {
		t.Errorf(".gitignore lacks bundles/: %q", gi)
	}
	if _, err := WriteScaffold(clean); !errors.As(err, &exists) || len(exists.Paths) != len(wantFiles) {
		t.Errorf("second init: %v", err)
	}
}

func TestReadmeSaysInvented(t *testing.T) {
	files, err := ScaffoldFiles()
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if f.Path == "README.txt" {
			if !strings.Contains(string(f.Data), "INVENTED") {
				t.Error("README.txt must say the data are invented")
			}
			return
		}
	}
	t.Error("no README.txt in the scaffold")
}
