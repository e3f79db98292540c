package runner

import (
	"bufio"
	"bytes"
	"cmp"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"strconv"
	"strings"
	"unicode/utf8"

	"fitseal/fitters"
)

// Group is the observations of one dataset, or of one group of a split
// dataset, as the likelihoods see them.
type Group struct {
	// Name is the group's split_by value ("" for an unsplit dataset).
	Name string
	Data fitters.Data
	// Rows counts the data rows that passed `where`; Missing the rows skipped
	// because an observation cell held a `missing` token.
	Rows    int
	Missing int
}

// DatasetData is a dataset as read from its file.
type DatasetData struct {
	Dataset *Dataset
	// Groups in order of first appearance in the file; one group, named "",
	// when the dataset is not split.
	Groups []*Group
	// Rows counts every data row of the file; Filtered the rows that `where`
	// left out; Missing the rows skipped as missing, over all groups.
	// BlankLines counts the blank lines among the Missing rows: a blank line
	// after the header is read as a row of empty cells (one that `where`
	// leaves out is among Filtered instead).
	Rows       int
	Filtered   int
	Missing    int
	BlankLines int
	// Source is the size and SHA-256 of the file's bytes as they were
	// parsed (ReadDataset); zero for data read from elsewhere (ReadCSV).
	Source FileDigest
}

// ReadDataset reads the dataset's file (relative to the project folder);
// errors are [*DataError] naming the file as the project gives it. The
// file's bytes are hashed as they are parsed (DatasetData.Source). It
// parses on every core (see ReadCSV).
func ReadDataset(p *Project, d *Dataset) (*DatasetData, error) {
	return readDataset(p, d, runtime.GOMAXPROCS(0))
}

// readDataset is ReadDataset parsing on at most workers goroutines.
func readDataset(p *Project, d *Dataset, workers int) (*DatasetData, error) {
	f, err := os.Open(d.Path(p))
	if err != nil {
		return nil, &DataError{File: d.errorName(), Msg: fmt.Sprintf("cannot open: %v", unwrapPathError(err)), Err: err}
	}
	defer f.Close()
	dr := newDigestReader(f)
	dd, err := readCSV(d.errorName(), dr, d, workers, csvChunkSize)
	if err != nil {
		return nil, err
	}
	if dd.Source, err = dr.digest(); err != nil {
		return nil, &DataError{File: d.errorName(), Msg: fmt.Sprintf("cannot read: %v", unwrapPathError(err)), Err: err}
	}
	return dd, nil
}

// ReadCSV reads a dataset from r, streaming it row by row; name is the
// file's name for errors. A UTF-8 byte-order mark is skipped.
//
// Nothing is allocated per row (recordReader hands out fields as bytes,
// and cells are parsed without strings), and the values are gathered in
// blocks and copied once into slices of exactly their length, so a column
// of n values ends up holding 8n bytes (BenchmarkReadCSVBig). The rows are
// parsed on every core, in chunks of 1 MiB (rowsChunked), with the same
// result as one after another.
func ReadCSV(name string, r io.Reader, d *Dataset) (*DatasetData, error) {
	return readCSV(name, r, d, runtime.GOMAXPROCS(0), csvChunkSize)
}

// readCSV is ReadCSV parsing on at most workers goroutines in chunks of
// about chunkSize bytes; with one worker it parses row after row.
func readCSV(name string, r io.Reader, d *Dataset, workers, chunkSize int) (*DatasetData, error) {
	br := bufio.NewReaderSize(r, 64<<10)
	if bom, err := br.Peek(3); err == nil && bytes.Equal(bom, []byte{0xEF, 0xBB, 0xBF}) {
		br.Discard(3)
	}
	comma := ','
	if d.Delimiter != "" {
		comma, _ = utf8.DecodeRuneInString(d.Delimiter)
	}
	rd := &csvReading{name: name, d: d, rr: newRecordReader(br, comma), out: &DatasetData{Dataset: d}}
	if err := rd.header(); err != nil {
		return nil, err
	}
	rows := rd.rows
	if workers > 1 {
		rows = func() error { return rd.rowsChunked(br, workers, chunkSize) }
	}
	if err := rows(); err != nil {
		return nil, err
	}
	if d.SplitBy == "" && len(rd.out.Groups) == 0 {
		rd.out.Groups = []*Group{{}}
	}
	TracePhase("finish columns")
	// Each group's values are copied out of their blocks on the workers
	// (1000 groups of 1000 values: 3-5 ms on one, in traced batch runs).
	ForEach(workers, len(rd.builders), func(i int) { rd.builders[i].finish() })
	return rd.out, nil
}

