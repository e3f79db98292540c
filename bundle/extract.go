package bundle

import (
	"archive/tar"
	"bufio"
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
)

// Limits bound what a reader accepts, so that a hostile archive (a
// decompression bomb, millions of entries) fails fast in bounded memory.
type Limits struct {
	MaxEntries   int   // files and folders
	MaxFileSize  int64 // bytes of one file
	MaxTotalSize int64 // bytes of all files together
}

// DefaultLimits are generous for distribution fitting (input tables of a
// few hundred megabytes at most) and keep a reader's memory under ~1 GiB.
var DefaultLimits = Limits{
	MaxEntries:   10000,
	MaxFileSize:  512 << 20,
	MaxTotalSize: 1 << 30,
}

// metadataAllowance is how many decompressed bytes beyond MaxTotalSize the
// tar headers, PAX records, padding and end blocks of an archive may take:
// 8 KiB an entry (a header, a PAX header for a long name and padding take
// under 3 KiB) and 1 MiB more.
func (l Limits) metadataAllowance() int64 { return int64(l.MaxEntries)*8<<10 + 1<<20 }

// ErrUnsafeArchive is wrapped by every [ArchiveError].
var ErrUnsafeArchive = errors.New("unsafe or damaged archive")

// ArchiveError is an archive that fitseal refuses to read: a path escape, a
// link, a device, a duplicate name, more than one top folder, a limit
// exceeded, or a stream that is not a gzip'd tar. Member names the entry at
// fault where there is one. Damaged is set where the bytes end early or do
// not decompress (as after an interrupted download or copy), as opposed to
// an archive that reads whole but holds what a bundle never does.
type ArchiveError struct {
	Source  string
	Member  string
	Reason  string
	Damaged bool
}

func (e *ArchiveError) Error() string {
	if e.Member != "" {
		return fmt.Sprintf("%s: member %q: %s", e.Source, e.Member, e.Reason)
	}
	return fmt.Sprintf("%s: %s", e.Source, e.Reason)
}

func (e *ArchiveError) Unwrap() error { return ErrUnsafeArchive }

// Bag is a bag read into memory.
type Bag struct {
	// Name is the bag folder's name.
	Name string
	// Files maps slash paths relative to the bag folder to their bytes.
	Files map[string][]byte
	// Source is the path it was read from.
	Source string
}

// Payload is the payload with paths relative to data/.
func (b *Bag) Payload() map[string][]byte {
	out := map[string][]byte{}
	for p, d := range b.Files {
		if rest, ok := strings.CutPrefix(p, PayloadDir+"/"); ok {
			out[rest] = d
		}
	}
	return out
}

// RunJSON is run.json's bytes, nil when absent.
func (b *Bag) RunJSON() []byte { return b.Files[RunFile] }

// Paths are the bag's file paths, sorted.
func (b *Bag) Paths() []string {
	out := make([]string, 0, len(b.Files))
	for p := range b.Files {
		out = append(out, p)
	}
	sort.Strings(out)
	return out
}

// Open reads a bundle with [DefaultLimits]: a gzip'd tar file, or a bag
// folder. An error that is not an [*ArchiveError] means the path could not
// be read at all (no such file).
func Open(path string) (*Bag, error) { return OpenWithLimits(path, DefaultLimits) }

// openError is err of opening path without the name of the system call
// ("stat b.tar.gz: …"), which tells a reader nothing: "b.tar.gz: no such
// file or directory". The cause stays wrapped (errors.Is(err,
// fs.ErrNotExist)).
func openError(path string, err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return fmt.Errorf("%s: %w", path, pe.Err)
	}
	return err
}

// OpenWithLimits is [Open] with the given limits.
func OpenWithLimits(path string, lim Limits) (*Bag, error) {
	fi, err := os.Stat(path)
	if err != nil {
		return nil, openError(path, err)
	}
	if fi.IsDir() {
		return ReadFolder(path, lim)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, openError(path, err)
	}
	defer f.Close()
	b, err := ReadArchive(f, lim)
	if ae := (*ArchiveError)(nil); errors.As(err, &ae) {
		ae.Source = path
	}
	if b != nil {
		b.Source = path
	}
	return b, err
}

