package runner

import (
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

func TestReadCSV(t *testing.T) {
	inf := math.Inf(1)
	cases := []struct {
		name   string
		d      Dataset
		csv    string
		groups []string
		data   []struct {
			exact, left, right, lower, upper []float64
			trials                           []int
		}
		rows, missing, filtered, blank int
	}{
		{
			name:   "byte-order mark, missing tokens, a blank line counted as missing",
			d:      Dataset{Column: "x", Missing: []string{"", "NA"}},
			csv:    "\ufeffx,y\n1.5,a\nNA,b\n\n,c\n2,d\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{1.5, 2}}},
			missing: 3,
			rows:    5,
			blank:   1,
		},
		{
			name:   "plain decimal forms",
			d:      Dataset{Column: "x", Missing: []string{""}},
			csv:    "x\n+1.5\n-.5\n5.\n1E+3\n 2.5e-1 \n007\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{1.5, -0.5, 5, 1000, 0.25, 7}}},
			rows: 6,
		},
		{
			name:   "status column censoring",
			d:      Dataset{Column: "h", StatusColumn: "s", Left: []string{"<"}, Right: []string{"+", "susp"}, Missing: []string{""}},
			csv:    "h,s\n10,\n3,<\n40,+\n41, susp \n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{10}, left: []float64{3}, right: []float64{40, 41}}},
			rows: 4,
		},
		{
			name:   "split_by in order of first appearance, where filter, semicolon delimiter",
			d:      Dataset{Column: "v", SplitBy: "well", Where: &Where{Column: "site", Equals: "north"}, Delimiter: ";", Missing: []string{""}},
			csv:    "well;site;v\nMW-2;north;1\nMW-1;north;2\nMW-2;south;9\nMW-2;north;3\n",
			groups: []string{"MW-2", "MW-1"},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{1, 3}}, {exact: []float64{2}}},
			filtered: 1,
			rows:     4,
		},
		{
			name:   "interval columns with open bounds",
			d:      Dataset{LowerColumn: "lo", UpperColumn: "hi", Missing: []string{"", "NA"}},
			csv:    "lo,hi\n1,2\n,5\n7,\nNA,3\n,\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{lower: []float64{1, math.Inf(-1), 7}, upper: []float64{2, 5, inf}}},
			missing: 2,
			rows:    5,
		},
		{
			name:   "trials column",
			d:      Dataset{Column: "k", TrialsColumn: "n", Missing: []string{""}},
			csv:    "k,n\n3,10\n0,4\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{3, 0}, trials: []int{10, 4}}},
			rows: 2,
		},
		{
			name:   "one column of annual maxima: a blank year is a missing row",
			d:      Dataset{Column: "peak", Missing: []string{"", "NA"}},
			csv:    "peak\n812\n\n954\n733\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{812, 954, 733}}},
			rows: 4, missing: 1, blank: 1,
		},
		{
			name:   "blank lines at the end, CRLF, spaces; the final line break is not one",
			d:      Dataset{Column: "x", Missing: []string{""}},
			csv:    "x,y\r\n1,a\r\n\r\n  \r\n2,b\r\n\r\n\r\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{1, 2}}},
			rows: 6, missing: 4, blank: 4,
		},
		{
			name:   "blank lines before the header are not rows",
			d:      Dataset{Column: "x", Missing: []string{""}},
			csv:    "\n\nx\n1\n2",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{1, 2}}},
			rows: 2,
		},
		{
			name:   "a blank line is left out by where like any row of empty cells",
			d:      Dataset{Column: "x", Where: &Where{Column: "site", Equals: "north"}, Missing: []string{""}},
			csv:    "site,x\nnorth,1\n\nsouth,2\nnorth,\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{exact: []float64{1}}},
			rows: 4, missing: 1, filtered: 2,
		},
		{
			name:   "a blank line in interval data is a row with both bounds open, missing whatever missing lists",
			d:      Dataset{LowerColumn: "lo", UpperColumn: "hi", Missing: []string{"NA"}},
			csv:    "lo,hi\n1,2\n,\n\n3,4\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{lower: []float64{1, 3}, upper: []float64{2, 4}}},
			rows: 4, missing: 2, blank: 1,
		},
		{
			name:   "a blank line in interval data is a missing row",
			d:      Dataset{LowerColumn: "lo", UpperColumn: "hi", Missing: []string{"", "NA"}},
			csv:    "lo,hi\n1,2\n\n3,4\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{lower: []float64{1, 3}, upper: []float64{2, 4}}},
			rows: 3, missing: 1, blank: 1,
		},
		{
			name:   "header only",
			d:      Dataset{Column: "x", Missing: []string{""}},
			csv:    "x\n",
			groups: []string{""},
			data: []struct {
				exact, left, right, lower, upper []float64
				trials                           []int
			}{{}},
			rows: 0,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, err := ReadCSV("in.csv", strings.NewReader(c.csv), &c.d)
			if err != nil {
				t.Fatal(err)
			}
			var names []string
			for _, g := range out.Groups {
				names = append(names, g.Name)
			}
			if !reflect.DeepEqual(names, c.groups) {
				t.Fatalf("groups %q, want %q", names, c.groups)
			}
			for i, w := range c.data {
				g := out.Groups[i].Data
				for _, p := range []struct {
					got, want []float64
					what      string
				}{{g.Exact, w.exact, "exact"}, {g.Left, w.left, "left"}, {g.Right, w.right, "right"}, {g.Lower, w.lower, "lower"}, {g.Upper, w.upper, "upper"}} {
					if len(p.got) != len(p.want) || (len(p.want) > 0 && !reflect.DeepEqual(p.got, p.want)) {
						t.Errorf("group %d %s = %v, want %v", i, p.what, p.got, p.want)
					}
				}
				if len(w.trials) > 0 && !reflect.DeepEqual(g.Trials, w.trials) {
					t.Errorf("trials %v, want %v", g.Trials, w.trials)
				}
			}
			if out.Rows != c.rows || out.Missing != c.missing || out.Filtered != c.filtered || out.BlankLines != c.blank {
				t.Errorf("rows %d missing %d filtered %d blank lines %d, want %d %d %d %d",
					out.Rows, out.Missing, out.Filtered, out.BlankLines, c.rows, c.missing, c.filtered, c.blank)
			}
			if g := out.Groups[0]; c.d.SplitBy == "" && (g.Missing != c.missing || g.Rows != c.rows-c.filtered) {
				t.Errorf("group rows %d missing %d, want %d %d", g.Rows, g.Missing, c.rows-c.filtered, c.missing)
			}
		})
	}
}