// groupBuilder gathers one group's values while the file is read.
type groupBuilder struct {
	g                                *Group
	exact, left, right, lower, upper column[float64]
	trials                           column[int]
}

// finish puts the gathered values into the group's data.
func (b *groupBuilder) finish() {
	d := &b.g.Data
	d.Exact, d.Left, d.Right = b.exact.slice(), b.left.slice(), b.right.slice()
	d.Lower, d.Upper, d.Trials = b.lower.slice(), b.upper.slice(), b.trials.slice()
}

// column collects values in blocks (64 values, doubling up to 65536) and
// returns them as one slice of exactly their number. Growing one slice by
// append would copy it at every growth and leave up to a quarter of it
// unused (Go grows large slices by 1.25).
type column[T any] struct {
	full [][]T
	cur  []T
	n    int
}

func (c *column[T]) add(x T) {
	if len(c.cur) == cap(c.cur) {
		if c.cur != nil {
			c.full = append(c.full, c.cur)
		}
		c.cur = make([]T, 0, max(64, min(2*cap(c.cur), 1<<16)))
	}
	c.cur = append(c.cur, x)
	c.n++
}

// appendColumn moves o's values after c's (o is left empty); the blocks
// are handed over, not copied.
func (c *column[T]) appendColumn(o *column[T]) {
	if o.n == 0 {
		return
	}
	if len(c.cur) > 0 {
		c.full = append(c.full, c.cur)
	}
	c.full = append(c.full, o.full...)
	c.full = append(c.full, o.cur)
	c.cur = nil
	c.n += o.n
	o.full, o.cur, o.n = nil, nil, 0
}

// slice returns the values in order, nil when there are none.
func (c *column[T]) slice() []T {
	if c.n == 0 {
		return nil
	}
	out := make([]T, 0, c.n)
	for _, b := range c.full {
		out = append(out, b...)
	}
	out = append(out, c.cur...)
	c.full, c.cur = nil, nil
	return out
}

// csvReading is the state of one pass over a data file.
type csvReading struct {
	name string
	d    *Dataset
	rr   *recordReader
	out  *DatasetData

	columns                           []string
	obs, status, lower, upper, trials int // column indexes, -1 when unused
	split, where                      int
	byName                            map[string]*groupBuilder
	builders                          []*groupBuilder // in the order of out.Groups
	last                              *groupBuilder   // the group of the last row
	left, right, missing              map[string]bool
	line                              int
	// blankRow is set while a blank line is read as a row of empty cells
	// (empty), which has no field positions.
	blankRow bool
	empty    [][]byte
}

// fail is a DataError at the cell of field (0-based) of the current row,
// or, with field < 0, at the whole row.
func (rd *csvReading) fail(field int, hint, format string, args ...any) error {
	if field < 0 {
		return rd.failCells(nil, hint, format, args...)
	}
	return rd.failCells([]int{field}, hint, format, args...)
}

// failCells is a DataError at the cells of fields (0-based, in header
// order) of the current row, on the line where the first one starts.
func (rd *csvReading) failCells(fields []int, hint, format string, args ...any) error {
	e := &DataError{File: rd.name, Line: rd.line, Msg: fmt.Sprintf(format, args...), Hint: hint}
	for i, f := range fields {
		if i == 0 && !rd.blankRow {
			e.Line, e.Column = rd.rr.fieldPos(f)
		}
		e.Cells = append(e.Cells, rd.column(f))
	}
	return e
}

