package infer

import (
	"fmt"
	"math"
	"slices"
)

// studentized gathers the bootstrap-t pivots of one quantity,
//
//	t*ᵣ = (s(ψ*ᵣ) − s(ψ̂)) / se*ᵣ,
//
// s the quantity's scale (log, logit or natural) and se*ᵣ replicate r's
// standard error on that scale from its own observed information (Efron &
// Tibshirani, 1993, §12.5; Davison & Hinkley, 1997, §5.2.1).
type studentized struct {
	t []float64
	// left counts replicates with estimates whose pivot could not be
	// formed (no covariance, a quantity undefined at the refit, a standard
	// error that is zero or not finite); firstLeft says why for the lowest.
	left      int
	firstLeft string
}

// add records replicate r's pivot, or why it has none.
func (st *studentized) add(r int, tHat, tStar, seStar float64, why string) {
	if why == "" {
		switch {
		case !(seStar > 0) || math.IsInf(seStar, 0):
			why = fmt.Sprintf("standard error %v", seStar)
		case math.IsNaN(tStar) || math.IsInf(tStar, 0):
			why = fmt.Sprintf("estimate %v on the interval's scale", tStar)
		}
	}
	if why != "" {
		if st.left == 0 {
			st.firstLeft = fmt.Sprintf("replicate %d: %s", r, why)
		}
		st.left++
		return
	}
	st.t = append(st.t, (tStar-tHat)/seStar)
}

// interval returns s⁻¹(t̂ − t*₍₍₁₊L₎/₂₎·se), s⁻¹(t̂ − t*₍₍₁₋L₎/₂₎·se), the
// pivot quantiles by linear interpolation between order statistics
// (Hyndman & Fan, 1996, type 7); st.t is sorted in place.
func (st *studentized) interval(tHat, se float64, sc Scale, level float64) (float64, float64) {
	if len(st.t) == 0 {
		return math.NaN(), math.NaN()
	}
	slices.Sort(st.t)
	hi := quantile7(st.t, (1+level)/2)
	lo := quantile7(st.t, (1-level)/2)
	return sc.From(tHat - hi*se), sc.From(tHat - lo*se)
}

// note says which replicates were left out of the pivot quantiles.
func (st *studentized) note(requested int) string {
	if st.left == 0 {
		return ""
	}
	return fmt.Sprintf("%d of %d replicates gave no studentized value and are left out of the bootstrap-t quantiles (%s)", st.left, requested, st.firstLeft)
}

// bootstrapTLabel is the ci_method text of a bootstrap-t interval.
func bootstrapTLabel(sc Scale, used int) string {
	return fmt.Sprintf("bootstrap-t (%s scale, B = %d)", sc, used)
}

// percentileLabel is the ci_method text of the percentile interval the
// bootstrap falls back to.
func percentileLabel(used int) string {
	return fmt.Sprintf("bootstrap percentile (B = %d)", used)
}

// failedNote says how many replicates failed to refit.
func failedNote(rep *Replicates) string {
	if rep.Failed == 0 {
		return ""
	}
	return fmt.Sprintf("%d of %d replicates failed and are left out (%s)", rep.Failed, rep.Requested, rep.FirstFailure)
}

// noCovarianceWhy is why replicate r has no covariance ("" when it has one).
func noCovarianceWhy(rep *Replicates, r int) string {
	switch {
	case rep.Covariances[r] != nil:
		return ""
	case rep.NoCovariance > 0 && r == rep.firstNoCovariance:
		return rep.FirstNoCovariance[len(fmt.Sprintf("replicate %d: ", r)):]
	}
	return "observed information gave no covariance"
}

// bootstrapDerived fills out's bootstrap interval of the quantity g on
// scale sc from the replicates: bootstrap-t with the delta-method standard
// error seT of the estimate and, per replicate, the delta-method standard
// error from its own covariance; percentiles of g when that cannot be done.
func bootstrapDerived(out *DerivedValue, rep *Replicates, g func([]float64) float64, sc Scale, free []int, seT float64, infoErr error, discreteQuantile bool, level float64) {
	why := ""
	switch {
	case discreteQuantile:
		why = "a quantile of a discrete family is a step function of the parameters, with no delta-method standard error"
	case infoErr != nil:
		why = "the estimate has no standard error (" + infoErr.Error() + ")"
	case !(seT > 0) || math.IsInf(seT, 0):
		why = fmt.Sprintf("the delta-method standard error on the %s scale is %v", sc, seT)
	case rep.Covariances == nil:
		why = "the replicates were drawn without their observed information"
	}
	if why == "" {
		tHat := sc.To(out.Estimate)
		var st studentized
		var steps *Information
		for r, e := range rep.Estimates {
			if e == nil {
				continue
			}
			if noCov := noCovarianceWhy(rep, r); noCov != "" {
				st.add(r, tHat, math.NaN(), math.NaN(), noCov)
				continue
			}
			psi := g(e)
			if math.IsNaN(psi) {
				st.add(r, tHat, math.NaN(), math.NaN(), "the quantity is not defined at the refit")
				continue
			}
			cov := rep.Covariances[r]
			if steps == nil {
				steps = &Information{StdErrors: nanSlice(len(e))}
			}
			for a, i := range free {
				steps.StdErrors[i] = math.Sqrt(cov.At(a, a))
			}
			grad := quantityGradient(g, sc, e, free, steps)
			var v float64
			for a := range free {
				for b := range free {
					v += grad[a] * cov.At(a, b) * grad[b]
				}
			}
			st.add(r, tHat, sc.To(psi), math.Sqrt(v), "")
		}
		if len(st.t) > 0 {
			out.Method = bootstrapTLabel(sc, len(st.t))
			out.Lower, out.Upper = st.interval(tHat, seT, sc, level)
			out.Note = joinNote(failedNote(rep), st.note(rep.Requested))
			return
		}
		why = "no replicate gave a studentized value (" + st.firstLeft + ")"
	}
	vals := make([]float64, 0, rep.Requested)
	undefined := 0
	for _, e := range rep.Estimates {
		if e == nil {
			continue
		}
		if v := g(e); !math.IsNaN(v) {
			vals = append(vals, v)
		} else {
			undefined++
		}
	}
	out.Method = percentileLabel(len(vals))
	out.Lower, out.Upper = percentileInterval(vals, level)
	out.Note = joinNote(failedNote(rep), why+": percentile interval instead of bootstrap-t")
	if undefined > 0 {
		out.Note = joinNote(out.Note, fmt.Sprintf("the quantity is undefined for %d replicates, left out", undefined))
	}
}
