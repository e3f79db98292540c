package runner

import (
	"crypto/sha256"
	"hash"
	"io"
)

// FileDigest is a file as it was read: its length and the SHA-256 of the
// very bytes that were parsed (FIPS 180-4). A bundle copies a data file
// from disk only when it still has both, so the bundled bytes are the
// fitted ones.
type FileDigest struct {
	Bytes  int64
	SHA256 [sha256.Size]byte
}

// IsZero reports whether d is unset (data that was not read from a file).
func (d FileDigest) IsZero() bool { return d == FileDigest{} }

// digestReader passes a reader's bytes through, counting and hashing them.
type digestReader struct {
	r io.Reader
	h hash.Hash
	n int64
}

func newDigestReader(r io.Reader) *digestReader {
	return &digestReader{r: r, h: sha256.New()}
}

func (d *digestReader) Read(p []byte) (int, error) {
	n, err := d.r.Read(p)
	d.h.Write(p[:n])
	d.n += int64(n)
	return n, err
}

// digest reads what the parser left (nothing, for a file read to its end)
// and returns the digest of everything read.
func (d *digestReader) digest() (FileDigest, error) {
	if _, err := io.Copy(io.Discard, struct{ io.Reader }{d}); err != nil {
		return FileDigest{}, err
	}
	out := FileDigest{Bytes: d.n}
	d.h.Sum(out.SHA256[:0])
	return out, nil
}
