package runner

import (
	"fmt"
	"sync/atomic"
	"testing"
)

// TestForEachCallsEachIndexOnce: every index in [0, n) is called exactly
// once for any number of workers, nothing for n ≤ 0.
func TestForEachCallsEachIndexOnce(t *testing.T) {
	for _, n := range []int{-1, 0, 1, 2, 7, 1000} {
		for _, workers := range []int{-3, 0, 1, 2, 5, 64} {
			calls := make([]atomic.Int32, max(n, 0))
			var total atomic.Int64
			ForEach(workers, n, func(i int) {
				calls[i].Add(1)
				total.Add(1)
			})
			if got := total.Load(); got != int64(max(n, 0)) {
				t.Errorf("n = %d, workers = %d: %d calls", n, workers, got)
			}
			for i := range calls {
				if c := calls[i].Load(); c != 1 {
					t.Errorf("n = %d, workers = %d: index %d called %d times", n, workers, i, c)
				}
			}
		}
	}
}

// TestForEachErrReportsTheLowestIndex: every index is still called, and the
// error returned is the one of the lowest failing index, for any number of
// workers; nil when none fails.
func TestForEachErrReportsTheLowestIndex(t *testing.T) {
	for _, c := range []struct {
		n       int
		failing []int
		want    int // index whose error is returned; -1: nil
	}{
		{0, nil, -1},
		{10, nil, -1},
		{10, []int{7}, 7},
		{1000, []int{999, 3, 500}, 3},
	} {
		for _, workers := range []int{1, 2, 8} {
			errs := map[int]error{}
			for _, i := range c.failing {
				errs[i] = fmt.Errorf("index %d", i)
			}
			var calls atomic.Int64
			err := ForEachErr(workers, c.n, func(i int) error {
				calls.Add(1)
				return errs[i]
			})
			if calls.Load() != int64(c.n) {
				t.Errorf("n %d, %d workers: %d calls", c.n, workers, calls.Load())
			}
			if (c.want < 0 && err != nil) || (c.want >= 0 && err != errs[c.want]) {
				t.Errorf("n %d, %d workers: error %v, want that of index %d", c.n, workers, err, c.want)
			}
		}
	}
}
