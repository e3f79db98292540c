package fitters

import "sync"

// scratchPool holds n-sized float64 buffers that complete-data fits borrow
// for their transformed data (standardized values, logs) and give back
// before returning, so that repeated fits (bootstrap refits, one family
// after another on the same dataset) allocate nothing per fit once the
// pool is warm. A buffer is never shared while borrowed; its contents are
// undefined when lent.
var scratchPool = sync.Pool{New: func() any { return new([]float64) }}

// borrowScratch returns a buffer of length n from scratchPool; hand it back
// with returnScratch once nothing refers to its slice any more.
func borrowScratch(n int) *[]float64 {
	p := scratchPool.Get().(*[]float64)
	if cap(*p) < n {
		*p = make([]float64, n)
	}
	*p = (*p)[:n]
	return p
}

// returnScratch gives a buffer from borrowScratch back to the pool.
func returnScratch(p *[]float64) { scratchPool.Put(p) }