// column names field i (0-based) by the header, once it has been read.
func (rd *csvReading) column(i int) DataColumn {
	c := DataColumn{Position: i + 1}
	if i < len(rd.columns) {
		c.Name = strings.TrimSpace(rd.columns[i])
	}
	return c
}

func (rd *csvReading) csvError(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		field, line, col := rd.rr.errField()
		e := &DataError{File: rd.name, Line: pe.Line, Column: col, Cells: []DataColumn{rd.column(field)},
			Msg:  fmt.Sprintf("not valid CSV: %v (at character %d of the line)", pe.Err, pe.Column),
			Hint: "a field with the delimiter, a quote or a line break must be quoted, quotes doubled inside", Err: err}
		if line > 0 && line < pe.Line {
			// A quoted cell ran on over line breaks: name where it starts.
			e.Line = line
			e.Msg = fmt.Sprintf("not valid CSV: this cell's quotes run on to line %d, where they are not closed properly: %v (at character %d)", pe.Line, pe.Err, pe.Column)
		}
		return e
	}
	return &DataError{File: rd.name, Msg: "cannot read: " + err.Error(), Err: err}
}

func (rd *csvReading) header() error {
	rec, err := rd.rr.read()
	if err == io.EOF {
		return &DataError{File: rd.name, Line: 1, Msg: "the file is empty: it needs a header row naming the columns"}
	}
	if err != nil {
		return rd.csvError(err)
	}
	rd.line, _ = rd.rr.fieldPos(0)
	rd.columns = make([]string, len(rec))
	for i, f := range rec {
		rd.columns[i] = string(f)
	}
	// Header cells are named by position: their names are what is wrong.
	headerCell := func(i int, hint, format string, args ...any) error {
		line, col := rd.rr.fieldPos(i)
		return &DataError{File: rd.name, Line: line, Column: col, Cells: []DataColumn{{Position: i + 1}}, Msg: fmt.Sprintf(format, args...), Hint: hint}
	}
	for i, h := range rd.columns {
		if !utf8.ValidString(h) {
			return headerCell(i, "save the file as UTF-8", "the header is not valid UTF-8")
		}
		for j := 0; j < i; j++ {
			if rd.columns[j] == h && h != "" {
				return headerCell(i, "give every column its own name", "%q is already the name of column %d", h, j+1)
			}
		}
	}
	find := func(key, col string) (int, error) {
		if col == "" {
			return -1, nil
		}
		for i, h := range rd.columns {
			if strings.TrimSpace(h) == col {
				return i, nil
			}
		}
		hint := columnHint(col, rd.columns)
		if len(rd.columns) == 1 {
			for _, sep := range []string{";", "\t", "|"} {
				if strings.Contains(rd.columns[0], sep) {
					hint = fmt.Sprintf("the header reads as one column %q: if the file separates its columns with %q, set %s to %q",
						rd.columns[0], sep, rd.d.setting("delimiter"), sep)
					break
				}
			}
		}
		return -1, &DataError{File: rd.name, Line: rd.line, Msg: fmt.Sprintf("no column %q (named by %s)", col, rd.d.setting(key)), Hint: hint}
	}
	var err2 error
	for _, c := range []struct {
		idx      *int
		key, col string
	}{
		{&rd.obs, "column", rd.d.Column}, {&rd.status, "status_column", rd.d.StatusColumn},
		{&rd.lower, "lower_column", rd.d.LowerColumn}, {&rd.upper, "upper_column", rd.d.UpperColumn},
		{&rd.trials, "trials_column", rd.d.TrialsColumn}, {&rd.split, "split_by", rd.d.SplitBy},
		{&rd.where, "where.column", whereColumn(rd.d)},
	} {
		if *c.idx, err2 = find(c.key, c.col); err2 != nil {
			return err2
		}
	}
	rd.left, rd.right, rd.missing = set(rd.d.Left), set(rd.d.Right), set(rd.d.Missing)
	rd.byName = map[string]*groupBuilder{}
	return nil
}

func whereColumn(d *Dataset) string {
	if d.Where == nil {
		return ""
	}
	return d.Where.Column
}

func set(list []string) map[string]bool {
	m := make(map[string]bool, len(list))
	for _, s := range list {
		m[s] = true
	}
	return m
}

