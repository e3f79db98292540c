package runner

import (
	"math"
	"os"
	"path/filepath"
	"testing"
)

// TestNoMethodBesideAnEmptyInterval: a row whose interval is empty names no
// method (ci_method ""), its note saying why, so that no row reads
// "profile likelihood" beside a blank interval; a row with an interval
// names its method, and a fixed parameter's is "fixed" (TestFixedParameterMethod).
// Invented counts:
// a count quantile has no profile interval, its model average nothing to
// average; the exceedance probabilities have intervals.
func TestNoMethodBesideAnEmptyInterval(t *testing.T) {
	dir := t.TempDir()
	counts := "k\n0\n1\n1\n2\n2\n2\n3\n3\n4\n5\n0\n1\n2\n3\n7\n1\n2\n0\n4\n2\n9\n12\n0\n0\n"
	if err := os.WriteFile(filepath.Join(dir, "counts.csv"), []byte(counts), 0o644); err != nil {
		t.Fatal(err)
	}
	proj := `name = "counts"
[settings]
bootstrap = 0
[[dataset]]
name = "d"
file = "counts.csv"
column = "k"
[[candidates]]
name = "c"
families = ["poisson", "negbinomial", "geometric"]
[[analysis]]
dataset = "d"
candidates = "c"
quantiles = [0.5]
thresholds = [4]
`
	path := filepath.Join(dir, "fitseal.toml")
	if err := os.WriteFile(path, []byte(proj), 0o644); err != nil {
		t.Fatal(err)
	}
	a := runResults(t, path, 1).Analyses[0]
	var blank, given int
	for _, r := range a.Derived {
		empty := math.IsNaN(r.CILower) && math.IsNaN(r.CIUpper)
		switch {
		case empty && (r.CIMethod != "" || r.Note == ""):
			t.Errorf("%s %s %v: empty interval with method %q and note %q", r.Family, r.Quantity, r.Argument, r.CIMethod, r.Note)
		case !empty && r.CIMethod == "":
			t.Errorf("%s %s %v: interval [%v, %v] without a method", r.Family, r.Quantity, r.Argument, r.CILower, r.CIUpper)
		case empty:
			blank++
		default:
			given++
		}
		if r.Quantity == "quantile" && !empty {
			t.Errorf("%s quantile %v: a count quantile got an interval [%v, %v]", r.Family, r.Argument, r.CILower, r.CIUpper)
		}
	}
	if blank < 3 || given < 3 {
		t.Errorf("%d rows without an interval and %d with one: the test needs both", blank, given)
	}
	for i, rows := range a.Parameters {
		family := a.Comparison.Rows[i].Family
		for _, p := range rows {
			if empty := math.IsNaN(p.CILower) && math.IsNaN(p.CIUpper); empty != (p.CIMethod == "") {
				t.Errorf("%s %s: interval [%v, %v] with method %q", family, p.Parameter, p.CILower, p.CIUpper, p.CIMethod)
			}
		}
	}
}

// TestFixedParameterMethod: a fixed parameter's row has no interval and the
// method "fixed", not an empty one. Invented values above 30.
func TestFixedParameterMethod(t *testing.T) {
	dir := t.TempDir()
	values := "x\n31.2\n32.5\n33.1\n34.8\n36.0\n37.7\n39.9\n42.4\n45.1\n48.3\n52.9\n58.0\n64.6\n73.2\n88.5\n"
	if err := os.WriteFile(filepath.Join(dir, "peaks.csv"), []byte(values), 0o644); err != nil {
		t.Fatal(err)
	}
	proj := `name = "peaks"
[settings]
bootstrap = 0
[[dataset]]
name = "d"
file = "peaks.csv"
column = "x"
[[candidates]]
name = "c"
families = ["gpd"]
fixed = { gpd = { threshold = 30.0 } }
[[analysis]]
dataset = "d"
candidates = "c"
`
	path := filepath.Join(dir, "fitseal.toml")
	if err := os.WriteFile(path, []byte(proj), 0o644); err != nil {
		t.Fatal(err)
	}
	rows := runResults(t, path, 1).Analyses[0].Parameters[0]
	var fixed int
	for _, p := range rows {
		if p.Fixed {
			fixed++
			if p.CIMethod != "fixed" || !math.IsNaN(p.CILower) || !math.IsNaN(p.CIUpper) {
				t.Errorf("fixed %s: interval [%v, %v], method %q; want none and \"fixed\"", p.Parameter, p.CILower, p.CIUpper, p.CIMethod)
			}
		}
	}
	if fixed != 1 {
		t.Errorf("%d fixed parameters in %+v, want the threshold", fixed, rows)
	}
}