// TestReadCSVErrors: each problem is a *DataError with the line, the byte
// position of the cell at fault (0: the whole line or file), and a message
// that names the file, the line and the cell's column by its header.
func TestReadCSVErrors(t *testing.T) {
	obs := Dataset{Column: "x", Missing: []string{"", "NA"}}
	status := Dataset{Column: "x", StatusColumn: "s", Left: []string{"<"}, Missing: []string{""}}
	interval := Dataset{LowerColumn: "lo", UpperColumn: "hi", Missing: []string{""}}
	trials := Dataset{Column: "k", TrialsColumn: "n", Missing: []string{""}}
	cases := []struct {
		name      string
		d         Dataset
		csv       string
		line, col int
		err       string
	}{
		{"not a number", obs, "x\n1\nabc\n", 3, 1, `in.csv line 3, column "x": the value "abc" is not a number`},
		{"NaN", obs, "x\n1\nNaN\n", 3, 1, `in.csv line 3, column "x": the value "NaN" is not a finite number`},
		{"Inf in second column", Dataset{Column: "x", Missing: []string{""}}, "id,x\na,1\nb,-Inf\n", 3, 3, `in.csv line 3, column "x": the value "-Inf" is not a finite number`},
		{"too large", obs, "x\n1e999\n", 2, 1, `in.csv line 2, column "x": the value "1e999" is out of the range of a float64`},
		{"digit separators", obs, "x\n1\n1_000\n", 3, 1, `in.csv line 3, column "x": the value "1_000" is not a number`},
		{"hexadecimal", obs, "x\n0x1p4\n", 2, 1, `in.csv line 2, column "x": the value "0x1p4" is not a number`},
		{"hexadecimal interval bound", interval, "lo,hi\n1,0x10p0\n", 2, 3, `in.csv line 2, column "hi": the upper bound "0x10p0" is not a number`},
		{"Infinity word", obs, "x\n-Infinity\n", 2, 1, `in.csv line 2, column "x": the value "-Infinity" is not a finite number`},
		{"header name padded", Dataset{Column: "x", Missing: []string{""}}, "id, x \na,1\nb,z\n", 3, 3, `in.csv line 3, column "x": the value "z" is not a number`},
		{"ragged row", obs, "x,y\n1,2\n3\n", 3, 0, `in.csv line 3: the row has 1 field, the header 2`},
		{"unknown status code", status, "x,s\n1,\n2,>\n", 3, 3, `in.csv line 3, column "s": unknown status code ">" (left: "<"; right: none)`},
		{"no such column", Dataset{Column: "hours", Missing: []string{""}}, "hour,x\n1,2\n", 1, 0, `in.csv line 1: no column "hours" (named by column in dataset "")`},
		{"bad trials", trials, "k,n\n1,2.5\n", 2, 3, `in.csv line 2, column "n": trials "2.5" is not a whole number of trials`},
		{"count above trials", trials, "k,n\n1,2\n5,3\n", 3, 1, `in.csv line 3, column "k": the value 5 is outside 0 … 3 trials`},
		{"lower bound above upper", interval, "lo,hi\n1,2\n7,5\n", 3, 1, `in.csv line 3, columns "lo" and "hi": lower bound 7 is above upper bound 5`},
		{"empty interval", interval, "lo,hi\n3.5,3.5\n", 2, 1, `in.csv line 2, columns "lo" and "hi": the interval (3.5, 3.5] is empty: lower bound and upper bound are equal`},
		{"lower bound above upper, columns in header order", interval, "id,hi,lo\na,5,7.25\n", 2, 3, `in.csv line 2, columns "hi" and "lo": lower bound 7.25 is above upper bound 5`},
		{"bare quote", obs, "x,y\n1,a\"b\n", 2, 3, `in.csv line 2, column "y": not valid CSV: bare " in non-quoted-field (at character 4 of the line)`},
		{"quote left open", obs, "x\n\"1\n", 2, 1, `in.csv line 2, column "x": not valid CSV: extraneous or missing " in quoted-field (at character 4 of the line)`},
		{"bad quote in the header", obs, "x,y\"\n1,2\n", 1, 3, `in.csv line 1, column 2: not valid CSV: bare " in non-quoted-field (at character 4 of the line)`},
		{"bad quote in an unnamed column", obs, "x,\n1,a\"b\n", 2, 3, `in.csv line 2, column 2: not valid CSV: bare " in non-quoted-field (at character 4 of the line)`},
		{"bad quote past the header", obs, "x\n1,\"2\"3\n", 2, 3, `in.csv line 2, column 2: not valid CSV: extraneous or missing " in quoted-field (at character 5 of the line)`},
		{"quotes run on over lines", obs, "x,y\n1,2\n3,\"a\nb\nc\"d\n", 3, 3, `in.csv line 3, column "y": not valid CSV: this cell's quotes run on to line 5, where they are not closed properly: extraneous or missing " in quoted-field (at character 2)`},
		{"blank line where the empty cell is not missing", Dataset{Column: "x", Missing: []string{"NA"}}, "x\n1\n\n2\n", 3, 0,
			`in.csv line 3: the line is blank, and an empty cell is not a missing value (missing: "NA")`},
		{"blank last line where the empty cell is not missing", Dataset{Column: "x", Missing: []string{"NA"}}, "x\r\n1\r\n2\r\n\r\n", 4, 0,
			`in.csv line 4: the line is blank, and an empty cell is not a missing value (missing: "NA")`},
		{"line of spaces where the empty cell is not missing", Dataset{Column: "x", Missing: []string{"NA"}}, "x\n1\n \t\n", 3, 0,
			`in.csv line 3: the line is blank, and an empty cell is not a missing value (missing: "NA")`},
		{"blank line before a bad cell comes first", Dataset{Column: "x", Missing: nil}, "x\n1\n\nabc\n", 3, 0,
			`in.csv line 3: the line is blank, and an empty cell is not a missing value (missing: none)`},
		{"blank line in a split dataset", Dataset{Column: "x", SplitBy: "g", Missing: []string{""}}, "g,x\na,1\n\nb,2\n", 3, 0,
			`in.csv line 3: the line is blank, so the row has no group (split_by column "g")`},
		{"empty file", obs, "", 1, 0, `in.csv line 1: the file is empty: it needs a header row naming the columns`},
		{"empty split group", Dataset{Column: "x", SplitBy: "g", Missing: []string{""}}, "g,x\na,1\n,2\n", 3, 1, `in.csv line 3, column "g": the row has no group: its split_by cell is empty`},
		{"duplicate header", obs, "x,x\n1,2\n", 1, 3, `in.csv line 1, column 2: "x" is already the name of column 1`},
		{"header not UTF-8", obs, "x,\xff\n1,2\n", 1, 3, `in.csv line 1, column 2: the header is not valid UTF-8`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadCSV("in.csv", strings.NewReader(c.csv), &c.d)
			var de *DataError
			if !errors.As(err, &de) {
				t.Fatalf("error %v (%T), want *DataError", err, err)
			}
			if de.Error() != c.err || de.Line != c.line || de.Column != c.col {
				t.Errorf("got %q (line %d, byte %d)\nwant %q (line %d, byte %d)", de.Error(), de.Line, de.Column, c.err, c.line, c.col)
			}
		})
	}
}