func (rd *csvReading) rows() error {
	for {
		rec, err := rd.rr.read()
		for _, line := range rd.rr.blank {
			if err := rd.blankLine(line); err != nil {
				return err
			}
		}
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return rd.csvError(err)
		}
		rd.line, _ = rd.rr.fieldPos(0)
		if len(rec) == 1 && len(bytes.TrimSpace(rec[0])) == 0 {
			// Spaces alone: blank too.
			if err := rd.blankLine(rd.line); err != nil {
				return err
			}
			continue
		}
		if len(rec) != len(rd.columns) {
			return rd.fail(-1, "every row needs one field per header column; quote fields that contain the delimiter",
				"the row has %s, the header %d", fieldCount(len(rec)), len(rd.columns))
		}
		if err := rd.row(rec); err != nil {
			return err
		}
	}
}

// blankLine reads a blank line after the header as a row whose cells are
// all empty: where the empty cell is a missing value (as by default), it is
// counted and reported as a missing row like any other, so that a blank
// year in a column of annual maxima does not vanish; where it is not, the
// line is an error. In interval data it is a row with both bounds open,
// which counts as missing whatever the missing values are (an empty bound
// is open, not missing). The line break that ends the file is not a blank
// line.
func (rd *csvReading) blankLine(line int) error {
	rd.line = line
	if !rd.d.Interval() && !rd.isMissing(nil) {
		return &DataError{File: rd.name, Line: line,
			Msg:  fmt.Sprintf("the line is blank, and an empty cell is not a missing value (missing: %s)", cmp.Or(quoteList(rd.d.Missing), "none")),
			Hint: fmt.Sprintf(`remove the line, or add "" to %s to count blank lines as missing rows`, rd.d.setting("missing"))}
	}
	if rd.empty == nil {
		rd.empty = make([][]byte, len(rd.columns))
	}
	missing := rd.out.Missing
	rd.blankRow = true
	err := rd.row(rd.empty)
	rd.blankRow = false
	if rd.out.Missing > missing {
		rd.out.BlankLines++
	}
	return err
}

// row reads one data row of the header's width.
func (rd *csvReading) row(rec [][]byte) error {
	rd.out.Rows++
	if rd.where >= 0 && string(rec[rd.where]) != rd.d.Where.Equals {
		rd.out.Filtered++
		return nil
	}
	g, err := rd.group(rec)
	if err != nil {
		return err
	}
	g.g.Rows++
	if rd.d.Interval() {
		return rd.interval(rec, g)
	}
	return rd.observation(rec, g)
}

func (rd *csvReading) group(rec [][]byte) (*groupBuilder, error) {
	if rd.split < 0 {
		if len(rd.builders) == 0 {
			rd.newGroup("")
		}
		return rd.builders[0], nil
	}
	key := rec[rd.split]
	if rd.last != nil && string(key) == rd.last.g.Name {
		return rd.last, nil // rows of one group often come together
	}
	if b, ok := rd.byName[string(key)]; ok {
		rd.last = b
		return b, nil
	}
	if rd.blankRow {
		return nil, rd.fail(-1, "remove the blank line: every row of a split dataset belongs to a group",
			"the line is blank, so the row has no group (split_by column %q)", rd.d.SplitBy)
	}
	if len(bytes.TrimSpace(key)) == 0 {
		return nil, rd.fail(rd.split, "fill in the group, or leave the row out with where = { … }", "the row has no group: its split_by cell is empty")
	}
	if !utf8.Valid(key) {
		return nil, rd.fail(rd.split, "save the file as UTF-8", "the group name is not valid UTF-8")
	}
	b := rd.newGroup(string(key))
	rd.byName[b.g.Name] = b
	rd.last = b
	return b, nil
}

func (rd *csvReading) newGroup(name string) *groupBuilder {
	b := &groupBuilder{g: &Group{Name: name}}
	rd.builders = append(rd.builders, b)
	rd.out.Groups = append(rd.out.Groups, b.g)
	return b
}

