package bundle

import (
	"bytes"
	"compress/gzip"
	"context"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"fitseal/runner"
)

// A bundle's bytes do not depend on -j: the fits, the table rendering and
// the compression all take the worker count (SealOptions.Workers), and a
// bundle of several gzip members (the tar here is over 1 MiB) is the same
// for 1, 2 and 8 workers.
func TestSealBytesIndependentOfWorkers(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("set,x\n")
	r := rand.New(rand.NewPCG(11, 12)) // invented data: exponential draws
	for g := 0; g < 250; g++ {
		for i := 0; i < 40; i++ {
			fmt.Fprintf(&b, "s%03d,%s\n", g, strconv.FormatFloat(r.ExpFloat64()*(1+float64(g%7)), 'g', 10, 64))
		}
	}
	if err := os.WriteFile(filepath.Join(dir, "sets.csv"), []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	proj := `name = "workers"
[settings]
intervals = "wald"
bootstrap = 0
[[dataset]]
name = "sets"
file = "sets.csv"
column = "x"
split_by = "set"
[[candidates]]
name = "c"
families = ["exponential", "normal", "lognormal"]
[[analysis]]
dataset = "sets"
candidates = "c"
quantiles = [0.5]
[report]
pdf = false
figures = false
`
	path := filepath.Join(dir, "fitseal.toml")
	if err := os.WriteFile(path, []byte(proj), 0o644); err != nil {
		t.Fatal(err)
	}
	p, err := runner.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	var ref []byte
	for _, workers := range []int{1, 2, 8} {
		res, err := runner.Run(context.Background(), p, runner.RunOptions{Workers: workers})
		if err != nil {
			t.Fatal(err)
		}
		c, err := Seal(res, SealOptions{Created: testCreated, CreatedFrom: "SOURCE_DATE_EPOCH", Git: goldenGit,
			Signer: testSigner(t).PublicKey(), Tool: goldenTool, Workers: workers})
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := WriteArchive(&buf, c, testSigner(t)); err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = buf.Bytes()
			if n := tarSize(t, ref); n <= 2*gzipChunk {
				t.Fatalf("the tar has %d bytes; the test needs several gzip members of %d", n, gzipChunk)
			}
			continue
		}
		if !bytes.Equal(buf.Bytes(), ref) {
			t.Errorf("-j %d: the bundle differs from -j 1", workers)
		}
	}
}

// tarSize is the length of the tar stream inside a .tar.gz.
func tarSize(t *testing.T, b []byte) int64 {
	t.Helper()
	zr, err := gzip.NewReader(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	n, err := io.Copy(io.Discard, zr)
	if err != nil {
		t.Fatal(err)
	}
	return n
}
