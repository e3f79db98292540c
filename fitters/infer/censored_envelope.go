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

// BinnedEnvelope returns a pointwise simulation envelope for the empirical
// CDF of binned data d: every observation an interval, the distinct
// intervals disjoint bins (the bins of the binned check, newBinnedPlan,
// with the empty bins it adds where dist has mass). At each finite upper
// edge edges[k] of the bins, ascending, lower[k] and upper[k] are the
// (1 ∓ level)/2 order statistics, over B samples of n = d.N() values
// simulated from the fitted model dist and recorded in the same bins, of
// the sample's cumulative proportion
//
//	F̃(edges[k]) = #{values in the bins up to edges[k]}/n,
//
// which for disjoint bins is the Turnbull estimate at the edge. Each
// F̃(edges[k]) is Binomial(n, F(edges[k]))/n under the model, so for large
// B the bounds approach that law's quantiles. As for the other envelopes
// the model is not refitted on the samples. A draw outside every bin (only
// from rounding at the end of the support, such as a gamma draw that
// underflows to 0 below the bin (0, u]) counts in the nearest bin. ok is
// false for data that are not a disjoint binning (exact values, no bounded
// interval, or overlapping intervals). The samples are drawn in order from
// one generator seeded by seed, so the envelope depends on nothing else.
func BinnedEnvelope(dist fitters.Dist, d *fitters.Data, B int, level float64, seed uint64) (edges, lower, upper []float64, ok bool) {
	if B < 1 {
		return nil, nil, nil, false
	}
	plan, _ := newBinnedPlan(dist, d)
	if plan == nil {
		return nil, nil, nil, false
	}
	for _, h := range plan.hi {
		if !math.IsInf(h, 0) {
			edges = append(edges, h)
		}
	}
	if len(edges) == 0 {
		return nil, nil, nil, false
	}
	rng := rand.New(rand.NewPCG(seed, 0))
	draws := make([]float64, plan.n)
	counts := make([]int, len(plan.hi))
	proportions := make([][]float64, len(edges)) // [k][b]
	for k := range proportions {
		proportions[k] = make([]float64, 0, B)
	}
	n := float64(plan.n)
	for range B {
		fitters.FillRand(dist, rng, draws)
		clear(counts)
		for _, v := range draws {
			k := plan.bin(v)
			switch {
			case k >= 0:
			case v <= plan.lo[0]:
				k = 0
			default:
				k = len(plan.hi) - 1
			}
			counts[k]++
		}
		cumulative, e := 0, 0
		for k, h := range plan.hi {
			cumulative += counts[k]
			if !math.IsInf(h, 0) {
				proportions[e] = append(proportions[e], float64(cumulative)/n)
				e++
			}
		}
	}
	lower, upper = pointwiseBounds(proportions, B, level)
	return edges, lower, upper, true
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
