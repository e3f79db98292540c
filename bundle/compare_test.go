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

// TestCompareJSONArraysThatDoNotLineUp: arrays of unequal length, or whose
// elements name different things position by position, are compared element
// by element — by the element's name where every element has a distinct
// one, else by position — so that each added, removed or changed element is
// one difference that names it, never the two whole arrays (which, cut to a
// readable length, could print the same on both sides).
func TestCompareJSONArraysThatDoNotLineUp(t *testing.T) {
	type diff struct{ path, a, b string }
	cases := []struct {
		name string
		a, b string
		want []diff
	}{
		{"an element added at the end",
			`{"d":[{"name":"x","n":1},{"name":"y","n":2}]}`,
			`{"d":[{"name":"x","n":1},{"name":"y","n":2},{"name":"z","n":3}]}`,
			[]diff{{"d[name=z]", "(absent)", `{"n":3,"name":"z"}`}}},
		{"an element removed from the middle, another changed",
			`{"d":[{"name":"x","n":1},{"name":"y","n":2},{"name":"z","n":3}]}`,
			`{"d":[{"name":"x","n":1},{"name":"z","n":4}]}`,
			[]diff{{"d[name=y]", `{"n":2,"name":"y"}`, "(absent)"}, {"d[name=z].n", "3", "4"}}},
		{"the same elements in another order",
			`{"d":[{"family":"gamma","k":2},{"family":"weibull","k":2}]}`,
			`{"d":[{"family":"weibull","k":2},{"family":"gamma","k":2}]}`,
			nil},
		{"one element replaced by another of the same length",
			`{"d":[{"name":"x","n":1}]}`,
			`{"d":[{"name":"w","n":1}]}`,
			[]diff{{"d[name=x]", `{"n":1,"name":"x"}`, "(absent)"}, {"d[name=w]", "(absent)", `{"n":1,"name":"w"}`}}},
		{"texts added to a list of distinct texts, one in the middle",
			`{"l":["a","b","c"]}`,
			`{"l":["a","x","b","c","d"]}`,
			[]diff{{"l[1]", "(absent)", `"x"`}, {"l[4]", "(absent)", `"d"`}}},
		{"a text removed from a list of distinct texts",
			`{"l":["a","b","c"]}`,
			`{"l":["a","c"]}`,
			[]diff{{"l[1]", `"b"`, "(absent)"}}},
		{"a list with repeated texts is compared by position",
			`{"l":["a","a"]}`,
			`{"l":["a","b","a"]}`,
			[]diff{{"l[1]", `"a"`, `"b"`}, {"l[2]", "(absent)", `"a"`}}},
		{"a number list shortened and changed",
			`{"l":[1,2,3]}`,
			`{"l":[1,5]}`,
			[]diff{{"l[1]", "2", "5"}, {"l[2]", "3", "(absent)"}}},
		{"repeated names are compared by position",
			`{"d":[{"name":"x","n":1},{"name":"x","n":2}]}`,
			`{"d":[{"name":"x","n":1}]}`,
			[]diff{{"d[1]", `{"n":2,"name":"x"}`, "(absent)"}}},
		{"rows named by several members, one added in the middle",
			`{"d":[{"family":"gev","quantity":"return_level","argument":10,"estimate":40},{"family":"model-average","quantity":"return_level","argument":10,"estimate":41}]}`,
			`{"d":[{"family":"gev","quantity":"return_level","argument":10,"estimate":40},{"family":"weibull","quantity":"return_level","argument":10,"estimate":39},{"family":"model-average","quantity":"return_level","argument":10,"estimate":40.5}]}`,
			[]diff{
				{"d[family=model-average, quantity=return_level, argument=10].estimate", "41", "40.5"},
				{"d[family=weibull, quantity=return_level, argument=10]", "(absent)", `{"argument":10,"estimate":39,"family":"weibull","quantity":"return_level"}`},
			}},
		{"a second quantity for each family: matched by every naming member",
			`{"d":[{"family":"gev","quantity":"quantile","argument":0.5,"estimate":3},{"family":"gumbel","quantity":"quantile","argument":0.5,"estimate":4}]}`,
			`{"d":[{"family":"gev","quantity":"quantile","argument":0.5,"estimate":3},{"family":"gev","quantity":"quantile","argument":0.9,"estimate":7},{"family":"gumbel","quantity":"quantile","argument":0.5,"estimate":4}]}`,
			[]diff{{"d[family=gev, quantity=quantile, argument=0.9]", "(absent)", `{"argument":0.9,"estimate":7,"family":"gev","quantity":"quantile"}`}}},
		{"equal arrays with names keep their positions as paths",
			`{"d":[{"name":"x","n":1}]}`,
			`{"d":[{"name":"x","n":2}]}`,
			[]diff{{"d[0].n", "1", "2"}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ds, _, err := CompareJSON("x.json", []byte(c.a), []byte(c.b), nil)
			if err != nil {
				t.Fatal(err)
			}
			var got []diff
			for _, d := range ds {
				got = append(got, diff{d.Column, d.A, d.B})
			}
			if len(got) != len(c.want) {
				t.Fatalf("got %d differences %q, want %q", len(got), got, c.want)
			}
			for i := range got {
				if got[i] != c.want[i] {
					t.Errorf("difference %d: got %q, want %q", i, got[i], c.want[i])
				}
			}
		})
	}
}