// censoringMark returns the number of a cell such as "<0.5", "< 0.5",
// ">1200" or "0.5<" ("0.5"), or "" when the cell is not a number with such
// a mark.
func censoringMark(b []byte) string {
	for _, m := range []byte{'<', '>'} {
		var t []byte
		switch {
		case len(b) > 1 && b[0] == m:
			t = bytes.TrimSpace(b[1:])
		case len(b) > 1 && b[len(b)-1] == m:
			t = bytes.TrimSpace(b[:len(b)-1])
		default:
			continue
		}
		if _, err := parseFloat(t); err == nil {
			return string(t)
		}
	}
	return ""
}

// number parses one observation cell; ok is false for a missing cell.
func (rd *csvReading) number(rec [][]byte, i int, what string) (x float64, ok bool, err error) {
	b := bytes.TrimSpace(rec[i])
	if rd.isMissing(b) {
		return 0, false, nil
	}
	x, perr := parseFloat(b)
	if perr != nil {
		cell := string(b)
		var ne *strconv.NumError
		if errors.As(perr, &ne) && ne.Err == strconv.ErrRange {
			return 0, false, rd.fail(i, "", "%s %q is out of the range of a float64", what, cell)
		}
		hint := "write plain decimal numbers such as 1250, -0.5 or 1.25e3: a '.' decimal point, no thousands or digit separators, no hexadecimal"
		switch rest := censoringMark(b); {
		case rest != "":
			// "<0.5" or "> 1200": a laboratory's non-detect, or a
			// suspension, written into the value cell.
			hint = fmt.Sprintf("a value marked %q is censored: put %s in the value column and the mark in a column of its own, named by %s, with %s listing \"<\" for non-detects (or %s listing \">\" for values at or above it)",
				cell, rest, rd.d.setting("status_column"), rd.d.setting("left"), rd.d.setting("right"))
		case bytes.ContainsAny(b, ";\t|"):
			hint += fmt.Sprintf("; if the file separates its columns with another character than %q, set %s to it", string(rd.rr.comma), rd.d.setting("delimiter"))
		}
		if len(rd.d.Missing) > 0 {
			hint += fmt.Sprintf("; missing cells must be one of %s", quoteList(rd.d.Missing))
		}
		return 0, false, rd.fail(i, hint, "%s %q is not a number", what, cell)
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, false, rd.fail(i, fmt.Sprintf("mark missing values with one of %s instead", quoteList(rd.d.Missing)),
			"%s %q is not a finite number", what, string(b))
	}
	return x, true, nil
}

// parseFloat parses an observation cell written as a plain decimal
// number: an optional sign, digits with an optional decimal point (at
// least one digit), and an optional exponent (e or E, an optional sign,
// digits). Its value and range error are strconv.ParseFloat's: plain
// decimals take parseDecimal's exact path, and the rest go to strconv
// through a conversion of the cell that does not escape (made on the
// stack for a cell of up to 32 bytes). The words strconv reads as
// infinities and NaN ("inf", "-Infinity", "NaN", …) give those values,
// which the caller refuses as not finite. Every other syntax that strconv
// takes from Go's literals — digit separators (1_000), hexadecimal
// mantissas (0x1p4) — is a syntax error here: a data file holds decimals.
func parseFloat(b []byte) (float64, error) {
	if f, ok := parseDecimal(b); ok {
		return f, nil
	}
	if !plainDecimal(b) && !infOrNaN(b) {
		return 0, &strconv.NumError{Func: "ParseFloat", Num: string(b), Err: strconv.ErrSyntax}
	}
	return strconv.ParseFloat(string(b), 64)
}

// plainDecimal reports whether b is [+-]digits[.digits][(e|E)[+-]digits]
// with at least one digit before the exponent (".5" and "5." are plain).
func plainDecimal(b []byte) bool {
	i := 0
	if i < len(b) && (b[i] == '+' || b[i] == '-') {
		i++
	}
	digits, point := 0, false
	for ; i < len(b); i++ {
		if c := b[i]; c >= '0' && c <= '9' {
			digits++
		} else if c == '.' && !point {
			point = true
		} else {
			break
		}
	}
	if digits == 0 {
		return false
	}
	if i < len(b) && (b[i] == 'e' || b[i] == 'E') {
		i++
		if i < len(b) && (b[i] == '+' || b[i] == '-') {
			i++
		}
		start := i
		for i < len(b) && b[i] >= '0' && b[i] <= '9' {
			i++
		}
		if i == start {
			return false
		}
	}
	return i == len(b)
}

