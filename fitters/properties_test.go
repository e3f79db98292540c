package fitters_test

// Property checks over every continuous family, at the two members of each
// family in spot.json and on the reference datasets of mle.json. They need
// no outside value: they check that a family's functions agree with each
// other (quantile and CDF, CDF and survival, density and CDF, score and
// likelihood, random variates and quantiles) and that no nearby parameter
// vector beats a reported optimum.

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/integrate/quad"

	"fitseal/fitters"
)

// member builds the spot.json member m, failing the subtest when its
// family is not registered.
func member(t *testing.T, m spotMember) (fitters.Family, fitters.Dist) {
	t.Helper()
	f := lookup(t, m.Family)
	d, err := f.New(paramVector(t, f, m.Params))
	if err != nil {
		t.Fatalf("New(%s): %v", paramString(m.Params), err)
	}
	return f, d
}

// referencePoint is the point from which x is measured exactly (as in
// make_spot.py): the location of a location family, the threshold,
// pareto's scale, beta's nearer bound, else 0.
func referencePoint(family string, p map[string]float64, x float64) float64 {
	switch family {
	case "normal":
		return p["mu"]
	case "gumbel", "logistic", "studentt", "gev":
		return p["location"]
	case "weibull3", "lognormal3", "gpd":
		return p["threshold"]
	case "pareto":
		return p["scale"]
	case "beta":
		if x >= 0.5 {
			return 1
		}
	}
	return 0
}

// TestPropertyQuantileCDF checks Quantile(CDF(x)) ≈ x: for p across (0, 1),
// x = Quantile(p) has CDF(x) = p (lower tail) or S(x) = 1 − p (upper tail)
// to 1e-9 relative, and the quantile of that probability gives x back to
// 1e-9·|x − r| (r = referencePoint; at least 1e-9·IQR for location families). Where the tail probability is itself ill-conditioned
// in x (κ = |x|·f(x)/min(p, 1−p) large, e.g. beta(0.4, 0.7) at
// p = 1 − 1e-6, where 1 − x ≈ 1e-9 keeps only 7 digits in float64), the
// first tolerance is 8ε·κ instead: no float64 x does better.
func TestPropertyQuantileCDF(t *testing.T) {
	ms := loadSpot(t)
	names := memberNames(ms)
	for i, m := range ms {
		m := m
		t.Run(names[i], func(t *testing.T) {
			_, d := member(t, m)
			for _, p := range []float64{1e-6, 1e-3, 0.05, 0.3, 0.5, 0.7, 0.95, 0.999, 1 - 1e-6} {
				x := d.Quantile(p)
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Errorf("Quantile(%g) = %v", p, x)
					continue
				}
				var back float64
				kappa := math.Abs(x) * math.Exp(d.LogPDF(x)) / math.Min(p, 1-p)
				tolP := math.Max(1e-9, 8*0x1p-52*kappa)
				if p <= 0.5 {
					back = math.Exp(d.LogCDF(x))
					if r := math.Abs(back-p) / p; !(r <= tolP) {
						t.Errorf("CDF(Quantile(%g)) = %.17g (relative error %.3g)", p, back, r)
					}
				} else {
					s := math.Exp(d.LogSurvival(x))
					if r := math.Abs(s-(1-p)) / (1 - p); !(r <= tolP) {
						t.Errorf("S(Quantile(%g)) = %.17g, want %.17g (relative error %.3g)", p, s, 1-p, r)
					}
					back = 1 - s
				}
				x2 := d.Quantile(back)
				unit := math.Abs(x - referencePoint(m.Family, m.Params, x))
				if m.LocationFamily {
					unit = math.Max(unit, m.XScale)
				}
				if tol := 1e-9 * unit; !(math.Abs(x2-x) <= tol) {
					t.Errorf("Quantile(CDF(x)) = %.17g for x = Quantile(%g) = %.17g (difference %.3g)", x2, p, x, x2-x)
				}
			}
		})
	}
}

