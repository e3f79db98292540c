package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// BetaBinomial is the binomial whose success probability is beta-distributed
// with shape parameters Alpha, Beta > 0 (Skellam, 1948):
//
//	P(X = k) = C(n, k) B(k + α, n − k + β) / B(α, β),  k = 0 … n,
//
// with mean nα/(α+β) and variance nαβ(α+β+n)/((α+β)²(α+β+1)). As α, β → ∞
// with α/(α+β) = p fixed it tends to the binomial (no overdispersion).
// The log-pmf is formed from Pochhammer sums, ln B(k+α, n−k+β) − ln B(α, β)
// = ln(α)_k + ln(β)_(n−k) − ln(α+β)_n, which stay exact for large α, β.
//
// As for [Binomial], the number of trials is not a parameter: New returns
// Trials = 0 (set per observation) and LogLik takes Data.Trials.
type BetaBinomial struct {
	Alpha, Beta float64
	Trials      int
}

func (d BetaBinomial) LogPDF(x float64) float64 {
	n := float64(d.Trials)
	if !isCount(x) || x > n {
		return math.Inf(-1)
	}
	return countLnChoose(n, x) + countLnPoch(d.Alpha, x) + countLnPoch(d.Beta, n-x) - countLnPoch(d.Alpha+d.Beta, n)
}

// logSum returns ln Σ_{j=from}^{to} P(X = j), using the ratio
// P(j+1)/P(j) = (n−j)(j+α) / ((j+1)(n−j−1+β)) after the first term.
func (d BetaBinomial) logSum(from, to float64) float64 {
	if from > to {
		return math.Inf(-1)
	}
	n := float64(d.Trials)
	lp := d.LogPDF(from)
	s := lp
	for j := from; j < to; j++ {
		lp += math.Log((n-j)*(j+d.Alpha)) - math.Log((j+1)*(n-j-1+d.Beta))
		s = countLogAddExp(s, lp)
	}
	return s
}

// LogCDF sums the pmf over the shorter side and complements accurately.
func (d BetaBinomial) LogCDF(x float64) float64 {
	k, n := math.Floor(x), float64(d.Trials)
	switch {
	case k < 0:
		return math.Inf(-1)
	case k >= n:
		return 0
	}
	lower := d.logSum(0, k)
	if lower < -math.Ln2 {
		return lower
	}
	return log1mExp(math.Min(d.logSum(k+1, n), 0))
}

func (d BetaBinomial) LogSurvival(x float64) float64 {
	k, n := math.Floor(x), float64(d.Trials)
	switch {
	case k < 0:
		return 0
	case k >= n:
		return math.Inf(-1)
	}
	upper := d.logSum(k+1, n)
	if upper < -math.Ln2 {
		return upper
	}
	return log1mExp(math.Min(d.logSum(0, k), 0))
}

// Quantile returns the smallest integer k with P(X ≤ k) ≥ p.
func (d BetaBinomial) Quantile(p float64) float64 {
	n := float64(d.Trials)
	return discreteQuantile(d.LogCDF, p, n*d.Alpha/(d.Alpha+d.Beta), 0, n)
}

// Rand draws p from Beta(α, β), then a binomial variate.
func (d BetaBinomial) Rand(r *rand.Rand) float64 {
	if d.Trials == 0 {
		return 0
	}
	p := distuv.Beta{Alpha: d.Alpha, Beta: d.Beta, Src: r}.Rand()
	return Binomial{P: p, Trials: d.Trials}.Rand(r)
}

type betaBinomialFamily struct{}

func init() { register(betaBinomialFamily{}) }

func (betaBinomialFamily) Name() string         { return "betabinomial" }
func (betaBinomialFamily) Parameters() []string { return []string{"alpha", "beta"} }
func (betaBinomialFamily) Kind() Kind           { return Discrete }
func (betaBinomialFamily) Support() string      { return "0 … trials (needs trials_column)" }
func (betaBinomialFamily) Route() string {
	return "BFGS on (log alpha, log beta) with the analytic gradient; alpha, beta → ∞ (binomial limit) when the data are not overdispersed"
}

