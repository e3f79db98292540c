package infer

import (
	"math"
	"math/rand/v2"
	"sort"

	"fitseal/fitters"
)

// CensoredEnvelope returns a pointwise simulation envelope for the Q–Q and
// P–P plots of data d censored in one direction: for each plotting
// probability probs[j], the (1 ∓ level)/2 order statistics, over B
// samples simulated from the fitted model dist and censored as the data
// were (the conditional bootstrap's plan: Davison & Hinkley, 1997,
// Algorithm 3.3), of the sample's empirical quantile there, min{t : F̂(t)
// ≥ p} with F̂ the estimate the plots draw (Kaplan–Meier for suspensions,
// reverse Kaplan–Meier for non-detects). As for complete data, the model
// is not refitted on the samples. A probability that fewer than 90 % of
// the samples reach (their estimate stops below it under heavy censoring)
// gets NaN bounds. ok is false for data the plan does not cover
// (interval-censored or censored both ways, or complete). The samples are
// drawn in order from one generator seeded by seed, so the envelope
// depends on nothing else.
func CensoredEnvelope(dist fitters.Dist, d *fitters.Data, probs []float64, B int, level float64, seed uint64) (lower, upper []float64, ok bool) {
	if d.IsComplete() || B < 1 {
		return nil, nil, false
	}
	o, view, why := oneSidedView(d)
	if o == nil || why != "" {
		return nil, nil, false
	}
	plan := newCensoringPlan(view, o)
	rng := rand.New(rand.NewPCG(seed, 0))
	draws := make([]float64, view.N())
	quantiles := make([][]float64, len(probs)) // [j][b]
	for b := 0; b < B; b++ {
		fitters.FillRand(dist, rng, draws)
		sim := plan.simulate(draws, rng)
		var step *fitters.StepCDF
		var err error
		if o.Left {
			step, err = fitters.ReverseKaplanMeier(sim.Exact, sim.Left)
		} else {
			step, err = fitters.KaplanMeier(sim.Exact, sim.Right)
		}
		for j, p := range probs {
			q := math.NaN()
			if err == nil && len(sim.Exact) > 0 {
				q = stepQuantile(step, p)
			}
			quantiles[j] = append(quantiles[j], q)
		}
	}
	lower, upper = pointwiseBounds(quantiles, B, level)
	return lower, upper, true
}

// pointwiseBounds returns, for each point j, the (1 ∓ level)/2 order
// statistics of the B simulated values sims[j] (NaN or ±Inf for a sample
// that has no value there): the r-th smallest, r = round((1 ∓ level)/2 ·
// (B + 1)), the 5th and 195th of 199 at level 0.95 (the ranks of the
// complete-data envelope, simulationEnvelope in bundle/report). A sample
// without a value counts as above every value; a point where fewer than
// 90 % of the samples have one gets NaN bounds, and an upper rank beyond
// the values a NaN upper bound. sims is sorted in place.
func pointwiseBounds(sims [][]float64, B int, level float64) (lower, upper []float64) {
	lower, upper = make([]float64, len(sims)), make([]float64, len(sims))
	lo := int(math.Round((1-level)/2*float64(B+1))) - 1
	hi := int(math.Round((1+level)/2*float64(B+1))) - 1
	for j, qs := range sims {
		finite := qs[:0]
		for _, q := range qs {
			if !math.IsNaN(q) && !math.IsInf(q, 0) {
				finite = append(finite, q)
			}
		}
		if float64(len(finite)) < 0.9*float64(B) {
			lower[j], upper[j] = math.NaN(), math.NaN()
			continue
		}
		sort.Float64s(finite)
		lower[j] = finite[max(lo, 0)]
		if hi < len(finite) {
			upper[j] = finite[hi]
		} else {
			upper[j] = math.NaN()
		}
	}
	return lower, upper
}

// stepQuantile is min{t : F̂(t) ≥ p} for a step estimate, NaN when it
// never reaches p, or reaches it below its first time (the reverse
// Kaplan–Meier estimate's mass below the smallest detected value, whose
// place is not known).
func stepQuantile(s *fitters.StepCDF, p float64) float64 {
	if s.Start >= p {
		return math.NaN()
	}
	if i := sort.SearchFloat64s(s.CDF, p); i < len(s.Times) {
		return s.Times[i]
	}
	return math.NaN()
}
