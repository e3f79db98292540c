package infer

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"

	"fitseal/fitters"
)

// censoringPlan simulates data censored as a oneSided dataset was, by the
// conditional bootstrap for censored data (Davison & Hinkley, 1997, §3.5,
// Algorithm 3.3), in the right-censored frame. Observation j keeps its
// place: first the exact values in the data's order, then the censored
// ones. Ĝ is the product-limit estimate of the censoring distribution
// (suspensions as events, failures as censored; a failure at the time of
// a suspension came first and was not at risk of censoring there:
// newCensoringEstimate); its mass left beyond the largest observation lies
// at +∞ (never censored).
type censoringPlan struct {
	left bool
	// exact are the exact values (reflected when left), in the data's
	// order; censored the censoring times, likewise.
	exact, censored []float64
	// times are Ĝ's jump times, ascending; cumulative[k] = Ĝ(times[k]);
	// atInfinity is the mass beyond the last jump.
	times, cumulative []float64
	atInfinity        float64
	// after[j] is the first jump after exact value j (times[k] > exact[j]),
	// found once for all replicates.
	after []int
}

func newCensoringPlan(d *fitters.Data, o *oneSided) *censoringPlan {
	p := &censoringPlan{left: o.Left}
	if o.Left {
		p.exact, p.censored = reflected(d.Exact), reflected(d.Left)
	} else {
		p.exact, p.censored = slices.Clone(d.Exact), slices.Clone(d.Right)
	}
	g := newCensoringEstimate(o.Suspensions, o.Events)
	for _, s := range g.Steps {
		p.times = append(p.times, s.T)
		p.cumulative = append(p.cumulative, s.F)
	}
	p.atInfinity = g.Survival
	p.after = make([]int, len(p.exact))
	for j, y := range p.exact {
		p.after[j] = p.firstAfter(y)
	}
	return p
}

// firstAfter is the index of Ĝ's first jump after y (len(times) if none).
func (p *censoringPlan) firstAfter(y float64) int {
	return sort.Search(len(p.times), func(k int) bool { return p.times[k] > y })
}

// censoringTime draws a censoring time from Ĝ conditional on C > y, y the
// exact value j: +∞ where Ĝ has no mass beyond y. A uniform is drawn from
// rng only when more than one value is possible, so that with a common
// censoring time (Type I) a replicate is the model's draws censored at
// that time.
func (p *censoringPlan) censoringTime(j int, rng *rand.Rand) float64 {
	return p.drawAfter(p.after[j], rng)
}

// drawAfter draws a censoring time from Ĝ conditional on C ≥ times[k0],
// the jumps from k0 on (and +∞ with the mass beyond the last).
func (p *censoringPlan) drawAfter(k0 int, rng *rand.Rand) float64 {
	below := 0.0
	if k0 > 0 {
		below = p.cumulative[k0-1]
	}
	atoms := len(p.times) - k0
	if p.atInfinity > 0 {
		atoms++
	}
	switch {
	case atoms == 0 || 1-below <= 0:
		return math.Inf(1)
	case atoms == 1:
		if k0 < len(p.times) {
			return p.times[k0]
		}
		return math.Inf(1)
	}
	target := below + float64(rng.Float64()*(1-below)) // never fused (arm64 would)
	// The first jump whose cumulative mass exceeds the target (binary
	// search: a long record has many suspension times).
	if k := k0 + sort.Search(len(p.times)-k0, func(i int) bool { return p.cumulative[k0+i] > target }); k < len(p.times) {
		return p.times[k]
	}
	return math.Inf(1)
}

// simulate makes one replicate from the n model draws x (of the original
// scale, in observation order): Y*ⱼ = min(T*ⱼ, C*ⱼ) in the right-censored
// frame, censored when C*ⱼ < T*ⱼ, with C*ⱼ the observation's own censoring
// time when it was censored and a draw from Ĝ conditional on C > yⱼ when
// it was exact. The replicate is returned on the original scale.
func (p *censoringPlan) simulate(x []float64, rng *rand.Rand) *fitters.Data {
	ne := len(p.exact)
	sim := &fitters.Data{Exact: make([]float64, 0, len(x))}
	for j, v := range x {
		t := v
		if p.left {
			t = -v
		}
		var c float64
		if j < ne {
			c = p.censoringTime(j, rng)
		} else {
			c = p.censored[j-ne]
		}
		switch {
		case c >= t:
			sim.Exact = append(sim.Exact, v)
		case p.left:
			sim.Left = append(sim.Left, -c)
		default:
			sim.Right = append(sim.Right, c)
		}
	}
	return sim
}

