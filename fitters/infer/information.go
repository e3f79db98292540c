package infer

import (
	"errors"
	"fmt"
	"math"

	"fitseal/fitters"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// AnalyticInformation may be implemented by a family that knows its
// observed information in closed form. ObservedInformation fills h, sized
// k×k over all the family's parameters in order, with −∂² ln L/∂θᵢ∂θⱼ at
// params on the natural scale, and reports false where it has no formula
// for these data (censored observations, say). Families need not import
// this package to implement it.
type AnalyticInformation interface {
	ObservedInformation(params []float64, d *fitters.Data, h *mat.SymDense) bool
}

// ErrSingularHessian and ErrIndefiniteHessian are matched (errors.Is) by the
// *HessianError an information computation returns when the observed
// information cannot be inverted into a covariance.
var (
	ErrSingularHessian   = errors.New("observed information is singular")
	ErrIndefiniteHessian = errors.New("observed information is not positive definite")
	ErrNonFiniteHessian  = errors.New("observed information is not finite")
)

// HessianError says why the observed information gave no covariance, with
// its eigenvalues (ascending) when they could be computed.
type HessianError struct {
	Kind        error
	Eigenvalues []float64
	Detail      string
}

func (e *HessianError) Error() string {
	return fmt.Sprintf("%v (%s): no standard errors", e.Kind, e.Detail)
}

func (e *HessianError) Is(target error) bool { return target == e.Kind }

// Information is the observed information of a fit over its free
// parameters.
type Information struct {
	// Free lists the indices (in the family's parameter order) of the free
	// parameters; Hessian and Covariance are indexed in this order.
	Free []int
	// Hessian is −∂² ln L/∂θ∂θ' at the MLE on the natural scale.
	Hessian *mat.SymDense
	// Covariance is the inverse of Hessian; nil when it is not positive definite.
	Covariance *mat.SymDense
	// StdErrors has one entry per family parameter: √(Covariance_ii) for a
	// free parameter, NaN for a fixed one or when there is no covariance.
	StdErrors []float64
	// Method is "analytic" or the finite-difference recipe used.
	Method string
}

// numericMethod describes the finite-difference route of ObservedInformation.
const numericMethod = "central finite differences (gonum/diff/fd) with Richardson extrapolation, steps scaled to each standard error"

// ObservedInformation returns the observed information of fit at its
// estimates (Efron & Hinkley, 1978): analytic when the family implements
// AnalyticInformation, otherwise the central finite-difference Hessian of
// −ln L on the natural scale. The step is scaled to each parameter: a first
// pass with steps of 1e-4·|θ̂ᵢ| gives the curvature, and the reported pass
// steps a few thousandths of each parameter's own standard error (1/√Hᵢᵢ),
// extrapolated (Richardson), so a parameter of size 10⁻⁶ and one of size
// 10⁶ are differenced alike.
//
// Where the family reports a corner of the log-likelihood at the estimate
// (fitters.CornerAt: pareto's scale at an interval's lower end) there is
// no information to compute, and the error says why, as for a Hessian that
// is not finite. The covariance is the inverse, by Cholesky factorisation;
// a singular or indefinite information is never inverted: the returned Information has a
// nil Covariance and NaN standard errors, and the error is a *HessianError.
func ObservedInformation(fam fitters.Family, fit *fitters.Fit, d *fitters.Data) (*Information, error) {
	return observedInformation(fam, fit, d, true)
}

func observedInformation(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, allowAnalytic bool) (*Information, error) {
	free := freeIndices(fit)
	k := len(free)
	info := &Information{Free: free, StdErrors: nanSlice(len(fit.Estimates))}
	if k == 0 {
		info.Method = "no free parameters"
		return info, nil
	}
	if why := fitters.CornerAt(fam, fit.Estimates, d); why != "" {
		info.Method = "none: the log-likelihood has a corner at the estimate"
		return info, &HessianError{Kind: ErrNonFiniteHessian, Detail: why}
	}
	h := mat.NewSymDense(k, nil)
	analytic := false
	if allowAnalytic {
		if a, ok := fam.(AnalyticInformation); ok {
			full := mat.NewSymDense(len(fit.Estimates), nil)
			if a.ObservedInformation(fit.Estimates, d, full) {
				for i, fi := range free {
					for j, fj := range free {
						h.SetSym(i, j, full.At(fi, fj))
					}
				}
				analytic = true
				info.Method = "analytic"
			}
		}
	}
	if !analytic {
		numericHessian(h, fam, fit.Estimates, free, d)
		info.Method = numericMethod
	}
	info.Hessian = h
	theta := make([]float64, k)
	for i, fi := range free {
		theta[i] = fit.Estimates[fi]
	}
	cov, err := invertInformation(h, theta)
	if err != nil {
		return info, err
	}
	info.Covariance = cov
	for i, fi := range free {
		info.StdErrors[fi] = math.Sqrt(cov.At(i, i))
	}
	return info, nil
}

// numericHessian fills h with the finite-difference Hessian of −ln L over
// the free parameters at est, in two passes (see ObservedInformation).
func numericHessian(h *mat.SymDense, fam fitters.Family, est []float64, free []int, d *fitters.Data) {
	k := len(free)
	scale := make([]float64, k)
	for i, fi := range free {
		scale[i] = math.Abs(est[fi])
		if scale[i] == 0 {
			scale[i] = 1
		}
	}
	pass := func(h *mat.SymDense, step float64) {
		theta := append([]float64(nil), est...)
		f := func(u []float64) float64 {
			for i, fi := range free {
				theta[fi] = est[fi] + scale[i]*u[i]
			}
			return -fam.LogLik(theta, d)
		}
		u0 := make([]float64, k)
		fd.Hessian(h, f, u0, &fd.Settings{Formula: fd.Central, Step: step})
		for i := 0; i < k; i++ {
			for j := i; j < k; j++ {
				h.SetSym(i, j, h.At(i, j)/(scale[i]*scale[j]))
			}
		}
	}
	pass(h, 1e-4)
	rescaled := false
	for i := range scale {
		if hii := h.At(i, i); hii > 0 && !math.IsInf(hii, 0) {
			scale[i] = 1 / math.Sqrt(hii)
			rescaled = true
		}
	}
	if !rescaled {
		return
	}
	// Second pass in standard-error units, with Richardson extrapolation
	// of steps δ and 2δ: H ≈ (4H(δ) − H(2δ))/3 removes the O(δ²) error.
	// δ = 2e-3·max(1, |ln L|)^¼ balances the O(δ⁴/n²) truncation against
	// the rounding error ε|ln L|/δ².
	delta := math.Min(0.1, 2e-3*math.Pow(math.Max(1, math.Abs(fam.LogLik(est, d))), 0.25))
	h2 := mat.NewSymDense(k, nil)
	pass(h, delta)
	pass(h2, 2*delta)
	for i := 0; i < k; i++ {
		for j := i; j < k; j++ {
			h.SetSym(i, j, (4*h.At(i, j)-h2.At(i, j))/3)
		}
	}
}

// invertInformation inverts a positive-definite information matrix h of
// the parameters at theta by Cholesky factorisation and otherwise says why
// it cannot: not finite, singular (smallest eigenvalue ≤ 1e-12 of the
// largest in magnitude) or indefinite (a clearly negative eigenvalue: the
// point is not a maximum). Neither the verdict nor the digits depend on the
// units of the data or of the parameters (a gamma's shape near 1 beside a
// rate near 1e9 is not "singular"):
//
//   - the eigenvalue checks are made in relative coordinates, on T h T with
//     T = diag(|θᵢ|) (1 where θᵢ = 0), the curvature per relative change of
//     each parameter, where a parameter the data do not identify still
//     shows as a (numerically) zero row;
//   - the inverse is taken of H̃ = S h S with S = diag(1/√hᵢᵢ), h scaled to
//     a unit diagonal, and the covariance is S H̃⁻¹ S.
func invertInformation(h *mat.SymDense, theta []float64) (*mat.SymDense, error) {
	k := h.SymmetricDim()
	for i := 0; i < k; i++ {
		for j := i; j < k; j++ {
			if v := h.At(i, j); math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, &HessianError{Kind: ErrNonFiniteHessian,
					Detail: "the log-likelihood is not twice differentiable at the estimate (an estimate on the boundary of the parameter space, e.g. at the sample minimum)"}
			}
		}
	}
	rel := mat.NewSymDense(k, nil)
	t := make([]float64, k)
	for i := range t {
		t[i] = math.Abs(theta[i])
		if t[i] == 0 || math.IsInf(t[i], 0) || math.IsNaN(t[i]) {
			t[i] = 1
		}
	}
	for i := 0; i < k; i++ {
		for j := i; j < k; j++ {
			rel.SetSym(i, j, t[i]*h.At(i, j)*t[j])
		}
	}
	var eig mat.EigenSym
	var vals []float64
	if eig.Factorize(rel, false) {
		vals = eig.Values(nil)
		lo, hi := vals[0], vals[len(vals)-1]
		big := math.Max(math.Abs(lo), math.Abs(hi))
		switch {
		case big == 0 || math.Abs(lo) <= 1e-12*big:
			return nil, &HessianError{Kind: ErrSingularHessian, Eigenvalues: vals,
				Detail: fmt.Sprintf("smallest eigenvalue %.3g against largest %.3g (per relative change of the parameters): a parameter is not identified by these data", lo, hi)}
		case lo < 0:
			return nil, &HessianError{Kind: ErrIndefiniteHessian, Eigenvalues: vals,
				Detail: fmt.Sprintf("eigenvalue %.3g < 0 (per relative change of the parameters): the estimate is not a local maximum of the likelihood", lo)}
		}
	}
	sc := make([]float64, k)
	for i := range sc {
		switch d := h.At(i, i); {
		case d == 0:
			return nil, &HessianError{Kind: ErrSingularHessian,
				Detail: fmt.Sprintf("the information on parameter %d is 0: a parameter is not identified by these data", i+1)}
		case d < 0:
			return nil, &HessianError{Kind: ErrIndefiniteHessian,
				Detail: fmt.Sprintf("the curvature along parameter %d is negative (%.3g): the estimate is not a local maximum of the likelihood", i+1, -d)}
		}
		sc[i] = 1 / math.Sqrt(h.At(i, i))
	}
	hs := mat.NewSymDense(k, nil)
	for i := 0; i < k; i++ {
		for j := i; j < k; j++ {
			hs.SetSym(i, j, sc[i]*h.At(i, j)*sc[j])
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(hs) {
		return nil, &HessianError{Kind: ErrIndefiniteHessian, Eigenvalues: vals, Detail: "Cholesky factorisation failed"}
	}
	cs := mat.NewSymDense(k, nil)
	if err := ch.InverseTo(cs); err != nil {
		return nil, &HessianError{Kind: ErrSingularHessian, Eigenvalues: vals, Detail: err.Error()}
	}
	cov := mat.NewSymDense(k, nil)
	for i := 0; i < k; i++ {
		for j := i; j < k; j++ {
			cov.SetSym(i, j, sc[i]*cs.At(i, j)*sc[j])
		}
	}
	return cov, nil
}

// freeIndices lists the parameters of fit that are not fixed.
func freeIndices(fit *fitters.Fit) []int {
	var free []int
	for i := range fit.Estimates {
		if i < len(fit.Fixed) && fit.Fixed[i] {
			continue
		}
		free = append(free, i)
	}
	return free
}

func nanSlice(n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = math.NaN()
	}
	return s
}
