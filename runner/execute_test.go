package runner

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"gonum.org/v1/gonum/stat/distuv"

	"fitseal/fitters/infer"
)

// splitProject writes a project with one split dataset of groups × n
// lifetimes (invented for the test: Weibull draws from a fixed seed, a
// suspension every seventh row when censored) with the given extra
// [settings] lines, and returns its path.
func splitProject(t testing.TB, groups, n int, families, settings string, censored bool) string {
	t.Helper()
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("unit,hours,state\n")
	r := rand.New(rand.NewPCG(1, 2))
	for g := 0; g < groups; g++ {
		for i := 0; i < n; i++ {
			x := 1000 * math.Pow(-math.Log(1-r.Float64()), 1/1.5) // Weibull(shape 1.5, scale 1000)
			state := ""
			if censored && i%7 == 6 {
				state = "+"
			}
			fmt.Fprintf(&b, "u%03d,%s,%s\n", g, strconv.FormatFloat(x, 'g', 8, 64), state)
		}
	}
	if err := os.WriteFile(filepath.Join(dir, "life.csv"), []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	proj := fmt.Sprintf(`name = "split"
[settings]
seed = 42
%s
[[dataset]]
name = "life"
file = "life.csv"
column = "hours"
status_column = "state"
right = ["+"]
split_by = "unit"
[[candidates]]
name = "c"
families = [%s]
[[analysis]]
dataset = "life"
candidates = "c"
quantiles = [0.1, 0.5]
thresholds = [2000]
`, settings, families)
	path := filepath.Join(dir, "fitseal.toml")
	if err := os.WriteFile(path, []byte(proj), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// runResults loads the project at path and runs it on workers.
func runResults(t testing.TB, path string, workers int) *Results {
	t.Helper()
	p, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), p, RunOptions{Workers: workers})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func runFiles(t testing.TB, path string, workers int) map[string][]byte {
	t.Helper()
	files, err := runResults(t, path, workers).Files()
	if err != nil {
		t.Fatal(err)
	}
	return files
}

func TestRunIsDeterministicAcrossWorkerCounts(t *testing.T) {
	// Complete data, so the bootstrap (p-values and intervals) runs too.
	path := splitProject(t, 6, 40, `"weibull", "lognormal", "gamma", "exponential", "normal", "gev"`,
		"bootstrap = 19\nintervals = \"bootstrap\"", false)
	ref := runFiles(t, path, 1)
	for _, w := range []int{1, 2, 8} {
		got := runFiles(t, path, w)
		for name, want := range ref {
			if !bytes.Equal(got[name], want) {
				t.Errorf("-j %d: %s differs from -j 1", w, name)
			}
		}
	}
}

// With fewer fits than workers the bootstrap replicates run in parallel
// inside a fit; the bytes must not change either.
func TestBootstrapInsideFitIsDeterministic(t *testing.T) {
	path := splitProject(t, 1, 50, `"gamma", "weibull"`, "bootstrap = 40\nintervals = \"bootstrap\"", false)
	ref := runFiles(t, path, 1)
	got := runFiles(t, path, 8)
	for name, want := range ref {
		if !bytes.Equal(got[name], want) {
			t.Errorf("-j 8: %s differs from -j 1", name)
		}
	}
	if !bytes.Contains(ref[ParametersFile], []byte("bootstrap-t (log scale, B = 40)")) {
		t.Errorf("parameters.csv lacks bootstrap intervals:\n%s", ref[ParametersFile])
	}
}

func TestRunResults(t *testing.T) {
	path := splitProject(t, 3, 30, `"weibull", "normal", "lognormal"`, "bootstrap = 0\nintervals = \"wald\"", true)
	files := runFiles(t, path, 2)
	fits, err := csv.NewReader(bytes.NewReader(files[FitsFile])).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(fits[0][:16], ","); got != "analysis,dataset,family,n,n_censored,k,loglik,aic,aicc,bic,criterion,delta,weight,rank,converged,note" {
		t.Fatalf("fits.csv header %q", got)
	}
	if len(fits) != 1+3*3 {
		t.Fatalf("%d rows, want 9 (3 groups × 3 families)", len(fits)-1)
	}
	// Plan order: groups in order of appearance, families in candidate order.
	for i, want := range []string{"life/u000,life/u000,weibull", "life/u000,life/u000,normal", "life/u000,life/u000,lognormal", "life/u001,life/u001,weibull"} {
		if got := strings.Join(fits[1+i][:3], ","); got != want {
			t.Errorf("row %d = %s, want %s", i+1, got, want)
		}
	}
	// Weights of the fitted rows of each analysis sum to 1 (Burnham & Anderson, 2002, §2.9).
	sums := map[string]float64{}
	for _, row := range fits[1:] {
		if row[12] != "" {
			w, _ := strconv.ParseFloat(row[12], 64)
			sums[row[0]] += w
		}
		if row[3] != "30" || row[4] != "4" {
			t.Errorf("%s %s: n %s n_censored %s, want 30 and 4 (rows 7, 14, 21, 28 suspended)", row[0], row[2], row[3], row[4])
		}
	}
	for a, s := range sums {
		if math.Abs(s-1) > 1e-12 {
			t.Errorf("%s: weights sum to %v", a, s)
		}
	}
	// Derived rows: each quantile equals the fitted family's quantile at the
	// estimates in parameters.csv (distuv's Weibull as the outside reference).
	params, _ := csv.NewReader(bytes.NewReader(files[ParametersFile])).ReadAll()
	est := map[string]float64{}
	for _, row := range params[1:] {
		if row[0] == "life/u000" && row[1] == "weibull" {
			est[row[2]], _ = strconv.ParseFloat(row[3], 64)
		}
	}
	wb := distuv.Weibull{K: est["shape"], Lambda: est["scale"]}
	derived, _ := csv.NewReader(bytes.NewReader(files[DerivedFile])).ReadAll()
	found := 0
	for _, row := range derived[1:] {
		if row[0] != "life/u000" || row[1] != "weibull" {
			continue
		}
		arg, _ := strconv.ParseFloat(row[3], 64)
		got, _ := strconv.ParseFloat(row[4], 64)
		var want float64
		switch row[2] {
		case "quantile":
			want = wb.Quantile(arg)
		case "exceedance":
			want = wb.Survival(arg)
		}
		if math.Abs(got-want) > 1e-9*math.Abs(want) {
			t.Errorf("%s(%v) = %v, distuv gives %v", row[2], arg, got, want)
		}
		found++
	}
	if found != 3 {
		t.Errorf("%d derived weibull rows for life/u000, want 3", found)
	}
	// Model-averaged rows: Σ wᵢ θ̂ᵢ over the ranked fits, one per quantity.
	avg := 0
	for _, row := range derived[1:] {
		if row[0] == "life/u000" && row[1] == ModelAverage {
			avg++
		}
	}
	if avg != 3 {
		t.Errorf("%d model-average rows for life/u000, want 3", avg)
	}
}

func TestInapplicableFamiliesAreListed(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "d.csv"), []byte("x\n-1.5\n0.3\n2.2\n0.9\n-0.4\n"), 0o644)
	path := filepath.Join(dir, "p.toml")
	os.WriteFile(path, []byte(`name = "neg"
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
`), 0o644)
	files := runFiles(t, path, 1)
	fits, _ := csv.NewReader(bytes.NewReader(files[FitsFile])).ReadAll()
	if len(fits) != 3 {
		t.Fatalf("%d rows, want 2", len(fits)-1)
	}
	ln := fits[2]
	if ln[2] != "lognormal" || ln[14] != "false" || ln[7] != "" || ln[13] != "" || !strings.Contains(ln[15], "not applicable") {
		t.Errorf("lognormal row %q: want converged false, empty numbers and a note saying why", ln)
	}
	if fits[1][13] != "1" || fits[1][12] != "1" {
		t.Errorf("normal row %q: want rank 1 and weight 1", fits[1])
	}
}

