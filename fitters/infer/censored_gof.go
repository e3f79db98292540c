package infer

import (
	"math"
	"slices"

	"fitseal/fitters"
)

// Goodness of fit for data censored in one direction.
//
// Right-censored data (exact values and suspensions) are compared with
// the fitted model through the product-limit (Kaplan–Meier, 1958)
// estimate Fₙ of the CDF. Left-censored data (exact values and
// non-detects) are reflected, x → −x: a non-detect below L becomes a
// suspension at −L and the fitted CDF becomes F′(t) = S(−t), so that one
// implementation serves both directions.

// oneSided is a dataset censored in at most one direction, in the
// right-censored frame: Events are the exact values and Suspensions the
// censoring times, both ascending, reflected (x → −x) when Left.
type oneSided struct {
	Left        bool
	Events      []float64
	Suspensions []float64
}

// N is the number of observations.
func (o *oneSided) N() int { return len(o.Events) + len(o.Suspensions) }

// NotApplicableCensored begins the reason given for censored data that the
// check does not cover (interval-censored, or censored in both directions).
// A reason holds no "; ", which separates the clauses of a fit's
// inference note.
const NotApplicableCensored = "fitseal's goodness-of-fit check covers exact values censored in one direction only " +
	"(suspensions alone or non-detects alone) and binned values (disjoint intervals alone)"

// oneSidedView returns d in the right-censored frame, with d itself as
// exact, left- and right-censored values (an interval open at one end,
// (−∞, u] or (l, +∞), is the non-detect at u or the suspension at l it
// stands for: its likelihood term is the same), or the reason the censored
// check does not apply to it.
func oneSidedView(d *fitters.Data) (*oneSided, *fitters.Data, string) {
	if len(d.Lower) > 0 {
		open := &fitters.Data{Exact: d.Exact, Left: slices.Clone(d.Left), Right: slices.Clone(d.Right)}
		for i, l := range d.Lower {
			switch u := d.Upper[i]; {
			case math.IsInf(l, -1) && !math.IsInf(u, 0):
				open.Left = append(open.Left, u)
			case math.IsInf(u, 1) && !math.IsInf(l, 0):
				open.Right = append(open.Right, l)
			default:
				return nil, nil, NotApplicableCensored + ", and these data have interval-censored observations"
			}
		}
		d = open
	}
	switch {
	case len(d.Left) > 0 && len(d.Right) > 0:
		return nil, nil, NotApplicableCensored + ", and these data are censored in both directions"
	case len(d.Exact) == 0:
		return nil, nil, "no exact observations: the Kaplan–Meier estimate has no step"
	}
	return newOneSided(d, len(d.Left) > 0), d, ""
}

// newOneSided returns d (exact values and only left- or only right-censored
// ones, as left says) in the right-censored frame.
func newOneSided(d *fitters.Data, left bool) *oneSided {
	var s fitters.FloatSorter
	return newOneSidedSorted(d, left, &s)
}

// newOneSidedSorted is newOneSided sorting with s (a bootstrap worker's,
// kept between replicates; fitters.FloatSorter gives slices.Sort's order).
func newOneSidedSorted(d *fitters.Data, left bool, s *fitters.FloatSorter) *oneSided {
	o := &oneSided{Left: left}
	if left {
		o.Events, o.Suspensions = reflected(d.Exact), reflected(d.Left)
	} else {
		o.Events, o.Suspensions = slices.Clone(d.Exact), slices.Clone(d.Right)
	}
	s.Sort(o.Events)
	s.Sort(o.Suspensions)
	return o
}

// reflected returns −x for every x.
func reflected(x []float64) []float64 {
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = -v
	}
	return out
}

// productLimit is a product-limit estimate: F jumps to Steps[i].F at
// Steps[i].T. Max is the largest time observed (the estimate is undefined
// past a final censored one), and ReachesOne is true when F reaches 1 (at
// Max, where every unit still at risk has an event), so that F is defined
// to +∞.
type productLimit struct {
	Steps []step
	Max   float64
	// Survival is 1 − F after the last step.
	Survival   float64
	ReachesOne bool
}

type step struct{ T, F float64 }

