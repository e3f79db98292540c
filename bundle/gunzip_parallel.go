package bundle

import (
	"bytes"
	"compress/gzip"
	"errors"
	"io"
	"sync"
)

// memberStart is how every gzip member that fitseal writes begins: ID1,
// ID2, CM = 8 (deflate) and FLG = 0 (RFC 1952, section 2.3).
var memberStart = []byte{0x1f, 0x8b, 0x08, 0x00}

// errSplitFailed says that the stream could not be decompressed in the
// pieces it was cut into; ReadArchive then reads it in one piece.
var errSplitFailed = errors.New("the gzip stream could not be read in pieces")

// splitReader decompresses a multi-member gzip stream held in memory on up
// to workers goroutines, handing out the decompressed bytes in order.
//
// The stream is cut before every occurrence of memberStart, and each piece
// is read as a multi-member gzip stream of its own with the standard
// library's reader, which checks every member's CRC-32 and length. A cut
// that is not a member's start lies inside a member that began in an
// earlier piece, so that piece ends inside a member and fails; any failure
// (a damaged stream among them) makes Read return errSplitFailed, and the
// caller reads the whole stream again in one piece, where the error, if
// there is one, is found and reported as before. So whenever the pieces
// all succeed, their bytes are exactly those of reading the stream in one
// piece. At most 2·workers pieces of at most maxPiece bytes each are held
// decompressed at a time.
type splitReader struct {
	pieces  [][]byte
	next    int // the next piece to start decompressing
	pending []chan piece
	cur     []byte
	buf     *[]byte // the buffer cur lies in, returned once it is served
	workers int
	budget  int64 // decompressed bytes still allowed
	failed  bool
}

// piece is one decompressed piece (nil data when it failed) and the
// buffer that holds it.
type piece struct {
	data []byte
	buf  *[]byte
}

// newSplitReader cuts data into pieces; budget bounds the decompressed
// bytes (a piece beyond it fails, and the one-piece read then reports the
// limit).
func newSplitReader(data []byte, workers int, budget int64) *splitReader {
	var cuts []int
	for i := 0; ; {
		k := bytes.Index(data[i:], memberStart)
		if k < 0 {
			break
		}
		cuts = append(cuts, i+k)
		i += k + 1
	}
	s := &splitReader{workers: max(1, workers), budget: budget}
	if len(cuts) == 0 || cuts[0] != 0 {
		s.pieces = [][]byte{data}
	} else {
		for j, c := range cuts {
			end := len(data)
			if j+1 < len(cuts) {
				end = cuts[j+1]
			}
			s.pieces = append(s.pieces, data[c:end])
		}
	}
	return s
}

// maxPiece bounds one piece's decompressed bytes: fitseal's members hold
// gzipChunk bytes of tar each, and a larger piece (another writer's single
// member, or a bomb) is left to the one-piece read, which streams it and
// refuses a bomb by its tar headers before inflating it.
const maxPiece = 2 * gzipChunk

// gunzipPiece is one piece decompressed into buf (of capacity maxPiece+1),
// or nil when it fails or holds more than limit bytes (at most maxPiece).
func gunzipPiece(piece []byte, limit int64, buf []byte) []byte {
	limit = min(limit, maxPiece)
	zr, err := gzip.NewReader(bytes.NewReader(piece))
	if err != nil {
		return nil
	}
	// Read to the reader's own io.EOF: io.ReadFull would report a member
	// cut short (the gzip reader's io.ErrUnexpectedEOF, as when the file
	// lacks its last bytes) exactly as it reports a short read, and the
	// piece would pass without its CRC-32 and length being checked.
	var n int64
	for {
		m, err := zr.Read(buf[n : limit+1])
		n += int64(m)
		if n > limit || (err != nil && err != io.EOF) {
			return nil // more than limit bytes, or an error
		}
		if err == io.EOF {
			return buf[:n]
		}
	}
}

// pieceBuffers recycles the buffers pieces are decompressed into (a fresh
// 2 MiB buffer per piece cost more in zeroing than the decompression).
var pieceBuffers = sync.Pool{New: func() any { b := make([]byte, maxPiece+1); return &b }}

func (s *splitReader) Read(p []byte) (int, error) {
	for len(s.cur) == 0 {
		if s.failed {
			return 0, errSplitFailed
		}
		if s.buf != nil {
			pieceBuffers.Put(s.buf) // the piece just served
			s.buf = nil
		}
		for s.next < len(s.pieces) && len(s.pending) < 2*s.workers {
			ch := make(chan piece, 1)
			go func(data []byte, limit int64) {
				buf := pieceBuffers.Get().(*[]byte)
				ch <- piece{gunzipPiece(data, limit, *buf), buf}
			}(s.pieces[s.next], s.budget)
			s.pending = append(s.pending, ch)
			s.next++
		}
		if len(s.pending) == 0 {
			return 0, io.EOF
		}
		pc := <-s.pending[0]
		s.pending = s.pending[1:]
		s.buf = pc.buf
		if pc.data == nil || int64(len(pc.data)) > s.budget {
			s.failed = true
			for _, ch := range s.pending {
				<-ch
			}
			s.pending = nil
			return 0, errSplitFailed
		}
		s.budget -= int64(len(pc.data))
		s.cur = pc.data
	}
	n := copy(p, s.cur)
	s.cur = s.cur[n:]
	return n, nil
}
