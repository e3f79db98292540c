package infer

import (
	"fmt"
	"math"
	"math/rand/v2"
	"regexp"
	"testing"

	"fitseal/fitters"
)

// TestSolveNear checks the root of h near t0 and how many evaluations it
// costs: two for a linear h when the slope of the last root is known (the
// first secant step lands on the root, the second confirms it), a few
// more for curved ones, and the bracketing search where secant steps fail.
func TestSolveNear(t *testing.T) {
	for _, c := range []struct {
		name         string
		h            func(float64) float64
		t0, step     float64
		slope        float64
		root         float64
		maxEvals     int
		secantFailed bool // the root comes from the bracketing search
	}{
		{"linear, slope known", func(t float64) float64 { return 2*t - 3 }, 1, 0.5, 2, 1.5, 2, false},
		{"linear, slope unknown", func(t float64) float64 { return 2*t - 3 }, 1, 0.5, math.NaN(), 1.5, 3, false},
		{"exponential", func(t float64) float64 { return math.Exp(t) - 5 }, 1, 0.5, math.NaN(), math.Log(5), 10, false},
		{"cubic, stale slope", func(t float64) float64 { return t*t*t - 2 }, 1, 0.5, 1, math.Cbrt(2), 10, false},
		// A secant from t0 = 0 along a slope of 1e-6 leaves the 8-step reach,
		// so the search brackets [−0.5, 0] or [0, 0.5] and refines it.
		{"secant too far", func(t float64) float64 { return math.Atan(t - 0.3) }, 0, 0.5, 1e-6, 0.3, 80, true},
		// ±MaxFloat64 on either side of a jump at 0.01 (tailGap's clamped
		// tails): the secant across it has an infinite slope and must not
		// stop there; the bracket closes in on the jump.
		{"clamped tails", func(t float64) float64 {
			if t > 0.01 {
				return math.MaxFloat64
			}
			return -math.MaxFloat64
		}, 0, 0.5, math.NaN(), 0.01, 200, true},
		// NaN right of 0.6: a secant aimed there fails, the bracket does not.
		{"undefined beyond", func(t float64) float64 {
			if t > 0.6 {
				return math.NaN()
			}
			return t - 0.25
		}, 0, 0.5, 0.1, 0.25, 80, true},
	} {
		t.Run(c.name, func(t *testing.T) {
			evals := 0
			h := func(x float64) float64 { evals++; return c.h(x) }
			got, slope, ok := solveNear(h, c.t0, c.step, c.slope)
			if !ok || math.Abs(got-c.root) > 4e-14*math.Max(1, math.Abs(c.root)) {
				t.Fatalf("root %v ok %v, want %v", got, ok, c.root)
			}
			if evals > c.maxEvals {
				t.Errorf("%d evaluations, want at most %d", evals, c.maxEvals)
			}
			if c.secantFailed != math.IsNaN(slope) {
				t.Errorf("slope %v: secant failed = %v, want %v", slope, math.IsNaN(slope), c.secantFailed)
			}
		})
	}
}