// TestPropertyComplement checks exp(LogCDF) + exp(LogSurvival) = 1 to 1e-12
// in the body of each distribution (probabilities 0.01 to 0.99).
func TestPropertyComplement(t *testing.T) {
	ms := loadSpot(t)
	names := memberNames(ms)
	for i, m := range ms {
		m := m
		t.Run(names[i], func(t *testing.T) {
			_, d := member(t, m)
			for _, p := range []float64{0.01, 0.1, 0.25, 0.4, 0.5, 0.6, 0.75, 0.9, 0.99} {
				for _, x := range []float64{d.Quantile(p), d.Quantile(p) * (1 + 1e-3)} {
					s := math.Exp(d.LogCDF(x)) + math.Exp(d.LogSurvival(x))
					if !(math.Abs(s-1) <= 1e-12) {
						t.Errorf("at x = %.17g: exp(LogCDF) + exp(LogSurvival) = %.17g", x, s)
					}
				}
			}
		})
	}
}

// integrationGrid splits (0, 1) for the density check; the tails go out to
// probabilities 1e-10.
var integrationGrid = []float64{1e-10, 1e-8, 1e-6, 1e-4, 0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99,
	1 - 1e-4, 1 - 1e-6, 1 - 1e-8, 1 - 1e-10}

// adaptiveLegendre integrates a probability density f over [a, b] with
// 32-point Gauss–Legendre rules (gonum/integrate/quad), halving the interval
// until a rule and the sum over its halves agree to 1e-13 (absolute: the
// masses are at most 1; depth at most 30), so that a density steep near an
// end of its support is still integrated accurately.
func adaptiveLegendre(f func(float64) float64, a, b float64, depth int) float64 {
	whole := quad.Fixed(f, a, b, 32, quad.Legendre{}, 0)
	m := a + (b-a)/2
	halves := quad.Fixed(f, a, m, 32, quad.Legendre{}, 0) + quad.Fixed(f, m, b, 32, quad.Legendre{}, 0)
	if depth >= 30 || math.Abs(whole-halves) <= 1e-13 || math.IsNaN(halves) || m == a || m == b {
		return halves
	}
	return adaptiveLegendre(f, a, m, depth+1) + adaptiveLegendre(f, m, b, depth+1)
}

// TestPropertyDensityIntegrates integrates exp(LogPDF) adaptively with
// Gauss–Legendre rules between the quantiles of integrationGrid, on ln x
// (or ln −x) where a piece lies on one side of 0 so that heavy-tailed
// densities are smooth in the variable of integration. Each piece must
// carry its probability (to 1e-9 absolute plus 1e-8 relative) and the whole
// to 1 − 2e-10 within 1e-8.
func TestPropertyDensityIntegrates(t *testing.T) {
	ms := loadSpot(t)
	names := memberNames(ms)
	for i, m := range ms {
		m := m
		t.Run(names[i], func(t *testing.T) {
			_, d := member(t, m)
			pdf := func(x float64) float64 { return math.Exp(d.LogPDF(x)) }
			var total float64
			for k := 0; k+1 < len(integrationGrid); k++ {
				pa, pb := integrationGrid[k], integrationGrid[k+1]
				a, b := d.Quantile(pa), d.Quantile(pb)
				var got float64
				switch {
				case a > 0:
					got = adaptiveLegendre(func(u float64) float64 { x := math.Exp(u); return pdf(x) * x },
						math.Log(a), math.Log(b), 0)
				case b < 0:
					got = adaptiveLegendre(func(u float64) float64 { x := -math.Exp(u); return pdf(x) * -x },
						math.Log(-b), math.Log(-a), 0)
				default:
					got = adaptiveLegendre(pdf, a, b, 0)
				}
				want := pb - pa
				if !(math.Abs(got-want) <= 1e-9+1e-8*want) {
					t.Errorf("∫ f over [Quantile(%g), Quantile(%g)] = [%.17g, %.17g] is %.12g, want %.12g", pa, pb, a, b, got, want)
				}
				total += got
			}
			if want := 1 - 2e-10; !(math.Abs(total-want) <= 1e-8) {
				t.Errorf("density integrates to %.12g between the 1e-10 quantiles, want %.12g", total, want)
			}
		})
	}
}

// stepScale is the natural unit of a parameter for perturbations and finite
// differences: its magnitude, or the floor of paramTolerance where it may sit
// near zero.
func stepScale(family, name string, v float64, p map[string]float64) float64 {
	return paramTolerance(family, name, v, p) / 1e-6
}

