package fitters

import (
	"fmt"
	"math"
	"slices"
	"sync"
	"sync/atomic"
)

// Data is one dataset as a likelihood sees it. Observations are grouped by how
// they were recorded, so that the hot loops run over plain slices:
//
//   - Exact: the value was observed; it adds ln f(x) to the log-likelihood.
//   - Left: a non-detect, the true value is at or below the recorded limit; ln F(x).
//   - Right: a suspension, the true value is at or above the recorded value; ln S(x).
//   - Lower/Upper: interval-censored, the value lies in (Lower[i], Upper[i]];
//     either bound may be infinite (open); ln(F(u) − F(l)).
//
// Count data use Exact only; Trials, when non-nil, holds each exact
// observation's number of trials (binomial-type families) and has the same
// length as Exact.
type Data struct {
	Exact  []float64
	Left   []float64
	Right  []float64
	Lower  []float64
	Upper  []float64
	Trials []int

	// sorted holds the *sortedView of SortedExact.
	sorted atomic.Value
}

// sortedView is Exact in ascending order, with the slice it was made from,
// and how many of its values repeat the one before.
type sortedView struct {
	of   *float64 // &Exact[0]
	n    int
	x    []float64
	ties int
}

// SortedExact returns the exact values in ascending order. The sort is done
// on the first call and its result shared by every later call, from any
// goroutine: the goodness-of-fit statistics of every family fitted to one
// dataset sort it once. When Exact is already in order it is returned
// itself, with no copy. The result must not be modified; the view is made
// again only when Exact is replaced by another slice, so values must not be
// changed in place once SortedExact has been called.
func (d *Data) SortedExact() []float64 {
	if len(d.Exact) == 0 {
		return d.Exact
	}
	return d.view().x
}

// TiedExact is the number of exact values equal to a smaller-indexed one
// in SortedExact's order (n minus the number of distinct values), counted
// once with the sort.
func (d *Data) TiedExact() int {
	if len(d.Exact) == 0 {
		return 0
	}
	return d.view().ties
}

// view returns the sorted view of the current Exact (not empty), making it
// on first use. Two goroutines that find no view may both sort (each with a
// sorter of its own, so that tasks of different datasets never wait for
// each other); the first view stored is the one every caller gets, and the
// same values sort to the same bits either way.
func (d *Data) view() *sortedView {
	if v := d.storedView(); v != nil {
		return v
	}
	v := &sortedView{of: &d.Exact[0], n: len(d.Exact), x: d.Exact}
	if !slices.IsSorted(d.Exact) {
		v.x = sortedCopy(d.Exact)
	}
	v.ties = CountTies(v.x)
	for {
		old := d.sorted.Load()
		if ov, _ := old.(*sortedView); ov != nil && ov.of == v.of && ov.n == v.n {
			return ov
		}
		if d.sorted.CompareAndSwap(old, v) {
			return v
		}
	}
}

// sortedCopy returns x's values in ascending order (slices.Sort's order):
// by a pooled FloatSorter (O(n)) up to 2¹⁶ values, whose 8n bytes of
// scratch are then small; by slices.Sort in place on the copy above that,
// so that a large dataset is never held three times over while it is
// sorted.
func sortedCopy(x []float64) []float64 {
	if len(x) > 1<<16 {
		y := slices.Clone(x)
		slices.Sort(y)
		return y
	}
	y := make([]float64, len(x))
	s := copySorters.Get().(*FloatSorter)
	s.SortInto(y, x)
	copySorters.Put(s)
	return y
}

// CountTies is the number of values of the sorted x equal to the one
// before (len(x) minus the number of distinct values).
func CountTies(x []float64) int {
	ties := 0
	for i := 1; i < len(x); i++ {
		if x[i] == x[i-1] {
			ties++
		}
	}
	return ties
}

// copySorters are sortedCopy's sorters, kept between calls so that their
// buckets are allocated once per goroutine at a time, not once per dataset
// (8 KB each for the batch benchmark's 1000 datasets of 1000 values).
var copySorters = sync.Pool{New: func() any { return new(FloatSorter) }}

// storedView returns the stored view when it was made from the current
// Exact, else nil.
func (d *Data) storedView() *sortedView {
	v, _ := d.sorted.Load().(*sortedView)
	if v == nil || v.of != &d.Exact[0] || v.n != len(d.Exact) {
		return nil
	}
	return v
}

// Complete returns data made only of exact observations.
func Complete(x []float64) *Data { return &Data{Exact: x} }

// N is the number of observations of every kind.
func (d *Data) N() int { return len(d.Exact) + len(d.Left) + len(d.Right) + len(d.Lower) }

// NCensored is the number of censored observations (left, right and interval).
func (d *Data) NCensored() int { return len(d.Left) + len(d.Right) + len(d.Lower) }

// IsComplete reports whether every observation is exact.
func (d *Data) IsComplete() bool { return d.NCensored() == 0 }

// Validate checks the internal consistency of d: finite values, matching
// interval bounds with lower < upper, and a Trials slice aligned with Exact.
// It is a programmer-facing check; the runner reports data problems with file
// and line before they get here.
func (d *Data) Validate() error {
	for _, s := range []struct {
		name string
		v    []float64
	}{{"exact", d.Exact}, {"left-censored", d.Left}, {"right-censored", d.Right}} {
		for i, x := range s.v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return fmt.Errorf("%s observation %d is %v: every value must be finite", s.name, i, x)
			}
		}
	}
	if len(d.Lower) != len(d.Upper) {
		return fmt.Errorf("interval data: %d lower bounds but %d upper bounds", len(d.Lower), len(d.Upper))
	}
	for i := range d.Lower {
		l, u := d.Lower[i], d.Upper[i]
		if math.IsNaN(l) || math.IsNaN(u) || math.IsInf(l, 1) || math.IsInf(u, -1) {
			return fmt.Errorf("interval observation %d is (%v, %v]: bounds must be numbers, open ends ±Inf", i, l, u)
		}
		if !(l < u) {
			return fmt.Errorf("interval observation %d is (%v, %v]: lower must be below upper", i, l, u)
		}
	}
	if d.Trials != nil && len(d.Trials) != len(d.Exact) {
		return fmt.Errorf("%d trials for %d observations", len(d.Trials), len(d.Exact))
	}
	return nil
}

// valuesView is Values without the copy when the data are complete: then it
// is d.Exact itself, to be read, never written (a copy of a dataset of 10
// million values is 80 MB; issue 8).
func (d *Data) valuesView() []float64 {
	if d.IsComplete() {
		return d.Exact
	}
	return d.Values()
}

// Values returns every recorded value (exact values, censoring limits, and
// the finite interval bounds), for support checks and starting values.
func (d *Data) Values() []float64 {
	v := make([]float64, 0, d.N()+len(d.Upper))
	v = append(v, d.Exact...)
	v = append(v, d.Left...)
	v = append(v, d.Right...)
	for i := range d.Lower {
		if !math.IsInf(d.Lower[i], 0) {
			v = append(v, d.Lower[i])
		}
		if !math.IsInf(d.Upper[i], 0) {
			v = append(v, d.Upper[i])
		}
	}
	return v
}

// minMax returns the smallest and largest of v (NaN, NaN for an empty slice).
func minMax(v []float64) (lo, hi float64) {
	if len(v) == 0 {
		return math.NaN(), math.NaN()
	}
	lo, hi = v[0], v[0]
	for _, x := range v[1:] {
		if x < lo {
			lo = x
		}
		if x > hi {
			hi = x
		}
	}
	return lo, hi
}
