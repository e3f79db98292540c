package fitters

import "math"

// stirlingDelta returns Stirling's remainder
//
//	δ(z) = ln Γ(z) − (z − ½) ln z + z − ln √(2π),  z > 0:
//
// from z = 10 the series 1/(12z) − 1/(360z³) + 1/(1260z⁵) − 1/(1680z⁷) +
// 1/(1188z⁹) − 691/(360360z¹¹) + 1/(156z¹³) (Abramowitz & Stegun 6.1.41;
// the next term is below 4e-18 there), below it directly from math.Lgamma
// (absolute error a few ε). It is the one Stirling series
// of the package: gamma's c(k), the count families' ln Γ differences,
// studentt's constant and the incomplete beta's power terms all take it.
func stirlingDelta(z float64) float64 {
	if z < 10 {
		lg, _ := math.Lgamma(z)
		return lg - (z-0.5)*math.Log(z) + z - lnSqrt2Pi
	}
	w := 1 / (z * z)
	return (1.0/12 - w*(1.0/360-w*(1.0/1260-w*(1.0/1680-w*(1.0/1188-w*(691.0/360360-w*(1.0/156))))))) / z
}
