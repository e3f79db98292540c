package fitters

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
)

// LogNormal is the log-normal distribution: ln X is normal with mean Mu and
// standard deviation Sigma > 0,
//
//	f(x) = exp(−(ln x − μ)²/(2σ²)) / (x σ √(2π)),  x > 0.
//
// The density is of x (it carries the 1/x), not of ln x.
type LogNormal struct{ Mu, Sigma float64 }

func (d LogNormal) LogPDF(x float64) float64 {
	if !(x > 0) {
		return math.Inf(-1)
	}
	lx := math.Log(x)
	z := (lx - d.Mu) / d.Sigma
	return -0.5*z*z - lx - math.Log(d.Sigma) - lnSqrt2Pi
}

func (d LogNormal) LogCDF(x float64) float64 {
	if !(x > 0) {
		return math.Inf(-1)
	}
	return logNormalCDF((math.Log(x) - d.Mu) / d.Sigma)
}

func (d LogNormal) LogSurvival(x float64) float64 {
	if !(x > 0) {
		return 0
	}
	return logNormalSurvival((math.Log(x) - d.Mu) / d.Sigma)
}

func (d LogNormal) Quantile(p float64) float64 {
	return math.Exp(d.Mu + d.Sigma*mathext.NormalQuantile(p))
}

func (d LogNormal) Rand(r *rand.Rand) float64 { return math.Exp(d.Mu + d.Sigma*r.NormFloat64()) }

type lognormalFamily struct{}

func init() { register(lognormalFamily{}) }

func (lognormalFamily) Name() string         { return "lognormal" }
func (lognormalFamily) Parameters() []string { return []string{"mu", "sigma"} }
func (lognormalFamily) Kind() Kind           { return Continuous }
func (lognormalFamily) Support() string      { return "x > 0" }
func (lognormalFamily) Route() string {
	return "closed form (mean and ML standard deviation of ln x); censored data: Newton on the concave (μ/σ, 1/σ) likelihood of ln x, BFGS on (mu, log sigma) if it fails"
}

func (lognormalFamily) New(p []float64) (Dist, error) {
	if len(p) != 2 {
		panic("fitters: lognormal takes 2 parameters")
	}
	if !(p[1] > 0) || math.IsInf(p[1], 1) || math.IsNaN(p[0]) || math.IsInf(p[0], 0) {
		return nil, fmt.Errorf("lognormal: need finite mu and sigma > 0, got mu=%v sigma=%v", p[0], p[1])
	}
	return LogNormal{p[0], p[1]}, nil
}

func (f lognormalFamily) LogLik(p []float64, d *Data) float64 {
	dist, err := f.New(p)
	if err != nil {
		return math.Inf(-1)
	}
	ln := dist.(LogNormal)
	// Σ ln f(x) = −Σ ln x − n ln σ − n ln√(2π) − Σ(ln x − μ)²/(2σ²), with
	// ln x − μ taken as log1p((x − e^μ)/e^μ) near e^μ, so that data
	// clustered far from zero keep the digits of their spread.
	var sz, ss float64
	m := math.Exp(ln.Mu)
	for _, x := range d.Exact {
		if !(x > 0) {
			return math.Inf(-1)
		}
		var z float64
		if x > 0.5*m && x < 2*m {
			z = math.Log1p((x - m) / m)
		} else {
			z = math.Log(x) - ln.Mu
		}
		sz += z
		ss += z * z
	}
	n := float64(len(d.Exact))
	slx := n*ln.Mu + sz
	ll := -slx - n*(math.Log(ln.Sigma)+lnSqrt2Pi) - 0.5*ss/(ln.Sigma*ln.Sigma)
	return ll + censoredLogLik(ln, d, false)
}

func (f lognormalFamily) Applicable(d *Data, fixed Fixed) error {
	if err := noFixed(f.Name(), fixed); err != nil {
		return err
	}
	if err := needPositive(f.Name(), d, false); err != nil {
		return err
	}
	return needDistinct(f.Name(), d, 2)
}

// lognormalMLE is the closed-form estimate from complete data x > 0 and the
// maximum log-likelihood: μ̂ = mean ln x, σ̂² = mean (ln x − μ̂)² (two passes
// with the correction of Chan, Golub & LeVeque, 1983). The logs are taken
// about x[0] (logsAbout), into a borrowed buffer, so that tightly clustered
// data keep their spread.
func lognormalMLE(x []float64) (mu, sigma, ll float64) {
	buf := borrowScratch(len(x))
	defer returnScratch(buf)
	y := *buf
	lnRef, sy := logsAboutInto(y, x, 0)
	n := float64(len(x))
	m := sum4(y) / n
	ss, c := sumSqDev4(y, m)
	v := (ss - c*c/n) / n
	m += c / n
	if !(v >= 0) {
		v = 0
	}
	mu, sigma = lnRef+m, math.Sqrt(v)
	// At the optimum Σ(ln x − μ̂)² = nσ̂², so the quadratic term is −n/2.
	ll = -(n*lnRef + sy) - n*(math.Log(sigma)+lnSqrt2Pi) - 0.5*n
	return mu, sigma, ll
}