// TestDerivedProfileSecantMatchesBracketing checks that the secant steps
// and the CDF form of quantile constraints (tailGap) change the
// profile-likelihood intervals of derived quantities only within the
// solvers' tolerances: with secantTries = 0 and numericQuantile empty every
// constraint is solved as before them, ψ(θ) = v by the bracketing search
// alone, and the bounds agree to 1e-7 relative, with the same methods and
// the same notes but for the numbers in them (where the fit is not the
// maximum, the two searches report different higher points). Cases:
// ten families on their own draws at n = 12 and 50, every registered family
// on familyTestData (the discrete families' quantiles have no profile), and
// right- and interval-censored samples: 247 closed intervals. (Measured on
// amd64: 1.4e-10 apart at most, the resolution of the bound's own root
// finding, whose bracket stops at 1e-10 relative; on arm64 under qemu
// 1.1e-8; gev at n = 12, whose far-tail profiles are nearly flat, 2e-6.)
func TestDerivedProfileSecantMatchesBracketing(t *testing.T) {
	if testing.Short() {
		t.Skip("profiles some 500 intervals twice")
	}
	type query struct {
		q   Quantity
		arg float64
	}
	type dataset struct {
		name string
		fam  fitters.Family
		d    *fitters.Data
		opt  fitters.Options
		qs   []query
	}
	standard := func(x0, x1 float64) []query {
		return []query{{Quantile, 0.01}, {Quantile, 0.1}, {Quantile, 0.5}, {Quantile, 0.9},
			{ReturnLevel, 100}, {Exceedance, x0}, {Exceedance, x1}}
	}
	var cases []dataset
	for _, c := range []struct {
		family string
		params []float64
	}{
		{"gamma", []float64{2.5, 0.4}}, {"weibull", []float64{1.8, 120}}, {"lognormal", []float64{1, 0.5}},
		{"gumbel", []float64{10, 2}}, {"gev", []float64{10, 2, 0.1}}, {"invgauss", []float64{2, 3}},
		{"loglogistic", []float64{3, 2}}, {"normal", []float64{3, 2}}, {"logistic", []float64{3, 2}},
		{"exponential", []float64{0.5}},
	} {
		fam := family(t, c.family)
		dist, err := fam.New(c.params)
		if err != nil {
			t.Fatal(err)
		}
		for _, n := range []int{12, 50} {
			r := rand.New(rand.NewPCG(3, uint64(n)))
			x := make([]float64, n)
			for i := range x {
				x[i] = dist.Rand(r)
			}
			cases = append(cases, dataset{fmt.Sprintf("%s n=%d", c.family, n), fam, fitters.Complete(x), fitters.Options{}, standard(x[0], 1.5*x[1])})
			if n == 50 && c.family != "normal" && c.family != "logistic" && c.family != "gumbel" && c.family != "gev" {
				// Suspensions above the 80th draw's value, and the
				// first ten values known only to a bin of width 20 %.
				cut := x[40]
				var cd fitters.Data
				for i, v := range x {
					switch {
					case i < 10:
						cd.Lower = append(cd.Lower, 0.9*v)
						cd.Upper = append(cd.Upper, 1.1*v)
					case v > cut:
						cd.Right = append(cd.Right, cut)
					default:
						cd.Exact = append(cd.Exact, v)
					}
				}
				cases = append(cases, dataset{c.family + " censored", fam, &cd, fitters.Options{}, standard(x[0], 1.5*x[1])})
			}
		}
	}
	for _, fam := range fitters.Families() {
		d, opt := familyTestData(fam)
		arg := 0.5 * ballBearings[22]
		if fam.Name() == "beta" {
			arg = 0.5
		}
		cases = append(cases, dataset{fam.Name() + " familyTestData", fam, d, opt,
			[]query{{Quantile, 0.1}, {Quantile, 0.5}, {ReturnLevel, 100}, {Exceedance, arg}}})
	}
	compared, worst := 0, 0.0
	for _, c := range cases {
		fit, err := c.fam.Fit(c.d, c.opt)
		if err != nil || !fit.Converged {
			t.Logf("%s: not fitted (%v)", c.name, err)
			continue
		}
		for _, q := range c.qs {
			a, err := Derived(c.fam, fit, c.d, q.q, q.arg, MethodProfile, Settings{Level: 0.95})
			if err != nil {
				t.Fatal(err)
			}
			savedTries, savedNumeric := secantTries, numericQuantile
			secantTries, numericQuantile = 0, nil
			b, err := Derived(c.fam, fit, c.d, q.q, q.arg, MethodProfile, Settings{Level: 0.95})
			secantTries, numericQuantile = savedTries, savedNumeric
			if err != nil {
				t.Fatal(err)
			}
			if withoutNumbers(a.Note) != withoutNumbers(b.Note) || a.Method != b.Method || a.LowerOpen != b.LowerOpen || a.UpperOpen != b.UpperOpen {
				t.Errorf("%s %s %v: secant %+v, bracketing %+v", c.name, q.q, q.arg, a, b)
				continue
			}
			// A bound is a root of ℓp(v) = ℓ̂ − cut found to |ℓp − cut| < 1e-9;
			// where the profile is nearly flat the root moves accordingly:
			// by up to 1.1e-8 relative (a student t median on arm64), and for
			// gev's far-tail quantiles from 12 values (its shape barely
			// identified) by up to 1e-5. A wrong root would differ by far more.
			tol := 1e-7
			if c.fam.Name() == "gev" && c.d.N() < 20 {
				tol = 1e-5
			}
			for _, pair := range [][2]float64{{a.Lower, b.Lower}, {a.Upper, b.Upper}} {
				if math.IsNaN(pair[0]) != math.IsNaN(pair[1]) || math.Abs(pair[0]-pair[1]) > tol*math.Abs(pair[1]) {
					t.Errorf("%s %s %v: bounds [%v, %v] with secant steps, [%v, %v] bracketing", c.name, q.q, q.arg, a.Lower, a.Upper, b.Lower, b.Upper)
					break
				}
				if rel := math.Abs(pair[0]-pair[1]) / math.Abs(pair[1]); rel > worst && tol == 1e-7 {
					worst = rel
				}
			}
			if !math.IsNaN(a.Lower) {
				compared++
			}
		}
	}
	if compared < 240 {
		t.Errorf("only %d intervals compared; the cases give 247", compared)
	}
	t.Logf("%d intervals compared; largest relative difference of a bound %.2g", compared, worst)
}

