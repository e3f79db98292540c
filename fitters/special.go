package fitters

import "math"

const (
	lnSqrt2Pi = 0.91893853320467274178032973640561763986 // ln √(2π)
	sqrt2     = math.Sqrt2
)

// logNormalCDF returns ln Φ(z), the log of the standard normal CDF, accurate
// for every z: through erfc in the body and, below z = −5, through the Mills
// ratio R(x) = (1 − Φ(x))/φ(x), x = −z, evaluated by its continued fraction
// R(x) = 1/(x + 1/(x + 2/(x + 3/(x + …)))) (Laplace; Abramowitz & Stegun
// 26.2.14), so that ln Φ(−40) = −804.608… instead of ln 0.
func logNormalCDF(z float64) float64 {
	switch {
	case math.IsNaN(z):
		return math.NaN()
	case z > 5:
		// Φ(z) = 1 − Q(z), Q tiny: log1p(−Q) keeps every digit.
		return math.Log1p(-0.5 * math.Erfc(z/sqrt2))
	case z > -5:
		return math.Log(0.5 * math.Erfc(-z/sqrt2))
	case math.IsInf(z, -1):
		return math.Inf(-1)
	}
	x := -z
	return -0.5*x*x - lnSqrt2Pi + math.Log(millsRatio(x))
}

// logNormalSurvival returns ln(1 − Φ(z)) = ln Φ(−z).
func logNormalSurvival(z float64) float64 { return logNormalCDF(-z) }

// millsRatio returns (1 − Φ(x))/φ(x) for x ≥ 5 by backward evaluation of
// Laplace's continued fraction; 80 terms give full double precision there.
func millsRatio(x float64) float64 {
	t := x
	for k := 80; k >= 1; k-- {
		t = x + float64(k)/t
	}
	return 1 / t
}
