package bundle

import (
	kgzip "github.com/klauspost/compress/gzip"

	"archive/tar"
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"testing"
	"time"
)

var testCreated = time.Date(2026, 12, 2, 3, 4, 5, 0, time.UTC)

func sampleFiles() []member {
	return []member{
		{Path: "bagit.txt", Data: []byte("BagIt-Version: 1.0\n")},
		{Path: "data/inputs/data/seal_life.csv", Data: []byte("hours\n1\n2\n")},
		{Path: "data/inputs/fitseal.toml", Data: []byte("name = \"x\"\n")},
		{Path: "data/results/fits.csv", Data: []byte("analysis\n")},
		{Path: "data-notes.txt", Data: []byte("sorts between data and data/\n")},
	}
}

// readTarGz lists every header and body of a tar.gz for inspection.
func readTarGz(t *testing.T, b []byte) (*gzip.Reader, []*tar.Header, map[string][]byte) {
	t.Helper()
	zr, err := gzip.NewReader(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	tr := tar.NewReader(zr)
	var hs []*tar.Header
	bodies := map[string][]byte{}
	for {
		h, err := tr.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		body, err := io.ReadAll(tr)
		if err != nil {
			t.Fatal(err)
		}
		hs = append(hs, h)
		bodies[h.Name] = body
	}
	return zr, hs, bodies
}

func TestWriteTarGzHeaders(t *testing.T) {
	b, err := tarGzBytes("proj", sampleFiles(), testCreated.Add(700*time.Millisecond))
	if err != nil {
		t.Fatal(err)
	}
	zr, hs, bodies := readTarGz(t, b)
	if zr.Name != "" || !zr.ModTime.IsZero() || zr.Comment != "" {
		t.Errorf("gzip header carries name %q, time %v, comment %q; want none", zr.Name, zr.ModTime, zr.Comment)
	}
	// The MTIME field is bytes 4..7 of the gzip member (RFC 1952, section 2.3).
	if !bytes.Equal(b[4:8], []byte{0, 0, 0, 0}) {
		t.Errorf("gzip MTIME bytes = %v, want zero", b[4:8])
	}
	want := []struct {
		name string
		dir  bool
	}{
		{"proj/", true},
		{"proj/bagit.txt", false},
		{"proj/data/", true},
		{"proj/data-notes.txt", false},
		{"proj/data/inputs/", true},
		{"proj/data/inputs/data/", true},
		{"proj/data/inputs/data/seal_life.csv", false},
		{"proj/data/inputs/fitseal.toml", false},
		{"proj/data/results/", true},
		{"proj/data/results/fits.csv", false},
	}
	// Sorted by path without the folders' trailing slash: "data" < "data-notes.txt" < "data/...".
	if len(hs) != len(want) {
		t.Fatalf("got %d entries, want %d", len(hs), len(want))
	}
	for i, h := range hs {
		w := want[i]
		if h.Name != w.name {
			t.Errorf("entry %d = %q, want %q", i, h.Name, w.name)
		}
		wantType, wantMode := byte(tar.TypeReg), int64(0o644)
		if w.dir {
			wantType, wantMode = tar.TypeDir, 0o755
		}
		if h.Typeflag != wantType || h.Mode != wantMode {
			t.Errorf("%s: type %c mode %o, want %c %o", h.Name, h.Typeflag, h.Mode, wantType, wantMode)
		}
		if !h.ModTime.Equal(testCreated) {
			t.Errorf("%s: mtime %v, want %v (whole seconds)", h.Name, h.ModTime, testCreated)
		}
		if h.Uid != 0 || h.Gid != 0 || h.Uname != "" || h.Gname != "" {
			t.Errorf("%s: owner %d/%d %q/%q, want 0/0 with no names", h.Name, h.Uid, h.Gid, h.Uname, h.Gname)
		}
		if h.Format != tar.FormatUSTAR {
			t.Errorf("%s: format %v, want USTAR for a short ASCII name", h.Name, h.Format)
		}
	}
	if got := string(bodies["proj/data/inputs/fitseal.toml"]); got != "name = \"x\"\n" {
		t.Errorf("body = %q", got)
	}
}

func TestWriteTarGzLongAndNonASCIINamesUsePAX(t *testing.T) {
	long := "data/" + string(bytes.Repeat([]byte("a"), 180)) + ".csv"
	files := []member{{Path: long, Data: []byte("1")}, {Path: "data/débit.csv", Data: []byte("2")}}
	b, err := tarGzBytes("proj", files, testCreated)
	if err != nil {
		t.Fatal(err)
	}
	_, hs, bodies := readTarGz(t, b)
	if string(bodies["proj/"+long]) != "1" || string(bodies["proj/data/débit.csv"]) != "2" {
		t.Errorf("names did not round-trip: %v", hs)
	}
}

func TestWriteTarGzDeterministic(t *testing.T) {
	a, err := tarGzBytes("proj", sampleFiles(), testCreated)
	if err != nil {
		t.Fatal(err)
	}
	// Same members in another order, and a created time with a different
	// sub-second part and zone: the same bytes.
	files := sampleFiles()
	files[0], files[3] = files[3], files[0]
	b, err := tarGzBytes("proj", files, testCreated.Add(300*time.Millisecond).In(time.FixedZone("x", 3600)))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a, b) {
		t.Error("same members and created time gave different archives")
	}
	c, _ := tarGzBytes("proj", sampleFiles(), testCreated.Add(time.Second))
	if bytes.Equal(a, c) {
		t.Error("a different created time gave the same archive")
	}
}

