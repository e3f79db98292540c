// Package templates holds what fitseal writes from fixed text: the demo
// project that `fitseal init` scaffolds and the publication-table templates.
// Both are embedded in the binary with go:embed.
//
// # Scaffold
//
// [ScaffoldFiles] lists the demo project's files and [WriteScaffold] writes
// them into a folder, refusing to overwrite anything. The demo's data are
// invented (see scaffold/README.txt and the demodata package that made them).
//
// # Tables
//
// [LoadTables] parses the embedded text/template table templates, preferring
// same-named files from a project's own template folder. [Funcs] are the
// number and escaping helpers the templates use.
package templates

import (
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

//go:embed scaffold
var scaffold embed.FS

// File is one file of the scaffold: its slash-separated path inside the
// project folder and its content.
type File struct {
	Path string
	Data []byte
}

// renamed maps embedded names to the names written: go:embed leaves out
// dot files, so the .gitignore is kept without its dot.
var renamed = map[string]string{"gitignore": ".gitignore"}

// ScaffoldFiles returns the demo project's files in path order.
func ScaffoldFiles() ([]File, error) {
	var files []File
	err := fs.WalkDir(scaffold, "scaffold", func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		data, err := scaffold.ReadFile(path)
		if err != nil {
			return err
		}
		rel := strings.TrimPrefix(path, "scaffold/")
		if to, ok := renamed[rel]; ok {
			rel = to
		}
		files = append(files, File{Path: rel, Data: data})
		return nil
	})
	sort.Slice(files, func(i, j int) bool { return files[i].Path < files[j].Path })
	return files, err
}

// ExistsError says which scaffold files are already present; nothing was
// written.
type ExistsError struct {
	Dir   string
	Paths []string // slash-separated, relative to Dir
}

func (e *ExistsError) Error() string {
	return fmt.Sprintf("%s already has %s; nothing was written (init never overwrites: choose an empty folder or move those files away)",
		e.Dir, strings.Join(e.Paths, ", "))
}

// WriteScaffold writes the demo project into dir, creating dir and its data
// folder when needed. It checks every target first and, when any of them
// exists, writes nothing and returns an *ExistsError. Each file is written to
// a temporary name in its folder and renamed into place, so none is ever
// half-written. It returns the written paths (slash-separated, relative to
// dir).
func WriteScaffold(dir string) ([]string, error) {
	files, err := ScaffoldFiles()
	if err != nil {
		return nil, err
	}
	var existing []string
	for _, f := range files {
		_, err := os.Lstat(filepath.Join(dir, filepath.FromSlash(f.Path)))
		switch {
		case err == nil:
			existing = append(existing, f.Path)
		case !errors.Is(err, fs.ErrNotExist):
			return nil, pathReason(err)
		}
	}
	if len(existing) > 0 {
		return nil, &ExistsError{Dir: dir, Paths: existing}
	}
	var written []string
	for _, f := range files {
		target := filepath.Join(dir, filepath.FromSlash(f.Path))
		if err := os.MkdirAll(filepath.Dir(target), 0o755); err != nil {
			return written, pathReason(err)
		}
		if err := writeNew(target, f.Data); err != nil {
			return written, fmt.Errorf("writing %s: %w", target, pathReason(err))
		}
		written = append(written, f.Path)
	}
	return written, nil
}

// pathReason is err of a file operation named by its path and reason, not
// by the system call ("lstat d/.gitignore: not a directory" is
// "d/.gitignore: not a directory"; a temporary file's name is no use to
// the reader, so an error about one names only the reason).
func pathReason(err error) error {
	var pe *fs.PathError
	if !errors.As(err, &pe) {
		return err
	}
	if strings.HasPrefix(filepath.Base(pe.Path), ".fitseal-init-") {
		return pe.Err
	}
	return fmt.Errorf("%s: %w", pe.Path, pe.Err)
}

// writeNew writes data to a temporary file beside target and links it into
// place; the link fails rather than replace a file that appeared meanwhile.
func writeNew(target string, data []byte) error {
	tmp, err := os.CreateTemp(filepath.Dir(target), ".fitseal-init-*")
	if err != nil {
		return err
	}
	name := tmp.Name()
	defer os.Remove(name)
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Chmod(0o644); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	if err := os.Link(name, target); err != nil {
		if errors.Is(err, fs.ErrExist) {
			return fmt.Errorf("%s appeared while init was writing; left it untouched", target)
		}
		// File systems without hard links: fall back to rename after a
		// last check.
		if _, serr := os.Lstat(target); serr == nil {
			return fmt.Errorf("%s appeared while init was writing; left it untouched", target)
		}
		return os.Rename(name, target)
	}
	return nil
}