// New returns the member with the given alpha and beta and Trials = 0 (set
// per observation; see [BetaBinomial]).
func (betaBinomialFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: betabinomial takes 2 parameters")
	}
	if !(p[0] > 0) || !(p[1] > 0) || math.IsInf(p[0], 1) || math.IsInf(p[1], 1) {
		return nil, fmt.Errorf("betabinomial: need finite alpha > 0 and beta > 0, got alpha=%v beta=%v (the limit alpha, beta → ∞ is the binomial)", p[0], p[1])
	}
	return BetaBinomial{Alpha: p[0], Beta: p[1]}, nil
}

// LogLik is Σ ln P(X = x_i) with n_i from d.Trials and the constants
// ln C(n_i, x_i); NaN for censored data or missing trials.
func (f betaBinomialFamily) LogLik(p []float64, d *Data) float64 {
	if !d.IsComplete() || len(d.Trials) != len(d.Exact) {
		return math.NaN()
	}
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	bb := dist.(BetaBinomial)
	var ll float64
	for i, x := range d.Exact {
		bb.Trials = d.Trials[i]
		ll += bb.LogPDF(x)
	}
	return ll
}

func (f betaBinomialFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needCounts(f.Name(), d, 2); err != nil {
		return err
	}
	if err := needTrials(f.Name(), d); err != nil {
		return err
	}
	if err := (binomialFamily{}).Applicable(d, nil); err != nil {
		return &InapplicableError{Family: f.Name(), Reason: err.(*InapplicableError).Reason}
	}
	for _, n := range d.Trials {
		if n >= 2 {
			return nil
		}
	}
	return inapplicable(f.Name(), "every observation has at most 1 trial: alpha and beta are not identified separately, only alpha/(alpha+beta)")
}

// bbLik is the beta-binomial log-likelihood of one dataset in tail-count
// form: with A_j = #{x_i > j}, B_j = #{n_i − x_i > j}, N_j = #{n_i > j},
//
//	ℓ(α, β) = Σ ln C(n_i, x_i) + Σ_j [A_j ln(α+j) + B_j ln(β+j) − N_j ln(α+β+j)],
//
// and ∂ℓ/∂α = Σ_j [A_j/(α+j) − N_j/(α+β+j)] (the digamma differences
// ψ(x+α) − ψ(α) summed exactly), likewise for β.
type bbLik struct {
	a, b, nt []float64
	lnC      float64
}

func newBBLik(d *Data) bbLik {
	fails := make([]float64, len(d.Exact))
	trials := make([]float64, len(d.Exact))
	var lnC float64
	for i, x := range d.Exact {
		n := float64(d.Trials[i])
		fails[i], trials[i] = n-x, n
		lnC += countLnChoose(n, x)
	}
	return bbLik{a: tailCounts(d.Exact), b: tailCounts(fails), nt: tailCounts(trials), lnC: lnC}
}

func (l bbLik) value(alpha, beta float64) float64 {
	s := l.lnC
	for j, t := range l.a {
		if t != 0 {
			s += t * math.Log(alpha+float64(j))
		}
	}
	for j, t := range l.b {
		if t != 0 {
			s += t * math.Log(beta+float64(j))
		}
	}
	for j, t := range l.nt {
		if t != 0 {
			s -= t * math.Log(alpha+beta+float64(j))
		}
	}
	return s
}

func (l bbLik) gradient(alpha, beta float64) (ga, gb float64) {
	for j, t := range l.a {
		ga += t / (alpha + float64(j))
	}
	for j, t := range l.b {
		gb += t / (beta + float64(j))
	}
	var gn float64
	for j, t := range l.nt {
		gn += t / (alpha + beta + float64(j))
	}
	return ga - gn, gb - gn
}

