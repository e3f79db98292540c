package main

import (
	"os/exec"
	"strings"
	"testing"
)

// TestImportDirections keeps the layers apart (STYLE.md): fitters imports
// nothing of the project, runner never imports bundle, templates stays a
// leaf, and only bundle uses gofpdf, go-git and the SSH signature code.
func TestImportDirections(t *testing.T) {
	rules := []struct {
		pkg       string
		forbidden []string
	}{
		{"fitseal/fitters/...", []string{"fitseal/runner", "fitseal/bundle", "fitseal/templates", "fitseal/cmd"}},
		{"fitseal/runner/...", []string{"fitseal/bundle", "fitseal/templates", "fitseal/cmd", "github.com/jung-kurt/gofpdf", "github.com/go-git/go-git/v5", "golang.org/x/crypto/ssh"}},
		{"fitseal/templates/...", []string{"fitseal/fitters", "fitseal/runner", "fitseal/bundle", "fitseal/cmd"}},
	}
	for _, r := range rules {
		out, err := exec.Command("go", "list", "-deps", "-test=false", r.pkg).CombinedOutput()
		if err != nil {
			if strings.Contains(string(out), "matched no packages") {
				continue
			}
			t.Fatalf("go list -deps %s: %v\n%s", r.pkg, err, out)
		}
		for _, dep := range strings.Fields(string(out)) {
			for _, f := range r.forbidden {
				if dep == f || strings.HasPrefix(dep, f+"/") {
					t.Errorf("%s depends on %s: the layers must not point that way (see STYLE.md)", r.pkg, dep)
				}
			}
		}
	}
}
