package runner

import (
	"bytes"
	"context"
	"encoding/csv"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A fit that a profile beats — here a three-parameter Weibull on 25 values
// drawn from Weibull3(1.5, 60, 15) (test data only, seeded), whose
// profile of the shape finds −114.49 against the fit's −116.83 — is a
// local maximum: fits.csv's note and the fit's inference note say so, so
// that its criterion, weight and intervals are not taken at face value.
func TestLocalMaximumIsNoted(t *testing.T) {
	dir := t.TempDir()
	data := "x\n66.68\n35.63\n60.91\n51.51\n71.29\n40.13\n66.61\n36.82\n35.62\n27.45\n43.73\n133.59\n35.35\n" +
		"79.85\n118.89\n66.37\n33.56\n112.07\n47.33\n167.81\n67.08\n80.54\n91.39\n53.05\n50.75\n"
	if err := os.WriteFile(filepath.Join(dir, "x.csv"), []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
	proj := `name = "localmax"
[settings]
seed = 1
[[dataset]]
name = "x"
file = "x.csv"
column = "x"
[[candidates]]
name = "c"
families = ["weibull3", "weibull"]
[[analysis]]
dataset = "x"
candidates = "c"
`
	path := filepath.Join(dir, "fitseal.toml")
	if err := os.WriteFile(path, []byte(proj), 0o644); err != nil {
		t.Fatal(err)
	}
	p, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), p, RunOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	files, err := res.Files()
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(bytes.NewReader(files[FitsFile])).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	notes := map[string]string{}
	for _, r := range rows[1:] {
		notes[r[2]] = r[15]
	}
	if !strings.Contains(notes["weibull3"], LocalMaximumNote) {
		t.Errorf("weibull3's note %q does not say the fit is a local maximum", notes["weibull3"])
	}
	if strings.Contains(notes["weibull"], LocalMaximumNote) {
		t.Errorf("weibull's note %q says it is a local maximum", notes["weibull"])
	}
	a := res.Analyses[0]
	for i, row := range a.Comparison.Rows {
		if got := strings.Contains(a.Inference[i], LocalMaximumNote); got != (row.Family == "weibull3") {
			t.Errorf("%s: inference note %q", row.Family, a.Inference[i])
		}
	}
}
