package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fitseal/runner"
)

// TestInitWritesLoadableProject scaffolds the demo and loads it through the
// runner's own project loader: every key, family and dataset must check.
func TestInitWritesLoadableProject(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "demo")
	var out, errb bytes.Buffer
	if code := run(context.Background(), []string{"init", dir}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	for _, want := range []string{"wrote " + filepath.Join(dir, "fitseal.toml"), "invented", "fitseal run", "fitseal verify"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("stdout lacks %q:\n%s", want, out.String())
		}
	}
	p, err := runner.Load(filepath.Join(dir, "fitseal.toml"))
	if err != nil {
		t.Fatalf("runner.Load of the scaffold: %v", err)
	}
	if p.Name != "millbrook-asset-review" || len(p.Analyses) != 4 || len(p.Datasets) != 4 {
		t.Errorf("loaded %q with %d analyses, %d datasets", p.Name, len(p.Analyses), len(p.Datasets))
	}
	for _, d := range p.Datasets {
		if _, err := os.Stat(d.Path(p)); err != nil {
			t.Errorf("dataset %s: %v", d.Name, err)
		}
	}
}

func TestInitRefusesToOverwrite(t *testing.T) {
	dir := t.TempDir()
	mine := []byte("name = \"mine\"\n")
	os.WriteFile(filepath.Join(dir, "fitseal.toml"), mine, 0o644)
	var out, errb bytes.Buffer
	code := run(context.Background(), []string{"init", dir}, &out, &errb)
	if code != 2 {
		t.Fatalf("exit %d, want 2", code)
	}
	if !strings.Contains(errb.String(), "fitseal: error: ") || !strings.Contains(errb.String(), "fitseal.toml") || !strings.Contains(errb.String(), "nothing was written") {
		t.Errorf("stderr: %s", errb.String())
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("%d entries after a refused init, want only the user's file", len(entries))
	}
	if got, _ := os.ReadFile(filepath.Join(dir, "fitseal.toml")); !bytes.Equal(got, mine) {
		t.Error("the user's project file was changed")
	}
	if code := run(context.Background(), []string{"init", "a", "b"}, &out, &errb); code != 2 {
		t.Errorf("two folders: exit %d, want 2", code)
	}
	// A file where the folder should be: said plainly, with a hint, and
	// the file left as it was.
	file := filepath.Join(dir, "notes.txt")
	os.WriteFile(file, mine, 0o644)
	errb.Reset()
	if code := run(context.Background(), []string{"init", file}, &out, &errb); code != 2 {
		t.Errorf("a file: exit %d, want 2", code)
	}
	if want := "fitseal: error: init: " + file + " is a file, not a folder; nothing was written\nfitseal: hint: give a folder, new or existing, e.g. 'fitseal init notes-project'\n"; errb.String() != want {
		t.Errorf("a file: stderr %q, want %q", errb.String(), want)
	}
	if got, _ := os.ReadFile(file); !bytes.Equal(got, mine) {
		t.Error("the file was changed")
	}
}