// TestPropertyScore compares an analytic score, where a family exposes one
// (fitters.AnalyticScore), with central finite differences of LogLik (gonum/diff/fd)
// at random parameter vectors near the reference optimum of each mle.json
// dataset. Families without an analytic score are skipped.
func TestPropertyScore(t *testing.T) {
	rng := rand.New(rand.NewPCG(20261202, 3))
	for _, ref := range loadMLE(t) {
		ref := ref
		if len(ref.Limit) > 0 {
			continue
		}
		t.Run(ref.Family+"/"+ref.Name, func(t *testing.T) {
			f := lookup(t, ref.Family)
			score, ok := fitters.AnalyticScore(f)
			if !ok {
				t.Skipf("%s exposes no analytic score (Score(params, data) []float64)", ref.Family)
			}
			d := fitters.Complete(append([]float64(nil), ref.Data...))
			p := floats(ref.Params)
			base := paramVector(t, f, p, ref.Fixed)
			names := f.Parameters()
			for trial := 0; trial < 3; trial++ {
				theta := append([]float64(nil), base...)
				for i, n := range names {
					if _, fixed := ref.Fixed[n]; !fixed && !(ref.Family == "pareto" && n == "scale") {
						theta[i] += 0.01 * rng.NormFloat64() * stepScale(ref.Family, n, base[i], p)
					}
				}
				ll := f.LogLik(theta, d)
				g := score(theta, d)
				if len(g) != len(theta) {
					t.Fatalf("Score returned %d components for %d parameters", len(g), len(theta))
				}
				for i, n := range names {
					if _, fixed := ref.Fixed[n]; fixed || (ref.Family == "pareto" && n == "scale") {
						continue
					}
					h := 1e-5 * stepScale(ref.Family, n, base[i], p)
					num := fd.Derivative(func(v float64) float64 {
						th := append([]float64(nil), theta...)
						th[i] = v
						return f.LogLik(th, d)
					}, theta[i], &fd.Settings{Formula: fd.Central, Step: h})
					tol := 1e-6*math.Abs(num) + 1e-9*math.Max(1, math.Abs(ll))/h
					if !(math.Abs(g[i]-num) <= tol) {
						t.Errorf("at %v: score[%s] = %.12g, finite difference %.12g (tolerance %.3g)", theta, n, g[i], num, tol)
					}
				}
			}
		})
	}
}

// TestPropertyNoBetterNeighbour fits each mle.json dataset and checks that
// no parameter vector at ±1e-4 relative steps along each free axis (steps
// in the natural unit of stepScale) and along 8 random directions has a
// larger LogLik than the reported optimum (beyond rounding, 1e-12 relative).
func TestPropertyNoBetterNeighbour(t *testing.T) {
	for _, ref := range loadMLE(t) {
		ref := ref
		t.Run(ref.Family+"/"+ref.Name, func(t *testing.T) {
			f := lookup(t, ref.Family)
			d := fitters.Complete(append([]float64(nil), ref.Data...))
			fit, err := f.Fit(d, fitters.Options{Fixed: fitters.Fixed(ref.Fixed)})
			if err != nil {
				t.Fatalf("Fit: %v", err)
			}
			best := f.LogLik(fit.Estimates, d)
			if math.IsNaN(best) || math.IsInf(best, 0) {
				t.Fatalf("LogLik at the reported estimates %v is %v", fit.Estimates, best)
			}
			est := map[string]float64{}
			for i, n := range fit.Parameters {
				est[n] = fit.Estimates[i]
			}
			var free []int
			for i, n := range fit.Parameters {
				if fit.Fixed[i] || math.IsInf(fit.Estimates[i], 0) {
					continue
				}
				if _, lim := ref.Limit[n]; lim {
					continue
				}
				free = append(free, i)
			}
			step := func(i int) float64 {
				n := fit.Parameters[i]
				return 1e-4 * stepScale(ref.Family, n, fit.Estimates[i], est)
			}
			try := func(dir []float64, what string) {
				theta := append([]float64(nil), fit.Estimates...)
				for j, i := range free {
					theta[i] += dir[j] * step(i)
				}
				if v := f.LogLik(theta, d); v > best+1e-12*math.Max(1, math.Abs(best)) {
					t.Errorf("%s: LogLik(%v) = %.15g beats the reported optimum %v (%.15g) by %.3g",
						what, theta, v, fit.Estimates, best, v-best)
				}
			}
			for j := range free {
				for _, s := range []float64{1, -1} {
					dir := make([]float64, len(free))
					dir[j] = s
					try(dir, "axis "+fit.Parameters[free[j]])
				}
			}
			rng := rand.New(rand.NewPCG(uint64(ref.Seed), 11))
			for k := 0; k < 8; k++ {
				dir := make([]float64, len(free))
				var norm float64
				for j := range dir {
					dir[j] = rng.NormFloat64()
					norm += dir[j] * dir[j]
				}
				for j := range dir {
					dir[j] /= math.Sqrt(norm)
				}
				try(dir, "random direction")
			}
		})
	}
}