// censoredSampler draws samples censored as a dataset was and computes
// the statistics of a refitted model on one: the conditional bootstrap's
// plan with the Kaplan–Meier statistics (data censored in one direction),
// or the bins with Pearson's X² (binned data, binnedPlan).
type censoredSampler interface {
	// simulate censors the model draws x (in observation order) as the
	// data were, or says why the sample cannot be used.
	simulate(x []float64, rng *rand.Rand) (*fitters.Data, string)
	// statistics writes the statistics of model d on sample sim to out.
	statistics(d fitters.Dist, sim *fitters.Data, sorter *fitters.FloatSorter, out []float64)
	names() []string
	// pValueNote says how the replicates were drawn, for the p-values'
	// notes ("" when the statistic's note already says it).
	pValueNote() string
	// observed is the statistics of the fitted model on the data.
	observed(dist fitters.Dist) *GoodnessOfFit
}

// censoredSamplerFor returns the sampler for d (binned data first, then
// data censored in one direction) and d as the sampler reads it, or the
// reason neither applies (counts included: the check of censored data is
// for continuous families).
func censoredSamplerFor(fam fitters.Family, dist fitters.Dist, d *fitters.Data) (censoredSampler, *fitters.Data, string) {
	if fam.Kind() != fitters.Continuous {
		return nil, nil, "censored counts: fitseal's goodness-of-fit check of censored data is for continuous families"
	}
	if b, why := newBinnedPlan(dist, d); b != nil {
		return b, d, ""
	} else if why != "" {
		return nil, nil, why
	}
	o, view, why := oneSidedView(d)
	if o == nil {
		return nil, nil, why
	}
	return kmSampler{newCensoringPlan(view, o), o}, view, ""
}

// kmSampler is the censoring plan with the Kaplan–Meier statistics, and
// the data in the right-censored frame for the observed ones.
type kmSampler struct {
	plan *censoringPlan
	data *oneSided
}

func (k kmSampler) simulate(x []float64, rng *rand.Rand) (*fitters.Data, string) {
	sim := k.plan.simulate(x, rng)
	if len(sim.Exact) == 0 {
		return nil, "every value of the replicate is censored"
	}
	return sim, ""
}

func (k kmSampler) statistics(d fitters.Dist, sim *fitters.Data, sorter *fitters.FloatSorter, out []float64) {
	out[0], out[1] = kaplanMeierStatistics(d, newOneSidedSorted(sim, k.plan.left, sorter))
}

func (kmSampler) names() []string { return censoredStatNames }

func (kmSampler) pValueNote() string { return ConditionalBootstrapNote }

func (k kmSampler) observed(dist fitters.Dist) *GoodnessOfFit {
	return observedKaplanMeier(dist, k.data)
}

// bootstrapCensored is Bootstrap for data censored in one direction: each
// replicate is drawn by the censoring plan (conditional bootstrap), the
// family refitted on it with the original fixed parameters, and the
// Kaplan–Meier statistics of the refit on the replicate recorded. Replicate
// r draws, from stream r, first the n model values in observation order
// (as the complete-data bootstrap does), then the censoring times of the
// exact observations in order. Each replicate fills only its own slot, so
// the result does not depend on the workers. Unlike the complete-data loop
// this one allocates per replicate (the replicate's data and views).
func bootstrapCensored(fam fitters.Family, fit *fitters.Fit, dist fitters.Dist, d *fitters.Data, opt BootstrapOptions) (*Replicates, error) {
	sampler, d, why := censoredSamplerFor(fam, dist, d)
	if sampler == nil {
		return nil, fmt.Errorf("%w: %s", ErrBootstrapNotApplicable, why)
	}
	slots, err := newReplicateSlots(fit, opt, sampler.names())
	if err != nil {
		return nil, err
	}
	slots.rep.Censored, slots.rep.PValueNote = true, sampler.pValueNote()
	n := d.N()
	work := func() (ran bool) {
		pcg := rand.NewPCG(0, 0)
		rng := rand.New(pcg)
		seeds := slots.stream.seeder()
		draws := make([]float64, n)
		var rec fitters.FitRecord
		var sorter fitters.FloatSorter
		for {
			r, ok := slots.take()
			if !ok {
				return ran
			}
			ran = true
			seeds.reseed(pcg, r)
			fitters.FillRand(dist, rng, draws)
			sim, skip := sampler.simulate(draws, rng)
			if skip != "" {
				slots.reasons[r] = skip
				continue
			}
			refit, err := fitters.FitInto(fam, sim, slots.fitOpt, &rec)
			if slots.failed(r, refit, err) {
				continue
			}
			rd, err := fam.New(refit.Estimates)
			if err != nil {
				slots.reasons[r] = err.Error()
				continue
			}
			slots.keep(r, fam, refit, sim)
			if opt.NoStatistics {
				continue
			}
			sampler.statistics(rd, sim, &sorter, slots.statistics(r))
		}
	}
	return slots.run(work), nil
}
