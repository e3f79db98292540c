package fitters

import "math"

// logDiffExp returns ln(e^a − e^b) for a ≥ b without cancellation:
// a + ln(1 − e^(b−a)), using log1p or log(−expm1) whichever is accurate.
func logDiffExp(a, b float64) float64 {
	if b > a || math.IsNaN(a) || math.IsNaN(b) {
		return math.NaN()
	}
	if math.IsInf(b, -1) {
		return a
	}
	if a == b {
		return math.Inf(-1)
	}
	d := b - a // < 0
	if d > -math.Ln2 {
		return a + math.Log(-math.Expm1(d))
	}
	return a + math.Log1p(-math.Exp(d))
}

// log1mExp returns ln(1 − e^x) for x ≤ 0 accurately (Mächler, 2012):
// log(−expm1(x)) near 0 and log1p(−exp(x)) further out.
func log1mExp(x float64) float64 {
	if x > -math.Ln2 {
		return math.Log(-math.Expm1(x))
	}
	return math.Log1p(-math.Exp(x))
}

// logIntervalProb returns ln P(l < X ≤ u) = ln(F(u) − F(l)) for a
// distribution, choosing the lower-tail or upper-tail form so that the
// difference never cancels: in the upper tail it uses S(l) − S(u).
// Open bounds are ±Inf.
func logIntervalProb(d Dist, l, u float64) float64 {
	if math.IsInf(l, -1) {
		return d.LogCDF(u)
	}
	if math.IsInf(u, 1) {
		return d.LogSurvival(l)
	}
	lcu, lcl := d.LogCDF(u), d.LogCDF(l)
	// Where F(l) is above one half, the survival form is the accurate one.
	if lcl > -math.Ln2 {
		return logDiffExp(d.LogSurvival(l), d.LogSurvival(u))
	}
	return logDiffExp(lcu, lcl)
}

// censoredLogLik is the log-likelihood of every observation of data under
// d: Σ ln f(exact) + Σ ln F(left) + Σ ln S(right) + Σ ln(F(u) − F(l)).
// Families add the exact part themselves when they have a faster sum.
func censoredLogLik(d Dist, data *Data, includeExact bool) float64 {
	var s float64
	if includeExact {
		for _, x := range data.Exact {
			s += d.LogPDF(x)
		}
	}
	for _, x := range data.Left {
		s += d.LogCDF(x)
	}
	for _, x := range data.Right {
		s += d.LogSurvival(x)
	}
	for i := range data.Lower {
		s += logIntervalProb(d, data.Lower[i], data.Upper[i])
	}
	if math.IsNaN(s) {
		return math.Inf(-1)
	}
	return s
}

// logLikOf evaluates a family's log-likelihood through its Dist: -Inf where
// the parameters are invalid.
func logLikOf(f Family, params []float64, data *Data) float64 {
	d, err := f.New(params)
	if err != nil {
		return math.Inf(-1)
	}
	return censoredLogLik(d, data, true)
}

// sumLog returns Σ ln x and the plain sum of x in one pass.
func sumLog(x []float64) (sumLn, sum float64) {
	for _, v := range x {
		sumLn += math.Log(v)
		sum += v
	}
	return sumLn, sum
}

// meanVar returns the mean and the maximum-likelihood (divide by n) variance
// of x, using a two-pass algorithm with the compensating correction term
// (Chan, Golub & LeVeque, 1983), accurate for data far from zero. The
// variance overflows to +Inf only when it exceeds the float64 range (data
// near 1e300); meanSD never does.
func meanVar(x []float64) (mean, variance float64) {
	mean, sd := meanSD(x)
	return mean, sd * sd
}

// meanSD returns the mean and the maximum-likelihood standard deviation of
// x. Values whose magnitude would overflow a sum or a square are first
// scaled by a power of two (an exact operation), so that data near the ends
// of the float64 range keep every digit.
func meanSD(x []float64) (mean, sd float64) {
	var big float64
	for _, v := range x {
		big = math.Max(big, math.Abs(v))
	}
	scale := 1.0
	if big > 0x1p500 || (big > 0 && big < 0x1p-500) {
		_, e := math.Frexp(big)
		scale = math.Ldexp(1, e)
	}
	n := float64(len(x))
	var s float64
	for _, v := range x {
		s += v / scale
	}
	m := s / n
	var ss, c float64
	for _, v := range x {
		d := v/scale - m
		ss += d * d
		c += d
	}
	variance := (ss - c*c/n) / n
	// One correction of the mean removes the rounding left by the first pass.
	m += c / n
	if variance < 0 {
		variance = 0
	}
	return m * scale, math.Sqrt(variance) * scale
}