// capReader fails once more than n bytes have been read through it.
type capReader struct {
	r io.Reader
	n int64
}

var errOverCap = errors.New("decompressed size exceeds the limit")

func (c *capReader) Read(p []byte) (int, error) {
	if c.n <= 0 {
		return 0, errOverCap
	}
	if int64(len(p)) > c.n {
		p = p[:c.n]
	}
	n, err := c.r.Read(p)
	c.n -= int64(n)
	return n, err
}

// pathTree tracks the names seen in an archive or folder to refuse
// duplicates (exact or differing only in letter case), a name used both as a
// file and as a folder, and more than one top folder.
type pathTree struct {
	top     string
	kind    map[string]bool // name → is a folder (entries seen)
	folded  map[string]string
	implied map[string]bool // every ancestor folder of an entry
}

func newPathTree() *pathTree {
	return &pathTree{kind: map[string]bool{}, folded: map[string]string{}, implied: map[string]bool{}}
}

// add records name (clean, no trailing slash) and returns the reason it is
// refused, or "".
func (t *pathTree) add(name string, dir bool) string {
	if err := checkMemberPath(name); err != nil {
		return err.Error()
	}
	top, _, nested := strings.Cut(name, "/")
	if t.top == "" {
		t.top = top
	} else if top != t.top {
		return fmt.Sprintf("more than one top folder (%q and %q)", t.top, top)
	}
	if !nested && !dir {
		return "a file outside the bag folder"
	}
	if _, dup := t.kind[name]; dup {
		return "duplicate name"
	}
	if other, ok := t.folded[foldKey(name)]; ok {
		return fmt.Sprintf("name differs from %q only in letter case", other)
	}
	if !dir && t.implied[name] {
		return "a file where the archive has a folder"
	}
	for d := path.Dir(name); d != "."; d = path.Dir(d) {
		if isDir, ok := t.kind[d]; ok && !isDir {
			return fmt.Sprintf("inside %q, which is a file", d)
		}
		t.implied[d] = true
	}
	t.kind[name] = dir
	t.folded[foldKey(name)] = name
	return ""
}

// ReadArchive reads a gzip'd tar bag from r. Only regular files and folders
// are accepted; each entry's declared size is checked against the limits
// before any of its bytes are read, and the decompressed stream as a whole
// is capped, so a bomb fails after reading at most the limits.
//
// When r is a regular file of at most maxSplitFile bytes, it is read into
// memory and its gzip members are decompressed on every core
// (splitReader: the same bytes as one reader's, or else the file is read
// by one reader after all); reading the 1000-dataset bench bundle's 45 MB
// of tar took 0.2 s on one core.
func ReadArchive(r io.Reader, lim Limits) (*Bag, error) {
	limit := lim.MaxTotalSize + lim.metadataAllowance()
	if f, ok := r.(*os.File); ok {
		if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() && fi.Size() <= min(maxSplitFile, limit) {
			data := make([]byte, fi.Size())
			if _, err := io.ReadFull(f, data); err != nil {
				return archiveDamaged("", "cannot be read: %s", plainReason(err))
			}
			sr := newSplitReader(data, runtime.GOMAXPROCS(0), limit)
			if b, err := readArchive(sr, lim); !sr.failed {
				return b, err
			}
			r = bytes.NewReader(data)
		}
	}
	zr, err := gzip.NewReader(bufio.NewReader(r))
	if err != nil {
		return archiveDamaged("", "not a gzip-compressed file: %s", plainReason(err))
	}
	return readArchive(zr, lim)
}

// maxSplitFile is the largest compressed file that ReadArchive reads into
// memory to decompress on every core; a larger one is streamed.
const maxSplitFile = 256 << 20

// archiveFail is the *ArchiveError of a bundle read by ReadArchive
// (OpenWithLimits puts the file's path in Source).
func archiveFail(member, format string, args ...any) (*Bag, error) {
	return nil, &ArchiveError{Source: "bundle", Member: member, Reason: fmt.Sprintf(format, args...)}
}