// withoutNumbers replaces every run of digits, signs, points and exponents
// in s by "#".
func withoutNumbers(s string) string {
	return numberRun.ReplaceAllString(s, "#")
}

var numberRun = regexp.MustCompile(`[-+]?[0-9][0-9.eE+-]*`)

// TestQuantileGradientMatchesDifferences checks the implicit-differentiation
// gradient of a numerically inverted quantile against central differences
// of the quantile itself (quantityGradient, which inverts the CDF at each
// step), for the four families of numericQuantile at tail and central
// probabilities, on the log and natural scales: agreement to 1e-6
// relative, the differences' own accuracy with steps of 1e-4 standard
// errors.
func TestQuantileGradientMatchesDifferences(t *testing.T) {
	for _, c := range []struct {
		family string
		params []float64
		se     []float64
	}{
		{"gamma", []float64{2.5, 0.4}, []float64{0.3, 0.05}},
		{"gamma", []float64{0.4, 3}, []float64{0.05, 0.6}},
		{"invgauss", []float64{2, 3}, []float64{0.1, 0.4}},
		{"beta", []float64{2, 5}, []float64{0.3, 0.8}},
		{"studentt", []float64{1, 2, 4}, []float64{0.2, 0.2, 1}},
	} {
		fam := family(t, c.family)
		free := make([]int, len(c.params))
		for i := range free {
			free[i] = i
		}
		info := &Information{StdErrors: c.se}
		for _, p := range []float64{0.01, 0.1, 0.5, 0.9, 0.99} {
			g, err := quantityFunc(fam, Quantile, p)
			if err != nil {
				t.Fatal(err)
			}
			q := g(c.params)
			for _, sc := range []Scale{Natural, Log} {
				if sc == Log && !(q > 0) {
					continue
				}
				want := quantityGradient(g, sc, c.params, free, info)
				got := quantileGradient(fam, p, q, sc, c.params, free, info)
				if got == nil {
					t.Errorf("%s%v p=%v: no gradient", c.family, c.params, p)
					continue
				}
				for a := range want {
					if math.Abs(got[a]-want[a]) > 1e-6*math.Max(math.Abs(want[a]), 1e-3) {
						t.Errorf("%s%v p=%v %v: ∂t/∂θ%d = %v implicit, %v by differences of the quantile", c.family, c.params, p, sc, a, got[a], want[a])
					}
				}
			}
		}
	}
}