func TestWriteTarGzRejects(t *testing.T) {
	for _, tc := range []struct {
		name, bag string
		files     []member
	}{
		{"absolute", "p", []member{{Path: "/etc/passwd", Data: nil}}},
		{"dotdot", "p", []member{{Path: "data/../../x", Data: nil}}},
		{"unclean", "p", []member{{Path: "data//x", Data: nil}}},
		{"duplicate", "p", []member{{Path: "a", Data: nil}, {Path: "a", Data: nil}}},
		{"case collision", "p", []member{{Path: "data/A.csv", Data: nil}, {Path: "data/a.csv", Data: nil}}},
		{"file and folder", "p", []member{{Path: "data", Data: nil}, {Path: "data/x", Data: nil}}},
		{"bag with slash", "p/q", nil},
		{"bag dotdot", "..", nil},
		{"control char", "p", []member{{Path: "data/a\nb", Data: nil}}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := tarGzBytes(tc.bag, tc.files, testCreated); err == nil {
				t.Error("accepted")
			}
		})
	}
}

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "b.tar.gz")
	write := func(s string) func(io.Writer) error {
		return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
	}
	if err := writeFileAtomic(out, false, 0o644, write("one")); err != nil {
		t.Fatal(err)
	}
	err := writeFileAtomic(out, false, 0o644, write("two"))
	if !errors.Is(err, ErrExists) {
		t.Errorf("second write without force: %v, want ErrExists", err)
	}
	if b, _ := os.ReadFile(out); string(b) != "one" {
		t.Errorf("existing output changed to %q", b)
	}
	if err := writeFileAtomic(out, true, 0o644, write("three")); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(out); string(b) != "three" {
		t.Errorf("forced write gave %q", b)
	}
	// A failing writer leaves nothing behind.
	err = writeFileAtomic(filepath.Join(dir, "c.tar.gz"), false, 0o644, func(w io.Writer) error {
		io.WriteString(w, "partial")
		return errors.New("boom")
	})
	if err == nil {
		t.Error("failing writer reported success")
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 || ents[0].Name() != "b.tar.gz" {
		t.Errorf("folder holds %v, want only b.tar.gz", ents)
	}
	if fi, _ := os.Stat(out); fi.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644", fi.Mode().Perm())
	}
}

func TestWriteFolderAtomic(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "bag")
	if err := writeFolderAtomic(out, false, sampleFiles()); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(out, "data/inputs/fitseal.toml"))
	if err != nil || string(b) != "name = \"x\"\n" {
		t.Fatalf("read back %q, %v", b, err)
	}
	for _, p := range []string{"data", "data/inputs", "data/results"} {
		if fi, _ := os.Stat(filepath.Join(out, p)); fi.Mode().Perm() != 0o755 {
			t.Errorf("%s: mode %v, want 0755", p, fi.Mode().Perm())
		}
	}
	if fi, _ := os.Stat(filepath.Join(out, "bagit.txt")); fi.Mode().Perm() != 0o644 {
		t.Errorf("bagit.txt mode %v, want 0644", fi.Mode().Perm())
	}
	if err := writeFolderAtomic(out, false, sampleFiles()[:1]); !errors.Is(err, ErrExists) {
		t.Errorf("rewrite without force: %v, want ErrExists", err)
	}
	if err := writeFolderAtomic(out, true, sampleFiles()[:1]); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(out, "data")); !os.IsNotExist(err) {
		t.Errorf("forced rewrite kept old contents: %v", err)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("temporary folders left: %v", ents)
	}
}