// meanOf returns the mean of family at p and whether its variance is finite
// (so that the sample mean of n draws has standard error sd/√n); false
// where no simple closed form is used here.
func meanOf(family string, p map[string]float64) (float64, bool) {
	switch family {
	case "normal":
		return p["mu"], true
	case "lognormal":
		return math.Exp(p["mu"] + p["sigma"]*p["sigma"]/2), true
	case "lognormal3":
		return p["threshold"] + math.Exp(p["mu"]+p["sigma"]*p["sigma"]/2), true
	case "exponential":
		return 1 / p["rate"], true
	case "gamma":
		return p["shape"] / p["rate"], true
	case "weibull":
		return p["scale"] * math.Gamma(1+1/p["shape"]), true
	case "weibull3":
		return p["threshold"] + p["scale"]*math.Gamma(1+1/p["shape"]), true
	case "gumbel":
		return p["location"] + 0.57721566490153286*p["scale"], true
	case "logistic":
		return p["location"], true
	case "invgauss":
		return p["mean"], true
	case "beta":
		return p["alpha"] / (p["alpha"] + p["beta"]), true
	case "studentt":
		return p["location"], p["df"] > 2
	case "loglogistic":
		b := p["shape"]
		return p["scale"] * (math.Pi / b) / math.Sin(math.Pi/b), b > 2
	case "pareto":
		a := p["shape"]
		return a * p["scale"] / (a - 1), a > 2
	case "gev":
		xi := p["shape"]
		return p["location"] + p["scale"]*(math.Gamma(1-xi)-1)/xi, xi < 0.5 && xi != 0
	case "gpd":
		xi := p["shape"]
		return p["threshold"] + p["scale"]/(1-xi), xi < 0.5
	}
	return 0, false
}

// TestPropertyRand draws 20000 variates twice from the same seeded PCG
// source and checks that the streams are identical, that every draw lies in
// the support (finite LogPDF), that the sample's fraction below
// Quantile(p) is within 5 binomial standard errors of p at seven
// probabilities, and, where the variance is finite, that the sample mean is
// within 5 standard errors of the mean.
func TestPropertyRand(t *testing.T) {
	ms := loadSpot(t)
	names := memberNames(ms)
	const n = 20000
	for i, m := range ms {
		m := m
		t.Run(names[i], func(t *testing.T) {
			_, d := member(t, m)
			draw := func() []float64 {
				r := rand.New(rand.NewPCG(20261202, 5))
				x := make([]float64, n)
				for j := range x {
					x[j] = d.Rand(r)
				}
				return x
			}
			a, b := draw(), draw()
			for j := range a {
				if math.Float64bits(a[j]) != math.Float64bits(b[j]) {
					t.Fatalf("draw %d differs between two runs with the same seed: %v vs %v", j, a[j], b[j])
				}
			}
			for j, x := range a {
				if lp := d.LogPDF(x); math.IsNaN(lp) || math.IsInf(lp, -1) {
					t.Fatalf("draw %d = %v lies outside the support (LogPDF %v)", j, x, lp)
				}
			}
			sorted := append([]float64(nil), a...)
			sort.Float64s(sorted)
			for _, p := range []float64{0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99} {
				q := d.Quantile(p)
				frac := float64(sort.SearchFloat64s(sorted, q)) / n
				if se := math.Sqrt(p * (1 - p) / n); !(math.Abs(frac-p) <= 5*se) {
					t.Errorf("fraction of draws below Quantile(%g) = %v is %.4f (5 standard errors: %.4f)", p, q, frac, 5*se)
				}
			}
			if mean, ok := meanOf(m.Family, m.Params); ok {
				var s, ss float64
				for _, x := range a {
					s += x
				}
				xbar := s / n
				for _, x := range a {
					ss += (x - xbar) * (x - xbar)
				}
				se := math.Sqrt(ss / (n - 1) / n)
				if !(math.Abs(xbar-mean) <= 5*se) {
					t.Errorf("sample mean %.8g, mean %.8g (5 standard errors: %.3g)", xbar, mean, 5*se)
				}
			}
		})
	}
}
