package templates

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestSig(t *testing.T) {
	for _, c := range []struct {
		n    int
		x    float64
		want string
	}{
		{4, 1234.5678, "1235"},
		{4, 10576, "10576"}, // integer digits are kept
		{4, 9012.7, "9013"},
		{4, 0.012345, "0.01235"}, // round half to even on the binary value
		{4, 9.99961, "10.00"},
		{4, -2.5, "-2.500"},
		{3, 1.5e-5, "1.50e-05"},
		{4, 12345678, "1.235e+07"},
		{4, 0, "0.000"},
		{4, math.NaN(), ""},
		{4, math.Inf(1), ""},
	} {
		if got := Sig(c.n, c.x); got != c.want {
			t.Errorf("Sig(%d, %v) = %q, want %q", c.n, c.x, got, c.want)
		}
	}
}

func TestFixedPercentEscape(t *testing.T) {
	if got := Fixed(2, -0.001); got != "0.00" {
		t.Errorf("Fixed(2, -0.001) = %q, want 0.00 (no negative zero)", got)
	}
	if got := Fixed(3, -12.34567); got != "-12.346" {
		t.Errorf("Fixed = %q", got)
	}
	for p, want := range map[float64]string{0.95: "95", 0.975: "97.5", 0.9: "90"} {
		if got := Percent(p); got != want {
			t.Errorf("Percent(%v) = %q, want %q", p, got, want)
		}
	}
	if got := TeXEscape(`a_b 50% & $x$ #1 {y} ~ ^ \`); got != `a\_b 50\% \& \$x\$ \#1 \{y\} \textasciitilde{} \textasciicircum{} \textbackslash{}` {
		t.Errorf("TeXEscape = %q", got)
	}
	if got := TeXEscape("n ≤ k + 1; Δ → ∞; ξ – 1"); got != `n $\leq$ k + 1; $\Delta$ $\to$ $\infty$; $\xi$ -- 1` {
		t.Errorf("TeXEscape = %q", got)
	}
}

func TestLoadTablesPrefersProjectFolder(t *testing.T) {
	builtin, err := LoadTables("")
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, tt := range builtin {
		names = append(names, tt.Kind+"."+tt.Format)
		if tt.Source != "embedded" {
			t.Errorf("%s from %s", tt.Name(), tt.Source)
		}
	}
	if got := strings.Join(names, " "); got != "derived.md derived.tex parameters.md parameters.tex ranking.md ranking.tex" {
		t.Errorf("embedded tables: %s", got)
	}

	dir := t.TempDir()
	own := filepath.Join(dir, "ranking.md.tmpl")
	os.WriteFile(own, []byte("my ranking of {{.A.Name}}\n"), 0o644)
	os.WriteFile(filepath.Join(dir, "notes.md.tmpl"), []byte("notes\n"), 0o644)
	os.WriteFile(filepath.Join(dir, "README"), []byte("not a template"), 0o644)
	mixed, err := LoadTables(dir)
	if err != nil {
		t.Fatal(err)
	}
	sources := map[string]string{}
	for _, tt := range mixed {
		sources[tt.Name()] = tt.Source
	}
	if len(mixed) != 7 || sources["ranking.md.tmpl"] != own || sources["ranking.tex.tmpl"] != "embedded" || sources["notes.md.tmpl"] == "" {
		t.Errorf("with a project folder: %v", sources)
	}

	bad := t.TempDir()
	os.WriteFile(filepath.Join(bad, "ranking.md.tmpl"), []byte("{{.A.Name"), 0o644)
	if _, err := LoadTables(bad); err == nil || !strings.Contains(err.Error(), filepath.Join(bad, "ranking.md.tmpl")) {
		t.Errorf("a broken template must be an error naming its file, got %v", err)
	}
	if _, err := LoadTables(filepath.Join(bad, "nope")); err == nil || !strings.Contains(err.Error(), "[report] templates") {
		t.Errorf("a missing folder must name the project key, got %v", err)
	}
}
