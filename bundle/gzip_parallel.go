package bundle

import (
	"bytes"
	"io"
	"runtime"

	"github.com/klauspost/compress/gzip"
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
//
// The deflate encoder is github.com/klauspost/compress/flate (see
// gzipLevel): pure Go, with no assembly in its flate or gzip packages; on
// amd64 and arm64 it reads little-endian words through unsafe loads, which
// give the same values as encoding/binary's, so its bytes are the same on
// every platform. Bundles are read with the standard library's reader.
const gzipChunk = 1 << 20

// memberWriter compresses what it is given as consecutive gzip members of
// gzipChunk bytes of input each and writes them to w in order. Up to
// 2 × workers members are in flight, so that while the oldest is still
// being compressed (members take 1–4 ms each, by level) a finished worker
// finds the next member waiting instead of idling; at most workers are
// compressed at once. setLevel changes the level of what follows; a chunk
// that has begun is then closed as a shorter member, so that every member
// is made at one level and the bytes depend only on the stream and where
// the level changes.
//
// Chunk buffers, output buffers and encoders are recycled once a member is
// written out, so a stream of any length holds at most 2 × workers + 1 of each
// (fresh 1 MiB buffers for every member cost more in page faults and
// zeroing than the copy into them).
type memberWriter struct {
	w       io.Writer
	level   int
	workers int
	running chan struct{} // holds a token per member being compressed
	cur     *memberJob    // the job whose chunk is being filled, or nil
	pending []chan *memberJob
	free    []*memberJob
	members int
	err     error
}

// memberJob is one member in flight: the input chunk, the compressed
// member and the encoder that made it, all reused by the next job.
type memberJob struct {
	chunk   []byte
	level   int // of the member being made
	out     bytes.Buffer
	zw      *gzip.Writer
	zwLevel int // of zw, which is kept for the next member at that level
	err     error
}

// newMemberWriter compresses on at most workers goroutines; 0 means
// runtime.GOMAXPROCS(0).
func newMemberWriter(w io.Writer, level, workers int) *memberWriter {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	return &memberWriter{w: w, level: level, workers: workers, running: make(chan struct{}, workers)}
}

func (m *memberWriter) Write(p []byte) (int, error) {
	if m.err != nil {
		return 0, m.err
	}
	n := len(p)
	for len(p) > 0 {
		if m.cur == nil {
			m.cur = m.job()
		}
		take := min(len(p), gzipChunk-len(m.cur.chunk))
		m.cur.chunk = append(m.cur.chunk, p[:take]...)
		p = p[take:]
		if len(m.cur.chunk) == gzipChunk {
			m.dispatch()
			if m.err != nil {
				return n - len(p), m.err
			}
		}
	}
	return n, nil
}

// setLevel makes the bytes written from now on compressed at level: the
// chunk begun so far, if any, is dispatched as a member of its own at the
// level it was begun with.
func (m *memberWriter) setLevel(level int) {
	if level == m.level {
		return
	}
	if m.cur != nil && len(m.cur.chunk) > 0 {
		m.dispatch()
	}
	m.level = level
}

// job takes a free job with an empty chunk; a new one when none is free.
func (m *memberWriter) job() *memberJob {
	if k := len(m.free); k > 0 {
		j := m.free[k-1]
		m.free = m.free[:k-1]
		j.chunk = j.chunk[:0]
		return j
	}
	return &memberJob{chunk: make([]byte, 0, gzipChunk)}
}

// dispatch starts compressing the buffered chunk, first writing out the
// oldest member when 2 × workers are already in flight.
func (m *memberWriter) dispatch() {
	for len(m.pending) >= 2*m.workers && m.err == nil {
		m.writeOldest()
	}
	j := m.cur
	if j == nil {
		j = m.job()
	}
	m.cur = nil
	j.level = m.level
	ch := make(chan *memberJob, 1)
	go func() {
		m.running <- struct{}{}
		j.out.Reset()
		j.out.Grow(len(j.chunk)/2 + 1024)
		if j.zw == nil || j.zwLevel != j.level {
			j.zw, j.err = gzip.NewWriterLevel(&j.out, j.level)
			j.zwLevel = j.level
		} else {
			j.zw.Reset(&j.out)
		}
		if j.err == nil {
			// gzip.Header left at its zero value: no name, no comment,
			// MTIME 0, OS 255 (unknown), as the standard library writes.
			if _, j.err = j.zw.Write(j.chunk); j.err == nil {
				j.err = j.zw.Close()
			}
		}
		<-m.running
		ch <- j
	}()
	m.pending = append(m.pending, ch)
	m.members++
}

func (m *memberWriter) writeOldest() {
	j := <-m.pending[0]
	m.pending = m.pending[1:]
	defer func() {
		if j.err == nil {
			m.free = append(m.free, j)
		}
	}()
	if m.err != nil {
		return
	}
	if j.err != nil {
		m.err = j.err
		return
	}
	_, m.err = m.w.Write(j.out.Bytes())
}

// Close compresses the rest (one member at least) and writes every member.
func (m *memberWriter) Close() error {
	if m.cur != nil || m.members == 0 {
		m.dispatch()
	}
	for len(m.pending) > 0 {
		m.writeOldest()
	}
	return m.err
}
