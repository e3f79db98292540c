package runner

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
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
	Rows     int
	Filtered int
	Missing  int
}

// ReadDataset reads the dataset's file (relative to the project folder);
// errors are [*DataError] naming the file as the project gives it.
func ReadDataset(p *Project, d *Dataset) (*DatasetData, error) {
	f, err := os.Open(d.Path(p))
	if err != nil {
		return nil, &DataError{File: d.File, Msg: fmt.Sprintf("cannot open: %v", unwrapPathError(err)), Err: err}
	}
	defer f.Close()
	return ReadCSV(d.File, f, d)
}

// ReadCSV reads a dataset from r, streaming it row by row; name is the
// file's name for errors. A UTF-8 byte-order mark is skipped.
func ReadCSV(name string, r io.Reader, d *Dataset) (*DatasetData, error) {
	br := bufio.NewReaderSize(r, 64<<10)
	if bom, err := br.Peek(3); err == nil && bytes.Equal(bom, []byte{0xEF, 0xBB, 0xBF}) {
		br.Discard(3)
	}
	cr := csv.NewReader(br)
	cr.ReuseRecord = true
	cr.FieldsPerRecord = -1
	if d.Delimiter != "" {
		cr.Comma, _ = utf8.DecodeRuneInString(d.Delimiter)
	}
	rd := &csvReading{name: name, d: d, cr: cr, out: &DatasetData{Dataset: d}}
	if err := rd.header(); err != nil {
		return nil, err
	}
	if err := rd.rows(); err != nil {
		return nil, err
	}
	if d.SplitBy == "" && len(rd.out.Groups) == 0 {
		rd.out.Groups = []*Group{{}}
	}
	return rd.out, nil
}

// csvReading is the state of one pass over a data file.
type csvReading struct {
	name string
	d    *Dataset
	cr   *csv.Reader
	out  *DatasetData

	columns                           []string
	obs, status, lower, upper, trials int // column indexes, -1 when unused
	split, where                      int
	byName                            map[string]*Group
	left, right, missing              map[string]bool
	line                              int
}

func (rd *csvReading) fail(field int, hint, format string, args ...any) error {
	line, col := rd.line, 0
	if field >= 0 {
		line, col = rd.cr.FieldPos(field)
	}
	return &DataError{File: rd.name, Line: line, Column: col, Msg: fmt.Sprintf(format, args...), Hint: hint}
}

func (rd *csvReading) csvError(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &DataError{File: rd.name, Line: pe.Line, Column: pe.Column, Msg: "not valid CSV: " + pe.Err.Error(),
			Hint: "a field with the delimiter, a quote or a line break must be quoted, quotes doubled inside", Err: err}
	}
	return &DataError{File: rd.name, Msg: "cannot read: " + err.Error(), Err: err}
}

func (rd *csvReading) header() error {
	rec, err := rd.cr.Read()
	if err == io.EOF {
		return &DataError{File: rd.name, Line: 1, Msg: "the file is empty: it needs a header row naming the columns"}
	}
	if err != nil {
		return rd.csvError(err)
	}
	rd.line, _ = rd.cr.FieldPos(0)
	rd.columns = append([]string(nil), rec...)
	for i, h := range rd.columns {
		if !utf8.ValidString(h) {
			return rd.fail(i, "save the file as UTF-8", "the header is not valid UTF-8")
		}
		for j := 0; j < i; j++ {
			if rd.columns[j] == h && h != "" {
				return rd.fail(i, "give every column its own name", "column %q appears twice in the header", h)
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
		hint := didYouMean(col, rd.columns)
		if hint == "" {
			hint = "the header has: " + joinQuoted(rd.columns)
		}
		return -1, &DataError{File: rd.name, Line: rd.line, Msg: fmt.Sprintf("no column %q (named by %s in dataset %q)", col, key, rd.d.Name), Hint: hint}
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
	rd.byName = map[string]*Group{}
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
		rec, err := rd.cr.Read()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return rd.csvError(err)
		}
		rd.line, _ = rd.cr.FieldPos(0)
		if len(rec) != len(rd.columns) {
			if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
				continue // a blank line
			}
			return rd.fail(-1, "every row needs one field per header column; quote fields that contain the delimiter",
				"the row has %d fields, the header %d", len(rec), len(rd.columns))
		}
		rd.out.Rows++
		if rd.where >= 0 && rec[rd.where] != rd.d.Where.Equals {
			rd.out.Filtered++
			continue
		}
		g, err := rd.group(rec)
		if err != nil {
			return err
		}
		g.Rows++
		if rd.d.Interval() {
			err = rd.interval(rec, g)
		} else {
			err = rd.observation(rec, g)
		}
		if err != nil {
			return err
		}
	}
}

