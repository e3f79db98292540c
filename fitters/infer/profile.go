package infer

import (
	"fmt"
	"math"

	"fitseal/fitters"

	"gonum.org/v1/gonum/stat/distuv"
)

// profiler evaluates a profile log-likelihood ℓp(v) = max ln L(θ) over the
// θ with ψ(θ) = v, v being the profiled quantity on its transformed scale.
// The nuisance coordinates u are the other free parameters on their own
// transformed scales; build turns (v, u) into a full θ, or reports that no
// valid θ has these coordinates (the edge of the parameter space).
type profiler struct {
	fam    fitters.Family
	loglik func(theta []float64) float64 // fam.LogLik on the data (fitters.LogLikFunc)
	build  func(v float64, u, theta []float64) bool
	u0     []float64 // nuisance coordinates at the MLE
	theta  []float64 // scratch
	evals  int
	// irregular, set by guardIrregular, makes interval confirm every closed
	// bound from two starts on each side of it.
	irregular bool
	// admissible, when not nil, rejects a maximum at θ that is no maximum
	// of the profile (a threshold run into the smallest value); corner
	// names that unbounded corner of the likelihood in notes.
	admissible func(theta []float64) bool
	corner     string
	// ridge, when not nil, says why a bound whose maximum is at θ cannot be
	// confirmed ("" when it can).
	ridge func(theta []float64) string
	// ranAway records that a maximisation of this side ran into the
	// unbounded corner (see admissible).
	ranAway bool
}

// at returns ℓp(v), maximising from warm. edge is true when θ is invalid
// for every u tried (v is beyond the parameter space); ok false when the
// inner maximisation did not converge.
func (p *profiler) at(v float64, warm []float64) (ll float64, u []float64, edge, ok bool) {
	p.evals++
	valid := false
	f := func(u []float64) float64 {
		if !p.build(v, u, p.theta) {
			return math.Inf(-1)
		}
		if _, err := p.fam.New(p.theta); err != nil {
			return math.Inf(-1)
		}
		valid = true
		return p.loglik(p.theta)
	}
	u, ll, ok = maximize(f, p.feasible(f, warm))
	if !ok && valid {
		// One restart from where the optimiser stopped (fresh BFGS
		// curvature) settles most maxima on a constraint's edge.
		if u2, ll2, ok2 := maximize(f, u); ll2 >= ll {
			u, ll, ok = u2, ll2, ok2
		}
	}
	if !valid {
		return math.Inf(-1), warm, true, true
	}
	if p.admissible != nil && !math.IsInf(ll, -1) && p.build(v, u, p.theta) && !p.admissible(p.theta) {
		// The maximisation ran into the unbounded corner of the
		// likelihood: no maximum of the profile here, as beyond an edge.
		p.ranAway = true
		return math.Inf(-1), warm, true, true
	}
	return ll, u, false, ok || math.IsInf(ll, -1)
}

// atChecked is at with a second look where ℓp(v) comes out below the value
// below: the maximisation is restarted from where it stopped and from the
// MLE's nuisance values, and a maximum higher by more than 1e-6 taken
// instead. A maximisation can stop at a lower local maximum (a GEV with
// ξ < −½ has them where its endpoint meets the largest observation): that
// would put a point inside the interval outside it, and the bound too near.
func (p *profiler) atChecked(v float64, warm []float64, below float64) (ll float64, u []float64, edge, ok bool) {
	ll, u, edge, ok = p.at(v, warm)
	if edge || !(ll < below) || math.IsInf(ll, -1) {
		return ll, u, edge, ok
	}
	for _, start := range [][]float64{u, p.u0} {
		if l2, u2, e2, ok2 := p.at(v, start); !e2 && ok2 && l2 > ll+1e-6 {
			ll, u, ok = l2, u2, ok2
		}
	}
	return ll, u, edge, ok
}

// feasible returns a start with a finite log-likelihood for the inner
// maximisation: warm itself, else the MLE's nuisance values, else warm
// moved along one coordinate by ±½, ±1, ±2, ±4 or ±8 (on the transformed
// scale). A point where the likelihood vanishes at the warm start (a GPD
// whose upper endpoint has moved below the largest value, say) is not a
// point where the profile vanishes, so the search matters.
func (p *profiler) feasible(f func([]float64) float64, warm []float64) []float64 {
	ok := func(u []float64) bool {
		v := f(u)
		return !math.IsNaN(v) && !math.IsInf(v, -1)
	}
	if len(warm) == 0 || ok(warm) {
		return warm
	}
	if ok(p.u0) {
		return p.u0
	}
	try := make([]float64, len(warm))
	for _, d := range []float64{0.5, 1, 2, 4, 8} {
		for a := range warm {
			for _, sign := range []float64{1, -1} {
				copy(try, warm)
				try[a] += sign * d
				if ok(try) {
					return try
				}
			}
		}
	}
	return warm
}