// TestEmptyGroupSaysWhy: a group of a split dataset whose rows were all
// skipped as missing keeps a row per family in fits.csv and results.json,
// not applicable with the reason, and results.json counts its rows.
func TestEmptyGroupSaysWhy(t *testing.T) {
	tests := []struct {
		name, csv, group, reason string
		rows                     int
	}{
		{"two rows", "well,x\nmw-1,1.5\nmw-2,NA\nmw-1,2.5\nmw-2,\nmw-1,3\n", "mw-2",
			"the group has no observations: its 2 rows are all missing", 2},
		{"one row", "well,x\nmw-1,1.5\nmw-1,2.5\nmw-3,NA\nmw-1,3\n", "mw-3",
			"the group has no observations: its one row is missing", 1},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			dir := t.TempDir()
			if err := os.WriteFile(filepath.Join(dir, "wells.csv"), []byte(tt.csv), 0o644); err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(dir, "fitseal.toml")
			if err := os.WriteFile(path, []byte(`name = "wells"
[settings]
bootstrap = 0
[[dataset]]
name = "nitrate"
file = "wells.csv"
column = "x"
split_by = "well"
[[candidates]]
name = "c"
families = ["lognormal", "gamma"]
[[analysis]]
dataset = "nitrate"
candidates = "c"
`), 0o644); err != nil {
				t.Fatal(err)
			}
			files := runFiles(t, path, 1)
			fits, err := csv.NewReader(bytes.NewReader(files[FitsFile])).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			name := "nitrate/" + tt.group
			var got []string
			for _, r := range fits[1:] {
				if r[0] == name {
					got = append(got, strings.Join([]string{r[2], r[3], r[6], r[13], r[14], r[15]}, ","))
				}
			}
			want := []string{
				"lognormal,0,,,false,not applicable: " + tt.reason,
				"gamma,0,,,false,not applicable: " + tt.reason,
			}
			if strings.Join(got, "\n") != strings.Join(want, "\n") {
				t.Errorf("fits.csv rows of %s (family,n,loglik,rank,converged,note):\n%s\nwant:\n%s", name, strings.Join(got, "\n"), strings.Join(want, "\n"))
			}
			js := string(files[ResultsFile])
			for _, s := range []string{
				fmt.Sprintf(`{"name":%q,"rows":%d,"missing":%d,"n":0,"n_censored":0}`, tt.group, tt.rows, tt.rows),
				fmt.Sprintf(`"inapplicable":%q`, tt.reason),
			} {
				if !strings.Contains(js, s) {
					t.Errorf("results.json lacks %s", s)
				}
			}
		})
	}
}

