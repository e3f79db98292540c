package fitters

import (
	"math"
	"strings"
	"testing"
)

// TestThresholdCensoredDerivatives checks the threshold route's score and
// Hessian against differences of its own log-likelihood and score, and its
// log-likelihood against the family's LogLik, for the weibull3 and the
// lognormal3 on censored samples (limits, suspensions, a bin whose lower
// end lies below the threshold, a suspension below it).
func TestThresholdCensoredDerivatives(t *testing.T) {
	cases := []struct {
		name  string
		ts    *thresholdLocScale
		truth []float64
		at    [][3]float64 // (μ, ln σ, ln(m − γ))
	}{
		{"weibull3", &thresholdLocScale{std: stdSEV}, []float64{2.5, 20, 10}, [][3]float64{{3, math.Log(0.4), 1}, {2.8, math.Log(0.6), 2.5}}},
		{"lognormal3", &thresholdLocScale{std: stdNormal}, []float64{2, 0.4, 5}, [][3]float64{{2, math.Log(0.4), 1}, {2.3, math.Log(0.3), 0}}},
	}
	for _, c := range cases {
		f, _ := Lookup(c.name)
		dist, _ := f.New(c.truth)
		d := benchSampleData(dist, 300)
		d.Lower = append(d.Lower, c.truth[2]-1, dist.Quantile(0.5))
		d.Upper = append(d.Upper, dist.Quantile(0.3), dist.Quantile(0.7))
		d.Right = append(d.Right, c.truth[2]-2)
		floor, _ := thresholdFloor(d)
		dev := make([]float64, len(d.Exact))
		for i, x := range d.Exact {
			dev[i] = x - floor
		}
		cs, _ := newLocScaleShapeSample(d, 0, 1)
		s := thresholdSample{floor: floor, exact: dev, cs: cs}
		eval := func(th [3]float64) newton3Point { return thresholdCensoredPoint(c.ts, &s, th[0], th[1], th[2]) }
		for _, th := range c.at {
			checkNewton3Derivatives(t, c.name, eval, th, 2e-6)
			var p []float64
			sigma, g := math.Exp(th[1]), floor-math.Exp(th[2])
			if c.name == "weibull3" {
				p = []float64{1 / sigma, math.Exp(th[0]), g}
			} else {
				p = []float64{th[0], sigma, g}
			}
			want := f.LogLik(p, d)
			if got := eval(th).ll; math.Abs(got-want) > 1e-12*math.Abs(want) {
				t.Errorf("%s at %v: route logL %.15g, LogLik %.15g", c.name, th, got, want)
			}
		}
	}
}

// benchSampleData is benchSample's censoring (non-detects at the 0.1 and
// 0.2 quantiles, suspensions at the 0.8 quantile) of n draws of dist.
func benchSampleData(dist Dist, n int) *Data {
	limits := []float64{dist.Quantile(0.1), dist.Quantile(0.2)}
	susp := dist.Quantile(0.8)
	d := &Data{}
	for i := 0; i < n; i++ {
		x := dist.Quantile((float64(i) + 0.5) / float64(n))
		switch l := limits[i%2]; {
		case x < l:
			d.Left = append(d.Left, l)
		case x > susp:
			d.Right = append(d.Right, susp)
		default:
			d.Exact = append(d.Exact, x)
		}
	}
	return d
}

// TestThresholdCensoredNewtonAgreesWithBFGS compares the censored Newton
// route of the weibull3 and the lognormal3 with their generic route (BFGS
// from four starts run separately, the largest interior local maximum) on
// seeded censored datasets (80 each, or 400 with FITSEAL_LONG=1):
// log-likelihood never below BFGS's by more than 1e-9 relative, estimates
// within 1e-3 relative. The Newton's logL is at or above BFGS's on every
// dataset (up to 2e-12 relative above); the estimates agree within 1e-6
// except where BFGS stops short along a flat ridge (heavy suspensions at
// one time or only three exact values: the threshold, μ and σ nearly
// confounded): 1.7e-4 for one weibull3 dataset of 80, up to 5.7e-4 for
// three lognormal3 datasets of 400. TestThreeParameterCensoredReference
// pins the route to mpmath maxima within 1e-7. The route may hand a
// dataset to the BFGS runs (declined: iterates that ran to the sample
// minimum or off to γ → −∞, or crawled along a flat ridge for 100
// iterations), at most a fifth of them: measured 15 of 80 (65 of 400) for
// the weibull3 and 8 of 80 (48 of 400) for the lognormal3, nearly all with
// only three exact values.
func TestThresholdCensoredNewtonAgreesWithBFGS(t *testing.T) {
	declines := func(_ *Data, fit *Fit) bool {
		return strings.Contains(fit.Method, "the censored Newton route did not converge first")
	}
	for _, c := range []struct {
		newtonAgreementCase
		estTol float64
	}{
		{newtonAgreementCase{name: "weibull3", truths: [][]float64{{2.5, 20, 10}, {1.5, 3, -2}}, scenarios: censoredScenarios, declines: declines}, 1e-3},
		{newtonAgreementCase{name: "lognormal3", truths: [][]float64{{2, 0.4, 5}, {0, 0.8, 100}}, scenarios: censoredScenarios, declines: declines}, 1e-3},
	} {
		seeds := agreementSeeds()
		compared, declined := agreeWithGeneric(t, c.newtonAgreementCase, seeds, c.estTol)
		total := len(c.truths) * len(c.scenarios) * seeds
		t.Logf("%s: %d datasets compared with BFGS, %d declined", c.name, compared, declined)
		if compared < total*6/10 || declined > total*2/10 {
			t.Errorf("%s: %d of %d datasets compared, %d declined", c.name, compared, total, declined)
		}
	}
}
