package infer

import (
	"cmp"
	"math"
	"slices"

	"fitseal/fitters"
)

// ProfileLogLik returns the profile log-likelihood of parameter i of fit on
// d,
//
//	ℓp(θᵢ) = max over the other free parameters of ln L(θ),
//
// at each of values (values of θᵢ itself), computed as the
// profile-likelihood intervals compute it: the same inner maximisation on
// the same scales, with the same guards for the families whose likelihood
// is unbounded or flat at an edge (guardIrregular), walking out from the
// estimate on each side, each maximisation started where the previous one
// ended. A value where there is no maximum to report — beyond the parameter
// space, or where the maximisation runs into an unbounded corner of the
// likelihood — gives NaN. So a curve drawn from it is the profile whose
// crossings of the cut-off the intervals report.
func ProfileLogLik(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, i int, values []float64) []float64 {
	out := make([]float64, len(values))
	for k := range out {
		out[k] = math.NaN()
	}
	if i < 0 || i >= len(fit.Estimates) || (i < len(fit.Fixed) && fit.Fixed[i]) {
		return out
	}
	scales := scalesOf(fam, fit.Estimates)
	p := parameterProfiler(fam, fit, fitters.LogLikFunc(fam, d), scales, i)
	guardIrregular(p, fam, fit, d)
	est := fit.Estimates[i]
	for _, above := range []bool{false, true} {
		// The values on this side of the estimate, nearest first.
		var side []int
		for k, v := range values {
			if (v > est) == above {
				side = append(side, k)
			}
		}
		slices.SortStableFunc(side, func(a, b int) int { return cmp.Compare(math.Abs(values[a]-est), math.Abs(values[b]-est)) })
		warm := p.u0
		for _, k := range side {
			ll, u, edge, ok := p.at(scales[i].To(values[k]), warm)
			if edge || math.IsInf(ll, 0) || math.IsNaN(ll) {
				continue
			}
			out[k] = ll
			if ok {
				warm = u
			}
		}
	}
	return out
}
