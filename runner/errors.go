package runner

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"unicode/utf8"
)

// ProjectError is a problem in the project file: the file, the line where
// the key was found (0 when it cannot be told), the key path such as
// "analysis[2].quantiles[0]", what is wrong, and a hint saying what to do.
type ProjectError struct {
	File string
	Line int
	Key  string
	Msg  string
	Hint string
	Err  error // an underlying cause, if any
}

func (e *ProjectError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Key != "" {
		b.WriteString(": ")
		b.WriteString(e.Key)
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

func (e *ProjectError) Unwrap() error { return e.Err }

// ProjectErrors is every problem found in one project file, in file order
// as far as it can be told.
type ProjectErrors []*ProjectError

func (es ProjectErrors) Error() string {
	msgs := make([]string, len(es))
	for i, e := range es {
		msgs[i] = e.Error()
	}
	return strings.Join(msgs, "\n")
}

// Unwrap lets errors.As find each *ProjectError.
func (es ProjectErrors) Unwrap() []error {
	out := make([]error, len(es))
	for i, e := range es {
		out[i] = e
	}
	return out
}

// DataError is a problem in a data file, named by file, line and, where
// one or more cells are at fault, their columns by header name:
// `life.csv line 7, column "hours": the value "45O" is not a number`.
// Without cells it reads `life.csv line 3: …` (the whole line at fault,
// the header being line 1) or `life.csv: …` (the whole file).
type DataError struct {
	File string
	Line int
	// Column is the 1-based byte position in the line where the first cell
	// at fault starts (as encoding/csv counts), 0 when no cell is; it is for
	// programs, the message names Cells instead.
	Column int
	// Cells are the columns of the cells at fault, in header order.
	Cells []DataColumn
	Msg   string
	Hint  string
	Err   error
}

// DataColumn is a column of a data file: its 1-based position in the
// header and its name there ("" when the header leaves it unnamed).
type DataColumn struct {
	Position int
	Name     string
}

// String names the column as a reader of the file would: its header name
// quoted, or its position when the header gives it no usable name.
func (c DataColumn) String() string {
	if strings.TrimSpace(c.Name) != "" && utf8.ValidString(c.Name) {
		return strconv.Quote(c.Name)
	}
	return strconv.Itoa(c.Position)
}

func (e *DataError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	switch {
	case e.Line > 0 && len(e.Cells) > 0:
		fmt.Fprintf(&b, " line %d, column", e.Line)
		if len(e.Cells) > 1 {
			b.WriteString("s")
		}
		for i, c := range e.Cells {
			switch {
			case i == 0:
				b.WriteString(" ")
			case i == len(e.Cells)-1:
				b.WriteString(" and ")
			default:
				b.WriteString(", ")
			}
			b.WriteString(c.String())
		}
	case e.Line > 0:
		fmt.Fprintf(&b, " line %d", e.Line)
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

func (e *DataError) Unwrap() error { return e.Err }

// Hints returns the hints carried by err's project and data errors, in
// order and without repeats, for a command line to print after the error.
func Hints(err error) []string {
	var out []string
	seen := map[string]bool{}
	add := func(h string) {
		if h != "" && !seen[h] {
			seen[h] = true
			out = append(out, h)
		}
	}
	var pes ProjectErrors
	var pe *ProjectError
	var de *DataError
	switch {
	case errors.As(err, &pes):
		for _, e := range pes {
			add(e.Hint)
		}
	case errors.As(err, &pe):
		add(pe.Hint)
	case errors.As(err, &de):
		add(de.Hint)
	}
	return out
}

// Closest returns the candidate nearest to s by edit distance, if it is
// near enough to be a likely typo (distance at most 2, or at most a third of
// the word for long words), and "" otherwise: for project keys and family
// names. The command line's flags and commands have their own (cmd/fitseal's
// nearest: several names, one-letter flags, unique beginnings).
func Closest(s string, candidates []string) string {
	best, bestD := "", -1
	limit := max(2, len(s)/3)
	for _, c := range candidates {
		d := EditDistance(strings.ToLower(s), strings.ToLower(c))
		if d <= limit && (bestD < 0 || d < bestD) {
			best, bestD = c, d
		}
	}
	return best
}

// didYouMean is a hint naming the closest candidate, or "".
func didYouMean(s string, candidates []string) string {
	if c := Closest(s, candidates); c != "" {
		return fmt.Sprintf("did you mean %q?", c)
	}
	return ""
}

// EditDistance is the optimal-string-alignment distance between a and b,
// in runes: insertions, deletions, substitutions and transpositions of
// adjacent runes each count one ("verfiy" is one edit from "verify", not
// two). Wagner–Fischer's table with the transposition step:
//
//	d[i][j] = min(d[i−1][j] + 1, d[i][j−1] + 1, d[i−1][j−1] + [aᵢ ≠ bⱼ],
//	              d[i−2][j−2] + 1 when aᵢ = bⱼ₋₁ and aᵢ₋₁ = bⱼ).
func EditDistance(a, b string) int {
	x, y := []rune(a), []rune(b)
	// d[i][j] is the distance between x[:i] and y[:j].
	d := make([][]int, len(x)+1)
	for i := range d {
		d[i] = make([]int, len(y)+1)
		d[i][0] = i
	}
	for j := range d[0] {
		d[0][j] = j
	}
	for i := 1; i <= len(x); i++ {
		for j := 1; j <= len(y); j++ {
			cost := 1
			if x[i-1] == y[j-1] {
				cost = 0
			}
			d[i][j] = min(d[i-1][j]+1, d[i][j-1]+1, d[i-1][j-1]+cost)
			if i > 1 && j > 1 && x[i-1] == y[j-2] && x[i-2] == y[j-1] {
				d[i][j] = min(d[i][j], d[i-2][j-2]+1)
			}
		}
	}
	return d[len(x)][len(y)]
}