// profileBound is one end of a profile-likelihood interval.
type profileBound struct {
	// Value is the end on the natural scale of the quantity; for an open
	// side, the limit of the quantity's range (0, ±Inf, 1).
	Value float64
	// Open is true when the profile log-likelihood never fell to the
	// cut-off on this side: the data do not bound the quantity there.
	Open bool
	// Note says why a side is open or uncertain.
	Note string
	// AboveFit is true when the walk found the profile above the fit's
	// log-likelihood: the fit is not the maximum.
	AboveFit bool
}

// onRidge is the bound near x (on the quantity's own scale) left empty as
// not confirmed, when one of thetas (nil ones skipped) lies on a ridge
// towards a limiting family (p.ridge); ok is false otherwise.
func (p *profiler) onRidge(x float64, thetas ...[]float64) (b profileBound, ok bool) {
	if p.ridge == nil {
		return profileBound{}, false
	}
	for _, th := range thetas {
		if th == nil {
			continue
		}
		if why := p.ridge(th); why != "" {
			return profileBound{Value: math.NaN(), Note: fmt.Sprintf("not confirmed near %.6g: %s", x, why)}, true
		}
	}
	return profileBound{}, false
}

// chiSquareCut returns the cut-off of the profile-likelihood interval at
// the given level: ℓp(ψ) ≥ ℓ̂ − χ²₁(level)/2 (Cox & Hinkley, 1974, §9.3).
func chiSquareCut(level float64) float64 {
	return distuv.ChiSquared{K: 1}.Quantile(level) / 2
}

// maxCrossingGap is the largest |ℓp − cut-off| accepted at a bound found by
// narrowing the bracket (a continuous profile is within some 1e-9 there).
const maxCrossingGap = 1e-3

// maxRestarts bounds how often one side's walk resumes beyond a jump of
// the profile that a warm start from just inside removes.
const maxRestarts = 12

// maxDoublings bounds the outward walk of an interval search.
const maxDoublings = 40

