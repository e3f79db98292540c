package infer

import (
	"slices"

	"fitseal/fitters"
)

// withTrials returns the distribution of one observation with n trials for
// the binomial-type families, whose members leave the number of trials to
// each observation (fitters.Binomial, fitters.BetaBinomial); false for any
// other distribution.
func withTrials(d fitters.Dist, n int) (fitters.Dist, bool) {
	switch v := d.(type) {
	case fitters.Binomial:
		v.Trials = n
		return v, true
	case fitters.BetaBinomial:
		v.Trials = n
		return v, true
	}
	return nil, false
}

// TakesTrials reports whether d's family uses each observation's number of
// trials (binomial, betabinomial); the other count families model the
// counts alone and ignore a trials column.
func TakesTrials(d fitters.Dist) bool {
	_, ok := withTrials(d, 1)
	return ok
}

// component is one group of observations sharing a distribution: the
// expected count of a cell is Σ weight·P(cell) over the components.
type component struct {
	dist   fitters.Dist
	weight float64
}

// trialGroups describes a dataset's numbers of trials: the distinct values
// in increasing order, each observation's index among them, and how many
// observations have each.
type trialGroups struct {
	trials []int
	index  []int
	count  []float64
}

func groupTrials(t []int) *trialGroups {
	g := &trialGroups{trials: slices.Compact(slices.Sorted(slices.Values(t))), index: make([]int, len(t))}
	g.count = make([]float64, len(g.trials))
	for i, n := range t {
		j, _ := slices.BinarySearch(g.trials, n)
		g.index[i] = j
		g.count[j]++
	}
	return g
}

// components fills comps with d set to each group's number of trials,
// reusing comps' storage; false when d does not take trials.
func (g *trialGroups) components(d fitters.Dist, comps []component) ([]component, bool) {
	comps = comps[:0]
	for j, n := range g.trials {
		dj, ok := withTrials(d, n)
		if !ok {
			return comps, false
		}
		comps = append(comps, component{dj, g.count[j]})
	}
	return comps, true
}
