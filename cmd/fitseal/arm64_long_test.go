package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestVerifyOnArm64 (FITSEAL_LONG=1; needs Debian's qemu-user-static): a
// bundle made on this machine is verified by an arm64 build of fitseal under
// qemu-user, which must say that the platforms differ, compare within the
// stated tolerances and pass.
func TestVerifyOnArm64(t *testing.T) {
	if os.Getenv("FITSEAL_LONG") == "" {
		t.Skip("set FITSEAL_LONG=1 (cross-builds fitseal for arm64 and runs it under qemu-user)")
	}
	qemu, err := exec.LookPath("qemu-aarch64-static")
	if err != nil {
		t.Skip("qemu-aarch64-static not found (apt-get install qemu-user-static)")
	}
	if goarch := os.Getenv("GOARCH"); goarch == "arm64" {
		t.Skip("already on arm64")
	}
	project, key := bearingsProject(t)
	dir := filepath.Dir(project)
	bin := filepath.Join(dir, "fitseal-arm64")
	build := exec.Command("go", "build", "-o", bin, ".")
	build.Env = append(os.Environ(), "GOARCH=arm64", "GOOS=linux", "CGO_ENABLED=0")
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("cross-build: %v\n%s", err, out)
	}
	// The ball-bearing project, and the init demo with its censored fits,
	// bootstrap p-values and model averages.
	demo := filepath.Join(dir, "demo")
	mustCLI(t, 0, "init", demo)
	for _, proj := range []string{project, filepath.Join(demo, "fitseal.toml")} {
		b := filepath.Join(filepath.Dir(proj), "b.tar.gz")
		mustCLI(t, 0, "run", "-q", "--key", key, "-o", b, proj)
		out, err := exec.Command(qemu, bin, "verify", b).CombinedOutput()
		if err != nil {
			t.Fatalf("verify %s on arm64: %v\n%s", proj, err, out)
		}
		if !strings.Contains(string(out), "compared within tolerances, because the platforms differ") || !strings.Contains(string(out), "OK "+b) {
			t.Errorf("verify %s on arm64:\n%s", proj, out)
		}
	}
}
