package bundle

import (
	"archive/tar"
	"bytes"
	"fmt"
	"io"
	"slices"
	"strings"
	"time"

	"github.com/klauspost/compress/gzip"

	"fitseal/runner"
)

// member is one file of a bag: its slash path relative to the bag folder and
// its bytes, or the file on disk they are copied from.
type member struct {
	Path string
	Data []byte
	Disk *DiskFile
}

// size is the member's length in bytes.
func (m member) size() int64 {
	if m.Disk != nil {
		return m.Disk.Size
	}
	return int64(len(m.Data))
}

// writeBody writes the member's bytes to w.
func (m member) writeBody(w io.Writer, name string) error {
	if m.Disk != nil {
		return copyDiskFile(w, name, *m.Disk)
	}
	_, err := w.Write(m.Data)
	return err
}

// gzipLevel is the compression level of bundles.
//
// Measured on 2026-12-02 with BenchmarkGzipBundleLevels
// (gzip_bundle_bench_test.go) on the tar stream of the 1000-dataset bench
// bundle (`../shared/bench/run.sh -S 1000 --keep`: 45.6 MB, of which 13.9
// MB input CSV, 11.8 MB results.json, 5.6 MB result CSVs, 6.7 MB tables),
// as 1 MiB members on one core of this shared 2-core machine, with
// github.com/klauspost/compress v1.20.4 and, for comparison, the standard
// library's compress/gzip at level 1 (Go 1.26), which fitseal used before
// (median of 3 runs of a loaded machine; ratios exact):
//
//	encoder          level  seconds  MB     ratio
//	compress/gzip    1      0.337    11.23  4.06
//	klauspost        1      0.173    10.62  4.29
//	klauspost        2      0.187    10.41  4.38
//	klauspost        3      0.222    10.34  4.41
//	klauspost        4      0.250    10.66  4.27
//	klauspost        5      0.312    10.19  4.47
//	klauspost        6      0.330    10.02  4.55
//	klauspost        9      8.4       8.99  5.07
//
// Level 1 and level 2 take the same time within this machine's noise (4
// alternated runs of 10 each: medians 0.211 and 0.214 s), and level 2 is
// 2% smaller than level 1 and 7% smaller than the standard library's
// level 1, in half its time; level 3 and above cost more time for little.
// So: klauspost level 2. The level is named, not left to the library's
// default, so that it cannot change under us and alter the bytes.
const gzipLevel = 2

// inputLevel is the compression level of a large input copy (a file under
// data/inputs/ of at least gzipChunk bytes): Huffman coding only, no search
// for repeats.
//
// An input copy is the user's own file, most often a CSV of measurements,
// and was the slowest part of the stream to compress: on the 13.9 MB input
// CSV of the same bench bundle, level 2 took 75 ms on one core for 4.65 MB
// (ratio 3.0; its text is mostly digits, in which the encoder finds many
// short repeats worth little), Huffman coding alone 17 ms for 6.52 MB
// (ratio 2.1), four times as fast. On fitseal's own outputs the search
// pays: results.json 11.8 MB → 2.20 MB at level 2 but 7.37 MB by Huffman
// coding, at 32 ms against 15. So large input copies are Huffman-coded and
// everything else is compressed at gzipLevel: writing the bench bundle
// takes a quarter less CPU (BenchmarkGzipBundleLevels, "as-written" 119–146
// ms against "level2" 165–180 ms) for an archive 18 % larger (10.4 → 12.3
// MB). Smaller input copies stay at gzipLevel in the members around them:
// a member of their own would cost more in lost context than it saves (the
// small test bundle would grow from 2.3 to 3.4 kB).
const inputLevel = gzip.HuffmanOnly

// levelOf is the compression level of the member m: inputLevel for an input
// copy of at least gzipChunk bytes, gzipLevel for everything else.
func levelOf(m member) int {
	if m.size() >= gzipChunk && strings.HasPrefix(m.Path, PayloadDir+"/inputs/") {
		return inputLevel
	}
	return gzipLevel
}

// Folder and file modes inside every bundle (SPEC.md, "The bundle").
const (
	dirMode  = 0o755
	fileMode = 0o644
)

