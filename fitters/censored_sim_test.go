package fitters

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

// censoredSimulation fits a family to `reps` seeded censored samples and
// returns the mean and empirical standard deviation of each estimate, the
// mean censored fraction, and the number of fits that failed.
func censoredSimulation(t *testing.T, family string, truth []float64, reps int, sample func(r *rand.Rand, d Dist) *Data) (mean, sd []float64, censored float64) {
	t.Helper()
	f, ok := Lookup(family)
	if !ok {
		t.Fatalf("family %q is not registered: its file has not landed in fitters/", family)
	}
	dist, err := f.New(truth)
	if err != nil {
		t.Fatal(err)
	}
	k := len(truth)
	est := make([][]float64, k)
	for rep := 0; rep < reps; rep++ {
		r := rand.New(rand.NewPCG(20261202, uint64(rep)))
		d := sample(r, dist)
		censored += float64(d.NCensored()) / float64(d.N())
		fit, err := f.Fit(d, Options{})
		if err != nil {
			t.Fatalf("replicate %d: %v", rep, err)
		}
		if !fit.Converged {
			t.Fatalf("replicate %d: not converged: %s", rep, fit.Reason)
		}
		for i := range truth {
			est[i] = append(est[i], fit.Estimates[i])
		}
	}
	mean, sd = make([]float64, k), make([]float64, k)
	for i := range est {
		m, v := meanVar(est[i])
		mean[i], sd[i] = m, math.Sqrt(v)
	}
	return mean, sd, censored / float64(reps)
}

// simulationReplicates: 200 seeded replicates take about 5 s, so the full
// study is always on.
const simulationReplicates = 200

// checkBias requires |mean − truth| ≤ 0.25·sd for each parameter: the bias
// of the censored MLE is small against its standard error (the empirical
// sd of the estimates). A quarter of a standard error is common practice
// for "negligible bias"; the Monte Carlo error of the mean is sd/√reps,
// 0.07 sd at 200 replicates.
func checkBias(t *testing.T, names []string, truth, mean, sd []float64) {
	t.Helper()
	for i := range truth {
		bias := mean[i] - truth[i]
		t.Logf("%s: truth %.4g, mean %.4g, bias %.3g = %.3f sd (sd %.3g)", names[i], truth[i], mean[i], bias, bias/sd[i], sd[i])
		if math.Abs(bias) > 0.25*sd[i] {
			t.Errorf("%s: bias %.3g is %.2f standard errors (limit 0.25)", names[i], bias, math.Abs(bias)/sd[i])
		}
	}
}

// TestSimulationWeibullSuspensions: Weibull (shape 1.5, scale 100) life
// tests of 200 units with suspensions at three times, chosen so that about
// 60 % of the units are still running when the test stops. The censored MLE
// recovers the generating parameters.
func TestSimulationWeibullSuspensions(t *testing.T) {
	truth := []float64{1.5, 100}
	// suspension times where the survival is 0.7, 0.6 and 0.5
	var times []float64
	for _, s := range []float64{0.7, 0.6, 0.5} {
		times = append(times, truth[1]*math.Pow(-math.Log(s), 1/truth[0]))
	}
	mean, sd, cens := censoredSimulation(t, "weibull", truth, simulationReplicates, func(r *rand.Rand, d Dist) *Data {
		data := &Data{}
		for i := 0; i < 200; i++ {
			x, c := d.Rand(r), times[i%3]
			if x > c {
				data.Right = append(data.Right, c)
			} else {
				data.Exact = append(data.Exact, x)
			}
		}
		return data
	})
	t.Logf("suspended fraction %.3f", cens)
	if cens < 0.55 || cens > 0.65 {
		t.Errorf("suspended fraction %.3f, want about 0.6", cens)
	}
	checkBias(t, []string{"shape", "scale"}, truth, mean, sd)
}

// TestSimulationLognormalNonDetects: lognormal (mu 1, sigma 0.8) samples of
// 200 with two detection limits (the 0.2 and 0.4 quantiles, alternately),
// about 30 % non-detects. The censored MLE recovers mu and sigma.
func TestSimulationLognormalNonDetects(t *testing.T) {
	truth := []float64{1, 0.8}
	limits := []float64{
		math.Exp(truth[0] + truth[1]*mathext.NormalQuantile(0.2)),
		math.Exp(truth[0] + truth[1]*mathext.NormalQuantile(0.4)),
	}
	mean, sd, cens := censoredSimulation(t, "lognormal", truth, simulationReplicates, func(r *rand.Rand, d Dist) *Data {
		data := &Data{}
		for i := 0; i < 200; i++ {
			x, l := d.Rand(r), limits[i%2]
			if x < l {
				data.Left = append(data.Left, l)
			} else {
				data.Exact = append(data.Exact, x)
			}
		}
		return data
	})
	t.Logf("non-detect fraction %.3f", cens)
	if cens < 0.25 || cens > 0.35 {
		t.Errorf("non-detect fraction %.3f, want about 0.3", cens)
	}
	checkBias(t, []string{"mu", "sigma"}, truth, mean, sd)
}
