package bundle

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"

	"fitseal/runner"
)

// ErrExists is wrapped by the error for an output that already exists and
// may not be replaced.
var ErrExists = errors.New("already exists")

func existsError(out string) error {
	return fmt.Errorf("%s %w", out, ErrExists)
}

// writeFileAtomic writes a file through write to a temporary file in out's
// folder, syncs it, and moves it to out. Without force an existing out is
// never replaced: the move is a hard link, which fails if out exists (a plain
// check-then-rename is the fallback on file systems without links). On any
// failure the temporary file is removed and out is untouched.
func writeFileAtomic(out string, force bool, perm fs.FileMode, write func(io.Writer) error) (err error) {
	dir, base := filepath.Split(out)
	if dir == "" {
		dir = "."
	}
	if !force {
		if _, err := os.Lstat(out); err == nil {
			return existsError(out)
		}
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return plainf("writing "+out, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriterSize(f, 1<<16)
	if err = write(bw); err != nil {
		return plainf("writing "+out, err)
	}
	if err = bw.Flush(); err != nil {
		return plainf("writing "+out, err)
	}
	if err = f.Chmod(perm); err != nil {
		return plainf("writing "+out, err)
	}
	runner.TracePhase("write: sync")
	if err = f.Sync(); err != nil {
		return plainf("writing "+out, err)
	}
	runner.TracePhase("write: close, move")
	if err = f.Close(); err != nil {
		return plainf("writing "+out, err)
	}
	if force {
		if err = os.Rename(tmp, out); err != nil {
			return plainf("writing "+out, err)
		}
	} else {
		if lerr := os.Link(tmp, out); lerr != nil {
			if errors.Is(lerr, fs.ErrExist) {
				return existsError(out)
			}
			// No hard links here: check, then rename.
			if _, serr := os.Lstat(out); serr == nil {
				return existsError(out)
			}
			if err = os.Rename(tmp, out); err != nil {
				return plainf("writing "+out, err)
			}
		} else {
			os.Remove(tmp)
		}
	}
	syncDir(dir)
	return nil
}

// treeWriters is how many files writeTree writes at once.
const treeWriters = 16

// writeFolderAtomic writes files (slash paths relative to out) as the folder
// out: into a fresh temporary folder beside out, each file synced, then
// renamed to out. Without force an existing out is never replaced; with force
// the old one is moved aside first and removed once the new one is in place.
// Writes go through an [os.Root], so no path can land outside the folder.
func writeFolderAtomic(out string, force bool, files []member) (err error) {
	out = filepath.Clean(out)
	parent, base := filepath.Split(out)
	if parent == "" {
		parent = "."
	}
	if _, serr := os.Lstat(out); serr == nil && !force {
		return existsError(out)
	}
	if err := os.MkdirAll(parent, dirMode); err != nil {
		return plainf("writing "+out, err)
	}
	tmp, err := os.MkdirTemp(parent, "."+base+".tmp-*")
	if err != nil {
		return plainf("writing "+out, err)
	}
	defer func() {
		if err != nil {
			os.RemoveAll(tmp)
		}
	}()
	if err = os.Chmod(tmp, dirMode); err != nil {
		return plainf("writing "+out, err)
	}
	if err = writeTree(tmp, files); err != nil {
		return plainf("writing "+out, err)
	}
	if _, serr := os.Lstat(out); serr == nil {
		if !force {
			return existsError(out)
		}
		old := tmp + ".old"
		if err = os.Rename(out, old); err != nil {
			return plainf("replacing "+out, err)
		}
		if err = os.Rename(tmp, out); err != nil {
			os.Rename(old, out)
			return plainf("replacing "+out, err)
		}
		os.RemoveAll(old)
	} else if err = os.Rename(tmp, out); err != nil {
		return plainf("writing "+out, err)
	}
	syncDir(parent)
	return nil
}

// writeTree writes files under the existing empty folder dir, creating
// parent folders with mode 0755 and files with mode 0644 (exclusively: an
// existing name is an error), and syncs each file.
func writeTree(dir string, files []member) error {
	root, err := os.OpenRoot(dir)
	if err != nil {
		return err
	}
	defer root.Close()
	made := map[string]bool{}
	for _, m := range files {
		if err := checkMemberPath(m.Path); err != nil {
			return err
		}
		if d := path.Dir(m.Path); d != "." && !made[d] {
			if err := root.MkdirAll(d, dirMode); err != nil {
				return err
			}
			for ; d != "."; d = path.Dir(d) {
				made[d] = true
			}
		}
	}
	// The files are written and synced on treeWriters goroutines: each
	// waits for the disk in its fsync, and concurrent ones are committed
	// together (6,000 files: 3.0 s one after another). The first failure in
	// path order is reported.
	err = runner.ForEachErr(treeWriters, len(files), func(i int) error {
		m := files[i]
		f, err := root.OpenFile(m.Path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, fileMode)
		if err != nil {
			return err
		}
		err = m.writeBody(f, m.Path)
		if err == nil {
			err = f.Chmod(fileMode)
		}
		if err == nil {
			err = f.Sync()
		}
		if cerr := f.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			return pathError(m.Path, err)
		}
		return nil
	})
	if err != nil {
		return err
	}
	// Folders made by MkdirAll got 0755 less the umask; make them exact.
	return fs.WalkDir(root.FS(), ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && p != "." {
			return root.Chmod(p, dirMode)
		}
		return nil
	})
}

// syncDir flushes a folder's entries (the rename) to disk; errors are
// ignored because some file systems cannot sync a folder.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}
