package bundle

import (
	"bytes"
	"strings"
	"testing"
)

// TestIdenticalVersionsCountAsTheFullComparison checks the shortcut for two
// identical versions of a result file against the cell-by-cell comparison
// of the same content (made to differ by bytes that do not change it: a
// trailing space after the JSON value, a blank line in the CSV, which
// encoding/csv skips): no difference, the same count of numbers, the same
// errors. The content is the golden harbor bundle's result files and
// small hand-written cases.
func TestIdenticalVersionsCountAsTheFullComparison(t *testing.T) {
	bag, err := Open("testdata/golden/harbor-demo.tar.gz")
	if err != nil {
		t.Fatal(err)
	}
	files := map[string][]byte{}
	for p, b := range bag.Payload() {
		if strings.HasPrefix(p, "results/") {
			files[p] = b
		}
	}
	if len(files) < 4 {
		t.Fatalf("the golden bundle has %d result files, want fits, parameters, gof and results.json at least", len(files))
	}
	files["hand/escapes.json"] = []byte(`{"a":"say \"-1\" \\","b":[-1.5e-3,2,{"c":"x\\\"9"}],"d":null,"e":true,"f":1E+2}`)
	files["hand/quoted.csv"] = []byte("analysis,family,x\n\"a,1\",normal,-2.5\n\"b\"\"2\",gamma,NaN\nc,weibull,+Inf\nd,beta,text\n")
	files["hand/empty.csv"] = []byte("")
	files["hand/ragged.csv"] = []byte("a,b\n1,2\n3\n")
	files["hand/bad.json"] = []byte(`{"a": [1, 2}`)
	for name, b := range files {
		if strings.HasSuffix(name, ".json") {
			_, full, errFull := CompareJSON(name, b, append(bytes.Clone(b), ' '), nil)
			diffs, got, err := CompareJSON(name, b, bytes.Clone(b), nil)
			if len(diffs) != 0 || got != full || (err == nil) != (errFull == nil) {
				t.Errorf("%s: identical JSON gives %d differences, %d numbers, error %v; the full comparison %d numbers, error %v", name, len(diffs), got, err, full, errFull)
			}
			continue
		}
		_, full, errFull := CompareCSV(name, b, append(bytes.Clone(b), '\n'), nil)
		diffs, got, err := CompareCSV(name, b, bytes.Clone(b), nil)
		if len(diffs) != 0 || got != full || (err == nil) != (errFull == nil) {
			t.Errorf("%s: identical CSV gives %d differences, %d numbers, error %v; the full comparison %d numbers, error %v", name, len(diffs), got, err, full, errFull)
		}
		if errFull != nil && err != nil && err.Error() != errFull.Error() {
			t.Errorf("%s: error %q, the full comparison's %q", name, err, errFull)
		}
	}
	if _, n, _ := CompareJSON("x.json", files["hand/escapes.json"], files["hand/escapes.json"], nil); n != 3 {
		t.Errorf("hand/escapes.json holds 3 numbers (-1.5e-3, 2, 1E+2), counted %d", n)
	}
	if _, n, _ := CompareCSV("x.csv", files["hand/quoted.csv"], files["hand/quoted.csv"], nil); n != 3 {
		t.Errorf("hand/quoted.csv holds 3 numbers (-2.5, NaN, +Inf), counted %d", n)
	}
}
