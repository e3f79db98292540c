package bundle

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"

	"fitseal/runner"
)

// TestSameResultFilesIgnoresJSONLayout: results.json is compared by
// content, so a bundle written when results.json was indented still
// matches its own results on slice verification and merge, while a changed
// value is still caught.
func TestSameResultFilesIgnoresJSONLayout(t *testing.T) {
	res := runSealProject(t, 1)
	files, err := res.Files()
	if err != nil {
		t.Fatal(err)
	}
	payload := map[string][]byte{}
	for name, b := range files {
		payload["results/"+name] = b
	}
	if err := sameResultFiles(res, payload, ""); err != nil {
		t.Fatalf("own files: %v", err)
	}
	var indented bytes.Buffer
	if err := json.Indent(&indented, files[runner.ResultsFile], "", "  "); err != nil {
		t.Fatal(err)
	}
	if bytes.Equal(indented.Bytes(), files[runner.ResultsFile]) {
		t.Fatal("indenting did not change the layout; the test checks nothing")
	}
	payload["results/"+runner.ResultsFile] = indented.Bytes()
	if err := sameResultFiles(res, payload, ""); err != nil {
		t.Fatalf("indented results.json (an older bundle's layout): %v", err)
	}
	edited := bytes.Replace(indented.Bytes(), []byte(`"converged": true`), []byte(`"converged": false`), 1)
	if bytes.Equal(edited, indented.Bytes()) {
		t.Fatal("no converged field to edit")
	}
	payload["results/"+runner.ResultsFile] = edited
	err = sameResultFiles(res, payload, "")
	if err == nil || !strings.Contains(err.Error(), runner.ResultsFile) {
		t.Fatalf("edited results.json: got %v, want an error naming it", err)
	}
}

func TestSameJSON(t *testing.T) {
	for _, c := range []struct {
		a, b string
		want bool
	}{
		{`{"a":1,"b":[1,2]}`, "{\n  \"a\": 1,\n  \"b\": [\n    1,\n    2\n  ]\n}\n", true},
		{`{"a":1}`, `{"a":2}`, false},
		{`{"a":"x y"}`, `{"a":"xy"}`, false},
		{`{"a":1}`, `{"a":1`, false},
	} {
		if got := sameJSON([]byte(c.a), []byte(c.b)); got != c.want {
			t.Errorf("sameJSON(%q, %q) = %v, want %v", c.a, c.b, got, c.want)
		}
	}
}