// csvText makes n bytes of numeric CSV text shaped like fitseal's inputs and
// result tables (invented numbers, for measuring compression only).
// TestWriteTarGzLevels: the body of an input copy of gzipChunk bytes or
// more lies wholly in members made by Huffman coding alone (inputLevel),
// with at most its padding and the next header beside it, and every other
// byte of the tar stream in members made at gzipLevel; a small input copy
// stays at gzipLevel. Each member is read on its own and
// compressed again at both levels to see which one made it.
func TestWriteTarGzLevels(t *testing.T) {
	big := csvText(gzipChunk + 4321)
	small := csvText(5000)
	small[0] = 'x' // not a prefix of big
	results := csvText(2*gzipChunk + 99)
	results[0] = 'y'
	files := []member{
		{Path: "data/inputs/data/big.csv", Data: big},
		{Path: "data/inputs/data/small.csv", Data: small},
		{Path: "data/results/fits.csv", Data: results},
		{Path: "bagit.txt", Data: []byte("BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n")},
	}
	var archive bytes.Buffer
	if err := writeTarGz(&archive, "bag", files, time.Unix(1700000000, 0), 2); err != nil {
		t.Fatal(err)
	}

	// The members, each with the range of the tar stream it holds and the
	// level that makes its bytes.
	type span struct{ start, end, level int }
	var (
		spans  []span
		stream []byte
	)
	rest := bytes.NewReader(archive.Bytes())
	for rest.Len() > 0 {
		before := archive.Len() - rest.Len()
		zr, err := gzip.NewReader(rest)
		if err != nil {
			t.Fatal(err)
		}
		zr.Multistream(false)
		body, err := io.ReadAll(zr)
		if err != nil {
			t.Fatal(err)
		}
		raw := archive.Bytes()[before : archive.Len()-rest.Len()]
		level := 0
		for _, l := range []int{gzipLevel, inputLevel} {
			var again bytes.Buffer
			zw, _ := kgzip.NewWriterLevel(&again, l)
			zw.Write(body)
			zw.Close()
			if bytes.Equal(again.Bytes(), raw) {
				level = l
			}
		}
		if level == 0 {
			t.Fatalf("member %d (%d bytes of tar) is made at neither level", len(spans), len(body))
		}
		spans = append(spans, span{len(stream), len(stream) + len(body), level})
		stream = append(stream, body...)
	}
	at := bytes.Index(stream, big)
	if at < 0 {
		t.Fatal("big input's body not found in the tar stream")
	}
	for _, s := range spans {
		// The body, its padding to a 512-byte block, the next header.
		tail := (at+len(big)+511)/512*512 + 512
		inBig := s.start >= at && s.end <= tail
		overlapsBig := s.start < at+len(big) && s.end > at
		switch {
		case s.level == inputLevel && !inBig:
			t.Errorf("member [%d, %d) is Huffman-coded but not within the big input [%d, %d)", s.start, s.end, at, at+len(big))
		case s.level == gzipLevel && overlapsBig:
			t.Errorf("member [%d, %d) at level %d holds bytes of the big input [%d, %d)", s.start, s.end, gzipLevel, at, at+len(big))
		}
	}
	if len(spans) < 4 {
		t.Errorf("%d members; want at least 4 (before, two of the big input, after)", len(spans))
	}
}

func csvText(n int) []byte {
	r := rand.New(rand.NewPCG(1, 2))
	var b bytes.Buffer
	b.WriteString("analysis,family,parameter,estimate,std_error,ci_lower,ci_upper\n")
	for b.Len() < n {
		x := r.ExpFloat64() * 1000
		fmt.Fprintf(&b, "well-%d,weibull,shape,%s,%s,%s,%s\n", r.IntN(40),
			strconv.FormatFloat(x, 'g', -1, 64), strconv.FormatFloat(x/10, 'g', -1, 64),
			strconv.FormatFloat(x*0.9, 'g', -1, 64), strconv.FormatFloat(x*1.1, 'g', -1, 64))
	}
	return b.Bytes()[:n]
}

