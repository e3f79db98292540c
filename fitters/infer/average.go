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
// (logitAverageInterval), so that it stays inside (0, 1). Candidates with no weight
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
		if lo, hi, ok := logAverageInterval(used, total, z); ok {
			out.Lower, out.Upper = lo, hi
			out.Method = "model average: Akaike weights, unconditional se (Burnham & Anderson 2002 eq. 4.9), interval on the log scale"
		}
	}
	if q == Exceedance {
		if lo, hi, ok := logitAverageInterval(used, total, z); ok {
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

// logitAverageInterval is the model-averaged interval of a probability
// worked on the logit scale, where a normal interval cannot leave (0, 1):
// each candidate's estimate pᵢ becomes λᵢ = logit pᵢ with the delta-method
// standard error seᵢ/(pᵢ(1 − pᵢ)); λ̄ = Σ wᵢλᵢ with the unconditional
// standard error of eq. 4.9 on that scale; the interval is
// expit(λ̄ ± z·se(λ̄)). It needs every pᵢ strictly inside (0, 1).
func logitAverageInterval(used []Candidate, total, z float64) (lo, hi float64, ok bool) {
	var lbar float64
	for _, c := range used {
		if !(c.Estimate > 0 && c.Estimate < 1) {
			return 0, 0, false
		}
		lbar += c.Weight / total * logit(c.Estimate)
	}
	var se float64
	for _, c := range used {
		p := c.Estimate
		sl := c.StdError / (p * (1 - p))
		dl := logit(p) - lbar
		se += c.Weight / total * math.Sqrt(sl*sl+dl*dl)
	}
	if math.IsNaN(se) || math.IsInf(se, 0) {
		return 0, 0, false
	}
	return expit(lbar - z*se), expit(lbar + z*se), true
}

// logAverageInterval is the model-averaged interval of a positive
// quantity (a quantile or return level of families with no mass at or
// below 0, Candidate.Row.Positive for each) worked on the log scale, as
// each family's own delta-method interval is, so that it cannot reach
// below 0: each θᵢ becomes λᵢ = ln θᵢ with standard error seᵢ/θᵢ;
// λ̄ = Σ wᵢλᵢ with the unconditional standard error of eq. 4.9 on that
// scale; the interval is exp(λ̄ ± z·se(λ̄)). It needs every candidate's
// row to say its quantity is positive.
func logAverageInterval(used []Candidate, total, z float64) (lo, hi float64, ok bool) {
	var lbar float64
	for _, c := range used {
		if c.Row == nil || !c.Row.Positive || !(c.Estimate > 0) {
			return 0, 0, false
		}
		lbar += c.Weight / total * math.Log(c.Estimate)
	}
	var se float64
	for _, c := range used {
		sl := c.StdError / c.Estimate
		dl := math.Log(c.Estimate) - lbar
		se += c.Weight / total * math.Sqrt(sl*sl+dl*dl)
	}
	if math.IsNaN(se) || math.IsInf(se, 0) {
		return 0, 0, false
	}
	return math.Exp(lbar - z*se), math.Exp(lbar + z*se), true
}

func logit(p float64) float64 { return math.Log(p) - math.Log1p(-p) }
func expit(x float64) float64 { return 1 / (1 + math.Exp(-x)) }