// writeTarGz writes the bag as a gzip-compressed POSIX tar whose single top
// folder is bagName. The output depends only on its arguments: entries are
// sorted by path with every folder listed explicitly (mode 0755) before its
// contents, files have mode 0644, every entry carries the one mtime (whole
// seconds, UTC), owner and group are 0 with empty names, and the gzip header
// has no name and no modification time. Paths that fit USTAR are written as
// plain USTAR headers; longer or non-ASCII ones get a PAX record.
//
// The gzip members are compressed on at most workers goroutines (0: every
// core); the bytes do not depend on workers.
func writeTarGz(w io.Writer, bagName string, files []member, mtime time.Time, workers int) error {
	entries, err := tarEntries(bagName, files)
	if err != nil {
		return err
	}
	return writeTarEntries(w, entries, mtime, workers)
}

// writeTarEntries is writeTarGz of the entries tarEntries listed.
func writeTarEntries(w io.Writer, entries []tarEntry, mtime time.Time, workers int) error {
	mtime = time.Unix(mtime.Unix(), 0).UTC()
	runner.TracePhase("write: tar, gzip")
	// Gzip members of 1 MiB of tar each, compressed on up to workers cores
	// (gzip_parallel.go); the bytes do not depend on the number of cores.
	// A file's body and the padding after it are compressed at its level
	// (levelOf); tar headers at the level of the body before them.
	zw := newMemberWriter(w, gzipLevel, workers)
	tw := tar.NewWriter(zw)
	for _, e := range entries {
		h := &tar.Header{
			Name:    e.name,
			ModTime: mtime,
			Format:  tar.FormatPAX,
		}
		if e.dir {
			h.Typeflag = tar.TypeDir
			h.Name += "/"
			h.Mode = dirMode
		} else {
			h.Typeflag = tar.TypeReg
			h.Mode = fileMode
			h.Size = e.file.size()
		}
		if err := tw.WriteHeader(h); err != nil {
			return fmt.Errorf("writing %s: %w", e.name, err)
		}
		if !e.dir {
			zw.setLevel(levelOf(e.file))
			if err := e.file.writeBody(tw, e.file.Path); err != nil {
				return fmt.Errorf("writing %s: %w", e.name, err)
			}
		}
	}
	if err := tw.Close(); err != nil {
		return err
	}
	return zw.Close()
}

// tarEntry is one entry of a bundle's tar: a folder or a file.
type tarEntry struct {
	name string // full path without trailing slash
	dir  bool
	file member
}

// tarEntries lists the tar entries of a bag named bagName holding files: the
// top folder, every file, and every folder above a file, sorted by path. It
// refuses a path that checkMemberPath refuses, two members with the same
// path, two that differ only in letter case (foldKey), and a file whose path
// is also a folder's.
func tarEntries(bagName string, files []member) ([]tarEntry, error) {
	if err := checkBagName(bagName); err != nil {
		return nil, err
	}
	entries := make([]tarEntry, 0, len(files)+8)
	entries = append(entries, tarEntry{name: bagName, dir: true})
	for _, f := range files {
		if err := checkMemberPath(f.Path); err != nil {
			return nil, err
		}
		entries = append(entries, tarEntry{name: bagName + "/" + f.Path, file: f})
	}
	// Parent folders, found by walking up from each file until a folder
	// already listed (whose own parents are then listed too); paths are
	// clean, so a parent is the text before the last slash.
	dirs := map[string]bool{}
	for _, f := range files {
		for p := f.Path; ; {
			i := strings.LastIndexByte(p, '/')
			if i < 0 {
				break
			}
			p = p[:i]
			if dirs[p] {
				break
			}
			dirs[p] = true
			entries = append(entries, tarEntry{name: bagName + "/" + p, dir: true})
		}
	}
	slices.SortFunc(entries, func(a, b tarEntry) int { return strings.Compare(a.name, b.name) })
	// Sorted, equal paths are neighbours; a file that is also a folder is
	// a file entry next to a folder entry of the same path.
	for i := 1; i < len(entries); i++ {
		a, b := entries[i-1], entries[i]
		if a.name != b.name {
			continue
		}
		if a.dir != b.dir {
			return nil, fmt.Errorf("member %q is both a file and a folder", a.name)
		}
		return nil, fmt.Errorf("duplicate member %q", a.name)
	}
	folded := make(map[string]string, len(entries))
	for _, e := range entries {
		k := foldKey(e.name)
		if other, ok := folded[k]; ok {
			return nil, fmt.Errorf("members %q and %q differ only in letter case", other, e.name)
		}
		folded[k] = e.name
	}
	return entries, nil
}

// tarGzBytes is writeTarGz into memory.
func tarGzBytes(bagName string, files []member, mtime time.Time) ([]byte, error) {
	var buf bytes.Buffer
	if err := writeTarGz(&buf, bagName, files, mtime, 0); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