// interval walks outwards from the MLE vhat on each side, in steps of
// step, 2·step, 4·step, … until ℓp falls below the cut-off llhat − cut, then
// finds the crossing by regula falsi. span limits the walk on the
// transformed scale (the log of a positive quantity cannot usefully move
// more than a few hundred units). from maps v back to the natural scale and
// lo, hi are the natural scale's limits for an open side.
func (p *profiler) interval(vhat, llhat, step, cut, span float64, from func(float64) float64, lo, hi float64) (lower, upper profileBound) {
	target := llhat - cut
	side := func(dir float64, limit float64) profileBound {
		// openAtEdge is the side open at limit, the profile above the
		// cut-off up to the edge of the parameter space at v.
		p.ranAway = false
		openAtEdge := func(v float64) profileBound {
			if p.ranAway {
				return profileBound{Value: math.NaN(),
					Note: fmt.Sprintf("not confirmed: beyond %.6g the maximum over the other parameters runs into %s, where the likelihood is unbounded", from(v), p.corner)}
			}
			return profileBound{Value: limit, Open: true,
				Note: fmt.Sprintf("open: the profile log-likelihood stays above the cut-off up to the edge of the parameter space at %.6g", from(v))}
		}
		prev, uprev, dprev := vhat, p.u0, cut
		origin, restarts := vhat, 0 // where the doubling steps start from
		for k := 0; k < maxDoublings; k++ {
			v := origin + dir*step*math.Ldexp(1, k)
			if math.Abs(v-vhat) > span {
				break
			}
			// A step that lands far below the cut-off (a regular profile
			// is some 6 below it two doublings past the crossing) may have
			// stopped at a lower local maximum: look again.
			ll, u, edge, ok := p.atChecked(v, uprev, target-4*cut)
			if edge {
				// Close in on the edge by bisection: the profile may still
				// cross the cut-off between the last inside point and it.
				for it := 0; it < 60 && edge; it++ {
					if math.Abs(v-prev) <= 1e-12*math.Max(1, math.Abs(prev)) {
						return openAtEdge(prev)
					}
					mid := 0.5 * (prev + v)
					ll, u, edge, ok = p.at(mid, uprev)
					if edge {
						v = mid
					} else if ok && ll >= target {
						prev, uprev, dprev = mid, u, ll-target
						edge = true // keep closing in
					} else {
						v = mid
					}
				}
				if edge {
					return openAtEdge(prev)
				}
			}
			if !ok && !(ll >= target) {
				// A maximisation that stopped short still gives a lower
				// bound of ℓp: above the cut-off the point is inside for
				// sure, below it nothing is known.
				return profileBound{Value: math.NaN(),
					Note: fmt.Sprintf("the maximisation over the other parameters failed near %.6g", from(v))}
			}
			if ll > llhat+1e-6*math.Max(1, math.Abs(llhat)) {
				// Far out on a ridge towards a limiting family the
				// log-likelihood loses its last digits (a threshold 10¹³
				// below the data): no evidence against the fit.
				if p.ridge != nil && p.build(v, u, p.theta) {
					if b, ok := p.onRidge(from(v), p.theta); ok {
						return b
					}
				}
				return profileBound{Value: math.NaN(), AboveFit: true,
					Note: fmt.Sprintf("the profile log-likelihood %.10g at %.6g exceeds the fit's %.10g: the fit is not the maximum", ll, from(v), llhat)}
			}
			if ll < target {
				warm := uprev
				last := 0.0 // g at the last point evaluated
				g := func(x float64) float64 {
					l, _, edge, ok := p.at(x, warm)
					if edge {
						last = math.Inf(-1)
						return last
					}
					if !ok && !(l >= target) {
						return math.NaN()
					}
					last = l - target
					return last
				}
				root, found := findRoot(g, prev, v, dprev, ll-target, 1e-10, 1e-9, 200)
				if !found {
					return profileBound{Value: math.NaN(),
						Note: fmt.Sprintf("root finding on the profile failed between %.6g and %.6g", from(prev), from(v))}
				}
				// ℓp is continuous where the inner maximisations are right,
				// so at a crossing the last value tried is within the
				// bracket's 1e-10 of the cut-off (or the likelihood ends
				// there: −Inf). A bracket that closed on a jump is no bound:
				// the maximisation just beyond it started too far away and
				// stopped at a lower maximum. Look again just beyond,
				// starting from just inside; if the profile is still above
				// the cut-off there, walk on from that point.
				if math.Abs(last) <= maxCrossingGap || math.IsInf(last, -1) {
					if !p.irregular {
						return profileBound{Value: from(root)}
					}
					// An irregular likelihood: the maximisations near the
					// root may have followed one local maximum of the other
					// parameters, an edge of the parameter space or a ridge
					// while a higher maximum lies elsewhere. Confirm the
					// crossing from two starts on each side (the walk's last
					// inside point and the MLE's values): beyond the bound
					// the profile must be at or below the cut-off, inside
					// at or above it.
					d := 1e-3 * step
					lOut, uOut, tOut, beyond := p.bestAt(root+dir*d, vhat, warm)
					if math.IsInf(lOut, -1) && !beyond {
						return profileBound{Value: math.NaN(),
							Note: fmt.Sprintf("not confirmed: no maximum over the other parameters was found just beyond %.6g", from(root))}
					}
					if lOut > target+crossingTol {
						if restarts < maxRestarts {
							restarts++
							origin, prev, uprev, dprev = root+dir*d, root+dir*d, uOut, lOut-target
							k = -1
							continue
						}
						return profileBound{Value: math.NaN(),
							Note: fmt.Sprintf("not confirmed: the profile log-likelihood is above the cut-off again beyond %.6g (another maximum of the other parameters)", from(root))}
					}
					lIn, _, tIn, _ := p.bestAt(root-dir*d, vhat, warm)
					if !(lIn >= target-crossingTol) {
						return profileBound{Value: math.NaN(),
							Note: fmt.Sprintf("not confirmed: the profile log-likelihood falls below the cut-off just inside %.6g without crossing it there", from(root))}
					}
					if b, ok := p.onRidge(from(root), tIn, tOut); ok {
						return b
					}
					return profileBound{Value: from(root)}
				}
				// Look just inside and just beyond the jump, each from the
				// walk's own start, the MLE's values and along the path from
				// the estimate (bestAt).
				d := 1e-8 * math.Max(1, math.Abs(root))
				lIn, uIn, eIn, okIn := p.atChecked(root-dir*d, warm, target)
				if !eIn && !(okIn && lIn >= target) {
					if l2, u2, _, _ := p.bestAt(root-dir*d, vhat, warm); l2 >= target {
						lIn, uIn, okIn = l2, u2, true
					}
				}
				if okIn && !eIn && lIn >= target {
					lOut, uOut, eOut, okOut := p.atChecked(root+dir*d, uIn, target)
					below := false // just beyond, below the cut-off from every start
					if !eOut && !(okOut && lOut >= target) {
						l2, u2, _, _ := p.bestAt(root+dir*d, vhat, uIn)
						if l2 >= target {
							lOut, uOut, okOut = l2, u2, true
						} else {
							below = okOut && !math.IsInf(l2, -1)
						}
					}
					switch {
					case eOut:
						return openAtEdge(root)
					case okOut && lOut >= target && restarts < maxRestarts:
						// Still above the cut-off beyond: walk on from there.
						restarts++
						origin, prev, uprev, dprev = root+dir*d, root+dir*d, uOut, lOut-target
						k = -1
						continue
					case below:
						// The profile falls from above the cut-off to below
						// it here, however the other parameters are started:
						// their best maximum changes branch (a GEV's support,
						// for one, moves with them), and the likelihood-ratio
						// set ends at the jump.
						return profileBound{Value: from(root),
							Note: fmt.Sprintf("at a jump of the profile log-likelihood (by %.3g, from above the cut-off to below it, each side checked from three starts): the maximisation over the other parameters changes branch there", math.Abs(last))}
					}
				}
				return profileBound{Value: math.NaN(),
					Note: fmt.Sprintf("the profile log-likelihood jumps by %.3g near %.6g instead of crossing the cut-off: the maximisation over the other parameters is not continuous there", math.Abs(last), from(root))}
			}
			prev, uprev, dprev = v, u, ll-target
		}
		return profileBound{Value: limit, Open: true,
			Note: fmt.Sprintf("open: the profile log-likelihood stays above the cut-off out to %.6g", from(prev))}
	}
	lower = side(-1, lo)
	upper = side(+1, hi)
	return lower, upper
}

