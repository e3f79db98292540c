package fitters

import "math"

// Staged multi-start maximisation for large samples.
//
// Running every start of a multi-start search over 10⁵ observations costs
// hundreds of passes over the data. For a large complete sample the starts
// are therefore run on an evenly strided subsample (stageSubsample values),
// and the best subsample optimum θs is polished on all the data by BFGS in
// whitened coordinates u, θ = θs + C u, where CᵀHC = I for the subsample's
// Hessian H scaled by n/m (C = L⁻ᵀ, H = LLᵀ by Cholesky). Near the optimum
// the full problem then has an almost unit Hessian, so BFGS's initial
// identity matrix is already a good model and a few iterations reach the
// tolerance. The polish is judged by the same convergence rules as every
// fit; when it fails, the caller falls back to the plain multi-start on all
// the data.

const (
	// stageAbove is the sample size above which the staged route is used.
	stageAbove = 4000
	// stageSubsample is the size of the subsample the starts run on.
	stageSubsample = 2000
)

// minimizeRestarted is minimize followed, when the best run did not
// converge, by one restart from its end point: each run's gradient
// threshold is set from the objective at its own start, and a restart at
// the optimum applies the threshold of the optimum itself.
func minimizeRestarted(p problem, starts [][]float64, opt Options) optimum {
	o := minimize(p, starts, opt)
	if o.theta == nil || o.converged {
		return o
	}
	r := minimize(p, [][]float64{o.theta}, opt)
	r.iterations += o.iterations
	r.evaluations += o.evaluations
	r.starts = o.starts
	if r.theta == nil || r.negLogLik > o.negLogLik {
		o.iterations, o.evaluations = r.iterations, r.evaluations
		return o
	}
	return r
}

// minimizeStaged maximises with the staged route when sub is not nil (a
// problem on a subsample that is ratio = n/m times smaller than full), and
// otherwise with minimizeRestarted on full. It reports whether the staged
// route produced the result.
func minimizeStaged(full problem, sub *problem, ratio float64, starts [][]float64, opt Options) (optimum, bool) {
	if sub != nil {
		s := minimize(*sub, starts, opt)
		if s.theta != nil {
			o := whitenedPolish(full, *sub, ratio, s.theta, opt)
			o.iterations += s.iterations
			o.evaluations += s.evaluations
			o.starts = s.starts
			if o.converged {
				return o, true
			}
		}
	}
	return minimizeRestarted(full, starts, opt), false
}

// whitenedPolish runs BFGS on full from theta0 in the whitened coordinates
// described above and returns the optimum in the original coordinates (its
// gradient norm is the whitened one, the scale the optimiser worked on).
func whitenedPolish(full, sub problem, ratio float64, theta0 []float64, opt Options) optimum {
	dim := full.dim
	c := whitening(sub, theta0, ratio)
	at := func(u []float64) []float64 {
		th := append([]float64(nil), theta0...)
		for i := 0; i < dim; i++ {
			for j := 0; j < dim; j++ {
				th[i] += c[i][j] * u[j]
			}
		}
		return th
	}
	gTheta := make([]float64, dim)
	prob := problem{
		dim:       dim,
		negLogLik: func(u []float64) float64 { return full.negLogLik(at(u)) },
		grad: func(g, u []float64) {
			full.grad(gTheta, at(u))
			for j := 0; j < dim; j++ {
				g[j] = 0
				for i := 0; i < dim; i++ {
					g[j] += c[i][j] * gTheta[i]
				}
			}
		},
	}
	o := minimizeRestarted(prob, [][]float64{make([]float64, dim)}, opt)
	o.evaluations += 2 * dim // the gradients of the Hessian estimate
	if o.theta != nil {
		o.theta = at(o.theta)
	}
	return o
}

// whitening returns C = L⁻ᵀ for the Hessian H = ratio·∇²f_sub(θ) = LLᵀ,
// estimated by central differences of the analytic gradient (step
// 1e-4·max(1, |θᵢ|)), or a diagonal scaling (or the identity) where H is
// not positive definite.
func whitening(p problem, theta []float64, ratio float64) [][]float64 {
	dim := p.dim
	h := make([][]float64, dim)
	gp, gm := make([]float64, dim), make([]float64, dim)
	x := append([]float64(nil), theta...)
	for i := range h {
		h[i] = make([]float64, dim)
		step := 1e-4 * math.Max(1, math.Abs(theta[i]))
		x[i] = theta[i] + step
		p.grad(gp, x)
		x[i] = theta[i] - step
		p.grad(gm, x)
		x[i] = theta[i]
		for j := range gp {
			h[i][j] = ratio * (gp[j] - gm[j]) / (2 * step)
		}
	}
	for i := range h {
		for j := 0; j < i; j++ {
			m := 0.5 * (h[i][j] + h[j][i])
			h[i][j], h[j][i] = m, m
		}
	}
	c := make([][]float64, dim)
	for i := range c {
		c[i] = make([]float64, dim)
	}
	l, ok := cholesky(h)
	if ok {
		// C = L⁻ᵀ: solve Lᵀ C = I column by column (back substitution).
		for col := 0; col < dim; col++ {
			for i := dim - 1; i >= 0; i-- {
				v := 0.0
				if i == col {
					v = 1
				}
				for k := i + 1; k < dim; k++ {
					v -= l[k][i] * c[k][col]
				}
				c[i][col] = v / l[i][i]
			}
		}
		return c
	}
	for i := range c {
		c[i][i] = 1
		if h[i][i] > 0 && !math.IsInf(h[i][i], 1) {
			c[i][i] = 1 / math.Sqrt(h[i][i])
		}
	}
	return c
}

// cholesky returns the lower-triangular L with LLᵀ = a, or false when a is
// not (numerically) positive definite.
func cholesky(a [][]float64) ([][]float64, bool) {
	n := len(a)
	l := make([][]float64, n)
	for i := range l {
		l[i] = make([]float64, n)
	}
	for j := 0; j < n; j++ {
		d := a[j][j]
		for k := 0; k < j; k++ {
			d -= l[j][k] * l[j][k]
		}
		if !(d > 0) || math.IsInf(d, 1) {
			return nil, false
		}
		l[j][j] = math.Sqrt(d)
		for i := j + 1; i < n; i++ {
			s := a[i][j]
			for k := 0; k < j; k++ {
				s -= l[i][k] * l[j][k]
			}
			l[i][j] = s / l[j][j]
		}
	}
	return l, true
}

// stagedSubproblem returns the subsample problem for the exact values x of
// a complete sample larger than stageAbove (nil otherwise) and the ratio
// n/m of the sizes.
func stagedSubproblem(d *Data, x []float64, dim int, nll func(x []float64) exactNLL) (*problem, float64) {
	if !d.IsComplete() || len(x) <= stageAbove {
		return nil, 1
	}
	xs := startSubsample(x, stageSubsample)
	p := likelihoodProblem(dim, nll(xs), nil, Complete(xs))
	return &p, float64(len(x)) / float64(len(xs))
}

// stagedMethod names the route in the convergence record.
func stagedMethod(method string, staged bool) string {
	if staged {
		return method + "; starts on a 2000-value subsample, polished on all values in whitened coordinates"
	}
	return method
}
