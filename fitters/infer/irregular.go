package infer

import (
	"fmt"
	"math"
	"slices"

	"fitseal/fitters"
)

// irregularFamilies are the continuous families whose likelihood is
// unbounded or flat at an edge of the parameter space, where the inner
// maximisation of a profile can run into the edge, stall on a ridge towards
// a limiting family, or follow one local maximum of the other parameters
// while a higher one lies elsewhere: the three-parameter families with a
// threshold (the likelihood grows without bound as the threshold nears the
// smallest value, Smith 1985; a threshold far below the data approaches the
// two-parameter limit, where no maximum is attained), gpd (shape ξ near −1,
// scale running off with the upper endpoint) and Student t (df → ∞, the
// normal limit, beside a heavy-tailed maximum at small df). Their profiles
// get the checks of guardIrregular; the other families' profiles are left
// exactly as they were.
var irregularFamilies = map[string]bool{"weibull3": true, "lognormal3": true, "gpd": true, "studentt": true}

// Thresholds of guardIrregular, in units of the data's range (the largest
// recorded value less the smallest value that must lie above the threshold).
const (
	// runawayGap: a threshold closer than this to that smallest value is
	// the unbounded corner of the likelihood, not a maximum.
	runawayGap = 1e-4
	// ridgeDepth: a threshold farther than this below the data, or a GPD
	// scale larger than ridgeScale ranges, is on a ridge towards a limiting
	// family.
	ridgeDepth = 100
	ridgeScale = 1e6
)

// guardIrregular equips p, a profiler of fit of an irregular family on d,
// with the checks its bounds need (see interval): a maximum whose
// threshold has run into the smallest value is rejected (the likelihood is
// unbounded there, so the value found says nothing about the profile), and
// a bound whose maximum lies on a ridge towards a limiting family is not
// confirmed. A profiler of any other family is left as it is.
func guardIrregular(p *profiler, fam fitters.Family, fit *fitters.Fit, d *fitters.Data) {
	if !irregularFamilies[fam.Name()] {
		return
	}
	p.irregular = true
	floor, top, ok := dataRange(d)
	if !ok {
		return
	}
	names := fam.Parameters()
	thr := slices.Index(names, "threshold")
	if thr >= 0 && !(thr < len(fit.Fixed) && fit.Fixed[thr]) {
		span := top - floor
		if !(span > 0) {
			span = math.Max(math.Abs(floor), 1) * 1e-3
		}
		p.admissible = func(theta []float64) bool {
			return floor-theta[thr] > runawayGap*span
		}
		p.corner = "the threshold at the smallest value"
		p.ridge = func(theta []float64) string {
			if depth := (floor - theta[thr]) / span; depth > ridgeDepth {
				return fmt.Sprintf("the other parameters' maximum there has the threshold %.3g data ranges below the smallest value, on a ridge towards the two-parameter limit where no maximum is attained", depth)
			}
			return ""
		}
	}
	if sc := slices.Index(names, "scale"); fam.Name() == "studentt" && sc >= 0 && top > floor {
		// With ν(n − 1) < 1 the likelihood grows without bound as the
		// location sits on one observation and the scale shrinks to 0 (the
		// density there grows as 1/σ, the other n − 1 shrink only as σ^ν):
		// a spike, not a maximum.
		span := top - floor
		p.admissible = func(theta []float64) bool { return theta[sc] > runawayGap*span }
		p.corner = "a spike on one observation (the scale towards 0)"
	}
	if fam.Name() == "gpd" && thr >= 0 {
		sc := slices.Index(names, "scale")
		span := top - fit.Estimates[thr]
		if sc >= 0 && span > 0 {
			p.ridge = func(theta []float64) string {
				if r := theta[sc] / span; r > ridgeScale {
					return fmt.Sprintf("the other parameters' maximum there has a scale %.3g times the data's range, on a ridge where no maximum is attained", r)
				}
				return ""
			}
		}
	}
}

// dataRange returns the smallest value that must lie above a threshold (the
// least exact value, non-detect limit or finite interval upper bound, as in
// the threshold families' fit) and the largest finite value recorded.
func dataRange(d *fitters.Data) (floor, top float64, ok bool) {
	floor, top = math.Inf(1), math.Inf(-1)
	for _, s := range [][]float64{d.Exact, d.Left, d.Upper} {
		for _, v := range s {
			if !math.IsInf(v, 0) {
				floor, ok = math.Min(floor, v), true
			}
		}
	}
	for _, s := range [][]float64{d.Exact, d.Left, d.Right, d.Lower, d.Upper} {
		for _, v := range s {
			if !math.IsInf(v, 0) {
				top = math.Max(top, v)
			}
		}
	}
	return floor, top, ok && top >= floor
}

// bestAt is ℓp(v) maximised from warm, from the MLE's nuisance values and
// at the end of a path of continuationSteps maximisations from vhat to v
// (each started where the previous one ended), the highest admissible
// maximum kept, with the nuisance values and the full parameter vector
// there; −Inf when none gives one, and then beyond reports whether every
// maximisation found v beyond the parameter space (rather than failing, or
// running into the unbounded corner). The path follows the branch of the
// other parameters' maximum that the estimate lies on, where a single start
// near v can land on a lower branch (a weibull3 scale bound put 2 units
// short: TestIrregularProfileBounds).
func (p *profiler) bestAt(v, vhat float64, warm []float64) (ll float64, u, theta []float64, beyond bool) {
	ll, beyond = math.Inf(-1), true
	ranAway := p.ranAway
	p.ranAway = false
	keep := func(l float64, uu []float64, edge, ok bool) {
		beyond = beyond && edge
		if edge || !ok || !(l > ll) || !p.build(v, uu, p.theta) {
			return
		}
		ll, u, theta = l, uu, slices.Clone(p.theta)
	}
	for _, start := range [][]float64{warm, p.u0} {
		keep(p.at(v, start))
	}
	path := p.u0
	for i := 1; i <= continuationSteps; i++ {
		l, uu, edge, ok := p.at(vhat+(v-vhat)*float64(i)/continuationSteps, path)
		if i == continuationSteps {
			keep(l, uu, edge, ok)
			break
		}
		if !edge && ok {
			path = uu // a step beyond the profiled region (a GPD with ξ̂ < −1) is passed over
		}
	}
	beyond = beyond && !p.ranAway && math.IsInf(ll, -1)
	p.ranAway = p.ranAway || ranAway
	return ll, u, theta, beyond
}

// continuationSteps is the number of maximisations on bestAt's path.
const continuationSteps = 8

// crossingTol is how far past the cut-off ℓp may be on the wrong side of a
// confirmed bound, 10⁻³ standard errors away from it.
const crossingTol = 1e-6
