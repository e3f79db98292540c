package fitters

import "math"

// fitByMinimize maximises f's full log-likelihood with minimize (BFGS on an
// unconstrained scale θ) and records the optimum in fit. toNatural maps θ to
// the family's parameters (e.g. exp for a positive parameter). This is the
// route for censored data, where the closed forms and profile equations of
// complete data no longer hold; the starts come from a complete-data estimate.
//
// Location-scale families (and those of ln x) first try the dedicated
// censored Newton route from the first start (fitCensoredLocScale); only
// when it does not converge does the BFGS route run.
func fitByMinimize(fit *Fit, f Family, d *Data, opt Options, toNatural func(theta []float64) []float64, starts [][]float64, method string) {
	if len(starts) > 0 && fitCensoredLocScale(fit, f, d, opt, toNatural(starts[0])) {
		return
	}
	dim := len(starts[0])
	prob := problem{dim: dim, negLogLik: func(t []float64) float64 {
		return -f.LogLik(toNatural(t), d)
	}}
	o := minimize(prob, starts, opt)
	var est []float64
	if o.theta != nil {
		est = toNatural(o.theta)
		ll := f.LogLik(est, d)
		if math.IsNaN(ll) || math.IsInf(ll, 0) {
			o.converged = false
			o.reason = "the optimiser ended where the log-likelihood is not finite"
		}
	}
	fit.setOptimum(o, est, method)
}

// startSample returns the values a complete-data estimator starts a censored
// fit from: the exact values when there are at least min distinct ones,
// otherwise every recorded value (censoring limits and finite interval
// bounds included). When positive is set, values ≤ 0 are left out.
func startSample(d *Data, min int, positive bool) []float64 {
	keep := func(v []float64) []float64 {
		out := make([]float64, 0, len(v))
		for _, x := range v {
			if !positive || x > 0 {
				out = append(out, x)
			}
		}
		return out
	}
	ex := keep(d.Exact)
	if len(ex) >= min {
		if lo, hi := minMax(ex); lo < hi {
			return ex
		}
	}
	return keep(d.Values())
}

// locScaleStart returns a starting location (the mean) and scale
// (factor × standard deviation) of x, with safe defaults when x has no spread.
func locScaleStart(x []float64, factor float64) (location, scale float64) {
	if len(x) == 0 {
		return 0, 1
	}
	m, v := meanVar(x)
	s := factor * math.Sqrt(v)
	if !(s > 0) || math.IsInf(s, 0) {
		s = math.Max(1, math.Abs(m)*1e-3)
	}
	return m, s
}
