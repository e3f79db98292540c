package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fitseal/bundle"
)

func TestKeygenWritesPairAndRefusesOverwrite(t *testing.T) {
	dir := t.TempDir()
	key := filepath.Join(dir, "signing")
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"keygen", "-o", key}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	s, err := bundle.LoadSigner(key)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(stdout.String(), "fingerprint: "+s.Fingerprint()) {
		t.Errorf("stdout %q lacks the fingerprint %s", stdout.String(), s.Fingerprint())
	}
	if fi, _ := os.Stat(key); fi.Mode().Perm() != 0o600 {
		t.Errorf("private key mode %v, want 0600", fi.Mode().Perm())
	}
	pub, err := os.ReadFile(key + ".pub")
	if err != nil || !strings.HasPrefix(string(pub), "ssh-ed25519 ") || !strings.HasSuffix(string(pub), " fitseal\n") {
		t.Errorf("public key file %q, %v", pub, err)
	}
	before, _ := os.ReadFile(key)
	stderr.Reset()
	if code := run(context.Background(), []string{"keygen", "-o", key}, &stdout, &stderr); code != 2 {
		t.Errorf("second keygen: exit %d, want 2", code)
	}
	if !strings.Contains(stderr.String(), "already exists") {
		t.Errorf("stderr %q does not say the key exists", stderr.String())
	}
	if after, _ := os.ReadFile(key); !bytes.Equal(before, after) {
		t.Error("existing key replaced")
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 2 {
		t.Errorf("folder holds %d entries, want the key and its .pub only", len(ents))
	}
}

func TestKeygenDefaultPathAndUsage(t *testing.T) {
	cfg := t.TempDir()
	t.Setenv("XDG_CONFIG_HOME", cfg)
	var stdout, stderr bytes.Buffer
	if code := run(context.Background(), []string{"keygen"}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	want := filepath.Join(cfg, "fitseal", "id_ed25519")
	if _, err := bundle.LoadSigner(want); err != nil {
		t.Errorf("default key: %v", err)
	}
	if code := run(context.Background(), []string{"keygen", "extra"}, &stdout, &stderr); code != 2 {
		t.Errorf("keygen with an argument: exit %d, want 2", code)
	}
	if code := run(context.Background(), []string{"keygen", "-o", filepath.Join(cfg, "no", "such", "dir", "k")}, &stdout, &stderr); code != 2 {
		t.Errorf("keygen into a missing folder: exit %d, want 2", code)
	}
}
