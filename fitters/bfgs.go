package fitters

import (
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/optimize"
)

// MinimizeBFGS returns what optimize.Minimize(p, x0, settings,
// &optimize.BFGS{}) returns, running gonum's BFGS on the calling goroutine.
//
// Minimize runs the method on goroutines of its own and hands every
// evaluation between them over channels; for a cheap objective (a profile
// likelihood from statistics taken once costs some 50 ns) that handing-over
// cost several times the evaluation, and woke idle threads besides. Here
// gonum's own pieces do the work — optimize.LinesearchMethod with the BFGS
// direction and the bisection line search that BFGS uses by default — and
// this function is only the loop between them, written as Minimize and
// gonum's local-method driver run it: the same evaluations in the same
// order, the same tests at each major iteration (Settings.GradientThreshold,
// the Converger, MajorIterations; then BFGS's own gradient threshold,
// 1e-12), the same Result (location, status, major iterations and
// evaluation counts) and error (TestMinimizeBFGSMatchesMinimize, bit for
// bit). Settings with anything else set (evaluation limits, a Recorder,
// concurrency, initial values, a run time) and problems with a Status
// function go to Minimize itself.
func MinimizeBFGS(p optimize.Problem, x0 []float64, settings *optimize.Settings) (*optimize.Result, error) {
	if settings == nil {
		settings = &optimize.Settings{}
	}
	if p.Status != nil || p.Grad == nil || settings.InitValues != nil || settings.Recorder != nil ||
		settings.FuncEvaluations != 0 || settings.GradEvaluations != 0 || settings.HessEvaluations != 0 ||
		settings.Runtime != 0 || settings.Concurrent > 1 || len(x0) == 0 {
		return optimize.Minimize(p, x0, settings, &optimize.BFGS{})
	}
	dim := len(x0)
	converger := settings.Converger
	if converger == nil {
		converger = &optimize.FunctionConverge{Absolute: 1e-10, Iterations: 100} // Minimize's default
	}
	converger.Init(dim)

	res := &optimize.Result{Location: optimize.Location{X: make([]float64, dim), F: math.Inf(1)}}
	loc := &optimize.Location{X: append([]float64(nil), x0...)}
	x := make([]float64, dim)
	evaluate := func(op optimize.Operation) {
		copy(x, loc.X)
		if op&optimize.FuncEvaluation != 0 {
			loc.F = p.Func(x)
			res.Stats.FuncEvaluations++
		}
		if op&optimize.GradEvaluation != 0 {
			if len(loc.Gradient) == 0 {
				loc.Gradient = make([]float64, dim)
			}
			p.Grad(loc.Gradient, x)
			res.Stats.GradEvaluations++
		}
	}
	// majorIteration records loc as the result and applies Minimize's tests.
	majorIteration := func() optimize.Status {
		opt := &res.Location
		opt.F = loc.F
		copy(opt.X, loc.X)
		if opt.Gradient == nil {
			opt.Gradient = make([]float64, dim)
		}
		copy(opt.Gradient, loc.Gradient)
		res.Stats.MajorIterations++
		switch {
		case math.IsInf(opt.F, -1):
			return optimize.FunctionNegativeInfinity
		case settings.GradientThreshold > 0 && floats.Norm(opt.Gradient, math.Inf(1)) < settings.GradientThreshold:
			return optimize.GradientThreshold
		}
		if s := converger.Converged(opt); s != optimize.NotTerminated {
			return s
		}
		if settings.MajorIterations > 0 && res.Stats.MajorIterations >= settings.MajorIterations {
			return optimize.IterationLimit
		}
		return optimize.NotTerminated
	}
	finish := func(s optimize.Status, err error) (*optimize.Result, error) {
		res.Status = s
		return res, err
	}

	// The starting location, its checks, and its major iteration.
	evaluate(optimize.FuncEvaluation | optimize.GradEvaluation)
	if math.IsInf(loc.F, 1) || math.IsNaN(loc.F) {
		return finish(optimize.Failure, optimize.ErrFunc(loc.F))
	}
	for i, v := range loc.Gradient {
		if math.IsInf(v, 0) || math.IsNaN(v) {
			return finish(optimize.Failure, optimize.ErrGrad{Grad: v, Index: i})
		}
	}
	if s := majorIteration(); s != optimize.NotTerminated {
		return finish(s, nil)
	}
	ls := &optimize.LinesearchMethod{NextDirectioner: &optimize.BFGS{}, Linesearcher: &optimize.Bisection{}}
	op, err := ls.Init(loc)
	for err == nil {
		if op == optimize.MajorIteration {
			if s := majorIteration(); s != optimize.NotTerminated {
				return finish(s, nil)
			}
			if floats.Norm(loc.Gradient, math.Inf(1)) < bfgsGradientThreshold {
				return finish(optimize.GradientThreshold, nil)
			}
		} else {
			evaluate(op)
		}
		op, err = ls.Iterate(loc)
	}
	return finish(optimize.Failure, err)
}

// bfgsGradientThreshold is BFGS's own gradient threshold when its
// GradStopThreshold is 0 (gonum's defaultGradientAbsTol).
const bfgsGradientThreshold = 1e-12
