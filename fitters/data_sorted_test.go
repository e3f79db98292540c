package fitters

import (
	"math"
	"slices"
	"sync"
	"testing"
)

// TestSortedExact: SortedExact sorts a copy once and shares it (the data
// keep their order), returns already-sorted data itself, makes a new view
// when Exact is replaced, and gives every goroutine the same slice.
func TestSortedExact(t *testing.T) {
	raw := []float64{3, -1, 2, 2, 10, 0.5}
	d := Complete(slices.Clone(raw))
	x := d.SortedExact()
	if want := []float64{-1, 0.5, 2, 2, 3, 10}; !slices.Equal(x, want) {
		t.Fatalf("SortedExact = %v, want %v", x, want)
	}
	if !slices.Equal(d.Exact, raw) {
		t.Errorf("Exact changed to %v", d.Exact)
	}
	if y := d.SortedExact(); &y[0] != &x[0] {
		t.Error("second call sorted again instead of sharing the first result")
	}
	if got := d.TiedExact(); got != 1 {
		t.Errorf("TiedExact = %d, want 1 (the second 2)", got)
	}

	in := []float64{1, 2, 4}
	if y := Complete(in).SortedExact(); &y[0] != &in[0] {
		t.Error("sorted data were copied")
	}

	d.Exact = []float64{5, 4}
	if y := d.SortedExact(); !slices.Equal(y, []float64{4, 5}) {
		t.Errorf("after replacing Exact: %v, want [4 5]", y)
	}
	if got := d.TiedExact(); got != 0 {
		t.Errorf("after replacing Exact: TiedExact = %d, want 0", got)
	}
	if y := (&Data{}).SortedExact(); len(y) != 0 {
		t.Errorf("no data: %v", y)
	}
	// Ties are values equal to the one before: −0 and +0 are equal, NaNs
	// are not.
	for _, tc := range []struct {
		x    []float64
		want int
	}{
		{nil, 0},
		{[]float64{1}, 0},
		{[]float64{3, 3, 3, 1, 1, 2}, 3},
		{[]float64{0, math.Copysign(0, -1), 7}, 1},
		{[]float64{math.NaN(), math.NaN(), 1}, 0},
	} {
		if got := Complete(slices.Clone(tc.x)).TiedExact(); got != tc.want {
			t.Errorf("TiedExact(%v) = %d, want %d", tc.x, got, tc.want)
		}
	}

	c := Complete([]float64{9, 8, 7, 6, 5, 4, 3, 2, 1})
	got := make([][]float64, 8)
	var wg sync.WaitGroup
	for i := range got {
		wg.Add(1)
		go func() {
			defer wg.Done()
			got[i] = c.SortedExact()
		}()
	}
	wg.Wait()
	for _, g := range got[1:] {
		if &g[0] != &got[0][0] {
			t.Fatal("concurrent calls returned different copies")
		}
	}
}