// TestDataErrorColumns: cells are named by header, by position where the
// header leaves a column unnamed, and both bounds of an interval together.
func TestDataErrorColumns(t *testing.T) {
	cases := []struct {
		cells []DataColumn
		want  string
	}{
		{nil, "d.csv line 6: oops"},
		{[]DataColumn{{Position: 3, Name: "x"}}, `d.csv line 6, column "x": oops`},
		{[]DataColumn{{Position: 3}}, `d.csv line 6, column 3: oops`},
		{[]DataColumn{{Position: 3, Name: "  "}}, `d.csv line 6, column 3: oops`},
		{[]DataColumn{{Position: 3, Name: "\xff"}}, `d.csv line 6, column 3: oops`},
		{[]DataColumn{{Position: 1, Name: "lo"}, {Position: 2, Name: "hi"}}, `d.csv line 6, columns "lo" and "hi": oops`},
		{[]DataColumn{{Position: 1, Name: "a"}, {Position: 2, Name: "b"}, {Position: 4}}, `d.csv line 6, columns "a", "b" and 4: oops`},
	}
	for _, c := range cases {
		e := &DataError{File: "d.csv", Line: 6, Cells: c.cells, Msg: "oops"}
		if got := e.Error(); got != c.want {
			t.Errorf("%+v: %q, want %q", c.cells, got, c.want)
		}
	}
	if got := (&DataError{File: "d.csv", Cells: []DataColumn{{Position: 1, Name: "x"}}, Msg: "oops"}).Error(); got != "d.csv: oops" {
		t.Errorf("no line: %q", got)
	}
}

