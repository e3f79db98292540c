package bundle

import (
	"fmt"
	"path"
	"strings"
	"unicode/utf8"
)

// checkMemberPath reports whether p is an acceptable slash-separated relative
// path inside a bag: not empty, not absolute, already clean (no "." or ".."
// element, no empty element, no trailing slash), valid UTF-8, no backslash and
// no control character. Both the writer and every reader apply it, so that
// fitseal never writes an archive that its own reader would refuse.
func checkMemberPath(p string) error {
	switch {
	case p == "":
		return fmt.Errorf("empty path")
	case !utf8.ValidString(p):
		return fmt.Errorf("path %q is not valid UTF-8", p)
	case strings.HasPrefix(p, "/"):
		return fmt.Errorf("absolute path %q", p)
	case strings.Contains(p, `\`):
		return fmt.Errorf("path %q contains a backslash", p)
	}
	for _, r := range p {
		if r < 0x20 || r == 0x7f {
			return fmt.Errorf("path %q contains a control character", p)
		}
	}
	if p == ".." || strings.HasPrefix(p, "../") || strings.HasSuffix(p, "/..") || strings.Contains(p, "/../") {
		return fmt.Errorf("path %q escapes its folder (\"..\")", p)
	}
	if path.Clean(p) != p || p == "." {
		return fmt.Errorf("path %q is not in clean form", p)
	}
	return nil
}

// checkBagName reports whether name is usable as the bag's top folder: one
// path element that checkMemberPath accepts.
func checkBagName(name string) error {
	if err := checkMemberPath(name); err != nil {
		return fmt.Errorf("bag name: %w", err)
	}
	if strings.Contains(name, "/") {
		return fmt.Errorf("bag name %q must be a single folder name", name)
	}
	return nil
}

// foldKey is the key under which two paths collide on a case-insensitive
// file system; readers refuse two members with the same key.
func foldKey(p string) string { return strings.ToLower(p) }
