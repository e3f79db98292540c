package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"fitseal/templates"
)

// demoShards writes the init demo and a key, and returns the project file,
// the key and the folder.
func demoShards(t *testing.T) (project, key, dir string) {
	t.Helper()
	t.Setenv("SOURCE_DATE_EPOCH", "1764633600")
	dir = t.TempDir()
	if _, err := templates.WriteScaffold(filepath.Join(dir, "p")); err != nil {
		t.Fatal(err)
	}
	key = filepath.Join(dir, "key")
	mustCLI(t, 0, "keygen", "-o", key)
	return filepath.Join(dir, "p", "fitseal.toml"), key, dir
}

// TestShardsMergeEqualTheSingleRun: the demo run whole, and as 1, 3 and 7
// shards each run by a separate fitseal process, merged: the merged
// archive is byte for byte the single run's (same key, same
// SOURCE_DATE_EPOCH).
func TestShardsMergeEqualTheSingleRun(t *testing.T) {
	project, key, dir := demoShards(t)
	bin := filepath.Join(dir, "fitseal")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	env := append(os.Environ(), "SOURCE_DATE_EPOCH=1764633600", "FITSEAL_KEY="+key)
	fitseal := func(args ...string) string {
		t.Helper()
		cmd := exec.Command(bin, args...)
		cmd.Env = env
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("fitseal %s: %v\n%s", strings.Join(args, " "), err, out)
		}
		return string(out)
	}
	single := filepath.Join(dir, "single.tar.gz")
	fitseal("run", "-q", "-j", "2", "-o", single, project)
	want, _ := os.ReadFile(single)
	for _, n := range []int{1, 3, 7} {
		var parts []string
		for i := 0; i < n; i++ {
			part := filepath.Join(dir, "part-"+itoa(i)+"-of-"+itoa(n)+".tar.gz")
			fitseal("run", "-q", "-j", "1", "--shard", itoa(i)+"/"+itoa(n), "-o", part, project)
			parts = append(parts, part)
		}
		merged := filepath.Join(dir, "merged-"+itoa(n)+".tar.gz")
		// Parts in reverse order: the order given does not matter.
		args := []string{"merge", "-o", merged}
		for i := len(parts) - 1; i >= 0; i-- {
			args = append(args, parts[i])
		}
		fitseal(args...)
		got, _ := os.ReadFile(merged)
		if !bytes.Equal(got, want) {
			t.Errorf("%d shards: the merged bundle differs from the single run", n)
		}
	}
}

func itoa(i int) string { return strconv.Itoa(i) }

// TestMergeRefusals: each kind of wrong set of parts is refused, naming the
// part and the reason, with nothing written.
func TestMergeRefusals(t *testing.T) {
	project, key, dir := demoShards(t)
	t.Setenv("FITSEAL_KEY", key)
	part := func(name, shard string) string {
		out := filepath.Join(dir, name)
		mustCLI(t, 0, "run", "-q", "-j", "2", "--shard", shard, "-o", out, project)
		return out
	}
	p0, p1 := part("p0.tar.gz", "0/2"), part("p1.tar.gz", "1/2")
	q0 := part("q0.tar.gz", "0/3")
	folder := part("p1-bag", "1/2")

	// Other settings: the seed changed between the shards.
	src, _ := os.ReadFile(project)
	os.WriteFile(project, bytes.Replace(src, []byte("seed = 20261202"), []byte("seed = 7"), 1), 0o644)
	seed1 := part("seed1.tar.gz", "1/2")
	os.WriteFile(project, src, 0o644)

	// Other inputs: a data file edited between the shards (a comment line
	// the CSV reader skips would still change the hash; edit a value).
	data := filepath.Join(dir, "p", "data", "defects.csv")
	csv, _ := os.ReadFile(data)
	os.WriteFile(data, append(append([]byte(nil), csv...), []byte("B061,50,3\n")...), 0o644)
	input1 := part("input1.tar.gz", "1/2")
	os.WriteFile(data, csv, 0o644)

	// A bad signature: the signature of a part's bag folder damaged.
	sig := filepath.Join(folder, "tagmanifest-sha256.txt.sig")
	if _, err := os.Stat(sig); err != nil {
		matches, _ := filepath.Glob(filepath.Join(folder, "*.sig"))
		if len(matches) != 1 {
			t.Fatalf("no signature file in %s", folder)
		}
		sig = matches[0]
	}
	b, _ := os.ReadFile(sig)
	b = bytes.Replace(b, []byte("AAAA"), []byte("AAAB"), 1)
	os.WriteFile(sig, b, 0o644)

	full := filepath.Join(dir, "full.tar.gz")
	mustCLI(t, 0, "run", "-q", "-j", "2", "-o", full, project)

	for _, tc := range []struct {
		name  string
		parts []string
		code  int
		want  string
	}{
		{"other settings", []string{p0, seed1}, 2, seed1 + ": has other settings than " + p0},
		{"other inputs", []string{p0, input1}, 2, input1 + ": has other inputs"},
		{"overlap", []string{p0, p1, p0}, 2, p0 + ": shard 0/2 overlaps " + p0},
		{"missing", []string{p0}, 2, "missing shard(s) 1/2"},
		{"other count", []string{p0, q0}, 2, q0 + ": is a shard of 3, not of 2"},
		{"bad signature", []string{p0, folder}, 1, folder + ": failed its check"},
		{"not a part", []string{full}, 2, full + ": not a partial bundle"},
	} {
		out := filepath.Join(dir, "merged.tar.gz")
		code, _, errOut := cli(t, append([]string{"merge", "-o", out}, tc.parts...)...)
		if code != tc.code || !strings.Contains(errOut, tc.want) {
			t.Errorf("%s: exit %d, stderr %q; want exit %d and %q", tc.name, code, errOut, tc.code, tc.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: a bundle was written", tc.name)
		}
	}
	// The right parts merge.
	mustCLI(t, 0, "merge", "-o", filepath.Join(dir, "ok.tar.gz"), p1, p0)
}