// newProductLimit returns the product-limit estimate (Kaplan & Meier, 1958)
// of the distribution of the event times from events and censored times,
// both ascending: at each distinct event time t with d events and r units
// at risk, S ← S·(1 − d/r). A unit censored at t is at risk at t (events
// first, the usual convention for ties; Kalbfleisch & Prentice, 2002,
// §1.4). Used with suspensions as events and failures as censored it is
// the "reverse" estimate of the censoring distribution. It is
// fitters.KaplanMeier's estimate (TestProductLimitMatchesFitters) without
// the Greenwood variance, the re-sorting and the checks that the report's
// curves need, since the replicate loop calls it for every replicate.
func newProductLimit(events, censored []float64) productLimit {
	return productLimitTies(events, censored, false)
}

// newCensoringEstimate is the product-limit estimate Ĝ of the censoring
// distribution from the suspensions (its events) and the failures (its
// censored times), with the ties read in the same order as in the
// estimate of F: at a time with both, the failures came first, so a unit
// that failed there was no longer at risk of censoring there. With Type I
// censoring at τ and a failure tied at τ, Ĝ then reaches 1 at τ and no
// replicate is observed beyond τ, as none of the data could be.
func newCensoringEstimate(suspensions, failures []float64) productLimit {
	return productLimitTies(suspensions, failures, true)
}

// productLimitTies is newProductLimit with the ties between events and
// censored times at one time read either way: censored units at risk of
// the events there (censoredLeftFirst false, the usual order), or gone
// before them (true).
func productLimitTies(events, censored []float64, censoredLeftFirst bool) productLimit {
	n := len(events) + len(censored)
	pl := productLimit{Survival: 1, Steps: make([]step, 0, len(events))}
	if n == 0 {
		return pl
	}
	last := math.Inf(-1)
	if len(events) > 0 {
		last = events[len(events)-1]
	}
	if len(censored) > 0 {
		last = max(last, censored[len(censored)-1])
	}
	pl.Max = last
	atRisk, j := n, 0
	for i := 0; i < len(events); {
		t := events[i]
		for j < len(censored) && (censored[j] < t || censoredLeftFirst && censored[j] == t) {
			j++
			atRisk--
		}
		d := 0
		for i < len(events) && events[i] == t {
			i++
			d++
		}
		if d == atRisk {
			pl.Survival = 0
			pl.ReachesOne = true
		} else {
			pl.Survival *= 1 - float64(d)/float64(atRisk)
		}
		pl.Steps = append(pl.Steps, step{t, 1 - pl.Survival})
		atRisk -= d
	}
	return pl
}

// fittedCDFs returns the fitted model's CDF in the right-censored frame at
// the ascending times t: F(t) itself, or F′(t) = S(−t) for reflected
// (left-censored) data. The values come from fitters.CDFTailsBatch in
// blocks (its vector kernels for the common families, one interface call
// per block instead of one per point), at x = t ascending, or at x = −t
// (descending t reversed) for F′ = 1 − F(x), F continuous.
func fittedCDFs(d fitters.Dist, left bool, t []float64) []float64 {
	n := len(t)
	x := make([]float64, n)
	if left {
		for i, v := range t {
			x[n-1-i] = -v
		}
	} else {
		copy(x, t)
	}
	var lc, ls [fitters.CDFTailsBlock]float64
	cdf := make([]float64, n)
	for lo := 0; lo < n; lo += fitters.CDFTailsBlock {
		hi := min(lo+fitters.CDFTailsBlock, n)
		fitters.CDFTailsBatch(d, x[lo:hi], cdf[lo:hi], lc[:], ls[:])
	}
	if !left {
		return cdf
	}
	out := x // reused: F′(tᵢ) = 1 − F(−tᵢ), in t's order
	for i := range out {
		out[i] = 1 - cdf[n-1-i]
	}
	return out
}

