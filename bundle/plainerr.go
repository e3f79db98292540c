package bundle

import (
	"archive/tar"
	"compress/flate"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"strings"
)

// plainReason is what err says, in words for a reader of fitseal's
// messages rather than a Go programmer: without the system call and path
// of an [fs.PathError] ("open x: not a directory" is "not a directory"),
// and with the sentinel errors of archive/tar, compress/gzip,
// compress/flate and io ("archive/tar: invalid tar header", "unexpected
// EOF") said in the trade's words. Other errors keep their text, less a
// leading "archive/tar: ", "gzip: ", "flate: " or "ssh: ".
func plainReason(err error) string {
	switch e := err.(type) {
	case *plainPathError, *wordedError:
		return e.Error() // said plainly already
	case *fs.PathError:
		err = e.Err
	case *os.LinkError:
		err = e.Err
	}
	var corrupt flate.CorruptInputError
	switch {
	case errors.Is(err, tar.ErrHeader):
		return "a block where a tar header belongs is not one"
	case errors.Is(err, gzip.ErrHeader):
		return "it does not begin with the gzip signature"
	case errors.Is(err, gzip.ErrChecksum):
		return "the decompressed bytes do not match the checksum stored with them"
	case errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, io.EOF):
		return "it ends early"
	case errors.As(err, &corrupt):
		return fmt.Sprintf("the compressed data are damaged at byte %d", int64(corrupt))
	}
	s := err.Error()
	for _, prefix := range []string{"archive/tar: ", "gzip: ", "flate: ", "ssh: "} {
		s = strings.TrimPrefix(s, prefix)
	}
	return s
}

// pathError is err of an operation on path, named by the path and the
// plain reason ("afile/key: not a directory"), the cause still wrapped
// (errors.Is(err, fs.ErrNotExist) holds where it did).
func pathError(path string, err error) error {
	return &plainPathError{path: path, err: err}
}

type plainPathError struct {
	path string
	err  error
}

func (e *plainPathError) Error() string { return e.path + ": " + plainReason(e.err) }
func (e *plainPathError) Unwrap() error { return e.err }

// plainf is an error "PREFIX: REASON", the reason err's plain one, the
// cause still wrapped: writeError("writing out", err) reads "writing out:
// no space left on device", not "writing out: write .out.tmp-123: no space
// left on device".
func plainf(prefix string, err error) error {
	return &wordedError{msg: prefix + ": " + plainReason(err), err: err}
}

type wordedError struct {
	msg string
	err error
}

func (e *wordedError) Error() string { return e.msg }
func (e *wordedError) Unwrap() error { return e.err }

// PlainPathError is err named by the path it carries and its plain reason
// ("mkdir out/a: not a directory" is "out/a: not a directory"), the cause
// still wrapped, or err itself when it carries none.
func PlainPathError(err error) error {
	if pe, ok := err.(*fs.PathError); ok {
		return pathError(pe.Path, pe.Err)
	}
	return err
}