// BenchmarkReadCSV reads 100,000 rows with a status column and a split
// column (invented values).
func BenchmarkReadCSV(b *testing.B) {
	var sb strings.Builder
	sb.WriteString("well,value,flag\n")
	for i := 0; i < 100000; i++ {
		flag := ""
		if i%9 == 0 {
			flag = "<"
		}
		sb.WriteString("mw-" + strconv.Itoa(i%40) + "," + strconv.FormatFloat(float64(i%997)*0.173+0.5, 'g', -1, 64) + "," + flag + "\n")
	}
	data := sb.String()
	d := Dataset{Column: "value", StatusColumn: "flag", Left: []string{"<"}, SplitBy: "well", Missing: []string{"", "NA"}}
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ReadCSV("bench.csv", strings.NewReader(data), &d); err != nil {
			b.Fatal(err)
		}
	}
}

// decimalSyntax and infNaNSyntax are, written independently of
// plainDecimal, the cells parseFloat takes: plain decimals, and the words
// strconv reads as infinities and NaN.
var (
	decimalSyntax = regexp.MustCompile(`^[+-]?([0-9]+\.?[0-9]*|\.[0-9]+)([eE][+-]?[0-9]+)?$`)
	infNaNSyntax  = regexp.MustCompile(`(?i)^([+-]?inf(inity)?|nan)$`)
)

