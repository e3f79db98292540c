package bundle

import (
	"bytes"
	"encoding/json"
	"testing"
)

// TestRunJSONIsMarshalIndent: Seal indents run.json into a presized buffer
// (and on another goroutine than the rendering); the bytes are still
// json.MarshalIndent's with a final newline, the form of earlier bundles.
func TestRunJSONIsMarshalIndent(t *testing.T) {
	c := sealContents(t, runSealProject(t, 2), goldenTool)
	var rec RunRecord
	if err := json.Unmarshal(c.RunJSON, &rec); err != nil {
		t.Fatal(err)
	}
	js, err := json.MarshalIndent(rec, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(append(js, '\n'), c.RunJSON) {
		t.Error("run.json is not json.MarshalIndent's form")
	}
}