// lognormalFastMLE is lognormalMLE in one pass over x: the logs of a
// block of logsBlock values at a time by the batch kernel (logsInto, each
// exactly fastLog(x[i])) into a small buffer, and while the block is in
// cache the shifted sums S₁ = Σ(y − K) and S₂ = Σ(y − K)², y = ln x, in
// four interleaved partial sums each (products rounded on their own: no
// fused multiply-add, same bits on every processor). K is the median of
// ln x at the first, middle and last value, so that μ̂ = K + S₁/n,
// σ̂² = (S₂ − S₁²/n)/n and Σ ln x = nK + S₁.
//
// It reports ok = false, leaving the data to lognormalMLE, unless the sums
// are finite and σ̂ > 0 (so every x is positive and finite and two
// differ), (μ̂ − K)² ≤ 16σ̂² and √(μ̂² + σ̂²) ≤ 32σ̂. The shift test bounds
// the cancellation in S₂ − S₁²/n by S₂/(nσ̂²) = 1 + (μ̂ − K)²/σ̂² ≤ 17, so
// σ̂² carries at most about 17·(n/4 + 3)u relative error in the worst
// case (u = 2⁻⁵³; typically √n·u); the last keeps the accuracy of the
// route about x[0]: each ln xᵢ is within one ulp ≤ 2⁻⁵²|ln xᵢ|
// (TestFastLogAccuracy), and centring does not lengthen a vector, so
// |Δσ̂| ≤ 2⁻⁵² (mean (ln x)²)^½ = 2⁻⁵² (μ̂² + σ̂²)^½ ≤ 2⁻⁴⁷ σ̂; data
// clustered far from 1 (1e7 ± 0.1) fail it and keep every digit of their
// spread through logsAbout.
func lognormalFastMLE(x []float64) (mu, sigma, ll float64, ok bool) {
	buf := borrowScratch(min(len(x), logsBlock))
	defer returnScratch(buf)
	y := *buf
	k := median3(fastLog(x[0]), fastLog(x[len(x)/2]), fastLog(x[len(x)-1]))
	var s0, s1, s2, s3, q0, q1, q2, q3 float64
	for start := 0; start < len(x); start += len(y) {
		xb := x[start:min(start+len(y), len(x))]
		yb := y[:len(xb)]
		logsInto(yb, xb)
		i := 0
		for ; i+4 <= len(yb); i += 4 {
			v := yb[i : i+4 : i+4]
			d0, d1, d2, d3 := v[0]-k, v[1]-k, v[2]-k, v[3]-k
			s0 += d0
			s1 += d1
			s2 += d2
			s3 += d3
			q0 += float64(d0 * d0)
			q1 += float64(d1 * d1)
			q2 += float64(d2 * d2)
			q3 += float64(d3 * d3)
		}
		for ; i < len(yb); i++ {
			d := yb[i] - k
			s0 += d
			q0 += float64(d * d)
		}
	}
	n := float64(len(x))
	sd, sq := (s0+s1)+(s2+s3), (q0+q1)+(q2+q3)
	dm := sd / n
	v := (sq - float64(sd*dm)) / n
	mu, sigma = k+dm, math.Sqrt(v)
	sy := float64(n*k) + sd
	s2v := float64(sigma * sigma)
	if !(sigma > 0) || math.IsInf(sq, 0) || math.IsNaN(sy) || math.IsInf(sy, 0) ||
		float64(dm*dm) > 16*s2v || float64(mu*mu)+s2v > 1024*s2v {
		return 0, 0, 0, false
	}
	ll = -sy - float64(n*(fastLog(sigma)+lnSqrt2Pi)) - float64(0.5*n)
	return mu, sigma, ll, true
}

// median3 returns the middle one of a, b and c (NaN if any is NaN or the
// comparisons fail: the caller's finiteness tests then refuse the data).
func median3(a, b, c float64) float64 {
	if a > b {
		a, b = b, a
	}
	if b > c {
		b = c
	}
	if a > b {
		return a
	}
	return b
}

func (f lognormalFamily) Fit(d *Data, opt Options) (*Fit, error) {
	if d.IsComplete() && len(opt.Fixed) == 0 && len(d.Exact) >= 2 {
		// The log pass checks the data too: see lognormalFastMLE.
		if mu, sigma, ll, ok := lognormalFastMLE(d.Exact); ok {
			fit := newFitOpt(f, d, opt)
			fit.Estimates[0], fit.Estimates[1] = mu, sigma
			fit.LogLik = ll
			fit.Convergence = closedForm()
			return fit, nil
		}
	}
	if !quickApplicable(d, opt, 2, true) {
		if err := f.Applicable(d, opt.Fixed); err != nil {
			return nil, err
		}
	}
	fit := newFit(f, d)
	if d.IsComplete() {
		mu, sigma, ll := lognormalMLE(d.Exact)
		fit.Estimates[0], fit.Estimates[1] = mu, sigma
		fit.LogLik = ll
		fit.Convergence = closedForm()
		return fit, nil
	}
	mu0, s0 := 0.0, 1.0
	if x := startSample(d, 2, true); len(x) >= 2 {
		mu0, s0, _ = lognormalMLE(x)
	}
	if !(s0 > 1e-8) || math.IsInf(s0, 0) {
		s0 = 1
	}
	// θ = ((μ − μ₀)/σ₀, ln(σ/σ₀)): a well-scaled problem for any spread.
	starts := [][]float64{{0, 0}, {0, math.Log(3)}}
	toNatural := func(t []float64) []float64 { return []float64{mu0 + s0*t[0], s0 * math.Exp(t[1])} }
	fitByMinimize(fit, f, d, opt, toNatural, starts, "BFGS on (mu, log sigma)")
	return fit, nil
}
