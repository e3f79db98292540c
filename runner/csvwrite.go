package runner

import (
	"math"
	"strconv"
	"unicode"
	"unicode/utf8"
)

// csvTable writes a result table exactly as encoding/csv's Writer does with
// its defaults (comma, "\n" line ends, RFC 4180 quoting), straight into one
// buffer: numbers are appended without a string each, and no [][]string of
// the table is built. TestResultCSVMatchesEncodingCSV and FuzzCSVField check
// the bytes against encoding/csv.
type csvTable struct {
	b        []byte
	rowStart bool
}

func newCSVTable(header []string, withHeader bool, size int) *csvTable {
	t := &csvTable{b: make([]byte, 0, size), rowStart: true}
	if withHeader {
		for _, h := range header {
			t.text(h)
		}
		t.end()
	}
	return t
}

func (t *csvTable) sep() {
	if !t.rowStart {
		t.b = append(t.b, ',')
	}
	t.rowStart = false
}

// text writes a field, quoted where encoding/csv quotes it.
func (t *csvTable) text(s string) {
	t.sep()
	t.b = appendCSVField(t.b, s)
}

// num writes x in the shortest round-trip form, an empty field for NaN and
// ±Inf (FormatFloat); such a field never needs quotes.
func (t *csvTable) num(x float64) {
	t.sep()
	if !math.IsNaN(x) && !math.IsInf(x, 0) {
		t.b = strconv.AppendFloat(t.b, x, 'g', -1, 64)
	}
}

func (t *csvTable) int(n int) {
	t.sep()
	t.b = strconv.AppendInt(t.b, int64(n), 10)
}

func (t *csvTable) bool(v bool) {
	t.sep()
	t.b = strconv.AppendBool(t.b, v)
}

// end ends the row.
func (t *csvTable) end() {
	t.b = append(t.b, '\n')
	t.rowStart = true
}

// appendCSVField appends s as encoding/csv's Writer writes one field with
// the comma delimiter: quoted when it holds a comma, a quote, \r or \n,
// starts with white space or is `\.`, with quotes doubled inside.
func appendCSVField(b []byte, s string) []byte {
	if !csvNeedsQuotes(s) {
		return append(b, s...)
	}
	b = append(b, '"')
	for i := 0; i < len(s); i++ {
		if s[i] == '"' {
			b = append(b, '"', '"')
		} else {
			b = append(b, s[i])
		}
	}
	return append(b, '"')
}

func csvNeedsQuotes(s string) bool {
	if s == "" {
		return false
	}
	if s == `\.` {
		return true
	}
	for i := 0; i < len(s); i++ {
		if c := s[i]; c == '\n' || c == '\r' || c == '"' || c == ',' {
			return true
		}
	}
	r, _ := utf8.DecodeRuneInString(s)
	return unicode.IsSpace(r)
}
