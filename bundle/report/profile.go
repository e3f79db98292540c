package report

import (
	"math"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distuv"

	"fitseal/fitters"
	"fitseal/fitters/infer"
)

// ProfilePoints is the number of points of a drawn profile curve.
const ProfilePoints = 31

// ProfileCurve traces the profile log-likelihood of parameter i of a fit,
//
//	ℓp(θᵢ) = max over the other free parameters of ln L(θ),
//
// at ProfilePoints values spread evenly, on the parameter's own scale
// (log for positive parameters, logit for probabilities; see
// [infer.ScaleOf]), over the interval [lower, upper] widened by a third of
// its length on each side, or over the estimate ± 3 standard errors when
// the interval is not finite. The other parameters are maximised by BFGS,
// or Nelder–Mead where that fails (maximise), from the previous point's
// optimum (warm starts walking out from the estimate). The cut-off is
// ℓ(θ̂) − χ²₁(level)/2, so a profile-likelihood interval is where the curve
// stays above it (Venzon & Moolgavkar 1988). ok is false when no curve
// could be traced.
func ProfileCurve(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, i int, lower, upper, stdErr, level float64) (Profile, bool) {
	names := fam.Parameters()
	if i < 0 || i >= len(names) || i >= len(fit.Estimates) || (i < len(fit.Fixed) && fit.Fixed[i]) {
		return Profile{}, false
	}
	scales := make([]infer.Scale, len(names))
	for j := range names {
		scales[j] = infer.ScaleOf(fam, fit.Estimates, j)
	}
	s := scales[i]
	est := fit.Estimates[i]
	te := s.To(est)
	var tlo, thi float64
	switch {
	case finiteNum(lower) && finiteNum(upper) && upper > lower:
		a, b := s.To(lower), s.To(upper)
		w := (b - a) / 3
		tlo, thi = math.Min(a, te)-w, math.Max(b, te)+w
	case finiteNum(stdErr) && stdErr > 0:
		// Three standard errors, carried to the parameter's scale.
		w := 3 * stdErr / math.Max(s.Deriv(est), 1e-300)
		tlo, thi = te-w, te+w
	default:
		return Profile{}, false
	}
	if !finiteNum(tlo) || !finiteNum(thi) || thi <= tlo {
		return Profile{}, false
	}

	var free []int
	for j := range names {
		if j != i && (j >= len(fit.Fixed) || !fit.Fixed[j]) {
			free = append(free, j)
		}
	}
	params := append([]float64(nil), fit.Estimates...)
	famLogLik := fitters.LogLikFunc(fam, d)
	loglik := func(u []float64) float64 {
		for k, j := range free {
			params[j] = scales[j].From(u[k])
		}
		return famLogLik(params)
	}
	start := make([]float64, len(free))
	for k, j := range free {
		start[k] = scales[j].To(fit.Estimates[j])
	}

	pr := Profile{Family: fit.Family, Parameter: names[i], Estimate: est, Lower: lower, Upper: upper,
		Cutoff: fit.LogLik - distuv.ChiSquared{K: 1}.Quantile(level)/2}
	values := make([]float64, ProfilePoints)
	lls := make([]float64, ProfilePoints)
	// Walk out from the estimate in both directions, each point starting
	// from its neighbour's optimum.
	mid := int(math.Round((te - tlo) / (thi - tlo) * float64(ProfilePoints-1)))
	mid = max(0, min(ProfilePoints-1, mid))
	for _, dir := range []int{-1, 1} {
		warm := append([]float64(nil), start...)
		from := mid
		if dir == 1 {
			from = mid + 1
		}
		for k := from; k >= 0 && k < ProfilePoints; k += dir {
			t := tlo + (thi-tlo)*float64(k)/float64(ProfilePoints-1)
			params[i] = s.From(t)
			values[k] = params[i]
			if len(free) == 0 {
				lls[k] = famLogLik(params)
				continue
			}
			u, ll := maximise(loglik, warm)
			lls[k] = ll
			if finiteNum(ll) {
				warm = u
			}
		}
	}
	for k := range values {
		if finiteNum(values[k]) && finiteNum(lls[k]) {
			pr.Values = append(pr.Values, values[k])
			pr.LogLik = append(pr.LogLik, lls[k])
		}
	}
	return pr, len(pr.Values) >= 2
}

// maximise maximises f from x0 and returns the best point and value found
// (−Inf when every value was outside the support): by BFGS with
// central-difference gradients (fitters.MinimizeBFGS, on this goroutine)
// when it converges to a finite value, else by Nelder–Mead, which copes
// with the edge of a support where the value jumps to −Inf (a barrier of
// MaxFloat64 on the minimised side).
func maximise(f func([]float64) float64, x0 []float64) ([]float64, float64) {
	p := optimize.Problem{Func: func(u []float64) float64 {
		v := f(u)
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return math.MaxFloat64
		}
		return -v
	}}
	if f0 := p.Func(x0); f0 < math.MaxFloat64 {
		scale := math.Max(1, math.Abs(f0))
		grad := func(g, x []float64) {
			fd.Gradient(g, p.Func, x, &fd.Settings{Formula: fd.Central, Step: 1e-6})
		}
		res, err := fitters.MinimizeBFGS(optimize.Problem{Func: p.Func, Grad: grad}, append([]float64(nil), x0...), &optimize.Settings{
			GradientThreshold: 1e-7 * scale,
			Converger:         &optimize.FunctionConverge{Absolute: 1e-10 * scale, Relative: 1e-10, Iterations: 20},
			MajorIterations:   500,
		})
		if err == nil && res.F < f0+1e-12*scale && res.F < math.MaxFloat64 &&
			(res.Status == optimize.GradientThreshold || res.Status == optimize.FunctionConvergence) {
			return res.X, -res.F
		}
	}
	res, err := optimize.Minimize(p, x0, &optimize.Settings{
		MajorIterations: 2000,
		Converger:       &optimize.FunctionConverge{Absolute: 1e-10, Relative: 1e-10, Iterations: 50},
	}, &optimize.NelderMead{})
	if res == nil || (err != nil && res.F == 0) {
		return x0, math.Inf(-1)
	}
	if res.F == math.MaxFloat64 {
		return x0, math.Inf(-1)
	}
	return res.X, -res.F
}
