package infer

import (
	"fmt"
	"math"
	"slices"

	"fitseal/fitters"
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

// interval returns s⁻¹(t̂ − t*₍₍₁₊L₎/₂₎·se), s⁻¹(t̂ − t*₍₍₁₋L₎/₂₎·se) with
// the pivot quantiles at the (m + 1)p-th order statistic of the m pivots
// (Davison & Hinkley, 1997, §5.2.1, which makes the coverage exact for an
// exact pivot whatever B, e.g. t*₍₅₎ and t*₍₁₉₅₎ of 199), interpolated
// linearly between order statistics (Hyndman & Fan, 1996, type 6); st.t is
// sorted in place. short reports that m is too small for the level, so
// that an extreme pivot stands in for a quantile beyond it.
func (st *studentized) interval(tHat, se float64, sc Scale, level float64) (lo, hi float64, short bool) {
	if len(st.t) == 0 {
		return math.NaN(), math.NaN(), true
	}
	slices.Sort(st.t)
	tHi, shortHi := quantile6(st.t, (1+level)/2)
	tLo, shortLo := quantile6(st.t, (1-level)/2)
	return sc.From(tHat - tHi*se), sc.From(tHat - tLo*se), shortHi || shortLo
}

// quantile6 is the type-6 sample quantile of sorted v (Hyndman & Fan,
// 1996): linear interpolation at the 1-based position (m + 1)p, clamped to
// the extreme order statistics; clamped says a clamp was needed.
func quantile6(v []float64, p float64) (q float64, clamped bool) {
	m := len(v)
	h := float64(m+1) * p
	switch {
	case h < 1:
		return v[0], true
	case h >= float64(m):
		return v[m-1], h > float64(m)
	}
	lo := math.Floor(h)
	i := int(lo) - 1
	if h == lo || v[i] == v[i+1] {
		return v[i], false
	}
	return v[i] + (h-lo)*(v[i+1]-v[i]), false
}

// note says which replicates were left out of the pivot quantiles.
func (st *studentized) note(requested int, short bool, level float64) string {
	var n string
	if short {
		n = fmt.Sprintf("%d pivots are too few for level %v: the extreme pivot stands in for a quantile beyond it, so the interval may be too short", len(st.t), level)
	}
	if st.left == 0 {
		return n
	}
	return fitters.JoinNote(n, fmt.Sprintf("%d of %d replicates gave no studentized value and are left out of the bootstrap-t quantiles (%s)", st.left, requested, st.firstLeft))
}

// result returns the bootstrap-t interval of a quantity with estimate tHat
// and standard error se on scale sc, its ci_method text and its note; ok is
// false when no replicate gave a pivot, and note then says why.
func (st *studentized) result(rep *Replicates, tHat, se float64, sc Scale, level float64) (method string, lo, hi float64, note string, ok bool) {
	if len(st.t) == 0 {
		return "", math.NaN(), math.NaN(), "no replicate gave a studentized value (" + st.firstLeft + ")", false
	}
	lo, hi, short := st.interval(tHat, se, sc, level)
	return bootstrapTLabel(sc, len(st.t)), lo, hi, fitters.JoinNote(failedNote(rep), st.note(rep.Requested, short, level)), true
}

// percentileFallback returns the percentile interval of vals (sorted in
// place), its ci_method text and a note saying why it replaces bootstrap-t.
func percentileFallback(vals []float64, level float64, rep *Replicates, why string) (method string, lo, hi float64, note string) {
	lo, hi = percentileInterval(vals, level)
	return percentileLabel(len(vals)), lo, hi, fitters.JoinNote(failedNote(rep), why+": percentile interval instead of bootstrap-t")
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
		return rep.firstNoCovarianceWhy
	}
	return "observed information gave no covariance"
}

// bootstrapDerived fills out's bootstrap interval of the quantity g on
// scale sc from the replicates: bootstrap-t with the delta-method standard
// error seT of the estimate and, per replicate, the delta-method standard
// error from its own covariance (its gradient from gradientAt, as Derived
// takes it); percentiles of g when that cannot be done.
func bootstrapDerived(out *DerivedValue, rep *Replicates, g func([]float64) float64, gradientAt func(theta []float64, psi float64, info *Information) []float64, sc Scale, free []int, seT float64, infoErr error, discreteQuantile bool, level float64) {
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
			grad := gradientAt(e, psi, steps)
			var v float64
			for a := range free {
				for b := range free {
					v += grad[a] * cov.At(a, b) * grad[b]
				}
			}
			st.add(r, tHat, sc.To(psi), math.Sqrt(v), "")
		}
		var ok bool
		if out.Method, out.Lower, out.Upper, out.Note, ok = st.result(rep, tHat, seT, sc, level); ok {
			return
		}
		why = out.Note
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
	out.Method, out.Lower, out.Upper, out.Note = percentileFallback(vals, level, rep, why)
	if undefined > 0 {
		out.Note = fitters.JoinNote(out.Note, fmt.Sprintf("the quantity is undefined for %d replicates, left out", undefined))
	}
}
