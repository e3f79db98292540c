package runner

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestSoleFamilyAverageIsItsOwnRow: with lognormal inapplicable (values
// below zero), normal carries all the Akaike weight, so the model average of
// every derived quantity is normal's own estimate (θ̄ = θ̂, and eq. 4.9 of
// Burnham & Anderson, 2002, gives its own standard error): the averaged row
// must be normal's row, its profile interval included, and say why, not a
// normal-theory interval beside a different one for the same number.
// Invented data.
func TestSoleFamilyAverageIsItsOwnRow(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "d.csv"), []byte("x\n-1.5\n0.3\n2.2\n0.9\n-0.4\n1.7\n0.1\n3.1\n1.2\n-0.8\n"), 0o644)
	path := filepath.Join(dir, "p.toml")
	os.WriteFile(path, []byte(`name = "sole"
[settings]
bootstrap = 0
[[dataset]]
name = "d"
file = "d.csv"
column = "x"
[[candidates]]
name = "c"
families = ["normal", "lognormal"]
[[analysis]]
dataset = "d"
candidates = "c"
quantiles = [0.1, 0.9]
return_periods = [100]
thresholds = [1.0]
`), 0o644)
	res := runResults(t, path, 1)
	a := res.Analyses[0]
	own := map[string]DerivedRow{}
	for _, d := range a.Derived {
		if d.Family == "normal" {
			own[d.Quantity+" "+FormatFloat(d.Argument)] = d
		}
	}
	averaged := 0
	for _, d := range a.Derived {
		if d.Family != ModelAverage {
			continue
		}
		averaged++
		key := d.Quantity + " " + FormatFloat(d.Argument)
		o, ok := own[key]
		if !ok {
			t.Fatalf("%s: no normal row", key)
		}
		if !strings.HasPrefix(o.CIMethod, "profile likelihood") || math.IsNaN(o.CILower) || math.IsNaN(o.CIUpper) {
			t.Fatalf("%s: normal's row %+v: the check needs a profile interval", key, o)
		}
		if d.Estimate != o.Estimate || d.StdError != o.StdError || d.CILower != o.CILower || d.CIUpper != o.CIUpper ||
			d.LowerOpen != o.LowerOpen || d.UpperOpen != o.UpperOpen || d.Note != o.Note {
			t.Errorf("%s: average %v [%v, %v] %q, normal's own %v [%v, %v] %q", key, d.Estimate, d.CILower, d.CIUpper, d.Note,
				o.Estimate, o.CILower, o.CIUpper, o.Note)
		}
		if want := "model average: normal carries all the weight, so its own estimate and interval (" + o.CIMethod + ")"; d.CIMethod != want {
			t.Errorf("%s: method %q, want %q", key, d.CIMethod, want)
		}
	}
	if averaged != 4 {
		t.Errorf("%d model-averaged rows, want 4", averaged)
	}
}
