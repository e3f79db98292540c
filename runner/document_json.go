package runner

import (
	"bytes"
	"encoding/json"
	"runtime"
	"sync"
)

// docAnalyses is results.json's list of analyses. It marshals its elements
// on every core, each into its own slot, and joins them in order: the bytes
// are exactly encoding/json's for the plain slice (json.Marshal output is
// already compact and HTML-escaped, so the encoder's compaction of a
// Marshaler's output leaves it unchanged), whatever the number of cores.
// The reflection-driven encoding of a few hundred analyses was the largest
// serial step of writing the results (pprof of bundle BenchmarkPipeline).
type docAnalyses []docAnalysis

func (a docAnalyses) MarshalJSON() ([]byte, error) {
	if a == nil {
		return []byte("null"), nil
	}
	parts := make([][]byte, len(a))
	errs := make([]error, len(a))
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < min(runtime.GOMAXPROCS(0), len(a)); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				parts[i], errs[i] = json.Marshal(a[i])
			}
		}()
	}
	for i := range a {
		next <- i
	}
	close(next)
	wg.Wait()
	size := 2
	for i, p := range parts {
		if errs[i] != nil {
			return nil, errs[i]
		}
		size += len(p) + 1
	}
	var b bytes.Buffer
	b.Grow(size)
	b.WriteByte('[')
	for i, p := range parts {
		if i > 0 {
			b.WriteByte(',')
		}
		b.Write(p)
	}
	b.WriteByte(']')
	return b.Bytes(), nil
}
