package infer

import (
	"fmt"
	"math"
	"strings"

	"fitseal/fitters"

	"gonum.org/v1/gonum/stat/distuv"
)

// Candidate is one family's contribution to a model average: its Akaike
// weight (from fitters.Compare) and its estimate of the derived quantity
// with the estimate's standard error.
type Candidate struct {
	Family   string
	Weight   float64
	Estimate float64
	StdError float64
	// Row is the family's own derived row (estimate, interval, method and
	// note), nil when not at hand. A family that carries all the weight
	// has its own row for the average (see ModelAverage).
	Row *DerivedValue
}

// ModelAverage returns the Akaike-weighted estimate of a derived quantity
// over the candidates and its unconditional standard error (Burnham &
// Anderson, 2002, eqs. 4.1 and 4.9):
//
//	θ̄ = Σ wᵢ θ̂ᵢ,   se(θ̄) = Σ wᵢ √(var̂(θ̂ᵢ) + (θ̂ᵢ − θ̄)²),
//
// with the interval θ̄ ± z·se(θ̄) at the level; for an exceedance
// probability the interval is worked on the logit scale instead
// (scaledAverageInterval), so that it stays inside (0, 1), and for a positive quantity on the log scale. Candidates with no weight
// (NaN or 0) are left out; candidates with a weight but no finite estimate or
// standard error are left out too, the remaining weights renormalised to sum
// to 1, and the note names them. The returned value carries the quantity and
// argument given.
//
// When one family carries all the weight — it is the only one with a weight,
// or the only one with a weight and both an estimate and a standard error —
// θ̄ = θ̂ of that family and eq. 4.9 gives its own standard error, so the
// average is that family's estimate: given its own row (Candidate.Row), the
// average is that row, interval and note included, with the method saying
// so, rather than a normal interval beside a different one of the family's
// for the same number. With only one weighted family, that holds even where
// the family has no standard error (a count family's quantile).
func ModelAverage(q Quantity, arg float64, cands []Candidate, level float64) (DerivedValue, error) {
	if !(level > 0 && level < 1) {
		return DerivedValue{}, fmt.Errorf("confidence level must lie strictly between 0 and 1, got %v", level)
	}
	nan := math.NaN()
	out := DerivedValue{Quantity: q, Argument: arg, Estimate: nan, StdError: nan, Lower: nan, Upper: nan,
		Method: "model average: Akaike weights, unconditional se (Burnham & Anderson 2002 eq. 4.9), normal interval"}
	var weighted, used []Candidate
	var left []string
	var total float64
	for _, c := range cands {
		if math.IsNaN(c.Weight) || c.Weight <= 0 {
			continue
		}
		weighted = append(weighted, c)
		if math.IsNaN(c.Estimate) || math.IsInf(c.Estimate, 0) || math.IsNaN(c.StdError) || math.IsInf(c.StdError, 0) {
			left = append(left, c.Family)
			continue
		}
		used = append(used, c)
		total += c.Weight
	}
	if len(weighted) == 1 && weighted[0].Row != nil {
		return soleFamily(q, arg, weighted[0], ""), nil
	}
	if len(used) == 1 && used[0].Row != nil {
		return soleFamily(q, arg, used[0], fmt.Sprintf("left out for want of an estimate or standard error: %s, so the average rests on %s alone (it carries %.3g of the weight)",
			strings.Join(left, ", "), used[0].Family, total)), nil
	}
	if len(used) == 0 {
		if len(left) > 0 {
			out.Note = fmt.Sprintf("no candidate to average: none of %s has both an estimate and a standard error (a quantile of a count family has no standard error)", strings.Join(left, ", "))
		} else {
			out.Note = "no candidate to average"
		}
		return out, nil
	}
	if len(left) > 0 {
		out.Note = fmt.Sprintf("left out for want of an estimate or standard error: %s; the other families' weights renormalised (they carry %.3g of the weight)", strings.Join(left, ", "), total)
	}
	var mean float64
	for _, c := range used {
		mean += c.Weight / total * c.Estimate
	}
	var se float64
	for _, c := range used {
		dv := c.Estimate - mean
		se += c.Weight / total * math.Sqrt(c.StdError*c.StdError+dv*dv)
	}
	z := distuv.UnitNormal.Quantile(0.5 + level/2)
	out.Estimate, out.StdError = mean, se
	out.Lower, out.Upper = mean-z*se, mean+z*se
	if q != Exceedance {
		positive := func(c Candidate) bool { return c.Row != nil && c.Row.Positive && c.Estimate > 0 }
		if lo, hi, ok := scaledAverageInterval(used, total, z, Log, positive); ok {
			out.Lower, out.Upper = lo, hi
			out.Method = "model average: Akaike weights, unconditional se (Burnham & Anderson 2002 eq. 4.9), interval on the log scale"
		}
	}
	if q == Exceedance {
		inside := func(c Candidate) bool { return c.Estimate > 0 && c.Estimate < 1 }
		if lo, hi, ok := scaledAverageInterval(used, total, z, Logit, inside); ok {
			out.Lower, out.Upper = lo, hi
			out.Method = "model average: Akaike weights, unconditional se (Burnham & Anderson 2002 eq. 4.9), interval on the logit scale"
		} else if out.Lower < 0 || out.Upper > 1 {
			out.Lower, out.Upper = math.Max(out.Lower, 0), math.Min(out.Upper, 1)
			out.Note = fitters.JoinNote(out.Note, "normal interval clipped to [0, 1]")
		}
	}
	return out, nil
}