// parseFloat must give exactly strconv.ParseFloat's value and error kind
// for every plain decimal cell and every infinity or NaN word, through
// parseDecimal's exact path or through strconv, and a syntax error for
// every other cell (1_000 and 0x1p4 included, which strconv takes).
func sameAsStrconv(t *testing.T, s string) {
	t.Helper()
	want, werr := strconv.ParseFloat(s, 64)
	got, gerr := parseFloat([]byte(s))
	if !decimalSyntax.MatchString(s) && !infNaNSyntax.MatchString(s) {
		var ne *strconv.NumError
		if !errors.As(gerr, &ne) || ne.Err != strconv.ErrSyntax || ne.Num != s {
			t.Fatalf("parseFloat(%q) = %v, %v; want a syntax error (not a plain decimal)", s, got, gerr)
		}
		if _, ok := parseDecimal([]byte(s)); ok {
			t.Fatalf("parseDecimal(%q) accepts a cell that is not a plain decimal", s)
		}
		return
	}
	if (werr == nil) != (gerr == nil) || math.Float64bits(got) != math.Float64bits(want) && !(math.IsNaN(got) && math.IsNaN(want)) {
		t.Fatalf("parseFloat(%q) = %v (%b), %v; strconv %v (%b), %v", s, got, math.Float64bits(got), gerr, want, math.Float64bits(want), werr)
	}
	if werr != nil && werr.Error() != gerr.Error() {
		t.Fatalf("parseFloat(%q): error %v, strconv %v", s, gerr, werr)
	}
	if f, ok := parseDecimal([]byte(s)); ok && (werr != nil || math.Float64bits(f) != math.Float64bits(want)) {
		t.Fatalf("parseDecimal(%q) = %v, strconv %v, %v", s, f, want, werr)
	}
}

func TestParseFloatMatchesStrconv(t *testing.T) {
	cells := []string{"0", "-0", "+0", "0.0", "-0.0e5", "0e99999", "1", "-1", "+1", ".5", "5.", ".", "-.", "+", "", "e5", "1e", "1e+", "1e-5",
		"1E5", "1.5e22", "1e23", "1e-22", "1e-23", "123456789012345678", "1234567890123456789", "12345678901234567890",
		"9007199254740992", "9007199254740993", "9007199254740992e1", "0.000000000000000000000000001", "00000000000000000000000001.5",
		"1_000", "0x1p-2", "inf", "NaN", "1e308", "1e309", "-1e400", "4.9e-324", "2.2250738585072014e-308", "1..2", "1.2.3", "1e5.5",
		"1e1000000", "1_000", "1_000.5", "0x1p4", "0x1P-2", "0X10p0", "-0x1.8p1", "0b101", "0o7", "1e1_0", "_1", "infinity", "-Inf",
		"+INFINITY", "-nan", "+NaN", "infin", "nan1", "1e+", "e", ".e1", "+.5", "-5.", "5.e3", "0.1", "0.2", "0.30000000000000004", "3.141592653589793", "17976931348623157e292", "1,5", " 1", "1 "}
	r := rand.New(rand.NewPCG(5, 6))
	for range 20000 {
		x := math.Float64frombits(r.Uint64())
		cells = append(cells, strconv.FormatFloat(x, 'g', -1, 64), strconv.FormatFloat(x, 'e', r.IntN(20), 64))
		y := r.ExpFloat64() * math.Pow(10, float64(r.IntN(20)-10))
		cells = append(cells, strconv.FormatFloat(y, 'g', -1, 64), strconv.FormatFloat(y, 'f', r.IntN(12), 64), strconv.FormatFloat(-y, 'g', 8, 64))
	}
	for _, s := range cells {
		sameAsStrconv(t, s)
	}
}