// TestCompareCSVRowsThatMoved: when a family is added to an analysis the
// rows after it move down, so a changed cell is given by its row in each
// version, and a row in one version only by its row there, said as such
// (not as a cell "(row)" that is "absent" or "present"). Every row number
// given must point at the row with that key in that version.
func TestCompareCSVRowsThatMoved(t *testing.T) {
	const member = "data/results/fits.csv"
	a := "analysis,family,loglik\nrain,gumbel,-10\nrain,gev,-9\nlife,weibull,-5\n"
	b := "analysis,family,loglik\nrain,gumbel,-10\nrain,gev,-9\nrain,weibull,-12\nlife,weibull,-6\n"
	c := "analysis,family,loglik\nrain,gumbel,-11\nlife,weibull,-5\n"
	cases := []struct {
		name string
		a, b string
		want []string
	}{
		{"a row added, a later row changed", a, b, []string{
			"row 3 in A, 4 in B (analysis=life, family=weibull), column loglik: A -5, B -6",
			"row 3 (analysis=rain, family=weibull) of B: not in A",
		}},
		{"a row removed, an earlier row changed", a, c, []string{
			"row 1 (analysis=rain, family=gumbel), column loglik: A -10, B -11",
			"row 2 (analysis=rain, family=gev) of A: not in B",
		}},
	}
	rows := func(text string) [][]string {
		var out [][]string
		for _, line := range strings.Split(strings.TrimSpace(text), "\n")[1:] {
			out = append(out, strings.Split(line, ","))
		}
		return out
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ds, _, err := CompareCSV(member, []byte(tc.a), []byte(tc.b), nil)
			if err != nil {
				t.Fatal(err)
			}
			var got []string
			ra, rb := rows(tc.a), rows(tc.b)
			for _, d := range ds {
				got = append(got, d.Describe("A", "B"))
				for _, side := range []struct {
					row  int
					rows [][]string
				}{{d.Row, ra}, {d.RowB, rb}} {
					if side.row == 0 {
						continue
					}
					r := side.rows[side.row-1]
					if key := "analysis=" + r[0] + ", family=" + r[1]; key != d.Key {
						t.Errorf("%q: row %d holds %s", d.Describe("A", "B"), side.row, key)
					}
				}
			}
			if strings.Join(got, "\n") != strings.Join(tc.want, "\n") {
				t.Errorf("got\n%s\nwant\n%s", strings.Join(got, "\n"), strings.Join(tc.want, "\n"))
			}
		})
	}
}