func TestSeedsAreRecordedForEveryBootstrap(t *testing.T) {
	p, err := Load(splitProject(t, 2, 10, `"normal", "exponential"`, "bootstrap = 9\nintervals = \"wald\"", false))
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), p, RunOptions{Workers: 3})
	if err != nil {
		t.Fatal(err)
	}
	rec := res.Record()
	if len(rec.Seeds) != 4 {
		t.Fatalf("%d streams recorded, want 4 (2 groups × 2 families)", len(rec.Seeds))
	}
	for _, s := range rec.Seeds {
		st := infer.Stream{Master: 42, Analysis: s.Analysis, Family: s.Family, Purpose: "bootstrap"}
		a, b := st.StreamSeed(0)
		want := "42|" + s.Analysis + "|" + s.Family + "|bootstrap|0"
		if s.Replicates != 9 || s.Identity != want || s.FirstSeed != [2]uint64{a, b} {
			t.Errorf("stream %+v, want 9 replicates, identity %q and seed %d, %d", s, want, a, b)
		}
	}
	if len(rec.Optimizers) != 4 {
		t.Errorf("%d optimiser records, want 4", len(rec.Optimizers))
	}
}

func TestRunCancelled(t *testing.T) {
	p, err := Load(splitProject(t, 4, 20, `"weibull", "gamma"`, "", true))
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	res, err := Run(ctx, p, RunOptions{Workers: 2})
	if !errors.Is(err, context.Canceled) || res != nil {
		t.Fatalf("Run after cancel = %v, %v; want no results and context.Canceled", res, err)
	}
}

