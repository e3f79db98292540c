package fitters

import (
	"fmt"
	"math"
)

// newtonMonotone finds the root of an increasing function g of a positive
// variable by Newton's method from x0, keeping the bracket [lo, hi] of the
// root learnt from the signs seen so far: a Newton step that leaves the
// bracket is replaced by bisection (geometric while one end is still open,
// so an open bracket widens by halving or doubling). Every evaluation is a
// pass over the data, so none is wasted: it returns the last point
// evaluated, once the next Newton step would move it by less than
// xtol·x, with g there (the caller's sums from that evaluation belong to it).
func newtonMonotone(gdg func(x float64) (g, dg float64), x0, xtol float64, maxIter int) (root, gRoot float64, iterations int, err error) {
	lo, hi := 0.0, math.Inf(1)
	x := x0
	for it := 1; it <= maxIter; it++ {
		g, dg := gdg(x)
		if math.IsNaN(g) {
			return x, g, it, fmt.Errorf("the equation is not a number at %v", x)
		}
		if g == 0 {
			return x, g, it, nil
		}
		if g < 0 {
			lo = x
		} else {
			hi = x
		}
		next := x - g/dg
		if dg > 0 && math.Abs(next-x) <= xtol*x {
			return x, g, it, nil
		}
		if !(dg > 0) || !(next > lo) || !(next < hi) {
			switch {
			case math.IsInf(hi, 1):
				next = 2 * x
			case lo == 0:
				next = x / 2
			default:
				next = math.Sqrt(lo * hi)
			}
		}
		if hi-lo <= xtol*x {
			return x, g, it, nil
		}
		x = next
	}
	return x, math.NaN(), maxIter, fmt.Errorf("no convergence in %d iterations", maxIter)
}