// Fit maximises the likelihood by BFGS on (ln α, ln β) with the analytic
// gradient, started from the moment estimates and from two fixed
// overdispersions around the pooled proportion. When no point beats the
// binomial limit (α, β → ∞ with α/(α+β) = the pooled p̂) by more than the
// tolerance, the data are not overdispersed: the fit reports α = β = +Inf
// with that limit's log-likelihood as a converged fit, with a note giving p̂.
func (f betaBinomialFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if err := f.Applicable(d, opt.Fixed); err != nil {
		return nil, err
	}
	fit := newFit(f, d)
	sx, sn := pooledSuccesses(d)
	p := sx / sn
	llBin := binomialFamily{}.LogLik([]float64{p}, d)

	var value func(a, b float64) float64
	var gradient func(a, b float64) (float64, float64)
	var maxN int
	for _, n := range d.Trials {
		maxN = max(maxN, n)
	}
	if maxN <= maxTailCount {
		l := newBBLik(d)
		value, gradient = l.value, l.gradient
	} else {
		value = func(a, b float64) float64 { return f.LogLik([]float64{a, b}, d) }
		gradient = func(a, b float64) (float64, float64) {
			var ga, gb float64
			pa, pb, pab := mathext.Digamma(a), mathext.Digamma(b), mathext.Digamma(a+b)
			for i, x := range d.Exact {
				n := float64(d.Trials[i])
				dn := mathext.Digamma(a+b+n) - pab
				ga += mathext.Digamma(a+x) - pa - dn
				gb += mathext.Digamma(b+n-x) - pb - dn
			}
			return ga, gb
		}
	}
	prob := problem{
		dim: 2,
		negLogLik: func(t []float64) float64 {
			a, b := math.Exp(t[0]), math.Exp(t[1])
			if a == 0 || b == 0 || math.IsInf(a, 1) || math.IsInf(b, 1) {
				return math.Inf(1)
			}
			return -value(a, b)
		},
		grad: func(g, t []float64) {
			a, b := math.Exp(t[0]), math.Exp(t[1])
			ga, gb := gradient(a, b)
			g[0], g[1] = -a*ga, -b*gb
		},
	}
	// Moment estimate of the intra-class correlation ρ = 1/(α+β+1):
	// Σ(x − n p̂)² = p̂(1−p̂) Σ n_i [1 + (n_i − 1)ρ].
	var ss, nn1 float64
	for i, x := range d.Exact {
		n := float64(d.Trials[i])
		ss += (x - n*p) * (x - n*p)
		nn1 += n * (n - 1)
	}
	var starts [][]float64
	if rho := (ss - sn*p*(1-p)) / (p * (1 - p) * nn1); rho > 0 && rho < 1 {
		s := 1/rho - 1
		starts = append(starts, []float64{math.Log(p * s), math.Log((1 - p) * s)})
	}
	for _, s := range []float64{2, 50} {
		starts = append(starts, []float64{math.Log(p * s), math.Log((1 - p) * s)})
	}
	o := minimize(prob, starts, opt)
	tol := opt.tolerance()
	if o.theta == nil || -o.negLogLik <= llBin+tol*math.Max(1, math.Abs(llBin)) {
		fit.Estimates = []float64{math.Inf(1), math.Inf(1)}
		fit.LogLik = llBin
		fit.Convergence = Convergence{
			Method:      fmt.Sprintf("BFGS on (log alpha, log beta), %d start(s); binomial limit", o.starts),
			Iterations:  o.iterations,
			Evaluations: o.evaluations,
			Converged:   true,
			Note: fmt.Sprintf("alpha, beta → ∞ with alpha/(alpha+beta) = %s: the data are not overdispersed; "+
				"the optimum is the binomial limit, whose log-likelihood is reported", strconv.FormatFloat(p, 'g', -1, 64)),
		}
		return fit, nil
	}
	fit.setOptimum(o, []float64{math.Exp(o.theta[0]), math.Exp(o.theta[1])}, "BFGS on (log alpha, log beta)")
	fit.LogLik = f.LogLik(fit.Estimates, d)
	return fit, nil
}

// LimitDist returns the distribution a converged fit reached at its
// limiting family when fam.New cannot take its infinite estimates:
// betabinomial's α = β = +Inf is the binomial with the pooled proportion
// p̂ = Σk/Σn of d, the data it was fitted to (the limit's maximum). Other
// families take their limits in New (negbinomial's size → ∞ is the
// Poisson, studentt's df → ∞ the normal); ok is false for them.
func LimitDist(fam Family, fit *Fit, d *Data) (Dist, bool) {
	if fam.Name() != "betabinomial" || !fit.Converged || len(fit.Estimates) != 2 ||
		!math.IsInf(fit.Estimates[0], 1) || !math.IsInf(fit.Estimates[1], 1) {
		return nil, false
	}
	sx, sn := pooledSuccesses(d)
	if !(sn > 0) {
		return nil, false
	}
	return Binomial{P: sx / sn}, true
}