// Cancelling a run under way returns at once, without waiting for the fits
// in progress.
func TestRunCancelledMidway(t *testing.T) {
	p, err := Load(splitProject(t, 4, 300, `"gev", "weibull", "gamma"`, "bootstrap = 500", false))
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	var cancelled time.Time
	go func() {
		time.Sleep(100 * time.Millisecond)
		cancelled = time.Now()
		cancel()
	}()
	res, err := Run(ctx, p, RunOptions{Workers: 2})
	if !errors.Is(err, context.Canceled) || res != nil {
		t.Fatalf("Run = %v, %v; want no results and context.Canceled", res, err)
	}
	if wait := time.Since(cancelled); wait > 2*time.Second {
		t.Errorf("Run returned %v after the cancellation", wait)
	}
}

// The progress line ends with every task done.
func TestProgressDrawn(t *testing.T) {
	p, err := Load(splitProject(t, 2, 20, `"normal", "exponential"`, "bootstrap = 0", true))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if _, err := Run(context.Background(), p, RunOptions{Workers: 2, Progress: &buf}); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	if !strings.HasPrefix(out, "\rfitting ") || !strings.Contains(out, "fitting 4/4 tasks 100%") || !strings.HasSuffix(out, "\n") {
		t.Errorf("progress output %q", out)
	}
}

func TestProgressLine(t *testing.T) {
	for _, c := range []struct {
		done, total int
		elapsed     string
		want        string
	}{
		{0, 10, "3s", "fitting 0/10 tasks   0%  elapsed 3s  ETA …"},
		{5, 10, "4s", "fitting 5/10 tasks  50%  elapsed 4s  ETA 4s"},
		{10, 10, "9s", "fitting 10/10 tasks 100%  elapsed 9s  ETA 0s"},
	} {
		d, _ := time.ParseDuration(c.elapsed)
		if got := strings.TrimSpace(progressLine(c.done, c.total, d)); got != c.want {
			t.Errorf("progressLine(%d, %d, %s) = %q, want %q", c.done, c.total, c.elapsed, got, c.want)
		}
	}
}

// TestProgressShowsReplicates: once bootstrap replicates are drawn, the
// progress line counts them after the tasks.
func TestProgressShowsReplicates(t *testing.T) {
	var buf strings.Builder
	var done, drawn atomic.Int64
	p := &progress{w: &buf, total: 10, done: &done, drawn: &drawn, start: time.Now()}
	done.Store(3)
	p.draw()
	if strings.Contains(buf.String(), "replicates") {
		t.Errorf("no replicates drawn yet, line %q", buf.String())
	}
	drawn.Store(1998)
	buf.Reset()
	p.draw()
	if !strings.Contains(buf.String(), "fitting 3/10 tasks") || !strings.Contains(buf.String(), "bootstrap replicates 1998") {
		t.Errorf("progress line %q", buf.String())
	}
}

// TestPhase: a phase's status line names the work and the time it has
// taken, starts at once, and ends its line when stopped; without a
// terminal (a nil writer) it draws nothing.
func TestPhase(t *testing.T) {
	for _, c := range []struct {
		label, elapsed, want string
	}{
		{"sealing: tables, figures, PDF", "0s", "sealing: tables, figures, PDF  elapsed 0s"},
		{"sealing: tables, figures, PDF", "2.6s", "sealing: tables, figures, PDF  elapsed 3s"},
		{"re-rendering", "75s", "re-rendering  elapsed 1m15s"},
	} {
		d, _ := time.ParseDuration(c.elapsed)
		if got := strings.TrimSpace(phaseLine(c.label, d)); got != c.want {
			t.Errorf("phaseLine(%q, %s) = %q, want %q", c.label, c.elapsed, got, c.want)
		}
	}
	var buf bytes.Buffer
	p := StartPhase(&buf, "sealing")
	p.Stop()
	out := buf.String()
	if !strings.HasPrefix(out, "\rsealing  elapsed 0s") || !strings.HasSuffix(out, "\n") || strings.Count(out, "\n") != 1 {
		t.Errorf("phase output %q", out)
	}
	if p := StartPhase(nil, "sealing"); p != nil {
		t.Errorf("StartPhase(nil) = %v, want nil", p)
	}
	StartPhase(nil, "sealing").Stop() // a nil phase stops quietly
}
