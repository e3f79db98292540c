package report

import (
	"bytes"
	"fmt"
	"reflect"
	"strings"
	"testing"

	"fitseal/templates"
)

// TestFromResultsOnWorkersIsTheSame: the report filled on several
// goroutines renders the same tables and the same PDF, byte for byte, as
// the one filled on one, and prints the same (the demo project: censored,
// discrete and extreme-value analyses). (reflect.DeepEqual cannot judge:
// the report holds NaN for missing numbers.)
func TestFromResultsOnWorkersIsTheSame(t *testing.T) {
	res := demoResults(t, 2)
	tmpls, err := templates.LoadTables("")
	if err != nil {
		t.Fatal(err)
	}
	id := Identity{Created: testCreated, ToolVersion: "test", TagManifestSHA256: strings.Repeat("0", 64)}
	render := func(r *Report) (string, []File, []byte) {
		t.Helper()
		tables, err := RenderTablesOn(1, tmpls, r.Analyses, []string{"md", "tex"})
		if err != nil {
			t.Fatal(err)
		}
		pdf, err := RenderPDF(r, PDFOptions{})
		if err != nil {
			t.Fatal(err)
		}
		return fmt.Sprintf("%v", r), tables, pdf
	}
	want := FromResults(res, id)
	if len(want.Analyses) < 2 {
		t.Fatalf("the demo has %d analyses", len(want.Analyses))
	}
	wantText, wantTables, wantPDF := render(want)
	for _, w := range []int{2, 3, 16} {
		text, tables, pdf := render(FromResultsOn(w, res, id))
		if text != wantText || !reflect.DeepEqual(tables, wantTables) || !bytes.Equal(pdf, wantPDF) {
			t.Errorf("%d workers: the report renders otherwise than the one filled on one", w)
		}
	}
}
