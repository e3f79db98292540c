package templates

import (
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"sort"
	"strings"
	"text/template"
)

//go:embed tables/*.tmpl
var tables embed.FS

// TableSuffix ends every table template's file name: KIND.FORMAT.tmpl, e.g.
// "ranking.tex.tmpl" renders the ranking table in LaTeX.
const TableSuffix = ".tmpl"

// TableTemplate is one parsed table template.
type TableTemplate struct {
	Kind   string // "ranking", "parameters", "derived", or a project's own
	Format string // "md" or "tex"
	// Source is where it came from: "embedded" or the file's path.
	Source string
	Text   []byte // the template's text, for copying into a bundle
	*template.Template
}

// EmbeddedTables returns the built-in table templates' files, by name.
func EmbeddedTables() fs.FS {
	sub, err := fs.Sub(tables, "tables")
	if err != nil {
		panic("templates: " + err.Error())
	}
	return sub
}

// LoadTables parses the table templates: the embedded ones, each replaced by
// a file of the same name in dir when dir is not empty, plus any other
// KIND.FORMAT.tmpl files in dir (a project may add its own tables). The
// result is sorted by kind, then format. A template that does not parse is
// an error naming its file.
func LoadTables(dir string) ([]*TableTemplate, error) {
	byName := map[string]*TableTemplate{}
	embedded, err := fs.ReadDir(tables, "tables")
	if err != nil {
		return nil, err
	}
	for _, e := range embedded {
		text, err := tables.ReadFile(path.Join("tables", e.Name()))
		if err != nil {
			return nil, err
		}
		t, err := parseTable(e.Name(), "embedded", text)
		if err != nil {
			return nil, err
		}
		byName[e.Name()] = t
	}
	if dir != "" {
		entries, err := os.ReadDir(dir)
		if err != nil {
			if errors.Is(err, fs.ErrNotExist) {
				return nil, fmt.Errorf("report templates folder %s does not exist (check [report] templates in the project file)", dir)
			}
			return nil, err
		}
		for _, e := range entries {
			if e.IsDir() || !strings.HasSuffix(e.Name(), TableSuffix) {
				continue
			}
			file := filepath.Join(dir, e.Name())
			text, err := os.ReadFile(file)
			if err != nil {
				return nil, err
			}
			t, err := parseTable(e.Name(), file, text)
			if err != nil {
				return nil, err
			}
			byName[e.Name()] = t
		}
	}
	out := make([]*TableTemplate, 0, len(byName))
	for _, t := range byName {
		out = append(out, t)
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].Kind != out[j].Kind {
			return out[i].Kind < out[j].Kind
		}
		return out[i].Format < out[j].Format
	})
	return out, nil
}

func parseTable(name, source string, text []byte) (*TableTemplate, error) {
	base := strings.TrimSuffix(name, TableSuffix)
	kind, format, ok := strings.Cut(base, ".")
	if !ok || kind == "" || format == "" || strings.Contains(format, ".") {
		return nil, fmt.Errorf("%s: a table template is named KIND.FORMAT%s (e.g. ranking.tex%s)", source, TableSuffix, TableSuffix)
	}
	t, err := template.New(name).Funcs(Funcs()).Option("missingkey=error").Parse(string(text))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", source, err)
	}
	return &TableTemplate{Kind: kind, Format: format, Source: source, Text: text, Template: t}, nil
}
