package infer

import (
	"errors"
	"math"

	"fitseal/fitters"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/optimize"
)

// maximize returns the maximum of f (a log-likelihood on unconstrained
// nuisance coordinates u) found by BFGS (gonum/optimize, run on this
// goroutine by fitters.MinimizeBFGS) from u0, with a
// central finite-difference gradient, and a Nelder–Mead polish when BFGS
// stops short. ok reports whether the optimiser met its convergence test
// (a gradient below 1e-7·max(1, |f|), or f stable to 1e-12 relative).
// f returns −Inf where u is unusable.
func maximize(f func(u []float64) float64, u0 []float64) (u []float64, value float64, ok bool) {
	dim := len(u0)
	if dim == 0 {
		return nil, f(nil), true
	}
	f0 := f(u0)
	if math.IsNaN(f0) || math.IsInf(f0, 0) {
		return append([]float64(nil), u0...), f0, false
	}
	neg := func(x []float64) float64 {
		v := -f(x)
		if math.IsNaN(v) {
			return math.Inf(1)
		}
		return v
	}
	grad := func(g, x []float64) {
		fd.Gradient(g, neg, x, &fd.Settings{Formula: fd.Central, Step: 1e-6})
		for i, v := range g {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				g[i] = 0
			}
		}
	}
	scale := math.Max(1, math.Abs(f0))
	gtol := 1e-7 * scale
	settings := &optimize.Settings{
		GradientThreshold: gtol,
		Converger: &optimize.FunctionConverge{
			Absolute:   1e-12 * scale,
			Relative:   1e-12,
			Iterations: 20,
		},
		MajorIterations: 500,
	}
	best, bestF := append([]float64(nil), u0...), -f0
	res, err := fitters.MinimizeBFGS(optimize.Problem{Func: neg, Grad: grad}, append([]float64(nil), u0...), settings)
	if res != nil && res.F <= bestF {
		best, bestF = res.X, res.F
	}
	g := make([]float64, dim)
	grad(g, best)
	if res != nil && small(g, 100*gtol) {
		switch {
		case res.Status == optimize.GradientThreshold, res.Status == optimize.FunctionConvergence,
			errors.Is(err, optimize.ErrLinesearcherFailure):
			return best, -bestF, true
		}
	}
	// Polish with Nelder–Mead from the best point, then judge by the gradient.
	nm, _ := optimize.Minimize(optimize.Problem{Func: neg}, append([]float64(nil), best...),
		&optimize.Settings{Converger: &optimize.FunctionConverge{Absolute: 1e-12 * scale, Relative: 1e-12, Iterations: 50}, MajorIterations: 2000},
		&optimize.NelderMead{})
	if nm != nil && nm.F <= bestF {
		best, bestF = nm.X, nm.F
	}
	grad(g, best)
	if small(g, 1000*gtol) {
		return best, -bestF, true
	}
	// At a sharp maximum (a ridge where an observation meets the edge of
	// the support) the finite-difference gradient is dominated by
	// truncation error; accept the point when no probe along a coordinate
	// or along the gradient, at steps of 1e-4 and 1e-6, improves f by more
	// than 1e-10 relative.
	return best, -bestF, noBetterNearby(neg, best, bestF, g)
}

// noBetterNearby reports whether no probe around u improves the minimised
// objective neg beyond 1e-10·max(1, |f|).
func noBetterNearby(neg func([]float64) float64, u []float64, f float64, g []float64) bool {
	tol := 1e-10 * math.Max(1, math.Abs(f))
	dirs := make([][]float64, 0, len(u)+1)
	for a := range u {
		e := make([]float64, len(u))
		e[a] = 1
		dirs = append(dirs, e)
	}
	var gn float64
	for _, v := range g {
		gn += v * v
	}
	if gn = math.Sqrt(gn); gn > 0 && !math.IsInf(gn, 0) {
		e := make([]float64, len(u))
		for a, v := range g {
			e[a] = v / gn
		}
		dirs = append(dirs, e)
	}
	x := make([]float64, len(u))
	for _, e := range dirs {
		for _, h := range []float64{1e-4, 1e-6} {
			for _, sign := range []float64{1, -1} {
				for a := range u {
					x[a] = u[a] + sign*h*math.Max(1, math.Abs(u[a]))*e[a]
				}
				if neg(x) < f-tol {
					return false
				}
			}
		}
	}
	return true
}

func small(g []float64, tol float64) bool {
	for _, v := range g {
		if !(math.Abs(v) <= tol) {
			return false
		}
	}
	return true
}