func (rd *csvReading) group(rec []string) (*Group, error) {
	if rd.split < 0 {
		if len(rd.out.Groups) == 0 {
			rd.out.Groups = []*Group{{}}
		}
		return rd.out.Groups[0], nil
	}
	key := rec[rd.split]
	if g, ok := rd.byName[key]; ok {
		return g, nil
	}
	if strings.TrimSpace(key) == "" {
		return nil, rd.fail(rd.split, "fill in the group, or leave the row out with where = { … }", "the split_by column %q is empty", rd.d.SplitBy)
	}
	if !utf8.ValidString(key) {
		return nil, rd.fail(rd.split, "save the file as UTF-8", "the group name is not valid UTF-8")
	}
	g := &Group{Name: key}
	rd.byName[key] = g
	rd.out.Groups = append(rd.out.Groups, g)
	return g, nil
}

// number parses one observation cell; ok is false for a missing cell.
func (rd *csvReading) number(rec []string, i int, what string) (x float64, ok bool, err error) {
	cell := strings.TrimSpace(rec[i])
	if rd.missing[cell] {
		return 0, false, nil
	}
	x, perr := strconv.ParseFloat(cell, 64)
	if perr != nil {
		var ne *strconv.NumError
		if errors.As(perr, &ne) && ne.Err == strconv.ErrRange {
			return 0, false, rd.fail(i, "", "%s %q is out of the range of a float64", what, cell)
		}
		hint := "write numbers with a '.' decimal point and no thousands separators"
		if len(rd.d.Missing) > 0 {
			hint += fmt.Sprintf("; missing cells must be one of %s", quoteList(rd.d.Missing))
		}
		return 0, false, rd.fail(i, hint, "%s %q is not a number", what, cell)
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, false, rd.fail(i, fmt.Sprintf("mark missing values with one of %s instead", quoteList(rd.d.Missing)),
			"%s %q is not a finite number", what, cell)
	}
	return x, true, nil
}

func quoteList(list []string) string {
	q := make([]string, len(list))
	for i, s := range list {
		q[i] = strconv.Quote(s)
	}
	return strings.Join(q, ", ")
}

func (rd *csvReading) observation(rec []string, g *Group) error {
	x, ok, err := rd.number(rec, rd.obs, "the value")
	if err != nil {
		return err
	}
	if !ok {
		g.Missing++
		rd.out.Missing++
		return nil
	}
	if rd.status >= 0 {
		code := strings.TrimSpace(rec[rd.status])
		switch {
		case code == "":
		case rd.left[code]:
			g.Data.Left = append(g.Data.Left, x)
			return nil
		case rd.right[code]:
			g.Data.Right = append(g.Data.Right, x)
			return nil
		default:
			return rd.fail(rd.status, fmt.Sprintf("list it in left or right of dataset %q, or leave the cell empty for an exact value", rd.d.Name),
				"unknown status code %q (left: %s; right: %s)", code, quoteList(rd.d.Left), quoteList(rd.d.Right))
		}
	}
	if rd.trials >= 0 {
		cell := strings.TrimSpace(rec[rd.trials])
		n, perr := strconv.ParseInt(cell, 10, 64)
		if perr != nil || n < 0 || n > math.MaxInt32 {
			return rd.fail(rd.trials, "the trials column holds each observation's number of trials, a whole number ≥ 0",
				"trials %q is not a whole number of trials", cell)
		}
		if x < 0 || x > float64(n) {
			return rd.fail(rd.obs, "a count of successes lies between 0 and its number of trials",
				"the value %v is outside 0 … %d trials", x, n)
		}
		g.Data.Trials = append(g.Data.Trials, int(n))
	}
	g.Data.Exact = append(g.Data.Exact, x)
	return nil
}

// interval reads the bounds of one interval-censored row: an empty cell is
// an open bound, other missing tokens make the row missing.
func (rd *csvReading) interval(rec []string, g *Group) error {
	bound := func(i int, open float64, what string) (float64, bool, error) {
		if strings.TrimSpace(rec[i]) == "" {
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
		g.Missing++
		rd.out.Missing++
		return nil
	}
	if !(lo < hi) {
		return rd.fail(rd.upper, "an interval (lower, upper] needs lower < upper; record values known exactly in a separate dataset with column = …",
			"the interval (%v, %v] is empty", lo, hi)
	}
	g.Data.Lower = append(g.Data.Lower, lo)
	g.Data.Upper = append(g.Data.Upper, hi)
	return nil
}
