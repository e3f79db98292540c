package fitters

import (
	"fmt"
	"math"
)

// thresholdModel describes a three-parameter family X = γ + Y, Y in a
// two-parameter positive family, for fitThreshold. The two parameters of Y
// are optimised on transformed scales (θ0, θ1); the threshold as
// γ = m − e^t, m the smallest value that must exceed it, so that γ < m.
type thresholdModel struct {
	// nll returns −Σ ln f over the exact values, given dev = x − m (free
	// threshold, θ = (θ0, θ1, t), y = dev + e^t) or dev = x − u (fixed
	// threshold u, θ = (θ0, θ1), y = dev).
	nll func(dev []float64, free bool) exactNLL
	// natural maps (θ0, θ1) to the family's first two parameters.
	natural func(t0, t1 float64) (float64, float64)
	// dist builds the member with natural parameters a, b and threshold g.
	dist func(a, b, g float64) Dist
	// start fits Y to y > 0 by a quick explicit rule, returning (θ0, θ1).
	start func(y []float64) (float64, float64)
	// limit names the two-parameter limit reached as γ → −∞.
	limit string
	// note returns a caution for a converged free-threshold fit.
	note func(a, b float64) string
	// censored, when set, is the family as a location–scale law of
	// ln(x − γ), for the censored Newton route (fitThresholdCensored).
	censored *thresholdLocScale
}

// ThresholdFloor is the smallest value that must lie above a threshold
// family's threshold γ (weibull3, lognormal3): the least exact value,
// non-detect limit or finite interval upper bound; ok is false when d has
// none.
func ThresholdFloor(d *Data) (float64, bool) { return thresholdFloor(d) }

// thresholdFloor is the smallest value that must lie above the threshold:
// the least exact value, non-detect limit or finite interval upper bound
// (right-censored values and interval lower bounds may lie below it).
func thresholdFloor(d *Data) (float64, bool) {
	m, ok := math.Inf(1), false
	for _, v := range d.Exact {
		m, ok = math.Min(m, v), true
	}
	for _, v := range d.Left {
		m, ok = math.Min(m, v), true
	}
	for _, v := range d.Upper {
		if !math.IsInf(v, 1) {
			m, ok = math.Min(m, v), true
		}
	}
	return m, ok
}

// thresholdApplicable checks the fixed parameters (only "threshold") and
// the support x > threshold.
func thresholdApplicable(f Family, d *Data, fixed Fixed) error {
	if err := checkFixedNames(f, fixed, "threshold"); err != nil {
		return err
	}
	if u, ok := fixed["threshold"]; ok {
		for _, v := range d.valuesView() {
			if !(v > u) {
				return inapplicable(f.Name(), "needs every value above the fixed threshold %v, the data have %v", u, v)
			}
		}
		return needDistinct(f.Name(), d, 2)
	}
	if _, ok := thresholdFloor(d); !ok {
		return inapplicable(f.Name(), "needs an exact value, a non-detect limit or an interval upper bound to bound the threshold")
	}
	return needDistinct(f.Name(), d, 3)
}

