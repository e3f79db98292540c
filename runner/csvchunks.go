package runner

import (
	"bufio"
	"bytes"
	"io"
	"sync"
)

// csvChunkSize is the size of the pieces a data file is cut into to be
// parsed on several cores (rowsChunked).
const csvChunkSize = 1 << 20

// rowsChunked reads the rows after the header as rows does, but parses
// them on up to workers goroutines: the stream is cut into chunks of about
// chunkSize bytes, each ending just after a line break, and each chunk is
// parsed into groups of its own, which are then merged in file order. The
// result — groups and their order, values and their order, counts, and
// the first error with its line and column — is the same as rows gives
// (TestReadCSVChunked and FuzzReadCSVChunked compare the two), whatever
// the number of workers or the chunk size.
//
// Cutting at a line break is cutting between records only while no field
// is quoted (a quoted field may hold a line break), so from the first
// chunk that holds a quote character on, the rest of the stream is read
// by rows itself, one record after another.
func (rd *csvReading) rowsChunked(br *bufio.Reader, workers, chunkSize int) error {
	type job struct {
		part *csvReading
		err  error
		done chan struct{}
	}
	var pending []*job
	var pool sync.Pool // chunk buffers
	sem := make(chan struct{}, workers)
	// mergeOldest waits for the oldest chunk and adds it to rd.
	mergeOldest := func() error {
		j := pending[0]
		pending = pending[1:]
		<-j.done
		if j.err != nil {
			return j.err
		}
		rd.merge(j.part)
		return nil
	}
	wait := func() error {
		for len(pending) > 0 {
			if err := mergeOldest(); err != nil {
				// Let the chunks under way finish before returning.
				for _, j := range pending {
					<-j.done
				}
				return err
			}
		}
		return nil
	}
	line := rd.rr.numLine + 1 // the line the next chunk starts on
	var carry []byte          // bytes after the last line break read so far
	for {
		buf, _ := pool.Get().(*[]byte)
		if buf == nil {
			b := make([]byte, 0, chunkSize)
			buf = &b
		}
		chunk := append((*buf)[:0], carry...)
		chunk, eof, err := readChunk(br, chunk, chunkSize)
		if err != nil {
			wait()
			return rd.csvError(err)
		}
		cut := len(chunk)
		if !eof {
			cut = bytes.LastIndexByte(chunk, '\n') + 1
		}
		carry = append(carry[:0], chunk[cut:]...)
		chunk = chunk[:cut]
		if bytes.IndexByte(chunk, '"') >= 0 {
			// A quoted field: parse the rest in order with rows.
			if err := wait(); err != nil {
				return err
			}
			rest := io.MultiReader(bytes.NewReader(append(chunk, carry...)), br)
			rd.rr = newRecordReader(bufio.NewReaderSize(rest, 64<<10), rd.rr.comma)
			rd.rr.numLine = line - 1
			return rd.rows()
		}
		if len(chunk) > 0 {
			j := &job{part: rd.forChunk(chunk, line), done: make(chan struct{})}
			line += bytes.Count(chunk, []byte{'\n'})
			pending = append(pending, j)
			sem <- struct{}{}
			go func(buf *[]byte, chunk []byte) {
				defer func() { <-sem }()
				j.err = j.part.rows()
				*buf = chunk[:0]
				pool.Put(buf)
				close(j.done)
			}(buf, chunk)
		}
		// Keep at most workers+1 chunks in memory.
		for len(pending) > workers {
			if err := mergeOldest(); err != nil {
				wait()
				return err
			}
		}
		if eof {
			return wait()
		}
	}
}

// readChunk appends to chunk from br until it holds at least chunkSize
// bytes and a line break, or the stream ends (eof). A line longer than
// chunkSize makes the chunk longer.
func readChunk(br *bufio.Reader, chunk []byte, chunkSize int) (_ []byte, eof bool, err error) {
	lineBreak := bytes.IndexByte(chunk, '\n') >= 0
	for {
		if len(chunk) == cap(chunk) {
			chunk = append(chunk, 0)[:len(chunk)]
		}
		n, err := br.Read(chunk[len(chunk):cap(chunk)])
		fresh := chunk[len(chunk) : len(chunk)+n]
		chunk = chunk[:len(chunk)+n]
		lineBreak = lineBreak || bytes.IndexByte(fresh, '\n') >= 0
		switch {
		case err == io.EOF:
			return chunk, true, nil
		case err != nil:
			return chunk, false, err
		case len(chunk) >= chunkSize && lineBreak:
			return chunk, false, nil
		}
	}
}

// forChunk returns a reading of one chunk that starts on line firstLine:
// rd's columns and settings, and groups of its own.
func (rd *csvReading) forChunk(chunk []byte, firstLine int) *csvReading {
	part := *rd
	part.out = &DatasetData{Dataset: rd.d}
	part.byName = map[string]*groupBuilder{}
	part.builders, part.last = nil, nil
	part.rr = newRecordReader(bufio.NewReaderSize(bytes.NewReader(chunk), 64<<10), rd.rr.comma)
	part.rr.numLine = firstLine - 1
	return &part
}

// merge adds a parsed chunk's rows to rd: each of its groups joins rd's
// group of that name (a new one, in the chunk's order of first appearance,
// when rd has none), values appended after those already read.
func (rd *csvReading) merge(part *csvReading) {
	rd.out.Rows += part.out.Rows
	rd.out.Filtered += part.out.Filtered
	rd.out.Missing += part.out.Missing
	rd.out.BlankLines += part.out.BlankLines
	for _, pb := range part.builders {
		var b *groupBuilder
		switch {
		case rd.split < 0 && len(rd.builders) > 0:
			b = rd.builders[0]
		case rd.split < 0:
			b = rd.newGroup("")
		default:
			if b = rd.byName[pb.g.Name]; b == nil {
				b = rd.newGroup(pb.g.Name)
				rd.byName[b.g.Name] = b
			}
		}
		b.g.Rows += pb.g.Rows
		b.g.Missing += pb.g.Missing
		b.exact.appendColumn(&pb.exact)
		b.left.appendColumn(&pb.left)
		b.right.appendColumn(&pb.right)
		b.lower.appendColumn(&pb.lower)
		b.upper.appendColumn(&pb.upper)
		b.trials.appendColumn(&pb.trials)
	}
}