// archiveDamaged is archiveFail for bytes that end early or do not
// decompress.
func archiveDamaged(member, format string, args ...any) (*Bag, error) {
	return nil, &ArchiveError{Source: "bundle", Member: member, Reason: fmt.Sprintf(format, args...), Damaged: true}
}

// readArchive is ReadArchive on the decompressed stream zr.
func readArchive(zr io.Reader, lim Limits) (*Bag, error) {
	capped := &capReader{r: zr, n: lim.MaxTotalSize + lim.metadataAllowance()}
	tr := tar.NewReader(capped)
	tree := newPathTree()
	files := map[string][]byte{}
	var entries int
	var total int64
	for {
		h, err := tr.Next()
		if err == io.EOF {
			break
		}
		if errors.Is(err, errOverCap) {
			return archiveFail("", "the archive's headers exceed the size limits")
		}
		if err != nil {
			return archiveDamaged("", "not a readable tar archive: %s", plainReason(err))
		}
		entries++
		if entries > lim.MaxEntries {
			return archiveFail(h.Name, "more than %d entries", lim.MaxEntries)
		}
		var dir bool
		switch h.Typeflag {
		case tar.TypeReg, tar.TypeRegA: //nolint:staticcheck // old tars mark files with '\x00'
		case tar.TypeDir:
			dir = true
		case tar.TypeSymlink, tar.TypeLink:
			return archiveFail(h.Name, "a link (to %q); bundles hold only files and folders", h.Linkname)
		case tar.TypeChar, tar.TypeBlock:
			return archiveFail(h.Name, "a device; bundles hold only files and folders")
		case tar.TypeFifo:
			return archiveFail(h.Name, "a FIFO; bundles hold only files and folders")
		default:
			return archiveFail(h.Name, "entry type %q; bundles hold only files and folders", h.Typeflag)
		}
		name := h.Name
		if dir {
			name = strings.TrimSuffix(name, "/")
		}
		if reason := tree.add(name, dir); reason != "" {
			return archiveFail(h.Name, "%s", reason)
		}
		if dir {
			if h.Size != 0 {
				return archiveFail(h.Name, "a folder entry that carries %d bytes of data", h.Size)
			}
			continue
		}
		if h.Size < 0 || h.Size > lim.MaxFileSize {
			return archiveFail(h.Name, "size %d bytes exceeds the limit of %d", h.Size, lim.MaxFileSize)
		}
		if total+h.Size > lim.MaxTotalSize {
			return archiveFail(h.Name, "total size exceeds the limit of %d bytes", lim.MaxTotalSize)
		}
		total += h.Size
		data := make([]byte, h.Size)
		if _, err := io.ReadFull(tr, data); err != nil {
			if errors.Is(err, io.ErrUnexpectedEOF) {
				return archiveDamaged(h.Name, "truncated: the archive ends inside it")
			}
			return archiveDamaged(h.Name, "cannot be read: %s", plainReason(err))
		}
		files[strings.TrimPrefix(name, tree.top+"/")] = data
	}
	// Read to the end of the gzip stream so that its CRC-32 and length are
	// checked; a tar writer pads with at most a few blocks of zeros.
	if n, err := io.Copy(io.Discard, io.LimitReader(capped, 1<<20)); err != nil {
		return archiveDamaged("", "damaged compressed stream after the tar end: %s", plainReason(err))
	} else if n == 1<<20 {
		return archiveFail("", "more than 1 MiB of data after the tar end")
	}
	if tree.top == "" {
		return archiveFail("", "empty archive: no bag folder")
	}
	if _, ok := tree.kind[tree.top]; !ok && !tree.implied[tree.top] {
		return archiveFail(tree.top, "the top entry is not a folder")
	}
	return &Bag{Name: tree.top, Files: files}, nil
}

