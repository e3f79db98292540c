package bundle

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"fitseal/runner"
)

// sealProject is a small project (the ball-bearing endurance data) for the
// sealing tests.
var sealProject = filepath.Join("testdata", "seal", "fitseal.toml")

// goldenSeal is the bundle Seal makes of sealProject with testSigner, the
// fixed tool record goldenTool and the created time testCreated.
// Regenerate it (after a deliberate change to the fits, the report or the
// bundle layout) with:
//
//	FITSEAL_UPDATE_GOLDEN=1 go test ./bundle -run TestSealGolden
var goldenSeal = filepath.Join("testdata", "golden", "bearings.tar.gz")

// goldenTool is a fixed tool record, so that the golden bundle does not
// change with the Go release that runs the test.
var goldenTool = Tool{Name: "fitseal", Version: "golden", GoVersion: "go1.golden", OS: "linux", Arch: "amd64"}

var goldenGit = GitInfo{Repository: false, Note: "fixed provenance for the golden test", Files: []GitFile{{Path: "fitseal.toml", State: GitNoRepo}}}

func runSealProject(t *testing.T, workers int) *runner.Results {
	t.Helper()
	p, err := runner.Load(sealProject)
	if err != nil {
		t.Fatal(err)
	}
	res, err := runner.Run(context.Background(), p, runner.RunOptions{Workers: workers})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func sealContents(t *testing.T, res *runner.Results, tool Tool) Contents {
	t.Helper()
	c, err := Seal(res, SealOptions{Created: testCreated, CreatedFrom: "SOURCE_DATE_EPOCH", Git: goldenGit, Signer: testSigner(t).PublicKey(), Tool: tool})
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func sealedBag(t *testing.T, c Contents) *Bag {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteArchive(&buf, c, testSigner(t)); err != nil {
		t.Fatal(err)
	}
	b, err := ReadArchive(&buf, DefaultLimits)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestSealGolden compares the sealed bundle byte for byte with the golden
// one in testdata, member by member first so that a failure says which.
func TestSealGolden(t *testing.T) {
	skipOffGoldenPlatform(t)
	var buf bytes.Buffer
	if err := WriteArchive(&buf, sealContents(t, runSealProject(t, 2), goldenTool), testSigner(t)); err != nil {
		t.Fatal(err)
	}
	got := buf.Bytes()
	if os.Getenv("FITSEAL_UPDATE_GOLDEN") != "" {
		if err := os.WriteFile(goldenSeal, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(goldenSeal)
	if err != nil {
		t.Fatalf("%v (make it with FITSEAL_UPDATE_GOLDEN=1 go test ./bundle -run TestSealGolden)", err)
	}
	if bytes.Equal(got, want) {
		return
	}
	gb, _ := ReadArchive(bytes.NewReader(got), DefaultLimits)
	wb, err := ReadArchive(bytes.NewReader(want), DefaultLimits)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range gb.Paths() {
		if !bytes.Equal(gb.Files[p], wb.Files[p]) {
			t.Errorf("member %s differs from %s", p, goldenSeal)
		}
	}
	t.Errorf("sealed bundle differs from %s; if the change is deliberate, regenerate it: FITSEAL_UPDATE_GOLDEN=1 go test ./bundle -run TestSealGolden", goldenSeal)
}

// TestSealPayloadAndRunJSON checks what a bundle holds: the project file
// and data byte for byte, the result tables, the rendered files the
// [report] table asks for, and a run.json with every effective setting,
// the master seed, every derived seed, one optimiser record per fit and the
// signer.
func TestSealPayloadAndRunJSON(t *testing.T) {
	res := runSealProject(t, 1)
	c := sealContents(t, res, goldenTool)
	src, _ := os.ReadFile(sealProject)
	data, _ := os.ReadFile(filepath.Join("testdata", "seal", "data", "bearings.csv"))
	// The data file is not held but copied from disk as it was fitted.
	if d, ok := c.Files["inputs/data/bearings.csv"]; !ok || d.Size != int64(len(data)) || d.SHA256 != sha256.Sum256(data) {
		t.Errorf("data file to copy from disk: %+v, %v", d, ok)
	}
	if _, held := c.Payload["inputs/data/bearings.csv"]; held {
		t.Error("the data file is held in memory")
	}
	bag := sealedBag(t, c)
	if !bytes.Equal(c.Payload["inputs/fitseal.toml"], src) || !bytes.Equal(bag.Payload()["inputs/data/bearings.csv"], data) {
		t.Error("inputs are not copied byte for byte")
	}
	for _, p := range []string{"results/fits.csv", "results/parameters.csv", "results/derived.csv", "results/gof.csv", "results/results.json",
		"report.pdf", "tables/bearings-ranking.md", "figures/bearings-qq.svg", "figures/bearings-qq.png"} {
		if _, ok := c.Payload[p]; !ok {
			t.Errorf("payload lacks %s", p)
		}
	}
	for p := range c.Payload {
		if strings.HasSuffix(p, ".tex") {
			t.Errorf("payload holds %s, but [report] tables = [\"md\"]", p)
		}
	}
	rec, err := ParseRunRecord(c.RunJSON)
	if err != nil {
		t.Fatal(err)
	}
	want := runner.Settings{Seed: 20261202, Criterion: "aicc", Confidence: 0.95, Intervals: "wald", Bootstrap: 19,
		Tolerance: 1e-10, MaxIterations: 2000}
	if rec.Project.Settings != want {
		t.Errorf("recorded settings %+v, want %+v", rec.Project.Settings, want)
	}
	if rec.MasterSeed != 20261202 || rec.Created != testCreated || rec.Tool != goldenTool {
		t.Errorf("master seed %d, created %v, tool %+v", rec.MasterSeed, rec.Created, rec.Tool)
	}
	if len(rec.Seeds) != len(res.Seeds) || len(rec.Seeds) == 0 {
		t.Errorf("%d seeds recorded, the run derived %d", len(rec.Seeds), len(res.Seeds))
	}
	if len(rec.Optimizers) != 3 {
		t.Errorf("%d optimiser records, want one per fit (3)", len(rec.Optimizers))
	}
	if rec.Signer.Fingerprint != testSigner(t).Fingerprint() || rec.Signer.PublicKey != testSigner(t).AuthorizedKey() {
		t.Errorf("signer %+v", rec.Signer)
	}
	if len(rec.Inputs) != 2 || rec.Inputs[0].Path != "inputs/data/bearings.csv" || rec.Inputs[0].SHA256 != sha256Hex(data) {
		t.Errorf("inputs %+v", rec.Inputs)
	}
	if rec.ResultsIdentity != ResultsIdentity(bag.Payload()) {
		t.Error("results_identity is not the hash of the inputs and results")
	}
	var raw map[string]any
	json.Unmarshal(c.RunJSON, &raw)
	for _, k := range []string{"seed_derivation", "project", "git", "tool", "created"} {
		if _, ok := raw[k]; !ok {
			t.Errorf("run.json lacks %q", k)
		}
	}
}

// TestSealWorkersIdentical: the sealed bytes do not depend on the number of
// workers.
func TestSealWorkersIdentical(t *testing.T) {
	var first []byte
	for _, j := range []int{1, 2, 8} {
		var buf bytes.Buffer
		if err := WriteArchive(&buf, sealContents(t, runSealProject(t, j), goldenTool), testSigner(t)); err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = buf.Bytes()
		} else if !bytes.Equal(first, buf.Bytes()) {
			t.Errorf("-j %d gives other bytes than -j 1", j)
		}
	}
}

// TestRerun: a fresh bundle reproduces exactly on its own platform and
// within the tolerances on another; an edited number is named with its
// file, row, column and both values.
func TestRerun(t *testing.T) {
	ctx := context.Background()
	bag := sealedBag(t, sealContents(t, runSealProject(t, 2), CurrentTool()))
	rep, err := Rerun(ctx, bag, RerunOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if !rep.Exact || len(rep.Findings) > 0 || rep.Compared < 100 {
		t.Fatalf("exact %v, %d numbers, findings %v", rep.Exact, rep.Compared, rep.Findings)
	}
	if rep.RenderedCompared == 0 {
		t.Error("no rendered file was compared on the same build")
	}

	other := CurrentTool()
	other.Arch = "arm64-elsewhere"
	rep, err = Rerun(ctx, bag, RerunOptions{Workers: 1, Tool: other})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Exact || len(rep.Findings) > 0 || rep.RenderNote == "" {
		t.Fatalf("other platform: exact %v, findings %v, note %q", rep.Exact, rep.Findings, rep.RenderNote)
	}

	// Edit one estimate: the re-run names it.
	params := string(bag.Files["data/results/parameters.csv"])
	lines := strings.Split(params, "\n")
	fields := strings.Split(lines[1], ",")
	old := fields[3]
	fields[3] = "1.5"
	lines[1] = strings.Join(fields, ",")
	bag.Files["data/results/parameters.csv"] = []byte(strings.Join(lines, "\n"))
	rep, err = Rerun(ctx, bag, RerunOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, f := range rep.Findings {
		s := f.String()
		if f.Kind == KindNumber && f.Member == "data/results/parameters.csv" &&
			strings.Contains(s, "row 1 (analysis=bearings, family="+fields[1]+", parameter="+fields[2]+")") &&
			strings.Contains(s, "column estimate: recorded 1.5, recomputed "+old) {
			found = true
		}
	}
	if !found {
		t.Errorf("edited estimate not named; findings: %v", rep.Findings)
	}
}

// TestCrossPlatformTolerances checks each rule of the cross-platform
// comparison at and beyond its bound.
func TestCrossPlatformTolerances(t *testing.T) {
	agree := crossPlatform(99)
	boot := map[string]string{"ci_method": "bootstrap-t (log scale, B = 99)", "ci_lower": "1", "ci_upper": "3"}
	tests := []struct {
		name   string
		column string
		fields map[string]string
		a, b   float64
		want   bool
	}{
		{"estimate within 1e-9", "estimate", nil, 1000, 1000 * (1 + 0.9e-9), true},
		{"estimate beyond 1e-9", "estimate", nil, 1000, 1000 * (1 + 1.1e-9), false},
		{"loglik within", "loglik", nil, -176.94338015096227, -176.94338015096227 * (1 + 1e-10), true},
		{"p-value by 3 of B+1", "p_value", map[string]string{"replicates": "99"}, 0.5, 0.53, true},
		{"p-value by 4 of B+1", "p_value", map[string]string{"replicates": "99"}, 0.5, 0.54, false},
		{"bootstrap bound within 5/B of width", "ci_lower", boot, 1, 1 + 5.0/99*2*0.99, true},
		{"bootstrap bound beyond", "ci_lower", boot, 1, 1 + 5.0/99*2*1.01, false},
		{"profile bound is not a bootstrap quantity", "ci_lower", map[string]string{"ci_method": "profile likelihood"}, 1, 1.001, false},
		{"iterations not compared", "iterations", nil, 12, 14, true},
		{"std error within 1e-6", "std_error", nil, 0.5554485579406773, 0.5554485616589243, true},
		{"std error beyond 1e-6", "std_error", nil, 0.5, 0.5 * (1 + 1.1e-6), false},
		{"delta-method bound within 1e-6", "ci_upper", map[string]string{"ci_method": "delta method (log scale)"}, 43.626107, 43.626107 * (1 + 5e-7), true},
		{"model-average bound within 1e-6", "ci_lower", map[string]string{"ci_method": "model average: Akaike weights, unconditional se (Burnham & Anderson 2002 eq. 4.9), normal interval"}, 3131.18, 3131.18 * (1 + 5e-7), true},
		{"tiny exceedance within 1e-12 absolute", "estimate", map[string]string{"quantity": "exceedance"}, 1.7671796567962953e-08, 1.7671796589182108e-08, true},
		{"exceedance beyond 1e-12 absolute and 1e-9 relative", "estimate", map[string]string{"quantity": "exceedance"}, 0.2, 0.2 + 1e-9, false},
		{"quantile is not a probability", "estimate", map[string]string{"quantity": "quantile"}, 1e-8, 1e-8 + 1e-13, false},
	}
	for _, tc := range tests {
		if got := agree(tc.column, tc.fields, tc.a, tc.b); got != tc.want {
			t.Errorf("%s: agree(%v, %v) = %v, want %v", tc.name, tc.a, tc.b, got, tc.want)
		}
	}
}

// TestDiff: bundles that differ only in created time are identical in
// substance; an edited number and a changed setting are listed with both
// values.
func TestDiff(t *testing.T) {
	res := runSealProject(t, 2)
	a := sealedBag(t, sealContents(t, res, goldenTool))
	c := sealContents(t, res, goldenTool)
	c.Created = testCreated.Add(time.Hour)
	b := sealedBag(t, c)
	for _, it := range Diff(a, b) {
		if it.Substantive {
			t.Errorf("created time alone: substantive difference %s: %s", it.Kind, it.Text)
		}
	}
	b.Files["data/results/fits.csv"] = bytes.Replace(b.Files["data/results/fits.csv"], []byte(",23,0,"), []byte(",24,0,"), 1)
	var texts []string
	for _, it := range Diff(a, b) {
		if it.Substantive {
			texts = append(texts, it.Text)
		}
	}
	joined := strings.Join(texts, "\n")
	if !strings.Contains(joined, "data/results/fits.csv row 1 (analysis=bearings, family=weibull), column n: A 23, B 24") {
		t.Errorf("edited n not listed:\n%s", joined)
	}

	// A value of results.json that no table holds (a derived quantity's
	// standard error) is listed even when the tables differ too.
	var rec map[string]any
	if err := json.Unmarshal(b.Files["data/results/results.json"], &rec); err != nil {
		t.Fatal(err)
	}
	d0 := rec["analyses"].([]any)[0].(map[string]any)["derived"].([]any)[0].(map[string]any)
	old := d0["std_error"]
	d0["std_error"] = 12.5
	b.Files["data/results/results.json"], _ = json.Marshal(rec)
	texts = texts[:0]
	for _, it := range Diff(a, b) {
		if it.Substantive {
			texts = append(texts, it.Text)
		}
	}
	joined = strings.Join(texts, "\n")
	want := fmt.Sprintf("data/results/results.json analyses[0].derived[0].std_error: %v in A, 12.5 in B", old)
	if !strings.Contains(joined, want) {
		t.Errorf("a standard error only results.json holds is not listed (want %q):\n%s", want, joined)
	}
}

// TestRerunProgress: with a progress writer (verify on a terminal) the
// re-run shows its fitting progress and then the re-rendering, each line
// ended; without one it writes nothing, and the findings are the same.
func TestRerunProgress(t *testing.T) {
	ctx := context.Background()
	bag := sealedBag(t, sealContents(t, runSealProject(t, 2), CurrentTool()))
	for _, c := range []struct {
		name     string
		progress bool
		want     []string
	}{
		{"terminal", true, []string{"\rfitting ", " 100%", "\r" + rerenderLabel + "  elapsed "}},
		{"no terminal", false, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			opt := RerunOptions{Workers: 2}
			if c.progress {
				opt.Progress = &buf
			}
			rep, err := Rerun(ctx, bag, opt)
			if err != nil || len(rep.Findings) > 0 {
				t.Fatalf("Rerun: %v, findings %v", err, rep.Findings)
			}
			out := buf.String()
			for _, w := range c.want {
				if !strings.Contains(out, w) {
					t.Errorf("progress %q lacks %q", out, w)
				}
			}
			if c.progress && (strings.Count(out, "\n") != 2 || !strings.HasSuffix(out, "\n")) {
				t.Errorf("progress %q: want two lines, each ended", out)
			}
			if !c.progress && out != "" {
				t.Errorf("progress written without a writer: %q", out)
			}
		})
	}
}
