package runner

import (
	"sync"
	"sync/atomic"
)

// ForEach calls f(i) for every i in [0, n), each once, on up to workers
// goroutines (at least one; with one, in the caller's goroutine), handing
// the indices out in increasing order as goroutines free up; it returns
// when every call has returned. f must write only what belongs to i, so
// that nothing depends on workers.
func ForEach(workers, n int, f func(i int)) {
	workers = min(max(1, workers), n)
	if workers <= 1 {
		for i := range n {
			f(i)
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := int(next.Add(1) - 1); i < n; i = int(next.Add(1) - 1) {
				f(i)
			}
		}()
	}
	wg.Wait()
}

// ForEachErr is ForEach for an f that can fail: every call is made, and
// the error of the lowest i that failed is returned (nil when none did),
// so the error reported does not depend on workers either.
func ForEachErr(workers, n int, f func(i int) error) error {
	errs := make([]error, n)
	ForEach(workers, n, func(i int) { errs[i] = f(i) })
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}