func FuzzParseFloat(f *testing.F) {
	for _, s := range []string{"1.5", "-0", ".5e-3", "9007199254740993", "1e22", "1e23", "0x1p3", "NaN", "1_000", "-Infinity"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) { sameAsStrconv(t, s) })
}

// TestReadCSVHints: the hint that comes with a refused cell points at the
// likely cause: a laboratory's "<0.5" written into the value cell is a
// non-detect for a status column, a cell or header holding another
// separator asks for the delimiter setting.
func TestReadCSVHints(t *testing.T) {
	obs := Dataset{Name: "d", Column: "x", Missing: []string{"", "NA"}}
	for _, c := range []struct {
		name, csv string
		d         Dataset
		want      string
	}{
		{"non-detect in the value cell", "x\n1.2\n<0.5\n", obs, `put 0.5 in the value column and the mark in a column of its own, named by status_column in dataset "d", with left in dataset "d" listing "<"`},
		{"non-detect with a space", "x\n< 0.5\n", obs, `put 0.5 in the value column`},
		{"value at or above", "x\n1200>\n", obs, `put 1200 in the value column`},
		{"semicolon inside a cell", "id,x\n1,1.2;3\n", obs, `if the file separates its columns with another character than ",", set delimiter in dataset "d" to it`},
		{"semicolon header", "x;y\n1;2\n", obs, `the header reads as one column "x;y": if the file separates its columns with ";", set delimiter in dataset "d" to ";"`},
		{"plain typo has neither", "x\n4O\n", obs, `write plain decimal numbers`},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadCSV("in.csv", strings.NewReader(c.csv), &c.d)
			var de *DataError
			if !errors.As(err, &de) || !strings.Contains(de.Hint, c.want) {
				t.Fatalf("error %v, hint %q; want a hint containing %q", err, hintOf(de), c.want)
			}
			if c.name == "plain typo has neither" && (strings.Contains(de.Hint, "status column") || strings.Contains(de.Hint, "delimiter")) {
				t.Errorf("hint %q points at a cause the cell does not show", de.Hint)
			}
		})
	}
}

func hintOf(de *DataError) string {
	if de == nil {
		return ""
	}
	return de.Hint
}

// TestColumnHint: a column name the header lacks is answered with the
// column likely meant — the same name in other letter case, the one column
// holding the name given (a unit suffix left off) or held in it, else a near
// spelling, never a short unrelated name — and the header's names.
func TestColumnHint(t *testing.T) {
	floods := []string{"station", "year", "peak_m3s"}
	for _, c := range []struct {
		name, col string
		columns   []string
		want      string
	}{
		{"unit suffix left off", "peak", floods, `did you mean "peak_m3s"? (the header has: station, year, peak_m3s)`},
		{"letter case", "Year", floods, `did you mean "year"? (the header has: station, year, peak_m3s)`},
		{"a suffix too many", "station_id", floods, `did you mean "station"? (the header has: station, year, peak_m3s)`},
		{"typo", "staton", floods, `did you mean "station"? (the header has: station, year, peak_m3s)`},
		{"two columns hold it: the nearer spelling", "peak", []string{"peak_flow", "peak_stage", "pea"}, `did you mean "pea"? (the header has: peak_flow, peak_stage, pea)`},
		{"nothing near", "discharge", floods, "the header has: station, year, peak_m3s"},
		{"one column", "y", []string{"x"}, `did you mean "x"?`},
		{"many columns", "c1", []string{"a01", "a02", "a03", "a04", "a05", "a06", "a07", "a08", "a09", "a10", "a11", "a12", "a13", "a14", "a15", "a16", "a17", "a18", "a19", "a20", "c11"}, `did you mean "c11"?`},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := columnHint(c.col, c.columns); got != c.want {
				t.Errorf("columnHint(%q) = %q, want %q", c.col, got, c.want)
			}
		})
	}
}
