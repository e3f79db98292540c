package report

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestLaTeXTablesCompile \inputs every LaTeX table of the test analyses into
// a minimal thesis-like document and runs pdflatex on it: the tables must
// compile with booktabs and siunitx alone. Skipped where pdflatex (Debian's
// texlive-latex-recommended and texlive-science) is not installed.
func TestLaTeXTablesCompile(t *testing.T) {
	compileTeX(t, renderAll(t, "", "tex"))
}

// compileTeX \inputs the .tex files into an article and runs pdflatex,
// failing on errors, overfull boxes and unknown characters.
func compileTeX(t *testing.T, got map[string]string) {
	t.Helper()
	bin, err := exec.LookPath("pdflatex")
	if err != nil {
		t.Skip("pdflatex is not installed")
	}
	dir := t.TempDir()
	if d := os.Getenv("FITSEAL_KEEP_TEX"); d != "" {
		dir = d
	}
	var inputs []string
	for name, body := range got {
		if !strings.HasSuffix(name, ".tex") {
			continue
		}
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		inputs = append(inputs, `\input{`+strings.TrimSuffix(name, ".tex")+`}`)
	}
	doc := "\\documentclass{article}\n\\usepackage[T1]{fontenc}\n\\usepackage[utf8]{inputenc}\n\\usepackage{booktabs}\n\\usepackage{siunitx}\n" +
		"\\begin{document}\nThe tables follow.\n" +
		strings.Join(sorted(inputs), "\n\\clearpage\n") + "\n\\end{document}\n"
	if err := os.WriteFile(filepath.Join(dir, "thesis.tex"), []byte(doc), 0o644); err != nil {
		t.Fatal(err)
	}
	for range 2 { // twice, as for references
		cmd := exec.Command(bin, "-interaction=nonstopmode", "-halt-on-error", "thesis.tex")
		cmd.Dir = dir
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("pdflatex: %v\n%s", err, tail(string(out), 3000))
		}
	}
	log, _ := os.ReadFile(filepath.Join(dir, "thesis.log"))
	for _, bad := range []string{"Undefined control sequence", "Overfull \\hbox", "Missing character", "multiply defined"} {
		if strings.Contains(string(log), bad) {
			t.Errorf("pdflatex log: %s\n%s", bad, tail(string(log), 3000))
		}
	}
}

func tail(s string, n int) string {
	if len(s) > n {
		return s[len(s)-n:]
	}
	return s
}
