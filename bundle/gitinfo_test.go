package bundle

import (
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	git "github.com/go-git/go-git/v5"
	"github.com/go-git/go-git/v5/plumbing"
	"github.com/go-git/go-git/v5/plumbing/object"
)

var testAuthor = &object.Signature{Name: "Test Author", Email: "author@example.org", When: time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)}

// gitRepo makes a repository in dir with branch main and commits files.
func gitRepo(t *testing.T, dir string, files map[string]string) (*git.Repository, plumbing.Hash) {
	t.Helper()
	repo, err := git.PlainInitWithOptions(dir, &git.PlainInitOptions{
		InitOptions: git.InitOptions{DefaultBranch: plumbing.NewBranchReferenceName("main")},
	})
	if err != nil {
		t.Fatal(err)
	}
	if files == nil {
		return repo, plumbing.ZeroHash
	}
	wt, _ := repo.Worktree()
	for p, body := range files {
		full := filepath.Join(dir, filepath.FromSlash(p))
		os.MkdirAll(filepath.Dir(full), 0o755)
		if err := os.WriteFile(full, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		if _, err := wt.Add(p); err != nil {
			t.Fatal(err)
		}
	}
	h, err := wt.Commit("inputs", &git.CommitOptions{Author: testAuthor, Committer: testAuthor})
	if err != nil {
		t.Fatal(err)
	}
	return repo, h
}

func TestGitProvenanceOutsideRepository(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "fitseal.toml"), []byte("name = \"x\"\n"), 0o644)
	g, err := GitProvenance(filepath.Join(dir, "fitseal.toml"), []string{"fitseal.toml"})
	if err != nil {
		t.Fatal(err)
	}
	if g.Repository || g.Commit != "" || !strings.Contains(g.Note, "no git repository") {
		t.Errorf("outside a repository: %+v", g)
	}
	if got := g.Uncommitted(); len(got) != 1 || got[0] != "fitseal.toml (no-repository)" {
		t.Errorf("Uncommitted = %v", got)
	}
}

func TestGitProvenanceStates(t *testing.T) {
	root := t.TempDir()
	repoDir := filepath.Join(root, "repo")
	_, head := gitRepo(t, repoDir, map[string]string{
		"studies/pumps/fitseal.toml":          "name = \"pumps\"\n",
		"studies/pumps/data/seal_life.csv":    "hours\n1\n",
		"studies/pumps/data/storm_peaks.csv":  "peak\n2\n",
		"studies/pumps/data/will_be_gone.csv": "x\n",
	})
	project := filepath.Join(repoDir, "studies", "pumps", "fitseal.toml")
	inputs := []string{"fitseal.toml", "data/seal_life.csv", "data/storm_peaks.csv", "data/new.csv", "../../../outside.csv"}
	os.WriteFile(filepath.Join(root, "outside.csv"), []byte("x\n"), 0o644)

	// Clean: everything committed.
	g, err := GitProvenance(project, inputs[:3])
	if err != nil {
		t.Fatal(err)
	}
	if !g.Repository || g.Commit != head.String() || g.Branch != "main" || g.Detached || g.Dirty {
		t.Errorf("clean repository: %+v", g)
	}
	// The commit hash is the one git itself reports.
	if out, err := exec.Command("git", "-C", repoDir, "rev-parse", "HEAD").Output(); err == nil {
		if strings.TrimSpace(string(out)) != g.Commit {
			t.Errorf("git rev-parse HEAD = %s, fitseal recorded %s", out, g.Commit)
		}
	}
	if u := g.Uncommitted(); len(u) != 0 {
		t.Errorf("clean inputs reported uncommitted: %v", u)
	}

	// Modified, untracked and outside files; the tree is dirty.
	os.WriteFile(filepath.Join(repoDir, "studies/pumps/data/storm_peaks.csv"), []byte("peak\n3\n"), 0o644)
	os.WriteFile(filepath.Join(repoDir, "studies/pumps/data/new.csv"), []byte("x\n"), 0o644)
	g, err = GitProvenance(project, inputs)
	if err != nil {
		t.Fatal(err)
	}
	var states []string
	for _, f := range g.Files {
		states = append(states, f.State)
	}
	want := []string{GitCommitted, GitCommitted, GitModified, GitUntracked, GitOutside}
	if !reflect.DeepEqual(states, want) || !g.Dirty {
		t.Errorf("states %v dirty %v, want %v dirty", states, g.Dirty, want)
	}
	if g.Files[2].RepoPath != "studies/pumps/data/storm_peaks.csv" {
		t.Errorf("repo path %q", g.Files[2].RepoPath)
	}
	wantU := []string{"data/storm_peaks.csv (modified)", "data/new.csv (untracked)", "../../../outside.csv (outside)"}
	if u := g.Uncommitted(); !reflect.DeepEqual(u, wantU) {
		t.Errorf("Uncommitted = %v, want %v", u, wantU)
	}
}

func TestGitProvenanceDirtyElsewhereAndDetached(t *testing.T) {
	dir := t.TempDir()
	repo, head := gitRepo(t, dir, map[string]string{"fitseal.toml": "a\n", "notes.txt": "n\n"})
	// A change to a file that is not an input: the tree is dirty, the inputs committed.
	os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("changed\n"), 0o644)
	g, err := GitProvenance(filepath.Join(dir, "fitseal.toml"), []string{"fitseal.toml"})
	if err != nil {
		t.Fatal(err)
	}
	if !g.Dirty || len(g.Uncommitted()) != 0 {
		t.Errorf("dirty elsewhere: %+v", g)
	}
	os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("n\n"), 0o644)
	wt, _ := repo.Worktree()
	if err := wt.Checkout(&git.CheckoutOptions{Hash: head}); err != nil {
		t.Fatal(err)
	}
	g, err = GitProvenance(filepath.Join(dir, "fitseal.toml"), []string{"fitseal.toml"})
	if err != nil {
		t.Fatal(err)
	}
	if !g.Detached || g.Branch != "" || g.Commit != head.String() || g.Dirty {
		t.Errorf("detached HEAD: %+v", g)
	}
}

func TestGitProvenanceNoCommitYet(t *testing.T) {
	dir := t.TempDir()
	gitRepo(t, dir, nil)
	os.WriteFile(filepath.Join(dir, "fitseal.toml"), []byte("a\n"), 0o644)
	g, err := GitProvenance(filepath.Join(dir, "fitseal.toml"), []string{"fitseal.toml"})
	if err != nil {
		t.Fatal(err)
	}
	if !g.Repository || g.Commit != "" || !strings.Contains(g.Note, "no commit") || g.Files[0].State != GitUntracked || !g.Dirty {
		t.Errorf("repository without commits: %+v", g)
	}
}