// parameterProfiler profiles free parameter i of fit.
// loglik is fam's log-likelihood on the data (fitters.LogLikFunc).
func parameterProfiler(fam fitters.Family, fit *fitters.Fit, loglik func([]float64) float64, scales []Scale, i int) *profiler {
	free := freeIndices(fit)
	var others []int
	for _, j := range free {
		if j != i {
			others = append(others, j)
		}
	}
	est := fit.Estimates
	u0 := make([]float64, len(others))
	for a, j := range others {
		u0[a] = scales[j].To(est[j])
	}
	return &profiler{
		fam: fam, u0: u0, loglik: loglik,
		theta: append([]float64(nil), est...),
		build: func(v float64, u, theta []float64) bool {
			theta[i] = scales[i].From(v)
			fromScales(theta, u, u0, est, others, scales)
			return finite(theta) && regular(fam, theta)
		},
	}
}

// regular reports whether theta lies where the likelihood is bounded: for
// gev and gpd, shape ξ > −1 (Smith, 1985: below −1 the likelihood grows
// without bound as the endpoint nears an observation). Profiles are taken
// over this region only, so that no runaway value poses as a maximum.
func regular(fam fitters.Family, theta []float64) bool {
	if !realShape[fam.Name()] {
		return true
	}
	for i, name := range fam.Parameters() {
		if name == "shape" && !(theta[i] > -1) {
			return false
		}
	}
	return true
}

// profileLimits are the ends of parameter i's range on its scale, where
// an open side of its profile interval ends: ξ > −1 for gev and gpd
// (see regular), the scale's bounds otherwise.
func profileLimits(fam fitters.Family, i int, sc Scale) (float64, float64) {
	lo, hi := sc.Bounds()
	if realShape[fam.Name()] && fam.Parameters()[i] == "shape" {
		lo = -1
	}
	return lo, hi
}

// fromScales sets theta[others[a]] from the transformed u[a]; where u[a]
// is exactly the MLE's own value u0[a], the estimate itself is used, so an
// estimate on a boundary (a pareto scale at the sample minimum) survives the
// round trip exp(ln θ) bit for bit.
func fromScales(theta, u, u0, est []float64, others []int, scales []Scale) {
	for a, j := range others {
		if u[a] == u0[a] {
			theta[j] = est[j]
		} else {
			theta[j] = scales[j].From(u[a])
		}
	}
}

func finite(x []float64) bool {
	for _, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}
