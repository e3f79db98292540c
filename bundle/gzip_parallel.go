package bundle

import (
	"bytes"
	"compress/gzip"
	"io"
	"runtime"
)

// gzipChunk is the size of the tar stream compressed as one gzip member.
//
// A gzip file is a series of members (RFC 1952, section 2.2), each with its
// own header, deflate stream and CRC; every gzip reader concatenates them.
// Cutting the tar stream at fixed 1 MiB boundaries lets the members be
// compressed on all cores at once while the bytes depend only on the
// stream, never on the number of cores. A stream of at most 1 MiB (every
// small bundle) is one member, exactly the single-stream gzip of the same
// level. Each member restarts deflate's 32 KiB window, which costs a few
// hundred bytes per MiB; measured with BenchmarkGzipParallel
// (gzip_parallel_test.go) on the 200-dataset bench bundle.
const gzipChunk = 1 << 20

// memberWriter compresses what it is given as consecutive gzip members of
// gzipChunk bytes of input each, at most workers at a time, and writes
// them to w in order.
type memberWriter struct {
	w       io.Writer
	level   int
	workers int
	buf     []byte
	pending []chan compressed
	members int
	err     error
}

type compressed struct {
	data []byte
	err  error
}

// newMemberWriter compresses on at most workers goroutines; 0 means
// runtime.GOMAXPROCS(0).
func newMemberWriter(w io.Writer, level, workers int) *memberWriter {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	return &memberWriter{w: w, level: level, workers: workers}
}

func (m *memberWriter) Write(p []byte) (int, error) {
	if m.err != nil {
		return 0, m.err
	}
	n := len(p)
	for len(p) > 0 {
		take := min(len(p), gzipChunk-len(m.buf))
		m.buf = append(m.buf, p[:take]...)
		p = p[take:]
		if len(m.buf) == gzipChunk {
			m.dispatch()
			if m.err != nil {
				return n - len(p), m.err
			}
		}
	}
	return n, nil
}

// dispatch starts compressing the buffered chunk, first writing out the
// oldest finished member when workers are already busy.
func (m *memberWriter) dispatch() {
	for len(m.pending) >= m.workers && m.err == nil {
		m.writeOldest()
	}
	chunk := m.buf
	m.buf = make([]byte, 0, gzipChunk)
	ch := make(chan compressed, 1)
	go func(level int) {
		var out bytes.Buffer
		out.Grow(len(chunk) / 2)
		zw, err := gzip.NewWriterLevel(&out, level)
		if err == nil {
			// gzip.Header left at its zero value: no name, no comment, MTIME 0.
			if _, err = zw.Write(chunk); err == nil {
				err = zw.Close()
			}
		}
		ch <- compressed{out.Bytes(), err}
	}(m.level)
	m.pending = append(m.pending, ch)
	m.members++
}

func (m *memberWriter) writeOldest() {
	c := <-m.pending[0]
	m.pending = m.pending[1:]
	if m.err != nil {
		return
	}
	if c.err != nil {
		m.err = c.err
		return
	}
	_, m.err = m.w.Write(c.data)
}

// Close compresses the rest (one member at least) and writes every member.
func (m *memberWriter) Close() error {
	if len(m.buf) > 0 || m.members == 0 {
		m.dispatch()
	}
	for len(m.pending) > 0 {
		m.writeOldest()
	}
	return m.err
}