// ReadFolder reads a bag folder with the same rules as ReadArchive: only
// regular files and folders (a symbolic link is refused, not followed),
// names that pass the path checks, and the same limits.
func ReadFolder(dir string, lim Limits) (*Bag, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return nil, err
	}
	name := filepath.Base(abs)
	fail := func(member, format string, args ...any) (*Bag, error) {
		return nil, &ArchiveError{Source: dir, Member: member, Reason: fmt.Sprintf(format, args...)}
	}
	if err := checkBagName(name); err != nil {
		return fail("", "%v", err)
	}
	root, err := os.OpenRoot(dir)
	if err != nil {
		return nil, pathError(dir, err)
	}
	defer root.Close()
	tree := newPathTree()
	tree.add(name, true)
	files := map[string][]byte{}
	var entries int
	var total int64
	walkErr := fs.WalkDir(root.FS(), ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if p == "." {
			return nil
		}
		entries++
		if entries > lim.MaxEntries {
			_, e := fail(p, "more than %d entries", lim.MaxEntries)
			return e
		}
		switch t := d.Type(); {
		case t&fs.ModeSymlink != 0:
			_, e := fail(p, "a symbolic link; bundles hold only files and folders")
			return e
		case t&fs.ModeDevice != 0, t&fs.ModeCharDevice != 0:
			_, e := fail(p, "a device; bundles hold only files and folders")
			return e
		case t&fs.ModeNamedPipe != 0:
			_, e := fail(p, "a FIFO; bundles hold only files and folders")
			return e
		case !d.IsDir() && !t.IsRegular():
			_, e := fail(p, "not a regular file; bundles hold only files and folders")
			return e
		}
		if reason := tree.add(name+"/"+p, d.IsDir()); reason != "" {
			_, e := fail(p, "%s", reason)
			return e
		}
		if d.IsDir() {
			return nil
		}
		f, err := root.OpenFile(p, os.O_RDONLY|syscallNoFollow, 0)
		if err != nil {
			return err
		}
		defer f.Close()
		fi, err := f.Stat()
		if err != nil {
			return err
		}
		if !fi.Mode().IsRegular() {
			_, e := fail(p, "not a regular file; bundles hold only files and folders")
			return e
		}
		if fi.Size() > lim.MaxFileSize {
			_, e := fail(p, "size %d bytes exceeds the limit of %d", fi.Size(), lim.MaxFileSize)
			return e
		}
		data, err := io.ReadAll(io.LimitReader(f, lim.MaxFileSize+1))
		if err != nil {
			return err
		}
		if int64(len(data)) > lim.MaxFileSize {
			_, e := fail(p, "size exceeds the limit of %d bytes", lim.MaxFileSize)
			return e
		}
		total += int64(len(data))
		if total > lim.MaxTotalSize {
			_, e := fail(p, "total size exceeds the limit of %d bytes", lim.MaxTotalSize)
			return e
		}
		files[p] = data
		return nil
	})
	var pe *fs.PathError
	if errors.As(walkErr, &pe) && !errors.Is(walkErr, ErrUnsafeArchive) {
		return nil, pathError(filepath.Join(dir, filepath.FromSlash(pe.Path)), pe.Err)
	}
	if walkErr != nil {
		return nil, walkErr
	}
	return &Bag{Name: name, Files: files, Source: dir}, nil
}

// Extract reads the bundle at src (archive or folder) with [DefaultLimits]
// and writes its bag folder inside dir (created if missing), through a
// temporary folder in dir renamed into place. An existing dir/NAME is never
// replaced. It returns the path of the extracted bag folder.
func Extract(src, dir string) (string, error) {
	b, err := Open(src)
	if err != nil {
		return "", err
	}
	return b.WriteTo(dir)
}

// WriteTo writes the bag as the folder dir/NAME, as [Extract] does.
func (b *Bag) WriteTo(dir string) (string, error) {
	if err := checkBagName(b.Name); err != nil {
		return "", err
	}
	if err := os.MkdirAll(dir, dirMode); err != nil {
		return "", PlainPathError(err)
	}
	target := filepath.Join(dir, b.Name)
	if err := writeFolderAtomic(target, false, sortedMembers(b.Files)); err != nil {
		if errors.Is(err, ErrExists) {
			return "", fmt.Errorf("%w; extract into another folder, or move it away first", err)
		}
		return "", err
	}
	return target, nil
}
