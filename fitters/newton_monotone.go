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
//
// certain, when not nil, is asked about each Newton step x → next inside
// the bracket before next is evaluated: it returns a bound on |g(next)| and
// true when the caller can prove (from its sums at x and bounds on g″) that
// the step from next would be below xtol·next, having brought its own sums
// to next without a pass. newtonMonotone then returns next with that bound.
func newtonMonotone(gdg func(x float64) (g, dg float64), x0, xtol float64, maxIter int, certain func(x, next float64) (gBound float64, ok bool)) (root, gRoot float64, iterations int, err error) {
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
		newton := dg > 0 && next > lo && next < hi
		if !newton {
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
		if newton && certain != nil {
			if gb, ok := certain(x, next); ok {
				return next, gb, it, nil
			}
		}
		x = next
	}
	return x, math.NaN(), maxIter, fmt.Errorf("no convergence in %d iterations", maxIter)
}

// tiltedS0 moves the sum S0(t) = Σ exp(t·eᵢ) of a Weibull or Gumbel
// profile equation from t to t + τ without a pass over the data. With
// cᵢ = eᵢ − me, |cᵢ| ≤ cmax, S1 = Σ wᵢcᵢ and S2 = Σ wᵢcᵢ² at t (wᵢ = exp(t·eᵢ)):
//
//	S0(t+τ) = e^(τ·me) Σ wᵢ e^(τcᵢ) = e^(τ·me) (S0 + τS1 + τ²S2/2)(1 + r),
//
// |r| ≤ (|τ|cmax)³e^(|τ|cmax)/6 (Taylor's theorem, term by term). It reports
// false unless |r| is below 2⁻⁵⁴, half a rounding unit.
func tiltedS0(s0, s1, s2, me, cmax, tau float64) (float64, bool) {
	u := math.Abs(tau) * cmax
	if !(u*u*u*math.Exp(u)/6 <= 0x1p-54) {
		return 0, false
	}
	return math.Exp(tau*me) * (s0 + tau*(s1+0.5*tau*s2)), true
}

// skipCertainSteps turns the unconfirmed last step of the Weibull and
// Gumbel profile equations off (tests compare both routes).
var skipCertainSteps = false

func certainOrNil(c func(x, next float64) (float64, bool)) func(x, next float64) (float64, bool) {
	if skipCertainSteps {
		return nil
	}
	return c
}