// soleFamily is the model average of a family c that carries all the
// weight: its own row, with the method saying so and note before the
// row's own note.
func soleFamily(q Quantity, arg float64, c Candidate, note string) DerivedValue {
	out := *c.Row
	out.Quantity, out.Argument = q, arg
	method := out.Method
	if method == "" {
		method = "none"
	}
	out.Method = fmt.Sprintf("model average: %s carries all the weight, so its own estimate and interval (%s)", c.Family, method)
	out.Note = fitters.JoinNote(note, out.Note)
	out.AboveFit = false // the family's row reports it
	return out
}

// scaledAverageInterval is the model-averaged interval worked on the
// scale sc that the families' own delta-method intervals use, so that it
// stays in the quantity's range: a probability on the logit scale, inside
// (0, 1), and a positive quantity (a quantile or return level of families
// with no mass at or below 0: Candidate.Row.Positive) on the log scale,
// above 0. Each candidate's estimate θᵢ becomes λᵢ = t(θᵢ) with the
// delta-method standard error seᵢ/|dθ/dt|; λ̄ = Σ wᵢλᵢ with the
// unconditional standard error of eq. 4.9 on that scale; the interval is
// t⁻¹(λ̄ ± z·se(λ̄)). It needs admits to hold for every candidate.
func scaledAverageInterval(used []Candidate, total, z float64, sc Scale, admits func(Candidate) bool) (lo, hi float64, ok bool) {
	var lbar float64
	for _, c := range used {
		if !admits(c) {
			return 0, 0, false
		}
		lbar += c.Weight / total * sc.To(c.Estimate)
	}
	var se float64
	for _, c := range used {
		sl := c.StdError / sc.Deriv(c.Estimate)
		dl := sc.To(c.Estimate) - lbar
		se += c.Weight / total * math.Sqrt(sl*sl+dl*dl)
	}
	if math.IsNaN(se) || math.IsInf(se, 0) {
		return 0, 0, false
	}
	return averageFrom(sc, lbar-z*se), averageFrom(sc, lbar+z*se), true
}

// averageFrom maps a bound back from sc: exp, or 1/(1 + e⁻ᵗ) on the logit
// scale (the form the averaged intervals have always used; Scale.From
// takes e^t/(1 + e^t) below 0, which may differ in the last bit).
func averageFrom(sc Scale, t float64) float64 {
	if sc == Logit {
		return 1 / (1 + math.Exp(-t))
	}
	return sc.From(t)
}
