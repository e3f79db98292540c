package runner

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"unicode/utf8"
)

// recordReader splits a CSV stream into records exactly as encoding/csv's
// Reader does with FieldsPerRecord = -1 and the other options at their
// defaults (RFC 4180 quoting, no comments, no lazy quotes, no trimming):
// the same records, the same field positions, the same *csv.ParseError
// values. Unlike csv.Reader it hands out each record's fields as byte
// slices of one reused buffer, valid until the next read, instead of
// making a string per record: reading a data file then allocates nothing
// per row. FuzzRecordReader checks it against encoding/csv on arbitrary
// input. The code follows encoding/csv's readLine and readRecord (Go 1.26)
// step for step.
type recordReader struct {
	r     *bufio.Reader
	comma rune

	numLine   int
	rawBuffer []byte // a line longer than the bufio buffer

	record    []byte     // the unquoted bytes of every field, in order
	ends      []int      // each field's end in record
	positions []position // each field's first line and column
	fields    [][]byte
	// blank are the lines skipped as blank (a line break alone, \r\n
	// included) before the last record read, or before the end of the
	// stream; encoding/csv skips them without a trace.
	blank []int
	errAt position // where the field of the last *csv.ParseError starts
}

type position struct{ line, col int }

// errInvalidDelim is encoding/csv's error for an unusable delimiter.
var errInvalidDelim = errors.New("csv: invalid field or comment delimiter")

func newRecordReader(r *bufio.Reader, comma rune) *recordReader {
	return &recordReader{r: r, comma: comma}
}

// fieldPos returns the line and 1-based byte column where field i of the
// last record read starts (csv.Reader.FieldPos).
func (r *recordReader) fieldPos(i int) (line, col int) {
	p := r.positions[i]
	return p.line, p.col
}

// errField returns the 0-based index of the field in which the last read
// met its *csv.ParseError (the fields before it are complete), and the
// line and byte column where that field starts.
func (r *recordReader) errField() (field, line, col int) {
	return len(r.ends), r.errAt.line, r.errAt.col
}

func (r *recordReader) readLine() ([]byte, error) {
	line, err := r.r.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		r.rawBuffer = append(r.rawBuffer[:0], line...)
		for err == bufio.ErrBufferFull {
			line, err = r.r.ReadSlice('\n')
			r.rawBuffer = append(r.rawBuffer, line...)
		}
		line = r.rawBuffer
	}
	readSize := len(line)
	if readSize > 0 && err == io.EOF {
		err = nil
		// csv.Reader drops a trailing \r before EOF.
		if line[readSize-1] == '\r' {
			line = line[:readSize-1]
		}
	}
	r.numLine++
	// \r\n becomes \n on every line.
	if n := len(line); n >= 2 && line[n-2] == '\r' && line[n-1] == '\n' {
		line[n-2] = '\n'
		line = line[:n-1]
	}
	return line, err
}

func lengthNL(b []byte) int {
	if len(b) > 0 && b[len(b)-1] == '\n' {
		return 1
	}
	return 0
}

func nextRune(b []byte) rune {
	r, _ := utf8.DecodeRune(b)
	return r
}

func validDelim(r rune) bool {
	return r != 0 && r != '"' && r != '\r' && r != '\n' && utf8.ValidRune(r) && r != utf8.RuneError
}

// read returns the next record's fields, or io.EOF after the last one. A
// malformed record gives a *csv.ParseError.
func (r *recordReader) read() ([][]byte, error) {
	if !validDelim(r.comma) {
		return nil, errInvalidDelim
	}
	var line []byte
	var errRead error
	r.blank = r.blank[:0]
	for errRead == nil {
		line, errRead = r.readLine()
		if errRead == nil && len(line) == lengthNL(line) {
			if len(line) == 1 {
				// A line break alone; not the "" left of a lone \r
				// ending the file.
				r.blank = append(r.blank, r.numLine)
			}
			line = nil
			continue // blank lines are skipped
		}
		break
	}
	if errRead == io.EOF {
		return nil, errRead
	}

	var err error
	const quoteLen = len(`"`)
	commaLen := utf8.RuneLen(r.comma)
	recLine := r.numLine
	r.record = r.record[:0]
	r.ends = r.ends[:0]
	r.positions = r.positions[:0]
	pos := position{line: r.numLine, col: 1}
parseField:
	for {
		if len(line) == 0 || line[0] != '"' {
			// An unquoted field.
			var i int
			if r.comma < utf8.RuneSelf {
				i = bytes.IndexByte(line, byte(r.comma))
			} else {
				i = bytes.IndexRune(line, r.comma)
			}
			field := line
			if i >= 0 {
				field = field[:i]
			} else {
				field = field[:len(field)-lengthNL(field)]
			}
			if j := bytes.IndexByte(field, '"'); j >= 0 {
				err = &csv.ParseError{StartLine: recLine, Line: r.numLine, Column: pos.col + j, Err: csv.ErrBareQuote}
				r.errAt = pos
				break parseField
			}
			r.record = append(r.record, field...)
			r.ends = append(r.ends, len(r.record))
			r.positions = append(r.positions, pos)
			if i >= 0 {
				line = line[i+commaLen:]
				pos.col += i + commaLen
				continue parseField
			}
			break parseField
		}
		// A quoted field.
		fieldPos := pos
		line = line[quoteLen:]
		pos.col += quoteLen
		for {
			i := bytes.IndexByte(line, '"')
			if i >= 0 {
				r.record = append(r.record, line[:i]...)
				line = line[i+quoteLen:]
				pos.col += i + quoteLen
				switch rn := nextRune(line); {
				case rn == '"': // "" is a quote
					r.record = append(r.record, '"')
					line = line[quoteLen:]
					pos.col += quoteLen
				case rn == r.comma: // ", ends the field
					line = line[commaLen:]
					pos.col += commaLen
					r.ends = append(r.ends, len(r.record))
					r.positions = append(r.positions, fieldPos)
					continue parseField
				case lengthNL(line) == len(line): // "\n ends the record
					r.ends = append(r.ends, len(r.record))
					r.positions = append(r.positions, fieldPos)
					break parseField
				default: // a quote inside a quoted field
					err = &csv.ParseError{StartLine: recLine, Line: r.numLine, Column: pos.col - quoteLen, Err: csv.ErrQuote}
					r.errAt = fieldPos
					break parseField
				}
			} else if len(line) > 0 {
				// The field goes on past the end of the line.
				r.record = append(r.record, line...)
				if errRead != nil {
					break parseField
				}
				pos.col += len(line)
				line, errRead = r.readLine()
				if len(line) > 0 {
					pos.line++
					pos.col = 1
				}
				if errRead == io.EOF {
					errRead = nil
				}
			} else {
				// The file ends inside the quotes.
				if errRead == nil {
					err = &csv.ParseError{StartLine: recLine, Line: pos.line, Column: pos.col, Err: csv.ErrQuote}
					r.errAt = fieldPos
					break parseField
				}
				r.ends = append(r.ends, len(r.record))
				r.positions = append(r.positions, fieldPos)
				break parseField
			}
		}
	}
	if err == nil {
		err = errRead
	}
	r.fields = r.fields[:0]
	start := 0
	for _, end := range r.ends {
		r.fields = append(r.fields, r.record[start:end:end])
		start = end
	}
	return r.fields, err
}
