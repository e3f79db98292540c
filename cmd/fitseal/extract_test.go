package main

import (
	"archive/tar"
	"bytes"
	"compress/gzip"
	"context"
	"crypto/ed25519"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"fitseal/bundle"
)

// writeTestBundle writes a small signed bundle (invented contents, fixed key).
func writeTestBundle(t *testing.T, out string) {
	t.Helper()
	s, err := bundle.NewSigner(ed25519.NewKeyFromSeed(bytes.Repeat([]byte{7}, ed25519.SeedSize)))
	if err != nil {
		t.Fatal(err)
	}
	err = bundle.WriteBundle(out, false, bundle.Contents{
		Name:    "demo",
		Created: time.Date(2025, 12, 2, 0, 0, 0, 0, time.UTC),
		Payload: map[string][]byte{"inputs/fitseal.toml": []byte("name = \"demo\"\n"), "results/fits.csv": []byte("analysis\n")},
		RunJSON: []byte("{}\n"),
	}, s)
	if err != nil {
		t.Fatal(err)
	}
}

func TestExtractCommand(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join(dir, "demo.tar.gz")
	writeTestBundle(t, src)
	var stdout, stderr bytes.Buffer
	// Flags may follow the arguments.
	if code := run(context.Background(), []string{"extract", src, filepath.Join(dir, "out"), "-q"}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	bag := filepath.Join(dir, "out", "demo")
	if strings.TrimSpace(stdout.String()) != bag {
		t.Errorf("stdout %q, want %s", stdout.String(), bag)
	}
	b, err := os.ReadFile(filepath.Join(bag, "data", "inputs", "fitseal.toml"))
	if err != nil || string(b) != "name = \"demo\"\n" {
		t.Errorf("extracted input %q, %v", b, err)
	}
	for _, f := range []string{"bagit.txt", "bag-info.txt", "manifest-sha256.txt", "tagmanifest-sha256.txt", "tagmanifest-sha256.txt.sig", "run.json"} {
		if _, err := os.Stat(filepath.Join(bag, f)); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
	// Again into the same folder: refused, exit 2.
	stderr.Reset()
	if code := run(context.Background(), []string{"extract", src, filepath.Join(dir, "out")}, &stdout, &stderr); code != 2 || !strings.Contains(stderr.String(), "already exists") {
		t.Errorf("second extract: exit %d, stderr %q", code, stderr.String())
	}
	// Missing bundle, wrong argument count: exit 2.
	for _, args := range [][]string{{"extract", filepath.Join(dir, "nope.tar.gz"), dir}, {"extract", src}} {
		if code := run(context.Background(), args, &stdout, &stderr); code != 2 {
			t.Errorf("%v: exit %d, want 2", args, code)
		}
	}
}

func TestExtractCommandRefusesEscape(t *testing.T) {
	dir := t.TempDir()
	var buf bytes.Buffer
	zw := gzip.NewWriter(&buf)
	tw := tar.NewWriter(zw)
	tw.WriteHeader(&tar.Header{Name: "demo/", Typeflag: tar.TypeDir, Mode: 0o755})
	tw.WriteHeader(&tar.Header{Name: "demo/../../escaped.txt", Typeflag: tar.TypeReg, Mode: 0o644, Size: 1})
	tw.Write([]byte("x"))
	tw.Close()
	zw.Close()
	src := filepath.Join(dir, "evil.tar.gz")
	os.WriteFile(src, buf.Bytes(), 0o644)
	var stdout, stderr bytes.Buffer
	code := run(context.Background(), []string{"extract", src, filepath.Join(dir, "a", "b")}, &stdout, &stderr)
	if code != 1 || !strings.Contains(stderr.String(), `escapes its folder`) {
		t.Errorf("exit %d, stderr %q; want 1 and the reason", code, stderr.String())
	}
	if !strings.Contains(stderr.String(), "fitseal: hint: the archive holds what a fitseal bundle never does") {
		t.Errorf("no hint that the archive is not a bundle as written: %q", stderr.String())
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("something was written: %v", ents)
	}
}

// TestExtractCommandCutShort: an archive cut short, as by an interrupted
// download, is refused (exit 1) with the hint to fetch it again, and
// nothing is written.
func TestExtractCommandCutShort(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join(dir, "b.tar.gz")
	writeTestBundle(t, src)
	b, _ := os.ReadFile(src)
	os.WriteFile(src, b[:len(b)*2/3], 0o644)
	var stdout, stderr bytes.Buffer
	code := run(context.Background(), []string{"extract", src, filepath.Join(dir, "out")}, &stdout, &stderr)
	if code != 1 || !strings.Contains(stderr.String(), "fitseal: hint: the archive ends early") {
		t.Errorf("exit %d, stderr %q; want 1 and the hint to fetch it again", code, stderr.String())
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("something was written: %v", ents)
	}
}
