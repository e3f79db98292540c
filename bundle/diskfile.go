package bundle

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
)

// DiskFile is a payload file that the bundle copies from disk while it is
// written instead of holding it in memory: a data file of a run, which can
// be many times larger than the data it holds as numbers. Size and SHA256
// are those of the bytes that were parsed and fitted
// (runner.DatasetData.Source); the copy is hashed as it is written and
// must match both, so that a bundle never holds bytes other than the
// fitted ones.
type DiskFile struct {
	// Path is the file on disk.
	Path   string
	Size   int64
	SHA256 [sha256.Size]byte
}

func (d DiskFile) hex() string { return hex.EncodeToString(d.SHA256[:]) }

// ErrInputChanged is wrapped by the error for a data file that changed
// between being fitted and being copied into the bundle.
var ErrInputChanged = errors.New("changed after it was read")

// changedError says that the file no longer holds what was fitted; found
// describes what it holds now.
func changedError(d DiskFile, found string) error {
	return fmt.Errorf("the file %s %w and fitted (%d bytes, SHA-256 %s; now %s), so the bundle would not hold the fitted data; nothing was written: run again once the file no longer changes",
		d.Path, ErrInputChanged, d.Size, d.hex(), found)
}

// checkDiskFile fails early, before anything is rendered, when the file's
// size is no longer the one fitted; the hash is checked while copying.
func checkDiskFile(member string, d DiskFile) error {
	fi, err := os.Stat(d.Path)
	if err != nil {
		return fmt.Errorf("%s: %w", member, err)
	}
	if fi.Size() != d.Size {
		return fmt.Errorf("%s: %w", member, changedError(d, strconv.FormatInt(fi.Size(), 10)+" bytes"))
	}
	return nil
}

// copyBlock is the read size of copyDiskFile.
const copyBlock = 256 << 10

// copyDiskFile writes the file's d.Size bytes to w, hashing them and
// looking for private keys as they go, and fails if the file holds other
// bytes than those fitted (size or SHA-256) or a private key. member names
// the file in errors other than a change. What was written before a failure must be discarded
// by the caller (the bundle is written to a temporary file).
func copyDiskFile(w io.Writer, member string, d DiskFile) error {
	f, err := os.Open(d.Path)
	if err != nil {
		return fmt.Errorf("%s: %w", member, err)
	}
	defer f.Close()
	if fi, err := f.Stat(); err != nil {
		return fmt.Errorf("%s: %w", member, err)
	} else if fi.Size() != d.Size {
		return changedError(d, strconv.FormatInt(fi.Size(), 10)+" bytes")
	}
	h := sha256.New()
	keep := maxKeyMarker - 1 // kept from each block, for a marker across two
	buf := make([]byte, keep+copyBlock)
	carry := 0
	var n int64
	for n < d.Size {
		k, rerr := f.Read(buf[carry : carry+int(min(copyBlock, d.Size-n))])
		if k > 0 {
			block := buf[carry : carry+k]
			h.Write(block)
			if _, err := w.Write(block); err != nil {
				return err
			}
			n += int64(k)
			seen := buf[:carry+k]
			if err := refuseKeyIn(member, seen); err != nil {
				return err
			}
			carry = min(len(seen), keep)
			copy(buf, seen[len(seen)-carry:])
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return fmt.Errorf("%s: %w", member, rerr)
		}
	}
	if n != d.Size {
		return changedError(d, "shorter: "+strconv.FormatInt(n, 10)+" bytes")
	}
	var one [1]byte
	if k, _ := f.Read(one[:]); k > 0 {
		return changedError(d, "longer")
	}
	var sum [sha256.Size]byte
	h.Sum(sum[:0])
	if sum != d.SHA256 {
		return changedError(d, "SHA-256 "+hex.EncodeToString(sum[:]))
	}
	return nil
}

// refuseKeyIn fails when b holds the beginning of a private key (every
// marker ends with privateKeyTail, so one search rules most data out).
func refuseKeyIn(member string, b []byte) error {
	if !bytes.Contains(b, privateKeyTail) {
		return nil
	}
	for _, m := range privateKeyMarkers {
		if bytes.Contains(b, m) {
			return privateKeyError(member)
		}
	}
	return nil
}

// readDiskFile is copyDiskFile into memory.
func readDiskFile(member string, d DiskFile) ([]byte, error) {
	var buf bytes.Buffer
	buf.Grow(int(d.Size))
	if err := copyDiskFile(&buf, member, d); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
