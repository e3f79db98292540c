package bundle

import (
	"bytes"
	"fmt"
	"testing"
	"time"
)

// BenchmarkMembers makes the bag's members (private-key scan, manifest,
// tag files, signature) and lists the tar entries for a payload shaped like
// the 1000-analysis batch bundle's: 6,000 tables of about 2 KB and five
// result files of 1–12 MB, on one goroutine. It is the serial bookkeeping
// between rendering the tables and compressing the archive.
func BenchmarkMembers(b *testing.B) {
	payload := map[string][]byte{}
	for i := range 1000 {
		for _, kind := range []string{"parameters", "ranking", "derived"} {
			for _, ext := range []string{"md", "tex"} {
				payload[fmt.Sprintf("tables/bench_s%04d-%s.%s", i, kind, ext)] = bytes.Repeat([]byte{'a' + byte(i%26)}, 2000)
			}
		}
	}
	for name, mb := range map[string]int{"results.json": 12, "fits.csv": 2, "parameters.csv": 2, "gof.csv": 1} {
		payload["results/"+name] = bytes.Repeat([]byte("0.123456789,"), mb<<20/12)
	}
	c := Contents{Name: "bench-fit", Created: time.Unix(1, 0), Payload: payload, RunJSON: []byte("{}\n"), Workers: 1}
	signer := testSigner(b)
	b.ReportAllocs()
	for b.Loop() {
		files, disk, err := members(c, signer)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := tarEntries(c.Name, allMembers(files, disk)); err != nil {
			b.Fatal(err)
		}
	}
}
