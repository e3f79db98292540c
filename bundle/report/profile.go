package report

import (
	"math"

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
// the interval is not finite. The values are infer.ProfileLogLik's: the
// profile the intervals are found on, with the same inner maximisation
// (warm starts walking out from the estimate) and the same guards where
// the likelihood is unbounded or flat at an edge; a point with no maximum
// there is left out. The cut-off is
// ℓ(θ̂) − χ²₁(level)/2, so a profile-likelihood interval is where the curve
// stays above it (Venzon & Moolgavkar 1988). ok is false when no curve
// could be traced.
func ProfileCurve(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, i int, lower, upper, stdErr, level float64) (Profile, bool) {
	names := fam.Parameters()
	if i < 0 || i >= len(names) || i >= len(fit.Estimates) || (i < len(fit.Fixed) && fit.Fixed[i]) {
		return Profile{}, false
	}
	s := infer.ScaleOf(fam, fit.Estimates, i)
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

	pr := Profile{Family: fit.Family, Parameter: names[i], Estimate: est, Lower: lower, Upper: upper,
		Cutoff: fit.LogLik - distuv.ChiSquared{K: 1}.Quantile(level)/2}
	values := make([]float64, ProfilePoints)
	for k := range values {
		values[k] = s.From(tlo + (thi-tlo)*float64(k)/float64(ProfilePoints-1))
	}
	lls := infer.ProfileLogLik(fam, fit, d, i, values)
	for k := range values {
		if finiteNum(values[k]) && finiteNum(lls[k]) {
			pr.Values = append(pr.Values, values[k])
			pr.LogLik = append(pr.LogLik, lls[k])
		}
	}
	return pr, len(pr.Values) >= 2
}