// BenchmarkGzipLevels measures speed and ratio of gzip levels on 15 MB of CSV
// text; it justifies gzipLevel. Run: go test ./bundle -run '^$' -bench GzipLevels
func BenchmarkGzipLevels(b *testing.B) {
	data := csvText(15 << 20)
	for _, level := range []int{1, 3, 6, 9} {
		b.Run("level"+strconv.Itoa(level), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			var size int
			for b.Loop() {
				var buf bytes.Buffer
				zw, _ := gzip.NewWriterLevel(&buf, level)
				zw.Write(data)
				zw.Close()
				size = buf.Len()
			}
			b.ReportMetric(float64(len(data))/float64(size), "ratio")
		})
	}
}

// WriteBundle lists the tar's entries from the members' paths while the
// manifests are made, then attaches the members: the archive must be
// WriteArchive's, byte for byte, with files on disk among the members too.
func TestWriteBundleArchiveEqualsWriteArchive(t *testing.T) {
	dir := t.TempDir()
	c := testContents()
	onDisk := []byte("x,y\n1,2\n3,4\n")
	file := filepath.Join(dir, "big.csv")
	if err := os.WriteFile(file, onDisk, 0o644); err != nil {
		t.Fatal(err)
	}
	c.Files = map[string]DiskFile{"inputs/data/big.csv": {Path: file, Size: int64(len(onDisk)), SHA256: sha256.Sum256(onDisk)}}
	var want bytes.Buffer
	if err := WriteArchive(&want, c, testSigner(t)); err != nil {
		t.Fatal(err)
	}
	for _, workers := range []int{1, 2, 4} {
		c.Workers = workers
		out := filepath.Join(dir, fmt.Sprintf("bag-%d.tar.gz", workers))
		if err := WriteBundle(out, false, c, testSigner(t)); err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, want.Bytes()) {
			t.Errorf("%d workers: WriteBundle's archive (%d bytes) differs from WriteArchive's (%d bytes)", workers, len(got), want.Len())
		}
	}
}

// attachMembers refuses entries that do not match the members made: an
// entry with no member, a member with no entry, an entry outside the bag.
func TestAttachMembers(t *testing.T) {
	files := map[string][]byte{"bagit.txt": []byte("b"), "data/a.csv": []byte("a")}
	disk := map[string]DiskFile{"data/d.csv": {Path: "/nowhere", Size: 1}}
	list := func(paths ...string) []tarEntry {
		var ms []member
		for _, p := range paths {
			ms = append(ms, member{Path: p})
		}
		e, err := tarEntries("bag", ms)
		if err != nil {
			t.Fatal(err)
		}
		return e
	}
	for _, tc := range []struct {
		name  string
		bag   string
		paths []string
		ok    bool
	}{
		{"the same paths", "bag", []string{"bagit.txt", "data/a.csv", "data/d.csv"}, true},
		{"a member not listed", "bag", []string{"bagit.txt", "data/a.csv"}, false},
		{"an entry with no member", "bag", []string{"bagit.txt", "data/a.csv", "data/d.csv", "data/e.csv"}, false},
		{"another bag's entries", "other", []string{"bagit.txt", "data/a.csv", "data/d.csv"}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			entries, ok := attachMembers(tc.bag, list(tc.paths...), files, disk)
			if ok != tc.ok {
				t.Fatalf("ok = %v, want %v", ok, tc.ok)
			}
			if !ok {
				return
			}
			for _, e := range entries {
				switch {
				case e.dir:
				case e.file.Disk != nil:
					if e.name != "bag/data/d.csv" || e.file.Path != "data/d.csv" {
						t.Errorf("disk member at %s (%s)", e.name, e.file.Path)
					}
				case !bytes.Equal(e.file.Data, files[e.file.Path]) || e.name != "bag/"+e.file.Path:
					t.Errorf("entry %s holds member %s", e.name, e.file.Path)
				}
			}
		})
	}
}
