package bundle

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	git "github.com/go-git/go-git/v5"
	"github.com/go-git/go-git/v5/plumbing"
	"github.com/go-git/go-git/v5/plumbing/filemode"
	"github.com/go-git/go-git/v5/plumbing/object"
)

// Git states of one input file.
const (
	GitCommitted = "committed" // in HEAD's tree with the same bytes
	GitModified  = "modified"  // in HEAD's tree with other bytes
	GitUntracked = "untracked" // not in HEAD's tree
	GitOutside   = "outside"   // not inside the repository's working tree
	GitNoRepo    = "no-repository"
)

// GitInfo is the git provenance of a run, as recorded in run.json.
type GitInfo struct {
	// Repository is false when no git repository holds the project file.
	Repository bool `json:"repository"`
	// Note says plainly why something is missing (no repository, no commit yet).
	Note string `json:"note,omitempty"`
	// Commit is HEAD's commit hash; empty before the first commit.
	Commit string `json:"commit,omitempty"`
	// Branch is HEAD's branch, empty when HEAD is detached.
	Branch string `json:"branch,omitempty"`
	// Detached is true when HEAD names a commit, not a branch.
	Detached bool `json:"detached,omitempty"`
	// Dirty is true when the working tree or index differs from HEAD
	// (untracked files not ignored by .gitignore included).
	Dirty bool `json:"dirty"`
	// Files is the state of each input, in the order given.
	Files []GitFile `json:"files"`
}

// GitFile is one input's state in git.
type GitFile struct {
	// Path is the input's path as given (relative to the project file's folder).
	Path string `json:"path"`
	// RepoPath is its slash path in the repository, when inside it.
	RepoPath string `json:"repo_path,omitempty"`
	// State is one of GitCommitted, GitModified, GitUntracked, GitOutside, GitNoRepo.
	State string `json:"state"`
}

// Uncommitted lists the inputs that are not committed unmodified, for
// require_clean_git: "PATH (STATE)".
func (g GitInfo) Uncommitted() []string {
	var out []string
	for _, f := range g.Files {
		if f.State != GitCommitted {
			out = append(out, fmt.Sprintf("%s (%s)", f.Path, f.State))
		}
	}
	return out
}

// GitProvenance finds the git repository holding projectFile (searching
// upward from its folder) and records HEAD's commit and branch, whether the
// tree is dirty, and for each input (paths relative to the project file's
// folder, the project file itself included by the caller) whether it is
// committed unmodified: present in HEAD's tree as a regular file whose blob
// hash equals the hash of the bytes on disk. Outside a repository it
// returns Repository = false with a note and every file marked so; that is
// not an error.
func GitProvenance(projectFile string, inputs []string) (GitInfo, error) {
	projectDir, err := filepath.Abs(filepath.Dir(projectFile))
	if err != nil {
		return GitInfo{}, err
	}
	if real, err := filepath.EvalSymlinks(projectDir); err == nil {
		projectDir = real
	}
	info := GitInfo{Files: make([]GitFile, len(inputs))}
	for i, p := range inputs {
		info.Files[i] = GitFile{Path: p, State: GitNoRepo}
	}
	repo, err := git.PlainOpenWithOptions(projectDir, &git.PlainOpenOptions{DetectDotGit: true})
	if errors.Is(err, git.ErrRepositoryNotExists) {
		info.Note = "no git repository holds the project file"
		return info, nil
	}
	if err != nil {
		return GitInfo{}, fmt.Errorf("git repository of %s: %w", projectFile, err)
	}
	wt, err := repo.Worktree()
	if err != nil {
		info.Note = "the repository has no working tree"
		return info, nil
	}
	info.Repository = true
	root := wt.Filesystem.Root()
	if real, err := filepath.EvalSymlinks(root); err == nil {
		root = real
	}

	var tree *object.Tree
	head, err := repo.Head()
	switch {
	case errors.Is(err, plumbing.ErrReferenceNotFound):
		info.Note = "the repository has no commit yet"
	case err != nil:
		return GitInfo{}, fmt.Errorf("git HEAD: %w", err)
	default:
		info.Commit = head.Hash().String()
		if head.Name().IsBranch() {
			info.Branch = head.Name().Short()
		} else {
			info.Detached = true
		}
		commit, err := repo.CommitObject(head.Hash())
		if err != nil {
			return GitInfo{}, fmt.Errorf("git commit %s: %w", info.Commit, err)
		}
		if tree, err = commit.Tree(); err != nil {
			return GitInfo{}, fmt.Errorf("git tree of %s: %w", info.Commit, err)
		}
	}

	status, err := wt.Status()
	if err != nil {
		return GitInfo{}, fmt.Errorf("git status: %w", err)
	}
	info.Dirty = !status.IsClean()

	for i, p := range inputs {
		abs := p
		if !filepath.IsAbs(abs) {
			abs = filepath.Join(projectDir, p)
		}
		if real, err := filepath.EvalSymlinks(abs); err == nil {
			abs = real
		}
		rel, err := filepath.Rel(root, abs)
		if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
			info.Files[i].State = GitOutside
			continue
		}
		rel = filepath.ToSlash(rel)
		info.Files[i].RepoPath = rel
		state, err := fileState(tree, rel, abs)
		if err != nil {
			return GitInfo{}, err
		}
		info.Files[i].State = state
	}
	return info, nil
}

// fileState compares the file at abs with the entry rel of HEAD's tree.
func fileState(tree *object.Tree, rel, abs string) (string, error) {
	if tree == nil {
		return GitUntracked, nil
	}
	f, err := tree.File(rel)
	if errors.Is(err, object.ErrFileNotFound) || errors.Is(err, object.ErrDirectoryNotFound) {
		return GitUntracked, nil
	}
	if err != nil {
		return "", fmt.Errorf("git: %s: %w", rel, err)
	}
	data, err := os.ReadFile(abs)
	if err != nil {
		return "", fmt.Errorf("reading %s: %w", abs, err)
	}
	if f.Mode != filemode.Regular && f.Mode != filemode.Executable {
		return GitModified, nil
	}
	if plumbing.ComputeHash(plumbing.BlobObject, data) != f.Hash {
		return GitModified, nil
	}
	return GitCommitted, nil
}
