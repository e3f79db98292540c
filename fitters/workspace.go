package fitters

import (
	"sync"
	"weak"
)

// scratchPool holds n-sized float64 buffers that complete-data fits borrow
// for their transformed data (standardized values, logs) and give back
// before returning, so that repeated fits (bootstrap refits, one family
// after another on the same dataset) allocate nothing per fit once the
// pool is warm. A buffer is never shared while borrowed; its contents are
// undefined when lent.
var scratchPool = sync.Pool{New: func() any { return new([]float64) }}

// largeScratchLen is the length above which a scratch buffer counts as
// large: 1<<20 values are 8 MiB, a size at which the buffer, not the
// arithmetic, decides the memory a fit needs (issue 8: a dataset of 10
// million values must fit in under 4× its own size). Large buffers are
// lent one at a time (largeScratchGate), so that workers fitting several
// families of one big dataset at once hold one copy of transformed data
// between them, not one each; the fits that need none run on meanwhile.
const largeScratchLen = 1 << 20

// largeScratchGate admits one holder of a large scratch buffer at a time.
// A holder borrows exactly one buffer and borrows nothing else before
// returning it, so the gate cannot deadlock.
var largeScratchGate = make(chan struct{}, 1)

// largeScratch keeps the last large buffer for the next large fit, through
// a weak pointer: reused while it survives, reclaimed by the garbage
// collector once it is no longer lent (not kept per processor, as a
// sync.Pool would, where a second copy could wait unused beside the one
// lent). Only the holder of largeScratchGate touches it.
var largeScratch weak.Pointer[[]float64]

// borrowScratch returns a buffer of length n from scratchPool; hand it back
// with returnScratch once nothing refers to its slice any more. For
// n > largeScratchLen it waits until no other large buffer is lent.
func borrowScratch(n int) *[]float64 {
	var p *[]float64
	if n > largeScratchLen {
		largeScratchGate <- struct{}{}
		if p = largeScratch.Value(); p == nil {
			p = new([]float64)
		}
	} else {
		p = scratchPool.Get().(*[]float64)
	}
	if cap(*p) < n {
		*p = nil // let the old buffer go before the new one is made
		*p = make([]float64, n)
	}
	*p = (*p)[:n]
	return p
}

// returnScratch gives a buffer from borrowScratch back for reuse.
func returnScratch(p *[]float64) {
	if len(*p) > largeScratchLen {
		largeScratch = weak.Make(p)
		<-largeScratchGate
		return
	}
	scratchPool.Put(p)
}
