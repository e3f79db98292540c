package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// NegBinomial is the negative binomial distribution with Size r > 0 and
// Mean μ ≥ 0, variance μ + μ²/r:
//
//	P(X = k) = Γ(k+r)/(Γ(r) k!) · (r/(r+μ))^r · (μ/(r+μ))^k,  k = 0, 1, 2, …
//
// It is the Poisson whose mean is gamma-distributed with shape r and mean μ
// (Greenwood & Yule, 1920). P(X ≤ k) = I_q(r, k+1) with q = r/(r+μ), the
// regularized incomplete beta function. Size = +Inf is the Poisson limit
// with rate μ, which a fit reports when the data are not overdispersed.
type NegBinomial struct{ Size, Mean float64 }

// countLnPochRatio returns ln Γ(r+k) − ln Γ(r) − k ln r = Σ_{j<k} ln(1 + j/r),
// without cancellation for large r.
func countLnPochRatio(r, k float64) float64 {
	if k <= 32 {
		var s float64
		for j := 1.0; j < k; j++ {
			s += math.Log1p(j / r)
		}
		return s
	}
	if r >= 10 {
		return (r+k-0.5)*math.Log1p(k/r) - k + stirlingDelta(r+k) - stirlingDelta(r)
	}
	return countLnPoch(r, k) - k*math.Log(r)
}

func (d NegBinomial) LogPDF(x float64) float64 {
	if math.IsInf(d.Size, 1) {
		return Poisson{d.Mean}.LogPDF(x)
	}
	if !isCount(x) {
		return math.Inf(-1)
	}
	if d.Mean == 0 {
		if x == 0 {
			return 0
		}
		return math.Inf(-1)
	}
	r, mu := d.Size, d.Mean
	return countLnPochRatio(r, x) - countLnFactorial(x) - (r+x)*math.Log1p(mu/r) + x*math.Log(mu)
}

func (d NegBinomial) LogCDF(x float64) float64 {
	if math.IsInf(d.Size, 1) {
		return Poisson{d.Mean}.LogCDF(x)
	}
	k := math.Floor(x)
	if k < 0 {
		return math.Inf(-1)
	}
	if d.Mean == 0 || math.IsInf(k, 1) {
		return 0
	}
	if d.Size > nbSummedTails {
		lower, _ := d.summedTails(k)
		return lower
	}
	q, qc := d.Size/(d.Size+d.Mean), d.Mean/(d.Size+d.Mean)
	return countLogFromTails(mathext.RegIncBeta(d.Size, k+1, q), mathext.RegIncBeta(k+1, d.Size, qc),
		func() float64 { return countLogTailSum(d.LogPDF, k, 0, -1) })
}

func (d NegBinomial) LogSurvival(x float64) float64 {
	if math.IsInf(d.Size, 1) {
		return Poisson{d.Mean}.LogSurvival(x)
	}
	k := math.Floor(x)
	if k < 0 {
		return 0
	}
	if d.Mean == 0 || math.IsInf(k, 1) {
		return math.Inf(-1)
	}
	if d.Size > nbSummedTails {
		_, upper := d.summedTails(k)
		return upper
	}
	q, qc := d.Size/(d.Size+d.Mean), d.Mean/(d.Size+d.Mean)
	return countLogFromTails(mathext.RegIncBeta(k+1, d.Size, qc), mathext.RegIncBeta(d.Size, k+1, q),
		func() float64 { return countLogTailSum(d.LogPDF, k+1, math.Inf(1), 1) })
}

// nbSummedTails is the size above which the incomplete beta function loses
// digits (about 1e-9 relative at size 1e6, measured against mpmath sums) and
// the tails are summed term by term instead.
const nbSummedTails = 1e4

// summedTails returns ln P(X ≤ k) and ln P(X > k) by summing the tail that
// lies away from the mode, where the terms fall monotonically, and taking
// the other as its accurate complement.
func (d NegBinomial) summedTails(k float64) (lower, upper float64) {
	mode := math.Floor(d.Mean * (d.Size - 1) / d.Size)
	if k < mode {
		lower = countLogTailSum(d.LogPDF, k, 0, -1)
		return lower, log1mExp(lower)
	}
	upper = countLogTailSum(d.LogPDF, k+1, math.Inf(1), 1)
	return log1mExp(upper), upper
}

// Quantile returns the smallest integer k with P(X ≤ k) ≥ p.
func (d NegBinomial) Quantile(p float64) float64 {
	sd := math.Sqrt(d.Mean + d.Mean*d.Mean/d.Size)
	guess := d.Mean + sd*mathext.NormalQuantile(math.Min(math.Max(p, 1e-300), 1-1e-16))
	return discreteQuantile(d.LogCDF, p, guess, 0, math.Inf(1))
}

// Rand draws λ from the gamma distribution with shape r and mean μ, then a
// Poisson variate with mean λ.
func (d NegBinomial) Rand(r *rand.Rand) float64 {
	if math.IsInf(d.Size, 1) {
		return Poisson{d.Mean}.Rand(r)
	}
	if d.Mean == 0 {
		return 0
	}
	lambda := distuv.Gamma{Alpha: d.Size, Beta: d.Size / d.Mean, Src: r}.Rand()
	return Poisson{lambda}.Rand(r)
}

type negBinomialFamily struct{}

func init() { register(negBinomialFamily{}) }