// infOrNaN reports whether b may be one of the words strconv reads as an
// infinity or NaN: after an optional sign, it starts with i or n. Any
// such cell that strconv accepts is one of them.
func infOrNaN(b []byte) bool {
	if len(b) > 0 && (b[0] == '+' || b[0] == '-') {
		b = b[1:]
	}
	return len(b) > 0 && (b[0]|0x20 == 'i' || b[0]|0x20 == 'n')
}

// exactPow10 are the powers of ten that a float64 holds exactly.
var exactPow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// parseDecimal parses [+-]digits[.digits][(e|E)[+-]digits] when the digits,
// read as an integer m, are at most 2^53 and the decimal exponent e of
// m·10^e is within ±22. Then m and 10^|e| are exact float64s and one
// multiplication or division rounds correctly: the result is strconv's
// (Clinger, 1990, "How to read floating point numbers accurately"; strconv
// takes the same path). ok is false for anything else, which the caller
// hands to strconv.
func parseDecimal(b []byte) (f float64, ok bool) {
	i, neg := 0, false
	if i < len(b) && (b[i] == '+' || b[i] == '-') {
		neg = b[i] == '-'
		i++
	}
	var m uint64
	digits, significant, afterPoint, point := 0, 0, 0, false
	for ; i < len(b); i++ {
		c := b[i]
		if c == '.' && !point {
			point = true
			continue
		}
		if c < '0' || c > '9' {
			break
		}
		digits++
		if point {
			afterPoint++
		}
		if m != 0 || c != '0' {
			if significant++; significant > 19 {
				return 0, false
			}
			m = m*10 + uint64(c-'0')
		}
	}
	if digits == 0 {
		return 0, false
	}
	e := 0
	if i < len(b) && (b[i] == 'e' || b[i] == 'E') {
		i++
		eneg := false
		if i < len(b) && (b[i] == '+' || b[i] == '-') {
			eneg = b[i] == '-'
			i++
		}
		if i == len(b) {
			return 0, false
		}
		for ; i < len(b); i++ {
			c := b[i]
			if c < '0' || c > '9' || e > 1000 {
				return 0, false
			}
			e = e*10 + int(c-'0')
		}
		if eneg {
			e = -e
		}
	}
	if i != len(b) || m > 1<<53 {
		return 0, false
	}
	e -= afterPoint
	f = float64(m)
	if neg {
		f = -f
	}
	switch {
	case m == 0 || e == 0:
		return f, true
	case e > 0 && e < len(exactPow10):
		return f * exactPow10[e], true
	case e < 0 && -e < len(exactPow10):
		return f / exactPow10[-e], true
	}
	return 0, false
}

// isMissing reports whether a trimmed cell is one of the missing tokens.
func (rd *csvReading) isMissing(b []byte) bool {
	if len(rd.d.Missing) > 8 {
		return rd.missing[string(b)]
	}
	for _, m := range rd.d.Missing {
		if string(b) == m {
			return true
		}
	}
	return false
}

// fieldCount is "1 field" or "N fields".
func fieldCount(n int) string {
	if n == 1 {
		return "1 field"
	}
	return fmt.Sprintf("%d fields", n)
}

func quoteList(list []string) string {
	q := make([]string, len(list))
	for i, s := range list {
		q[i] = strconv.Quote(s)
	}
	return strings.Join(q, ", ")
}

