package runner

import (
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
