package main

import (
	"bytes"
	"io"
	"os"
	"runtime/debug"
	"slices"

	"fitseal/runner"
)

// largeDataRows is the number of data rows from which fit sets a soft
// memory limit: 1<<20 rows of one float64 are 8 MiB, below which the
// garbage collector's default headroom (the heap may grow to twice what is
// live) costs little.
const largeDataRows = 1 << 20

// heapPerRow is the soft limit's allowance per data row, in bytes: three
// float64 (24 bytes), the data plus one transformed copy that a fit
// borrows plus headroom, so that the process stays under 4× the data's
// size as float64 (issue 8) without the garbage collector running on
// every allocation.
const heapPerRow = 24

// limitMemory sets a soft memory limit (runtime/debug.SetMemoryLimit) of
// held + heapPerRow·rows bytes, held being bytes the command keeps in
// memory besides the data. It does nothing
// when rows < largeDataRows, or when the user has set GOMEMLIMIT, which
// then rules. The limit is soft: the collector works harder near it but
// never fails an allocation, and results do not depend on it.
func limitMemory(rows, held int64) {
	if rows < largeDataRows || os.Getenv("GOMEMLIMIT") != "" {
		return
	}
	debug.SetMemoryLimit(held + heapPerRow*rows)
}

// countLines returns the number of newline characters in r, an upper
// bound on its CSV data rows.
func countLines(r io.Reader) (int64, error) {
	buf := make([]byte, 1<<16)
	var n int64
	for {
		k, err := r.Read(buf)
		n += int64(bytes.Count(buf[:k], []byte{'\n'}))
		if err == io.EOF {
			return n, nil
		}
		if err != nil {
			return n, err
		}
	}
}

// limitMemoryForFile sets limitMemory from the lines of the CSV file at
// path (`fit`: its one dataset is the data); a file that cannot be read is
// left to the reader to report.
func limitMemoryForFile(path string) {
	if n, ok := fileLines(path); ok {
		limitMemory(n, 0)
	}
}

// fileLines counts the lines of the file at path; ok is false when it
// cannot be read.
func fileLines(path string) (int64, bool) {
	f, err := os.Open(path)
	if err != nil {
		return 0, false
	}
	defer f.Close()
	n, err := countLines(f)
	return n, err == nil
}

// limitMemoryForProject sets `run`'s limit only where one dataset is large:
// some data file read whole, without split_by, has at least largeDataRows
// lines. The limit then allows heapPerRow for every line of every data
// file. A file split into groups never sets it: a project's rows may form
// thousands of small datasets whose results, not the data, fill the heap,
// and a limit sized from the rows made the garbage collector run
// constantly (2,000 datasets of 1,000 values: 6.9 s with the limit, 3.5 s
// without).
//
// Files are read only when some dataset reads its file whole: a project of
// split files alone (the batch workload: 14 MB of CSV) is not read twice.
func limitMemoryForProject(p *runner.Project) {
	files := projectDataFiles(p)
	if !slices.ContainsFunc(files, func(f dataFile) bool { return f.whole }) {
		return
	}
	var total int64
	large := false
	for _, f := range files {
		n, ok := fileLines(f.path)
		if !ok {
			return // the reader reports it
		}
		total += n
		large = large || (f.whole && n >= largeDataRows)
	}
	if large {
		limitMemory(total, 0)
	}
}