func (negBinomialFamily) Name() string         { return "negbinomial" }
func (negBinomialFamily) Parameters() []string { return []string{"size", "mean"} }
func (negBinomialFamily) Kind() Kind           { return Discrete }
func (negBinomialFamily) Support() string      { return "0, 1, 2, …" }
func (negBinomialFamily) Route() string {
	return "mean = sample mean; size by the profile score equation (safeguarded Newton); size → ∞ (Poisson limit) when the data are not overdispersed"
}

// New returns the member with the given size and mean; size = +Inf is the
// Poisson limit.
func (negBinomialFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: negbinomial takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] >= 0) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("negbinomial: need size > 0 and a finite mean ≥ 0, got size=%v mean=%v", p[0], p[1])
	}
	return NegBinomial{p[0], p[1]}, nil
}

// LogLik is Σ ln P(X = x_i) with the constants −ln x_i!; NaN for censored data.
func (f negBinomialFamily) LogLik(p []float64, d *Data) float64 { return countLogLik(f, p, d) }

func (f negBinomialFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needCounts(f.Name(), d, 2); err != nil {
		return err
	}
	if _, hi := minMax(d.Exact); hi == 0 {
		return inapplicable(f.Name(), "all %d counts are 0: the mean's maximum-likelihood estimate is 0, on the boundary of its range", len(d.Exact))
	}
	return nil
}

// nbProfileScore is the derivative of the log-likelihood in the size r with
// the mean at its maximum-likelihood value x̄ (which does not depend on r):
//
//	∂ℓ/∂r = Σ_i [ψ(x_i + r) − ψ(r)] − n ln(1 + x̄/r) = Σ_j T_j/(r + j) − n ln(1 + x̄/r),
//
// with T_j = #{x_i > j}; it returns the score and its derivative in r.
type nbProfileScore struct {
	tail  []float64 // T_j, or nil when the counts are too large (digamma form)
	x     []float64
	n, xb float64
}

func (s nbProfileScore) eval(r float64) (score, dscore float64) {
	if s.tail != nil {
		for j, t := range s.tail {
			if t == 0 {
				continue
			}
			a := r + float64(j)
			score += t / a
			dscore -= t / (a * a)
		}
	} else {
		psi := mathext.Digamma(r)
		for _, x := range s.x {
			score += mathext.Digamma(x+r) - psi
		}
		dscore = math.NaN() // no trigamma at hand: the solver bisects
	}
	score -= s.n * math.Log1p(s.xb/r)
	dscore += s.n * s.xb / (r * (r + s.xb))
	return score, dscore
}

// Fit maximises the likelihood. The mean's estimate is x̄ for every size,
// so the size solves the one-dimensional profile score equation. A finite
// maximum exists, and is unique, exactly when the ML variance s² exceeds
// x̄ (Aragón, Eberly & Eberly, 1992 — recalled from memory; the asymptote
// of the score, n(x̄ − s²)/(2r²), shows the sign at infinity); otherwise the
// likelihood increases towards size → ∞ and the fit reports that Poisson
// limit, with its log-likelihood, as a converged fit with a note.
func (f negBinomialFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	xb, s2 := meanVar(d.Exact)
	var sum float64
	for _, x := range d.Exact {
		sum += x
	}
	xb = sum / float64(len(d.Exact)) // the exact ML mean (meanVar corrects it anyway)
	limit := func(why string) *Fit {
		fit.Estimates = []float64{math.Inf(1), xb}
		fit.LogLik = poissonFamily{}.LogLik([]float64{xb}, d)
		fit.Convergence = closedForm()
		fit.Method = "closed form (Poisson limit)"
		fit.Note = "size → ∞: " + why + "; the estimate is the Poisson limit with rate = mean, and its log-likelihood is reported"
		return fit
	}
	if s2 <= xb {
		return limit(fmt.Sprintf("the data are not overdispersed (variance %.6g ≤ mean %.6g)", s2, xb)), nil
	}
	sc := nbProfileScore{x: d.Exact, n: float64(len(d.Exact)), xb: xb}
	if _, hi := minMax(d.Exact); hi <= maxTailCount {
		sc.tail = tailCounts(d.Exact)
	}
	evals := 0
	fdf := func(r float64) (float64, float64) { evals++; return sc.eval(r) }
	score := func(r float64) float64 { v, _ := fdf(r); return v }
	// The score is positive below the root and negative above it (the root
	// is unique), so the bracket grows on each side separately from the
	// method-of-moments size.
	r0 := xb * xb / (s2 - xb)
	lo, hi := r0/2, 2*r0
	for i := 0; i < 2000 && score(lo) <= 0; i++ {
		lo /= 2
	}
	ok := score(lo) > 0
	for i := 0; ok && i < 2000 && score(hi) >= 0; i++ {
		hi *= 2
	}
	ok = ok && score(hi) < 0
	if !ok {
		return limit("the profile likelihood in size keeps increasing (no root of the score up to size " +
			fmt.Sprintf("%.3g", hi) + ")"), nil
	}
	r, it, err := solveBracketed(fdf, lo, hi, 1e-14, 500)
	fit.Estimates = []float64{r, xb}
	fit.LogLik = f.LogLik(fit.Estimates, d)
	g, _ := sc.eval(r)
	fit.Convergence = Convergence{
		Method:       "profile score in size, safeguarded Newton (mean = sample mean)",
		Iterations:   it,
		Evaluations:  evals,
		GradientNorm: math.Abs(g),
		Converged:    err == nil,
	}
	if err != nil {
		fit.Reason = "profile score equation in size: " + err.Error()
	}
	return fit, nil
}