// fitThreshold fits a threshold family. With the threshold fixed it is an
// excess model: BFGS over (θ0, θ1), k = 2. With the threshold free, the
// likelihood is unbounded as γ approaches the sample minimum (Smith, 1985;
// Cheng & Amin, 1983), so each start is run on its own and only runs that
// converge to a stationary point count: the largest of these interior local
// maxima is reported. Runs that run away to the boundary or off to γ → −∞
// never are; when no run converges the fit is reported as non-regular.
func fitThreshold(f Family, m thresholdModel, d *Data, opt Options) (*Fit, error) {
	if err := thresholdApplicable(f, d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	values := d.valuesView() // read only
	if u, ok := opt.Fixed["threshold"]; ok {
		fit.Fixed[2], fit.K, fit.Estimates[2] = true, 2, u
		devBuf := borrowScratch(len(d.Exact)) // nothing keeps dev after the fit
		defer returnScratch(devBuf)
		dev := *devBuf
		for i, x := range d.Exact {
			dev[i] = x - u
		}
		few := startSubsample(values, stageSubsample) // starts need no more
		y := make([]float64, 0, len(few))
		for _, v := range few {
			y = append(y, v-u)
		}
		a0, b0 := m.start(y)
		starts := [][]float64{{a0, b0}, {a0 + 0.5, b0}, {a0 - 0.5, b0}}
		dist := func(t []float64) Dist { a, b := m.natural(t[0], t[1]); return m.dist(a, b, u) }
		sub, ratio := stagedSubproblem(d, dev, 2, func(x []float64) exactNLL { return m.nll(x, false) })
		o, staged := minimizeStaged(likelihoodProblem(2, m.nll(dev, false), dist, d), sub, ratio, starts, opt)
		var est []float64
		if o.theta != nil {
			a, b := m.natural(o.theta[0], o.theta[1])
			est = []float64{a, b, u}
		}
		fit.setOptimum(o, est, stagedMethod("BFGS on the excesses over the fixed threshold", staged))
		return fit, nil
	}

	floor, _ := thresholdFloor(d)
	_, hi := minMax(values)
	span := hi - floor
	if !(span > 0) {
		span = math.Max(math.Abs(floor), 1) * 1e-3
	}
	devBuf := borrowScratch(len(d.Exact)) // nothing keeps dev after the fit
	defer returnScratch(devBuf)
	dev := *devBuf
	for i, x := range d.Exact {
		dev[i] = x - floor
	}
	dist := func(t []float64) Dist {
		a, b := m.natural(t[0], t[1])
		return m.dist(a, b, floor-math.Exp(t[2]))
	}
	prob := likelihoodProblem(3, m.nll(dev, true), dist, d)
	var starts [][]float64
	few := startSubsample(values, stageSubsample) // starts need no more
	for _, c := range []float64{0.02, 0.2, 1, 5} {
		gap := c * span
		y := make([]float64, 0, len(few))
		for _, v := range few {
			if v-floor+gap > 0 {
				y = append(y, v-floor+gap)
			}
		}
		a0, b0 := m.start(y)
		if finiteParam(a0) && finiteParam(b0) {
			starts = append(starts, []float64{a0, b0, math.Log(gap)})
		}
	}
	farLimit, nearBoundary := math.Log(1e4*span), math.Log(1e-3*span)
	solved, newtonReason := fitThresholdCensored(fit, m, d, opt, dev, floor, starts, farLimit, nearBoundary)
	if solved {
		return fit, nil
	}
	if newtonReason != "" {
		defer censoredNewtonFallback(fit, newtonReason)
	}
	staged := false
	r := thresholdRuns{}
	if d.IsComplete() && len(dev) > stageAbove {
		// Staged: the starts on a subsample that keeps the minimum (dev 0),
		// the best interior maximum polished on all values.
		sdev := append(startSubsample(dev, stageSubsample), 0)
		sub := likelihoodProblem(3, m.nll(sdev, true), nil, Complete(sdev))
		r = runThresholdStarts(sub, starts, opt, farLimit, nearBoundary)
		if r.best != nil {
			o := whitenedPolish(prob, sub, float64(len(dev))/float64(len(sdev)), r.best.theta, opt)
			r.iters += o.iterations
			r.evals += o.evaluations
			if o.converged && o.theta[2] < farLimit {
				r.best, staged = &o, true
			}
		}
	}
	if !staged {
		full := runThresholdStarts(prob, starts, opt, farLimit, nearBoundary)
		full.iters += r.iters
		full.evals += r.evals
		r = full
	}
	best, iters, evals := r.best, r.iters, r.evals
	runaway, tooFar, lastReason := r.runaway, r.tooFar, r.lastReason
	method := stagedMethod("BFGS on the two shape/scale parameters and log(min − threshold), each start separately", staged)
	if best != nil {
		best.iterations, best.evaluations, best.starts = iters, evals, len(starts)
		a, b := m.natural(best.theta[0], best.theta[1])
		fit.setOptimum(*best, []float64{a, b, floor - math.Exp(best.theta[2])}, method)
		fit.Note = "the likelihood is unbounded as the threshold approaches the sample minimum; reported the largest interior local maximum found (Smith, 1985)"
		if n := m.note(a, b); n != "" {
			fit.Note += "; " + n
		}
		return fit, nil
	}
	fit.Convergence = Convergence{Method: fmt.Sprintf("%s, %d start(s)", method, len(starts)), Iterations: iters, Evaluations: evals}
	switch {
	case runaway:
		fit.Reason = "non-regular likelihood: it grows without bound as the threshold approaches the sample minimum, and no interior local maximum was found"
	case tooFar:
		fit.Reason = fmt.Sprintf("no finite maximum: the likelihood keeps increasing as the threshold → −∞ (towards the %s limit)", m.limit)
	case lastReason != "":
		fit.Reason = lastReason
	default:
		fit.Reason = "no start gave a finite log-likelihood"
	}
	return fit, nil
}

// thresholdRuns collects the separate runs of fitThreshold's starts.
type thresholdRuns struct {
	best            *optimum // the converged run with the highest likelihood
	iters, evals    int
	runaway, tooFar bool   // some run went to the minimum, or to γ → −∞
	lastReason      string // why the last other run failed
}

// runThresholdStarts runs each start on its own and classifies the result:
// t = ln(min − γ) beyond farLimit is the γ → −∞ limit, a run that did not
// converge below nearBoundary ran away to the minimum, and only converged
// runs (stationary points, interior by construction) compete for best.
func runThresholdStarts(prob problem, starts [][]float64, opt Options, farLimit, nearBoundary float64) thresholdRuns {
	var r thresholdRuns
	for _, s := range starts {
		o := minimize(prob, [][]float64{s}, opt)
		if o.theta != nil && !o.converged && o.theta[2] >= nearBoundary && o.theta[2] <= farLimit {
			// A restart at the end point judges it by its own gradient scale.
			o2 := minimize(prob, [][]float64{o.theta}, opt)
			o2.iterations += o.iterations
			o2.evaluations += o.evaluations
			if o2.theta != nil && o2.negLogLik <= o.negLogLik {
				o = o2
			}
		}
		r.iters += o.iterations
		r.evals += o.evaluations
		if o.theta == nil {
			continue
		}
		t := o.theta[2]
		switch {
		case t > farLimit:
			r.tooFar = true
			continue
		case !o.converged && t < nearBoundary:
			r.runaway = true
			continue
		case !o.converged:
			r.lastReason = o.reason
			continue
		}
		if r.best == nil || o.negLogLik < r.best.negLogLik {
			oc := o
			r.best = &oc
		}
	}
	return r
}
