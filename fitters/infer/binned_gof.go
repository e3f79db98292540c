package infer

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"

	"fitseal/fitters"
)

// Goodness of fit for binned data: every observation an interval, the
// distinct intervals disjoint bins (l₀, l₁], (l₁, l₂], … Bins the data
// show empty (a gap between two, below the first or above the last where
// the fitted model has mass) are taken to be part of the recording scheme
// with no value in them. The binning is then the known recording
// mechanism, so samples drawn from the fit and recorded in the same bins
// are distributed as the data would be under the model.

// binnedPlan holds the bins of binned data, ascending, with how each was
// recorded (a non-detect for (−∞, u], a suspension for (l, ∞), an interval
// otherwise) and the data's count in each.
type binnedPlan struct {
	lo, hi []float64
	kind   []int // binLeft, binRight, binInterval
	counts []float64
	index  map[float64]int // bin by its lower end
	n      int
}

const (
	binInterval = iota
	binLeft
	binRight
)

// newBinnedPlan returns the bins of d, the empty ones included, when it is
// binned data. It returns nil and "" when d is not binned data at all (it
// has exact values, or no bounded interval: the Kaplan–Meier check may
// apply), and nil with the reason when its intervals overlap.
func newBinnedPlan(dist fitters.Dist, d *fitters.Data) (*binnedPlan, string) {
	bounded := false
	for i, l := range d.Lower {
		bounded = bounded || (!math.IsInf(l, 0) && !math.IsInf(d.Upper[i], 0))
	}
	if len(d.Exact) > 0 || !bounded {
		return nil, ""
	}
	type bin struct {
		lo, hi float64
		kind   int
	}
	count := map[bin]float64{}
	for _, u := range d.Left {
		count[bin{math.Inf(-1), u, binLeft}]++
	}
	for _, l := range d.Right {
		count[bin{l, math.Inf(1), binRight}]++
	}
	for i, l := range d.Lower {
		count[bin{l, d.Upper[i], binInterval}]++
	}
	bins := make([]bin, 0, len(count))
	for b := range count {
		bins = append(bins, b)
	}
	sort.Slice(bins, func(i, j int) bool {
		if bins[i].lo != bins[j].lo {
			return bins[i].lo < bins[j].lo
		}
		return bins[i].hi < bins[j].hi
	})
	p := &binnedPlan{index: map[float64]int{}, n: d.N()}
	add := func(lo, hi float64, kind int, n float64) {
		p.index[lo] = len(p.lo)
		p.lo, p.hi, p.kind = append(p.lo, lo), append(p.hi, hi), append(p.kind, kind)
		p.counts = append(p.counts, n)
	}
	// The recording scheme covers the whole range: a value below the first
	// bin, between two, or above the last would have been recorded in a
	// bin of its own, which the data show empty.
	if first := bins[0].lo; !math.IsInf(first, -1) && math.Exp(dist.LogCDF(first)) > 0 {
		add(math.Inf(-1), first, binLeft, 0)
	}
	for k, b := range bins {
		if k > 0 {
			prev := bins[k-1].hi
			if b.lo < prev {
				return nil, fmt.Sprintf("the intervals overlap ((%v, %v] and (%v, %v]): fitseal's check of binned data needs disjoint bins", bins[k-1].lo, prev, b.lo, b.hi)
			}
			if b.lo > prev {
				add(prev, b.lo, binInterval, 0)
			}
		}
		add(b.lo, b.hi, b.kind, count[b])
	}
	if last := p.hi[len(p.hi)-1]; !math.IsInf(last, 1) && math.Exp(dist.LogSurvival(last)) > 0 {
		add(last, math.Inf(1), binRight, 0)
	}
	return p, ""
}

// binProbability is P(lo < X ≤ hi), from the smaller tail's side.
func binProbability(d fitters.Dist, lo, hi float64) float64 {
	if fl := math.Exp(d.LogCDF(lo)); fl < 0.5 {
		return math.Exp(d.LogCDF(hi)) - fl
	}
	return math.Exp(d.LogSurvival(lo)) - math.Exp(d.LogSurvival(hi))
}

// chiSquare returns Pearson's X² = Σ (O − E)²/E of counts in the plan's
// bins against d, E = n·P(bin), the bins pooled from the left until each
// expected count is at least minExpected (a short last group joined to its
// neighbour), as for counts (chiSquareCounts), and the number of pooled
// cells.
func (p *binnedPlan) chiSquare(d fitters.Dist, counts []float64) (float64, int) {
	var c cells
	pool := c.pooler()
	for k := range p.lo {
		pool.o += counts[k]
		pool.e += float64(p.n) * binProbability(d, p.lo[k], p.hi[k])
		pool.endCell()
	}
	return pool.finish()
}

// bin is the index of the bin (lo, hi] that holds v (the first with
// hi ≥ v), or −1 when none does.
func (p *binnedPlan) bin(v float64) int {
	k := sort.SearchFloat64s(p.hi, v)
	if k == len(p.hi) || !(v > p.lo[k]) {
		return -1
	}
	return k
}

// simulate records the draws x in the plan's bins, each bin as the data
// recorded it.
func (p *binnedPlan) simulate(x []float64, _ *rand.Rand) (*fitters.Data, string) {
	sim := &fitters.Data{}
	for _, v := range x {
		k := p.bin(v)
		if k < 0 {
			return nil, fmt.Sprintf("a draw (%v) fell outside the bins", v)
		}
		switch p.kind[k] {
		case binLeft:
			sim.Left = append(sim.Left, p.hi[k])
		case binRight:
			sim.Right = append(sim.Right, p.lo[k])
		default:
			sim.Lower, sim.Upper = append(sim.Lower, p.lo[k]), append(sim.Upper, p.hi[k])
		}
	}
	return sim, ""
}

// statistics is X² of d on a sample recorded in the plan's bins.
func (p *binnedPlan) statistics(d fitters.Dist, sim *fitters.Data, _ *fitters.FloatSorter, out []float64) {
	counts := make([]float64, len(p.lo))
	for range sim.Left {
		counts[0]++
	}
	for _, l := range sim.Right {
		counts[p.index[l]]++
	}
	for _, l := range sim.Lower {
		counts[p.index[l]]++
	}
	out[0], _ = p.chiSquare(d, counts)
}

func (*binnedPlan) names() []string { return []string{ChiSquare} }

func (*binnedPlan) pValueNote() string { return "" }

// BinnedNote is the note of the statistic of binned data.
const BinnedNote = "Pearson's X² over the data's bins, pooled from the left to expected counts ≥ 5 (common practice); " +
	"its p-value's replicates are drawn from the fit and recorded in the same bins, as the data were"

// observed is observedStatistics for binned data: X² of the fit over the
// data's bins.
func (p *binnedPlan) observed(dist fitters.Dist) *GoodnessOfFit {
	x2, cells := p.chiSquare(dist, p.counts)
	st := Statistic{Name: ChiSquare, Value: x2, PValue: math.NaN(),
		Note: fmt.Sprintf("%s; %d of %d bins after pooling", BinnedNote, cells, len(p.lo))}
	if cells < 2 {
		st.Note = "every bin pooled into one: the statistic carries no information; no p-value"
		st.Uninformative = true
	}
	return &GoodnessOfFit{Applicable: true, Statistics: []Statistic{st}}
}
