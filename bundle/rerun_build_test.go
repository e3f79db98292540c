package bundle

import (
	"context"
	"strconv"
	"strings"
	"testing"
)

// TestCrossBuildTolerances: a bundle made by another build may differ in an
// estimate by a millionth of its standard error, and in nothing else
// beyond the cross-platform rules.
func TestCrossBuildTolerances(t *testing.T) {
	agree := crossBuild(crossPlatform(0))
	se := map[string]string{"std_error": "1.5"}
	tests := []struct {
		name   string
		column string
		fields map[string]string
		a, b   float64
		want   bool
	}{
		{"estimate within 1e-6 se", "estimate", se, 6.074899578787588, 6.074899578787588 + 0.9e-6*1.5, true},
		{"estimate beyond 1e-6 se", "estimate", se, 6.074899578787588, 6.074899578787588 + 1.1e-6*1.5, false},
		{"estimate without a standard error", "estimate", nil, 6.0, 6.0 * (1 + 2e-9), false},
		{"estimate with a NaN standard error", "estimate", map[string]string{"std_error": "NaN"}, 6.0, 6.0 * (1 + 2e-9), false},
		{"loglik is held to 1e-9 relative", "loglik", se, -100, -100 * (1 + 2e-9), false},
		{"cross-platform rules still hold", "estimate", nil, 1000, 1000 * (1 + 0.9e-9), true},
	}
	for _, tc := range tests {
		if got := agree(tc.column, tc.fields, tc.a, tc.b); got != tc.want {
			t.Errorf("%s: agree(%v, %v) = %v, want %v", tc.name, tc.a, tc.b, got, tc.want)
		}
	}
}

// TestRerunOtherBuild: numbers that moved in their last digits, and an
// optimiser described in other words, pass when another build made the
// bundle (and the report says so), but not when the same identified build
// did; a real edit fails either way.
func TestRerunOtherBuild(t *testing.T) {
	ctx := context.Background()
	made := CurrentTool()
	made.Version, made.Revision = "v1.0.0", "1111111111111111111111111111111111111111"
	later := made
	later.Version, later.Revision = "v1.1.0", "2222222222222222222222222222222222222222"
	bag := sealedBag(t, sealContents(t, runSealProject(t, 1), made))

	// Move the first estimate by 1e-7 of its standard error and reword the
	// first fit's optimiser.
	params := strings.Split(string(bag.Files["data/results/parameters.csv"]), "\n")
	header := strings.Split(params[0], ",")
	row := strings.Split(params[1], ",")
	col := map[string]int{}
	for i, h := range header {
		col[h] = i
	}
	est, _ := strconv.ParseFloat(row[col["estimate"]], 64)
	se, _ := strconv.ParseFloat(row[col["std_error"]], 64)
	if !(se > 0) {
		t.Fatalf("first parameter row has no standard error: %q", params[1])
	}
	row[col["estimate"]] = strconv.FormatFloat(est+1e-7*se, 'g', -1, 64)
	params[1] = strings.Join(row, ",")
	bag.Files["data/results/parameters.csv"] = []byte(strings.Join(params, "\n"))
	fits := strings.Split(string(bag.Files["data/results/fits.csv"]), "\n")
	fh := strings.Split(fits[0], ",")
	frow := strings.Split(fits[1], ",")
	for i, h := range fh {
		if h == "method" {
			frow[i] = "an older route to the same maximum"
		}
	}
	fits[1] = strings.Join(frow, ",")
	bag.Files["data/results/fits.csv"] = []byte(strings.Join(fits, "\n"))

	rep, err := Rerun(ctx, bag, RerunOptions{Workers: 1, Tool: later})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Exact || len(rep.Findings) > 0 || !strings.Contains(rep.OtherBuild, "another build") {
		t.Fatalf("other build: exact %v, other-build note %q, findings %v", rep.Exact, rep.OtherBuild, rep.Findings)
	}

	rep, err = Rerun(ctx, bag, RerunOptions{Workers: 1, Tool: made})
	if err != nil {
		t.Fatal(err)
	}
	numbers := 0
	for _, f := range rep.Findings {
		if f.Kind == KindNumber {
			numbers++
		}
	}
	if !rep.Exact || rep.OtherBuild != "" || numbers != 2 {
		t.Fatalf("same identified build: exact %v, note %q, findings %v (want the estimate and the method)", rep.Exact, rep.OtherBuild, rep.Findings)
	}

	row[col["estimate"]] = strconv.FormatFloat(est+1e-3*se, 'g', -1, 64)
	params[1] = strings.Join(row, ",")
	bag.Files["data/results/parameters.csv"] = []byte(strings.Join(params, "\n"))
	rep, err = Rerun(ctx, bag, RerunOptions{Workers: 1, Tool: later})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Findings) != 1 || rep.Findings[0].Member != "data/results/parameters.csv" {
		t.Fatalf("an estimate moved by 1e-3 standard errors must fail from another build too; findings %v", rep.Findings)
	}
}

func TestKnownSameBuild(t *testing.T) {
	stamped := Tool{Name: "fitseal", Version: "(devel)", GoVersion: "go1.26.8", OS: "linux", Arch: "amd64", Revision: "abc"}
	released := Tool{Name: "fitseal", Version: "v1.2.3", GoVersion: "go1.26.8", OS: "linux", Arch: "amd64"}
	unstamped := Tool{Name: "fitseal", Version: "(devel)", GoVersion: "go1.26.8", OS: "linux", Arch: "amd64"}
	modified := stamped
	modified.Modified = true
	for _, c := range []struct {
		name string
		a, b Tool
		want bool
	}{
		{"same revision", stamped, stamped, true},
		{"same release", released, released, true},
		{"unstamped builds cannot be told apart", unstamped, unstamped, false},
		{"modified checkout", modified, modified, false},
		{"different builds", stamped, released, false},
	} {
		if got := knownSameBuild(c.a, c.b); got != c.want {
			t.Errorf("%s: knownSameBuild = %v, want %v", c.name, got, c.want)
		}
	}
}
