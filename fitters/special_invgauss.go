package fitters

import "math"

// glNodes and glWeights are the 20-point Gauss–Legendre rule on [−1, 1].
var glNodes, glWeights = gaussLegendre(20)

// gaussLegendre returns the nodes and weights of the n-point Gauss–Legendre
// rule on [−1, 1], found by Newton's method on the Legendre polynomial P_n
// from the starting values cos(π(i − 1/4)/(n + 1/2)) (Press et al.,
// Numerical Recipes, 4.6).
func gaussLegendre(n int) (x, w []float64) {
	x, w = make([]float64, n), make([]float64, n)
	for i := 0; i < (n+1)/2; i++ {
		z := math.Cos(math.Pi * (float64(i) + 0.75) / (float64(n) + 0.5))
		var dp float64
		for it := 0; it < 100; it++ {
			p1, p2 := 1.0, 0.0
			for j := 1; j <= n; j++ {
				p3 := p2
				p2 = p1
				p1 = ((2*float64(j)-1)*z*p2 - (float64(j)-1)*p3) / float64(j)
			}
			dp = float64(n) * (z*p1 - p2) / (z*z - 1)
			dz := p1 / dp
			z -= dz
			if math.Abs(dz) < 1e-16 {
				break
			}
		}
		x[i], x[n-1-i] = -z, z
		w[i] = 2 / ((1 - z*z) * dp * dp)
		w[n-1-i] = w[i]
	}
	return x, w
}

// oneMinusTMills returns 1 − t·R(t) = −R′(t) > 0, where R(t) = Q(t)/φ(t) is
// the normal Mills ratio. For t ≥ 5 it uses Laplace's continued fraction:
// with R = 1/(t + c), c = 1/(t + 2/(t + 3/(t + …))), 1 − tR = c·R, free of
// the cancellation of 1 − tR; below 5, R comes from erfc.
func oneMinusTMills(t float64) float64 {
	if t >= 5 {
		c := t
		for k := 80; k >= 2; k-- {
			c = t + float64(k)/c
		}
		c = 1 / c
		return c / (t + c)
	}
	r := 0.5 * math.Erfc(t/sqrt2) * math.Exp(0.5*t*t+lnSqrt2Pi)
	return 1 - t*r
}

// logMillsDifference returns ln(R(a) − R(b)) for 0 ≤ a < b, as
// ln ∫_a^b (1 − tR(t)) dt by 20-point Gauss–Legendre quadrature; the
// integrand is smooth and slowly varying on [a, b] when b < 2a + 1.
func logMillsDifference(a, b float64) float64 {
	h, m := 0.5*(b-a), 0.5*(b+a)
	var s float64
	for i, u := range glNodes {
		s += glWeights[i] * oneMinusTMills(m+h*u)
	}
	return math.Log(h * s)
}

// logMills returns ln R(t), R(t) = Q(t)/φ(t) the normal Mills ratio, for
// any t: the continued fraction from t = 5 on, ln Q(t) + t²/2 + ln√(2π) below.
func logMills(t float64) float64 {
	if t >= 5 {
		return math.Log(millsRatio(t))
	}
	return logNormalCDF(-t) + 0.5*t*t + lnSqrt2Pi
}

// logAddExpPair returns ln(e^a + e^b) without overflow.
func logAddExpPair(a, b float64) float64 {
	if a < b {
		a, b = b, a
	}
	if math.IsInf(b, -1) {
		return a
	}
	return a + math.Log1p(math.Exp(b-a))
}
