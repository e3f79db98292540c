package infer

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"fitseal/fitters"
)

// TestTiesAreNoted: lifetimes recorded to whole units repeat one another
// (invented: 80 weibull(1.5, 12) values rounded), and a continuous model's
// replicates never do, so the EDF statistics' notes say the p-value can
// come out too small; the same values unrounded get no such note. Both for
// complete data and for the Kaplan–Meier statistics of suspended data.
func TestTiesAreNoted(t *testing.T) {
	rng := rand.New(rand.NewPCG(80, 12))
	raw := make([]float64, 80)
	for i := range raw {
		raw[i] = 12 * math.Pow(-math.Log(1-rng.Float64()), 1/1.5)
	}
	rounded := make([]float64, len(raw))
	for i, v := range raw {
		rounded[i] = math.Max(1, math.Round(v))
	}
	fam := family(t, "weibull")
	for _, c := range []struct {
		name   string
		values []float64
		ties   bool
	}{{"rounded", rounded, true}, {"unrounded", raw, false}} {
		for _, censored := range []bool{false, true} {
			d := fitters.Complete(c.values)
			if censored {
				// The values above 20 still running at 20.
				d = &fitters.Data{}
				for _, v := range c.values {
					if v > 20 {
						d.Right = append(d.Right, 20)
					} else {
						d.Exact = append(d.Exact, v)
					}
				}
			}
			fit := fitOf(t, fam, d)
			g, err := CheckFit(fam, fit, d, BootstrapOptions{})
			if err != nil || !g.Applicable {
				t.Fatalf("%s (censored %v): %v %+v", c.name, censored, err, g)
			}
			for _, s := range g.Statistics {
				if got := strings.Contains(s.Note, "repeat another") && strings.Contains(s.Note, "the p-value can be too small"); got != c.ties {
					t.Errorf("%s (censored %v) %s: note %q, want a ties warning %v", c.name, censored, s.Name, s.Note, c.ties)
				}
			}
		}
	}
}

// TestManyFailedReplicatesAreNoted: a p-value resting on replicates whose
// refits often failed says it may be biased (from 10 % failed); a few
// failures are only counted.
func TestManyFailedReplicatesAreNoted(t *testing.T) {
	for _, c := range []struct {
		failed int
		warn   bool
	}{{0, false}, {9, false}, {10, true}, {49, true}} {
		rep := &Replicates{Requested: 100, Failed: c.failed, FirstFailure: "refit did not converge", Statistics: make([][]float64, 100)}
		for r := c.failed; r < 100; r++ {
			rep.Statistics[r] = []float64{float64(r) / 100}
		}
		g := checkFitFrom(&GoodnessOfFit{Applicable: true, Statistics: []Statistic{{Name: "ks", Value: 0.5, PValue: math.NaN()}}}, rep)
		s := g.Statistics[0]
		if counted := strings.Contains(s.Note, "replicates failed and are left out"); counted != (c.failed > 0) {
			t.Errorf("%d failed: note %q", c.failed, s.Note)
		}
		if warned := strings.Contains(s.Note, "may be biased"); warned != c.warn {
			t.Errorf("%d failed: note %q, want the bias warning %v", c.failed, s.Note, c.warn)
		}
		if s.Replicates != 100-c.failed {
			t.Errorf("%d failed: the p-value rests on %d replicates, want %d", c.failed, s.Replicates, 100-c.failed)
		}
	}
}
