package infer

import (
	"math"
	"strconv"
	"testing"

	"fitseal/fitters"

	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat"
)

// lrRejections recomputes, for the coverage study's datasets of case c at
// size n, the likelihood-ratio statistic at the true value of c's
// parameter, W = 2(ℓ̂ − max ℓ(θ) over the other parameters with that one
// held at the truth), independently of the profile code: the inner
// maximum is taken by gonum's Nelder–Mead on (other parameters, log of
// positive ones) from two starts (the estimates and, for a location and
// scale, the sample mean and standard deviation). It returns how many of
// the datasets whose fit converged have W > χ²₁(0.95), the datasets the
// profile interval must miss if it is computed right, and how many were
// used (Cox & Hinkley, 1974, §9.3: the profile interval is the set of
// values not rejected by this test), and the estimates of the parameter.
func lrRejections(t testing.TB, c coverageCase, n, datasets int) (rejected, used int, estimates []float64) {
	fam := family(t, c.family)
	truth, err := fam.New(c.truth)
	if err != nil {
		t.Fatal(err)
	}
	scales := scalesOf(fam, c.truth)
	stream := Stream{Master: 2026, Analysis: "coverage/" + strconv.Itoa(n), Family: c.family, Purpose: "dataset"}
	x := make([]float64, n)
	for i := 0; i < datasets; i++ {
		r := stream.Rand(i)
		for j := range x {
			x[j] = truth.Rand(r)
		}
		d := fitters.Complete(append([]float64(nil), x...))
		fit, err := fam.Fit(d, fitters.Options{})
		if err != nil || !fit.Converged {
			continue
		}
		var others []int
		for k := range c.truth {
			if k != c.param {
				others = append(others, k)
			}
		}
		theta := append([]float64(nil), c.truth...)
		negLogLik := func(u []float64) float64 {
			for a, k := range others {
				theta[k] = scales[k].From(u[a])
			}
			ll := fam.LogLik(theta, d)
			if math.IsNaN(ll) || math.IsInf(ll, 0) {
				return math.Inf(1)
			}
			return -ll
		}
		starts := [][]float64{make([]float64, len(others))}
		for a, k := range others {
			starts[0][a] = scales[k].To(fit.Estimates[k])
		}
		if len(others) == 2 && scales[others[0]] == Natural && scales[others[1]] == Log {
			starts = append(starts, []float64{stat.Mean(x, nil), math.Log(stat.StdDev(x, nil))})
		}
		best := math.Inf(1)
		for _, st := range starts {
			res, _ := optimize.Minimize(optimize.Problem{Func: negLogLik}, st,
				&optimize.Settings{MajorIterations: 5000}, &optimize.NelderMead{})
			if res != nil && res.F < best {
				best = res.F
			}
		}
		if math.IsInf(best, 1) {
			continue
		}
		used++
		estimates = append(estimates, fit.Estimates[c.param])
		if 2*(fit.LogLik+best) > chi95 {
			rejected++
		}
	}
	return rejected, used, estimates
}
