package fitters

import (
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

// Large scratch buffers are lent one at a time (issue 8: a big dataset's
// fits must not hold one transformed copy per worker).
func TestLargeScratchLentOneAtATime(t *testing.T) {
	var inUse, most atomic.Int32
	var wg sync.WaitGroup
	for range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			buf := borrowScratch(largeScratchLen + 1)
			if k := inUse.Add(1); k > most.Load() {
				most.Store(k)
			}
			time.Sleep(5 * time.Millisecond)
			if len(*buf) != largeScratchLen+1 {
				t.Errorf("len = %d, want %d", len(*buf), largeScratchLen+1)
			}
			inUse.Add(-1)
			returnScratch(buf)
		}()
	}
	wg.Wait()
	if m := most.Load(); m != 1 {
		t.Errorf("%d large buffers lent at once, want 1", m)
	}
	// Small buffers do not wait on the gate, even while a large one is lent.
	big := borrowScratch(largeScratchLen + 1)
	small := borrowScratch(10)
	returnScratch(small)
	returnScratch(big)
}

// logisticSums gives bit-identical sums whatever the length of its block
// of exponentials (a whole multiple of logProductChunk), so the bounded
// work buffer changes no result.
func TestLogisticSumsBlockInvariant(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 2026))
	v := make([]float64, 3*locScaleBlock+123)
	for i := range v {
		v[i] = r.NormFloat64()
	}
	full := logisticSums(v, make([]float64, len(v)), 0.3, 1.7)
	for _, block := range []int{logProductChunk, locScaleBlock, 5 * logProductChunk} {
		if got := logisticSums(v, make([]float64, block), 0.3, 1.7); got != full {
			t.Errorf("block %d: %+v, want %+v", block, got, full)
		}
	}
}

// Standardizing in place (as loglogisticMLE does with its own buffer)
// gives the same fit as standardizing into a borrowed buffer.
func TestLogisticMLEInPlaceSame(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 2027))
	x := make([]float64, 5000)
	for i := range x {
		x[i] = 3 + 2*r.NormFloat64()
	}
	m1, s1, ll1, c1 := logisticMLE(x, Options{})
	y := slices.Clone(x)
	m2, s2, ll2, c2 := logisticMLEInto(y, y, Options{})
	if m1 != m2 || s1 != s2 || ll1 != ll2 || c1.Converged != c2.Converged {
		t.Errorf("in place (%v, %v, %v) differs from copy (%v, %v, %v)", m2, s2, ll2, m1, s1, ll1)
	}
	if !c1.Converged || math.IsNaN(ll1) {
		t.Errorf("fit did not converge: %+v", c1)
	}
}

// valuesView of complete data is d.Exact itself (no copy) and equals Values.
func TestValuesViewComplete(t *testing.T) {
	d := Complete([]float64{3, 1, 2})
	v := d.valuesView()
	if &v[0] != &d.Exact[0] || !slices.Equal(v, d.Values()) {
		t.Errorf("valuesView = %v, want d.Exact %v itself", v, d.Exact)
	}
	c := &Data{Exact: []float64{1}, Right: []float64{2}}
	if !slices.Equal(c.valuesView(), c.Values()) {
		t.Errorf("censored valuesView = %v, want %v", c.valuesView(), c.Values())
	}
}