func (rd *csvReading) observation(rec [][]byte, g *groupBuilder) error {
	x, ok, err := rd.number(rec, rd.obs, "the value")
	if err != nil {
		return err
	}
	if !ok {
		g.g.Missing++
		rd.out.Missing++
		return nil
	}
	if rd.status >= 0 {
		code := bytes.TrimSpace(rec[rd.status])
		switch {
		case len(code) == 0:
		case rd.left[string(code)]:
			g.left.add(x)
			return nil
		case rd.right[string(code)]:
			g.right.add(x)
			return nil
		default:
			where := fmt.Sprintf("left or right of dataset %q", rd.d.Name)
			if rd.d.fitFlags {
				where = "--left or --right"
			}
			return rd.fail(rd.status, fmt.Sprintf("list it in %s, or leave the cell empty for an exact value", where),
				"unknown status code %q (left: %s; right: %s)", string(code), cmp.Or(quoteList(rd.d.Left), "none"), cmp.Or(quoteList(rd.d.Right), "none"))
		}
	}
	if rd.trials >= 0 {
		cell := bytes.TrimSpace(rec[rd.trials])
		n, perr := strconv.ParseInt(string(cell), 10, 64)
		if perr != nil || n < 0 || n > math.MaxInt32 {
			return rd.fail(rd.trials, "the trials column holds each observation's number of trials, a whole number ≥ 0",
				"trials %q is not a whole number of trials", string(cell))
		}
		if x < 0 || x > float64(n) {
			return rd.fail(rd.obs, "a count of successes lies between 0 and its number of trials",
				"the value %v is outside 0 … %d trials", x, n)
		}
		g.trials.add(int(n))
	}
	g.exact.add(x)
	return nil
}

// interval reads the bounds of one interval-censored row: an empty cell is
// an open bound, other missing tokens make the row missing. Equal bounds
// (an empty interval) and a lower bound above the upper one are errors.
func (rd *csvReading) interval(rec [][]byte, g *groupBuilder) error {
	bound := func(i int, open float64, what string) (float64, bool, error) {
		if len(bytes.TrimSpace(rec[i])) == 0 {
			return open, true, nil
		}
		return rd.number(rec, i, what)
	}
	lo, okl, err := bound(rd.lower, math.Inf(-1), "the lower bound")
	if err != nil {
		return err
	}
	hi, oku, err := bound(rd.upper, math.Inf(1), "the upper bound")
	if err != nil {
		return err
	}
	if !okl || !oku || (math.IsInf(lo, -1) && math.IsInf(hi, 1)) {
		g.g.Missing++
		rd.out.Missing++
		return nil
	}
	if lo >= hi {
		cells := []int{rd.lower, rd.upper}
		if rd.upper < rd.lower {
			cells = []int{rd.upper, rd.lower}
		}
		if lo == hi {
			// Every interval row counts as censored (SPEC.md): a value
			// read to a resolution is the interval of that width.
			return rd.failCells(cells, "record a value read to a resolution as the interval it stands for, e.g. 3.45 and 3.55 for 3.5 read to 0.1",
				"the interval (%v, %v] is empty: lower bound and upper bound are equal", lo, hi)
		}
		return rd.failCells(cells, "swap the bounds if they were entered the wrong way round",
			"lower bound %v is above upper bound %v", lo, hi)
	}
	g.lower.add(lo)
	g.upper.add(hi)
	return nil
}

// columnHint is the hint for a column name that the header lacks: the
// column likely meant (the same name in another letter case, the one column
// whose name holds the name given or is held in it, else a near spelling),
// then the header's names when there are several, but few enough to read at
// a glance.
func columnHint(col string, columns []string) string {
	want := strings.ToLower(strings.TrimSpace(col))
	guess := ""
	var holding []string
	for _, h := range columns {
		have := strings.ToLower(strings.TrimSpace(h))
		if have == want {
			guess = h
			break
		}
		if want != "" && strings.Contains(have, want) || len(have) >= 3 && strings.Contains(want, have) {
			holding = append(holding, h)
		}
	}
	if guess == "" && len(holding) == 1 {
		guess = holding[0]
	}
	if guess == "" {
		guess = Closest(col, columns)
	}
	header := "the header has: " + joinQuoted(columns)
	switch {
	case guess == "":
		return header
	case len(columns) == 1 || len(columns) > 20:
		return fmt.Sprintf("did you mean %q?", guess)
	}
	return fmt.Sprintf("did you mean %q? (%s)", guess, header)
}
