package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/optimize"
)

// TestMinimizeBFGSMatchesMinimize runs MinimizeBFGS and gonum's
// optimize.Minimize with BFGS on the same problems and settings and wants
// the same result bit for bit: location, value, gradient, status, error
// and the counts of major iterations and evaluations. Problems: random
// convex quadratics (dimensions 1–4), Rosenbrock's valley, a function that
// is +Inf outside a box (as a log-likelihood outside its support), one that
// is NaN at the start, and the log-likelihoods of three families fitted
// through finite-difference gradients, with and without a gradient
// threshold, iteration limits of 1, 3 and 500 and converger tolerances from
// 1e-4 to 1e-14.
func TestMinimizeBFGSMatchesMinimize(t *testing.T) {
	type problem struct {
		name string
		p    optimize.Problem
		x0   []float64
	}
	var problems []problem
	r := rand.New(rand.NewPCG(1, 2))
	withFD := func(f func([]float64) float64) optimize.Problem {
		return optimize.Problem{Func: f, Grad: func(g, x []float64) {
			fd.Gradient(g, f, x, &fd.Settings{Formula: fd.Central, Step: 1e-6})
		}}
	}
	for dim := 1; dim <= 4; dim++ {
		a := make([]float64, dim)
		c := make([]float64, dim)
		for i := range a {
			a[i], c[i] = 0.1+3*r.Float64(), 4*r.Float64()-2
		}
		f := func(x []float64) float64 {
			var s float64
			for i, v := range x {
				d := v - c[i]
				s += a[i] * d * d
			}
			return s
		}
		grad := func(g, x []float64) {
			for i, v := range x {
				g[i] = 2 * a[i] * (v - c[i])
			}
		}
		x0 := make([]float64, dim)
		problems = append(problems,
			problem{fmt.Sprintf("quadratic%d", dim), optimize.Problem{Func: f, Grad: grad}, x0},
			problem{fmt.Sprintf("quadratic%d-fd", dim), withFD(f), x0})
	}
	rosen := func(x []float64) float64 {
		return 100*(x[1]-x[0]*x[0])*(x[1]-x[0]*x[0]) + (1-x[0])*(1-x[0])
	}
	problems = append(problems, problem{"rosenbrock-fd", withFD(rosen), []float64{-1.2, 1}})
	boxed := func(x []float64) float64 {
		if math.Abs(x[0]) > 2 || math.Abs(x[1]) > 2 {
			return math.Inf(1)
		}
		return math.Exp(x[0]) - 2*x[0] + x[1]*x[1] - x[1]
	}
	problems = append(problems, problem{"boxed-fd", withFD(boxed), []float64{1.5, -1.5}})
	problems = append(problems, problem{"nan-start", withFD(func(x []float64) float64 {
		if x[0] < 0 {
			return math.NaN()
		}
		return x[0] * x[0]
	}), []float64{-1}})
	for _, c := range []struct {
		family string
		params []float64
	}{{"gev", []float64{10, 2, 0.1}}, {"weibull", []float64{1.8, 120}}, {"gamma", []float64{0.7, 2}}} {
		fam, _ := Lookup(c.family)
		dist, _ := fam.New(c.params)
		rr := rand.New(rand.NewPCG(4, 5))
		x := make([]float64, 60)
		for i := range x {
			x[i] = dist.Rand(rr)
		}
		d := Complete(x)
		neg := func(u []float64) float64 {
			p := append([]float64(nil), u...)
			for i := 1; i < len(p); i++ {
				p[i] = math.Exp(p[i])
			}
			if c.family != "gev" {
				p[0] = math.Exp(p[0])
			}
			v := -fam.LogLik(p, d)
			if math.IsNaN(v) {
				return math.Inf(1)
			}
			return v
		}
		x0 := make([]float64, len(c.params))
		for i, v := range c.params {
			x0[i] = math.Log(v) + 0.3
		}
		if c.family == "gev" {
			x0[0] = c.params[0] + 0.5
		}
		problems = append(problems, problem{c.family + "-loglik-fd", withFD(neg), x0})
	}

	compared := 0
	statuses := map[string]int{}
	for _, pr := range problems {
		for _, gtol := range []float64{0, 1e-7} {
			for _, iters := range []int{1, 3, 500} {
				for _, ctol := range []float64{1e-4, 1e-10, 1e-14} {
					settings := func() *optimize.Settings {
						return &optimize.Settings{GradientThreshold: gtol, MajorIterations: iters,
							Converger: &optimize.FunctionConverge{Absolute: ctol, Relative: ctol, Iterations: 20}}
					}
					want, werr := optimize.Minimize(pr.p, append([]float64(nil), pr.x0...), settings(), &optimize.BFGS{})
					got, gerr := MinimizeBFGS(pr.p, append([]float64(nil), pr.x0...), settings())
					name := fmt.Sprintf("%s gtol=%v iters=%d ctol=%v", pr.name, gtol, iters, ctol)
					if fmt.Sprint(werr) != fmt.Sprint(gerr) {
						t.Errorf("%s: error %v, Minimize %v", name, gerr, werr)
						continue
					}
					if got.Status != want.Status || !sameBits(got.X, want.X) || !sameBits([]float64{got.F}, []float64{want.F}) ||
						!sameBits(got.Gradient, want.Gradient) || got.MajorIterations != want.MajorIterations ||
						got.FuncEvaluations != want.FuncEvaluations || got.GradEvaluations != want.GradEvaluations {
						t.Errorf("%s:\n got  %v %v F=%v g=%v iter=%d f=%d g=%d\n want %v %v F=%v g=%v iter=%d f=%d g=%d", name,
							got.Status, got.X, got.F, got.Gradient, got.MajorIterations, got.FuncEvaluations, got.GradEvaluations,
							want.Status, want.X, want.F, want.Gradient, want.MajorIterations, want.FuncEvaluations, want.GradEvaluations)
					}
					compared++
					statuses[fmt.Sprintf("%v/%v", want.Status, werr != nil)]++
				}
			}
		}
	}
	t.Logf("%d runs compared; outcomes (status/error): %v", compared, statuses)
	for _, s := range []string{"GradientThreshold/false", "FunctionConvergence/false", "IterationLimit/false", "Failure/true"} {
		if statuses[s] == 0 {
			t.Errorf("no run ended %s: the comparison should cover it", s)
		}
	}
}
