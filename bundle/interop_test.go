package bundle

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestGNUTarListsArchive: GNU tar, a reader outside the project, lists the
// archive with the modes, owner 0/0 and the created time that SPEC.md fixes.
func TestGNUTarListsArchive(t *testing.T) {
	tarCmd, err := exec.LookPath("tar")
	if err != nil {
		t.Skip("tar not found")
	}
	dir := t.TempDir()
	arch := filepath.Join(dir, "b.tar.gz")
	os.WriteFile(arch, testArchive(t), 0o644)
	cmd := exec.Command(tarCmd, "-tvzf", arch, "--numeric-owner", "--full-time")
	cmd.Env = append(os.Environ(), "TZ=UTC", "LC_ALL=C")
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if !strings.HasPrefix(lines[0], "drwxr-xr-x 0/0") || !strings.HasSuffix(lines[0], " 2026-12-02 03:04:05 harbor-demo/") {
		t.Errorf("first entry %q, want the bag folder, drwxr-xr-x 0/0 at the created time", lines[0])
	}
	for _, l := range lines {
		isDir := strings.HasSuffix(l, "/")
		want := "-rw-r--r-- 0/0"
		if isDir {
			want = "drwxr-xr-x 0/0"
		}
		if !strings.HasPrefix(l, want) || !strings.Contains(l, " 2026-12-02 03:04:05 harbor-demo/") {
			t.Errorf("entry %q, want %s at 2026-12-02 03:04:05 inside harbor-demo/", l, want)
		}
	}
}

// TestSha256sumChecksManifests: BagIt's manifest lines ("HASH  PATH") are
// what coreutils' sha256sum -c reads, so an independent tool confirms every
// hash fitseal wrote, in both manifests.
func TestSha256sumChecksManifests(t *testing.T) {
	sum, err := exec.LookPath("sha256sum")
	if err != nil {
		t.Skip("sha256sum not found")
	}
	c := testContents()
	delete(c.Payload, "inputs/data/100% pure.csv") // sha256sum does not decode BagIt's %25
	dir := t.TempDir()
	bag := filepath.Join(dir, "bag")
	if err := WriteBundle(bag, false, c, testSigner(t)); err != nil {
		t.Fatal(err)
	}
	for _, m := range []string{ManifestFile, TagManifestFile} {
		cmd := exec.Command(sum, "--strict", "-c", m)
		cmd.Dir = bag
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Errorf("sha256sum -c %s: %v\n%s", m, err, out)
		}
		if n := strings.Count(string(out), ": OK\n"); n == 0 {
			t.Errorf("sha256sum -c %s checked nothing:\n%s", m, out)
		}
	}
}
