package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fitseal/bundle"
	"fitseal/runner"
)

// TestShardAuto: --shard auto reads each scheduler's variables (as their
// manuals name them: Slurm's SLURM_ARRAY_TASK_ID/_MIN/_COUNT, a Kubernetes
// Indexed Job's JOB_COMPLETION_INDEX, GNU parallel's PARALLEL_SEQ counting
// from 1), and says what is missing otherwise.
func TestShardAuto(t *testing.T) {
	for _, tc := range []struct {
		name string
		env  map[string]string
		want runner.Shard
		err  string
	}{
		{"slurm from 0", map[string]string{"SLURM_ARRAY_TASK_ID": "5", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_COUNT": "16"}, runner.Shard{Index: 5, Count: 16}, ""},
		{"slurm from 1", map[string]string{"SLURM_ARRAY_TASK_ID": "16", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_COUNT": "16"}, runner.Shard{Index: 15, Count: 16}, ""},
		{"slurm no min", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_COUNT": "4"}, runner.Shard{Index: 2, Count: 4}, ""},
		{"slurm stepped", map[string]string{"SLURM_ARRAY_TASK_ID": "8", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_COUNT": "4"}, runner.Shard{}, "range with step 1"},
		{"slurm no count", map[string]string{"SLURM_ARRAY_TASK_ID": "2"}, runner.Shard{}, "SLURM_ARRAY_TASK_COUNT is not"},
		{"kubernetes", map[string]string{"JOB_COMPLETION_INDEX": "3", "FITSEAL_SHARD_COUNT": "8"}, runner.Shard{Index: 3, Count: 8}, ""},
		{"kubernetes no count", map[string]string{"JOB_COMPLETION_INDEX": "3"}, runner.Shard{}, "FITSEAL_SHARD_COUNT is not"},
		{"kubernetes index too big", map[string]string{"JOB_COMPLETION_INDEX": "8", "FITSEAL_SHARD_COUNT": "8"}, runner.Shard{}, "between 0 and 7"},
		{"gnu parallel", map[string]string{"PARALLEL_SEQ": "1", "FITSEAL_SHARD_COUNT": "4"}, runner.Shard{Index: 0, Count: 4}, ""},
		{"gnu parallel last", map[string]string{"PARALLEL_SEQ": "4", "FITSEAL_SHARD_COUNT": "4"}, runner.Shard{Index: 3, Count: 4}, ""},
		{"plain", map[string]string{"FITSEAL_SHARD_INDEX": "0", "FITSEAL_SHARD_COUNT": "1"}, runner.Shard{Index: 0, Count: 1}, ""},
		{"not a number", map[string]string{"JOB_COMPLETION_INDEX": "x", "FITSEAL_SHARD_COUNT": "2"}, runner.Shard{}, `JOB_COMPLETION_INDEX="x" is not a whole number`},
		{"nothing", map[string]string{}, runner.Shard{}, "no scheduler variables found"},
	} {
		got, err := parseShardFlag("auto", func(k string) string { return tc.env[k] })
		if tc.err != "" {
			if err == nil || !strings.Contains(err.Error(), tc.err) {
				t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.err)
			}
			continue
		}
		if err != nil || *got != tc.want {
			t.Errorf("%s: got %v, %v; want %v", tc.name, got, err, tc.want)
		}
	}
}

// TestRunShardAutoNoEnvironment: exit 2 and nothing written.
func TestRunShardAutoNoEnvironment(t *testing.T) {
	project, key, _ := demoShards(t)
	for _, v := range []string{"SLURM_ARRAY_TASK_ID", "JOB_COMPLETION_INDEX", "PARALLEL_SEQ", "FITSEAL_SHARD_INDEX"} {
		t.Setenv(v, "")
	}
	code, _, errOut := cli(t, "run", "-q", "--key", key, "--shard", "auto", project)
	if code != 2 || !strings.Contains(errOut, "--shard auto: no scheduler variables found") {
		t.Errorf("exit %d, stderr %q", code, errOut)
	}
	if _, err := os.Stat(filepath.Join(filepath.Dir(project), "bundles")); err == nil {
		t.Error("a bundles folder was made")
	}
	// With Kubernetes' variables: the default name carries the shard.
	t.Setenv("JOB_COMPLETION_INDEX", "1")
	t.Setenv("FITSEAL_SHARD_COUNT", "3")
	out := mustCLI(t, 0, "run", "-q", "--key", key, "--shard", "auto", project)
	if !strings.Contains(out, "-20251202T000000Z-shard-1-of-3.tar.gz") || !strings.Contains(out, "shard 1/3:") {
		t.Errorf("run output:\n%s", out)
	}
}

// TestVerifySlices: every slice of a full bundle verifies (slice 0 also
// compares the rendered files); a number edited and re-signed fails the
// slice that holds its analysis and only that one.
func TestVerifySlices(t *testing.T) {
	project, key, dir := demoShards(t)
	full := filepath.Join(dir, "full.tar.gz")
	mustCLI(t, 0, "run", "-q", "-j", "2", "--key", key, "-o", full, project)
	total := 0
	for i := 0; i < 3; i++ {
		out := mustCLI(t, 0, "verify", "-j", "2", "--shard", itoa(i)+"/3", full)
		if !strings.Contains(out, "every number of slice "+itoa(i)+"/3 reproduced") {
			t.Errorf("slice %d:\n%s", i, out)
		}
		if i == 0 && strings.Contains(out, " 0 tables, figures and PDF files identical") {
			t.Errorf("slice 0 compared no rendered file:\n%s", out)
		}
		total++
	}
	// Edit the estimate of nitrate/MW-1's first parameter row and re-sign.
	bag, err := bundle.Open(full)
	if err != nil {
		t.Fatal(err)
	}
	rec, _ := bundle.ParseRunRecord(bag.RunJSON())
	payload := bag.Payload()
	lines := strings.Split(string(payload["results/parameters.csv"]), "\n")
	row := -1
	for i, l := range lines {
		if strings.HasPrefix(l, "nitrate/MW-1,") {
			row = i
			break
		}
	}
	if row < 0 {
		t.Fatal("no nitrate/MW-1 row in parameters.csv")
	}
	f := strings.Split(lines[row], ",")
	f[3] = "4.25"
	lines[row] = strings.Join(f, ",")
	payload["results/parameters.csv"] = []byte(strings.Join(lines, "\n"))
	signer, err := bundle.LoadSigner(key)
	if err != nil {
		t.Fatal(err)
	}
	forged := filepath.Join(dir, "forged.tar.gz")
	if err := bundle.WriteBundle(forged, false, bundle.Contents{Name: bag.Name, Created: rec.Created, Description: rec.Project.Description,
		Payload: payload, RunJSON: bag.RunJSON()}, signer); err != nil {
		t.Fatal(err)
	}
	holder := runner.ShardOf("nitrate/MW-1", 3)
	for i := 0; i < 3; i++ {
		code, out, _ := cli(t, "verify", "-j", "2", "--shard", itoa(i)+"/3", forged)
		// The edited file no longer matches its results.json, which every
		// slice checks when it reads the recorded numbers back.
		if code != 1 || !strings.Contains(out, "FAIL data/results/") {
			t.Errorf("slice %d of the forged bundle (analysis in slice %d): exit %d\n%s", i, holder, code, out)
		}
	}

	// A consistent forgery: the estimate edited in every result file (read
	// back, edited, written again). Only the slice holding the analysis
	// re-runs it; slice 0 also finds the rendered files stale.
	p, err := runner.Load(project)
	if err != nil {
		t.Fatal(err)
	}
	data, err := runner.ReadAll(p)
	if err != nil {
		t.Fatal(err)
	}
	res, err := runner.Rebuild(p, data, runner.MakePlan(p, data), [][]byte{bag.Payload()["results/results.json"]}, rec.Seeds)
	if err != nil {
		t.Fatal(err)
	}
	for _, a := range res.Analyses {
		if a.Name == "nitrate/MW-1" {
			for _, ps := range a.Parameters {
				if len(ps) > 0 {
					ps[0].Estimate *= 1.5
					break
				}
			}
		}
	}
	files, err := res.Files()
	if err != nil {
		t.Fatal(err)
	}
	payload = bag.Payload()
	for name, b := range files {
		payload["results/"+name] = b
	}
	consistent := filepath.Join(dir, "consistent.tar.gz")
	if err := bundle.WriteBundle(consistent, false, bundle.Contents{Name: bag.Name, Created: rec.Created, Description: rec.Project.Description,
		Payload: payload, RunJSON: bag.RunJSON()}, signer); err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 3; i++ {
		code, out, _ := cli(t, "verify", "-j", "2", "--shard", itoa(i)+"/3", consistent)
		switch {
		case i == holder:
			if code != 1 || !strings.Contains(out, "did not reproduce: ") || !strings.Contains(out, "nitrate/MW-1") {
				t.Errorf("slice %d holds the edited analysis: exit %d\n%s", i, code, out)
			}
		case i == 0:
			// The results identity printed in the PDF no longer matches
			// (and, with a commit-stamped build, the rendered files differ).
			if code != 1 || !strings.Contains(out, "FAIL run.json: results_identity") {
				t.Errorf("slice 0 re-renders from the edited numbers: exit %d\n%s", code, out)
			}
		default:
			if code != 0 {
				t.Errorf("slice %d does not hold the edited analysis: exit %d\n%s", i, code, out)
			}
		}
	}
}
