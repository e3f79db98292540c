//go:build unix

package bundle

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

func TestReadFolderRefusesLinksAndSpecialFiles(t *testing.T) {
	for _, tc := range []struct {
		name, want string
		make       func(dir string) error
	}{
		{"symlink to outside", "symbolic link", func(d string) error { return os.Symlink("/etc/passwd", filepath.Join(d, "data", "x")) }},
		{"symlinked folder", "symbolic link", func(d string) error { return os.Symlink("/etc", filepath.Join(d, "data", "etc")) }},
		{"fifo", "FIFO", func(d string) error { return syscall.Mkfifo(filepath.Join(d, "data", "pipe"), 0o644) }},
		{"control character", "control character", func(d string) error { return os.WriteFile(filepath.Join(d, "data", "a\nb"), nil, 0o644) }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := filepath.Join(t.TempDir(), "bag")
			os.MkdirAll(filepath.Join(dir, "data"), 0o755)
			os.WriteFile(filepath.Join(dir, "bagit.txt"), []byte(bagItDeclaration), 0o644)
			if err := tc.make(dir); err != nil {
				t.Skip(err)
			}
			_, err := Open(dir)
			var ae *ArchiveError
			if !errors.As(err, &ae) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want an *ArchiveError saying %q", err, tc.want)
			}
		})
	}
}
