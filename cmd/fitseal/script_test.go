package main

import (
	"bytes"
	"context"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/rogpeppe/go-internal/testscript"
)

// TestMain lets the scripts run fitseal as a program: testscript re-executes
// this test binary as "fitseal", which runs main.
func TestMain(m *testing.M) {
	testscript.Main(m, map[string]func(){"fitseal": main})
}

// TestScript runs every end-to-end script in testdata/script, one behaviour
// per file (see the comment at the top of each).
//
// Extra script commands:
//
//	status N PROG ARGS…  run PROG and require exit status N (stdout and stderr
//	                     are kept for the stdout/stderr commands)
//	notemp DIR           DIR holds no temporary file or folder (".tmp-")
//	cmpdir A B           folders A and B hold the same files, byte for byte
func TestScript(t *testing.T) {
	// One signing key for every script, made by fitseal keygen, so that no
	// script creates the default key (and bundles of one script compare
	// byte for byte).
	key := filepath.Join(t.TempDir(), "id_ed25519")
	var stderr bytes.Buffer
	if code := run(context.Background(), []string{"keygen", "-o", key}, io.Discard, &stderr); code != 0 {
		t.Fatalf("keygen: exit %d: %s", code, stderr.String())
	}
	testscript.Run(t, testscript.Params{
		Dir: "testdata/script",
		Setup: func(env *testscript.Env) error {
			env.Setenv("SOURCE_DATE_EPOCH", "1764633600") // 2025-12-02T00:00:00Z
			env.Setenv("FITSEAL_KEY", key)
			return nil
		},
		Cmds: map[string]func(ts *testscript.TestScript, neg bool, args []string){
			"status": cmdStatus,
			"notemp": cmdNoTemp,
			"cmpdir": cmdCmpDir,
		},
	})
}

func cmdStatus(ts *testscript.TestScript, neg bool, args []string) {
	if neg || len(args) < 2 {
		ts.Fatalf("usage: status N PROG ARGS…")
	}
	want, err := strconv.Atoi(args[0])
	if err != nil {
		ts.Fatalf("status: %v", err)
	}
	got := 0
	if err := ts.Exec(args[1], args[2:]...); err != nil {
		var ee *exec.ExitError
		if !errors.As(err, &ee) {
			ts.Fatalf("status: %v", err)
		}
		got = ee.ExitCode()
	}
	if got != want {
		ts.Fatalf("exit status %d, want %d", got, want)
	}
}

func cmdNoTemp(ts *testscript.TestScript, neg bool, args []string) {
	if len(args) != 1 {
		ts.Fatalf("usage: notemp DIR")
	}
	var found []string
	filepath.WalkDir(ts.MkAbs(args[0]), func(path string, d os.DirEntry, err error) error {
		if err == nil && strings.Contains(d.Name(), ".tmp-") {
			found = append(found, path)
		}
		return nil
	})
	if neg != (len(found) == 0) {
		return
	}
	if neg {
		ts.Fatalf("no temporary files, want some")
	}
	ts.Fatalf("temporary files left behind: %v", found)
}

func cmdCmpDir(ts *testscript.TestScript, neg bool, args []string) {
	if neg || len(args) != 2 {
		ts.Fatalf("usage: cmpdir A B")
	}
	list := func(dir string) map[string][]byte {
		out := map[string][]byte{}
		filepath.WalkDir(ts.MkAbs(dir), func(path string, d os.DirEntry, err error) error {
			ts.Check(err)
			if !d.IsDir() {
				rel, _ := filepath.Rel(ts.MkAbs(dir), path)
				b, err := os.ReadFile(path)
				ts.Check(err)
				out[rel] = b
			}
			return nil
		})
		return out
	}
	a, b := list(args[0]), list(args[1])
	var names []string
	for n := range a {
		names = append(names, n)
	}
	for n := range b {
		if _, ok := a[n]; !ok {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	for _, n := range names {
		if !bytes.Equal(a[n], b[n]) {
			ts.Fatalf("%s differs between %s and %s", n, args[0], args[1])
		}
	}
	if len(names) == 0 {
		ts.Fatalf("%s and %s are both empty", args[0], args[1])
	}
}

// TestRunInterruptedLeavesNothing: a run whose context is cancelled (ctrl-C)
// stops, says so, and writes nothing.
func TestRunInterruptedLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	write := func(name, content string) {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(content), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("x.csv", "x\n1.5\n2.5\n0.5\n3.1\n")
	write("fitseal.toml", "name = \"stop\"\n[[dataset]]\nname = \"x\"\nfile = \"x.csv\"\ncolumn = \"x\"\n"+
		"[[candidates]]\nname = \"c\"\nfamilies = [\"weibull\", \"gamma\"]\n[[analysis]]\ndataset = \"x\"\ncandidates = \"c\"\n")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var stdout, stderr bytes.Buffer
	out := filepath.Join(dir, "out")
	err := runRun(ctx, runOptions{Project: filepath.Join(dir, "fitseal.toml"), Output: out, Quiet: true}, &stdout, &stderr)
	if err == nil || !strings.Contains(err.Error(), "interrupted: nothing was written") {
		t.Fatalf("runRun after cancel: %v", err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 2 || stdout.Len() != 0 {
		t.Errorf("folder holds %d entries (want the 2 inputs only), stdout %q", len(entries), stdout.String())
	}
}