// kaplanMeierStatistics returns the Kolmogorov–Smirnov and Cramér–von
// Mises distances between the product-limit estimate Fₙ of data o (n
// observations) and the fitted model d:
//
//	D  = sup |Fₙ(t) − F̂(t)| over t ≤ t_max, the largest observation,
//	     taken at each step of Fₙ on both sides (Fₙ(t−) and Fₙ(t)) and at t_max;
//	ψ² = n ∫ (Fₙ(t) − F̂(t))² dF̂(t) over t ≤ t_max, to +∞ when Fₙ
//	     reaches 1 (Koziol & Green, 1976, Biometrika 63, 465–474).
//
// Fₙ is a step function: on a step where Fₙ = c, from F̂ = a to F̂ = b,
// the integral is ((b − c)³ − (a − c)³)/3 exactly. Without censoring D is
// the usual D and ψ² is W² = 1/(12n) + Σ (F̂ᵢ − (2i−1)/(2n))²
// (TestKaplanMeierStatisticsOnCompleteData). A NaN statistic is +Inf.
func kaplanMeierStatistics(d fitters.Dist, o *oneSided) (ks, cvm float64) {
	pl := newProductLimit(o.Events, o.Suspensions)
	times := make([]float64, len(pl.Steps)+1)
	for i, s := range pl.Steps {
		times[i] = s.T
	}
	times[len(pl.Steps)] = pl.Max
	fitted := fittedCDFs(d, o.Left, times)
	before, fStart, sum := 0.0, 0.0, 0.0
	for i, s := range pl.Steps {
		f := fitted[i]
		ks = max(ks, math.Abs(before-f), math.Abs(s.F-f))
		sum += float64(cube(f-before) - cube(fStart-before))
		before, fStart = s.F, f
	}
	fMax := fitted[len(pl.Steps)]
	ks = max(ks, math.Abs(before-fMax))
	if pl.ReachesOne {
		fMax = 1
	}
	sum += float64(cube(fMax-before) - cube(fStart-before))
	cvm = float64(o.N()) * sum / 3
	if math.IsNaN(ks) {
		ks = math.Inf(1)
	}
	if math.IsNaN(cvm) {
		cvm = math.Inf(1)
	}
	return ks, cvm
}

// cube is x³, rounded as written: the explicit conversions keep arm64's
// compiler from fusing it with the sum it enters (SPEC: bundles agree
// across processors to the last bits where they can).
func cube(x float64) float64 { return float64(float64(x*x) * x) }

// censoredStatNames are the statistics of censored data, in the order of
// kaplanMeierStatistics' results.
var censoredStatNames = []string{KolmogorovSmirnov, CramerVonMises}

// KaplanMeierNote is the note of every statistic of censored data.
const KaplanMeierNote = "against the Kaplan–Meier estimate of the CDF up to the largest observation " +
	"(cvm: Koziol & Green 1976); no ad for censored data, whose tail weights are unstable " +
	"where the Kaplan–Meier estimate rests on few units at risk"

// ConditionalBootstrapNote is added to the note of a censored statistic
// whose p-value comes from the replicates.
const ConditionalBootstrapNote = "p-value by the conditional bootstrap for censored data " +
	"(Davison & Hinkley 1997, Algorithm 3.3): each replicate drawn from the fitted model and " +
	"censored as the data were, by the Kaplan–Meier estimate of the censoring times"

// observedCensored is observedStatistics for censored data: the
// statistics of the sampler that will draw their replicates
// (censoredSamplerFor), or why there is none.
func observedCensored(fam fitters.Family, dist fitters.Dist, d *fitters.Data) *GoodnessOfFit {
	sampler, _, why := censoredSamplerFor(fam, dist, d)
	if sampler == nil {
		return &GoodnessOfFit{Reason: why}
	}
	return sampler.observed(dist)
}

// observedKaplanMeier is the Kaplan–Meier statistics of data o against the
// fitted dist, with their notes.
func observedKaplanMeier(dist fitters.Dist, o *oneSided) *GoodnessOfFit {
	ks, cvm := kaplanMeierStatistics(dist, o)
	g := &GoodnessOfFit{Applicable: true}
	note := fitters.JoinNote(KaplanMeierNote, tiesNote(fitters.CountTies(o.Events), len(o.Events)))
	for i, v := range []float64{ks, cvm} {
		g.Statistics = append(g.Statistics, Statistic{Name: censoredStatNames[i], Value: v, PValue: math.NaN(), Note: note})
	}
	return g
}
