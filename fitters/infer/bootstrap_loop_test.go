package infer

import (
	"bytes"
	"math/rand/v2"
	"slices"
	"strconv"
	"testing"

	"fitseal/fitters"
)

// plainReplicates is the parametric bootstrap written as its definition
// reads, with nothing reused: replicate r draws n values one Rand call at a
// time from Stream.Rand(r), refits, and computes the EDF statistics (or
// the chi-square) on a slices.Sort'ed copy. Bootstrap's reused buffers,
// radix sort, fills and seeding must give exactly these numbers.
func plainReplicates(t *testing.T, fam fitters.Family, fit *fitters.Fit, d *fitters.Data, B int, stream Stream) *Replicates {
	t.Helper()
	dist, err := fam.New(fit.Estimates)
	if err != nil {
		t.Fatal(err)
	}
	stream.Purpose = "bootstrap"
	rep := &Replicates{Requested: B, StatNames: statNames(fam.Kind()),
		Estimates: make([][]float64, B), Statistics: make([][]float64, B)}
	for r := 0; r < B; r++ {
		rng := stream.Rand(r)
		x := make([]float64, len(d.Exact))
		if sf, ok := dist.(fitters.SortedRandFiller); ok && d.Trials == nil {
			sf.RandFillSorted(rng, x) // a model that draws its samples in order
		} else {
			for i := range x {
				if d.Trials != nil {
					di, _ := withTrials(dist, d.Trials[i])
					x[i] = di.Rand(rng)
				} else {
					x[i] = dist.Rand(rng)
				}
			}
		}
		sim := &fitters.Data{Exact: x, Trials: d.Trials}
		refit, err := fam.Fit(sim, refitOptions(fit, fitters.Options{}))
		if err != nil || !refit.Converged {
			why := "refit did not converge: "
			if err != nil {
				why = err.Error()
			} else {
				why += refit.Reason
			}
			if rep.Failed == 0 {
				rep.FirstFailure = "replicate " + strconv.Itoa(r) + ": " + why
			}
			rep.Failed++
			continue
		}
		rd, err := fam.New(refit.Estimates)
		if err != nil {
			t.Fatal(err)
		}
		rep.Estimates[r] = slices.Clone(refit.Estimates)
		sorted := slices.Sorted(slices.Values(x))
		if fam.Kind() == fitters.Discrete {
			comps := []component{{rd, float64(len(x))}}
			if d.Trials != nil {
				comps, _ = groupTrials(d.Trials).components(rd, nil)
			}
			var c cells
			v, _ := chiSquareCounts(comps, sorted, &c)
			rep.Statistics[r] = []float64{v}
		} else {
			var edf [3]float64
			edfStatistics(rd, sorted, &edf)
			rep.Statistics[r] = edf[:]
		}
	}
	return rep
}

// TestBootstrapMatchesPlainLoop checks, bit for bit, that Bootstrap gives
// the replicates of plainReplicates for families with and without a
// RandFill, continuous and discrete, with per-observation trials, on 1 and
// 3 workers: the optimisations of the loop change no number.
func TestBootstrapMatchesPlainLoop(t *testing.T) {
	counts := []float64{0, 1, 1, 2, 0, 3, 1, 0, 2, 1, 4, 0, 1, 2, 1}
	trials := []int{4, 4, 5, 5, 3, 6, 4, 2, 5, 5, 8, 3, 4, 6, 2}
	r := rand.New(rand.NewPCG(3, 8))
	wide := make([]float64, 300) // long enough for the radix sort's own route
	for i := range wide {
		wide[i] = fitters.Gamma{Shape: 0.7, Rate: 0.01}.Rand(r)
	}
	for _, c := range []struct {
		name string
		data *fitters.Data
	}{
		{"gamma", fitters.Complete(ballBearings)},
		{"gamma", fitters.Complete(wide)},
		{"weibull", fitters.Complete(ballBearings)},
		{"weibull", fitters.Complete(wide)},
		{"lognormal", fitters.Complete(wide)},
		{"loglogistic", fitters.Complete(wide)},
		{"normal", fitters.Complete(ballBearings)},
		{"exponential", fitters.Complete(wide)},
		{"poisson", fitters.Complete(counts)},
		{"binomial", &fitters.Data{Exact: counts, Trials: trials}},
	} {
		fam := family(t, c.name)
		fit := fitOf(t, fam, c.data)
		stream := Stream{Master: 11, Analysis: "plain", Family: c.name}
		want := replicateBytes(plainReplicates(t, fam, fit, c.data, 40, stream))
		for _, w := range []int{1, 3} {
			rep, err := Bootstrap(fam, fit, c.data, BootstrapOptions{Replicates: 40, Workers: w, Stream: stream})
			if err != nil {
				t.Fatal(err)
			}
			if got := replicateBytes(rep); !bytes.Equal(got, want) {
				t.Errorf("%s (n = %d), %d workers: Bootstrap's replicates differ from the plain loop's", c.name, len(c.data.Exact), w)
			}
		}
	}
}

// TestSeederMatchesStreamRand checks that the reused seeding text seeds
// each replicate as Stream.Rand does (numbers of every digit count, in
// any order), without allocating.
func TestSeederMatchesStreamRand(t *testing.T) {
	s := Stream{Master: 7, Analysis: "a.b/c", Family: "gamma", Purpose: "bootstrap"}
	z := s.seeder()
	p := rand.NewPCG(0, 0)
	for _, r := range []int{0, 9, 10, 99, 100, 3, 999999, 1 << 40, 12} {
		z.reseed(p, r)
		want := s.Rand(r)
		for range 4 {
			if a, b := p.Uint64(), want.Uint64(); a != b {
				t.Fatalf("replicate %d: reseeded stream gives %x, Stream.Rand %x", r, a, b)
			}
		}
	}
	if a := testing.AllocsPerRun(100, func() { z.reseed(p, 123456) }); a != 0 {
		t.Errorf("reseed allocates %v times, want 0", a)
	}
}

// TestBootstrapLoopAllocatesNothing measures the allocations of Bootstrap
// per replicate (the difference between B = 24 and B = 8, one worker). For
// the nine families of the batch workload, whose complete-data refits go
// into the worker's FitRecord and Member, a replicate must allocate
// nothing at all, where fam.Fit and fam.New on their own allocate (logged).
// For other families it must allocate no more than their refit and fam.New,
// measured on their own: the loop's sampling, seeding, sorting and
// statistics allocate nothing.
func TestBootstrapLoopAllocatesNothing(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 4))
	for _, c := range []struct {
		name    string
		dist    fitters.Dist
		inPlace bool // refit and model rebuilt without allocating
	}{
		{"normal", fitters.Normal{Mu: 3, Sigma: 2}, true},
		{"lognormal", fitters.LogNormal{Mu: 1, Sigma: 0.6}, true},
		{"exponential", fitters.Exponential{Rate: 0.2}, true},
		{"gamma", fitters.Gamma{Shape: 2.5, Rate: 0.4}, true},
		{"weibull", fitters.Weibull{Shape: 1.8, Scale: 120}, true},
		{"gumbel", fitters.Gumbel{Location: 10, Scale: 3}, true},
		{"logistic", fitters.Logistic{Location: -4, Scale: 1.5}, true},
		{"loglogistic", fitters.LogLogistic{Scale: 20, Shape: 3}, true},
		{"invgauss", fitters.InvGauss{Mean: 5, Shape: 12}, true},
		{"pareto", fitters.Gamma{Shape: 2.5, Rate: 0.4}, false},
	} {
		x := make([]float64, 200)
		fitters.FillRand(c.dist, r, x)
		fam := family(t, c.name)
		d := fitters.Complete(x)
		fit := fitOf(t, fam, d)
		run := func(B int) float64 {
			opt := BootstrapOptions{Replicates: B, Workers: 1, Stream: Stream{Master: 1, Analysis: "allocs", Family: c.name}}
			return testing.AllocsPerRun(10, func() {
				if _, err := Bootstrap(fam, fit, d, opt); err != nil {
					t.Fatal(err)
				}
			})
		}
		perReplicate := (run(24) - run(8)) / 16
		refit := testing.AllocsPerRun(50, func() {
			f, err := fam.Fit(d, fitters.Options{})
			if err != nil {
				t.Fatal(err)
			}
			if _, err := fam.New(f.Estimates); err != nil {
				t.Fatal(err)
			}
		})
		t.Logf("%s: %.2f allocations per replicate; fam.Fit and fam.New alone make %.0f", c.name, perReplicate, refit)
		switch {
		case raceEnabled:
			// allocation counts are not the program's (race_on_test.go)
		case c.inPlace && perReplicate != 0:
			t.Errorf("%s: %.2f allocations per replicate, want 0", c.name, perReplicate)
		case perReplicate > refit+0.125:
			t.Errorf("%s: %.2f allocations per replicate, more than the %.0f of the refit and fam.New: the loop allocates", c.name, perReplicate, refit)
		}
	}
}

// TestReplicateAllocatesNothing measures one replicate's step as the loop
// takes it — draw the sample, sort it, refit into the worker's record,
// rebuild the model in place, compute the three EDF statistics — for each
// of the nine families, and asserts that it allocates nothing.
func TestReplicateAllocatesNothing(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for _, c := range []struct {
		name string
		dist fitters.Dist
	}{
		{"normal", fitters.Normal{Mu: 3, Sigma: 2}},
		{"lognormal", fitters.LogNormal{Mu: 1, Sigma: 0.6}},
		{"exponential", fitters.Exponential{Rate: 0.2}},
		{"gamma", fitters.Gamma{Shape: 2.5, Rate: 0.4}},
		{"weibull", fitters.Weibull{Shape: 1.8, Scale: 120}},
		{"gumbel", fitters.Gumbel{Location: 10, Scale: 3}},
		{"logistic", fitters.Logistic{Location: -4, Scale: 1.5}},
		{"loglogistic", fitters.LogLogistic{Scale: 20, Shape: 3}},
		{"invgauss", fitters.InvGauss{Mean: 5, Shape: 12}},
	} {
		fam := family(t, c.name)
		sample := make([]float64, 1000)
		sorted := make([]float64, len(sample))
		var sorter fitters.FloatSorter
		var rec fitters.FitRecord
		member := fitters.NewMember(fam)
		sim := &fitters.Data{}
		var edf [3]float64
		step := func() {
			if sf, ok := c.dist.(fitters.SortedRandFiller); ok {
				sf.RandFillSorted(r, sorted) // drawn in order, as the loop does
				sim.Exact = sorted
			} else {
				fitters.FillRand(c.dist, r, sample)
				sorter.SortInto(sorted, sample)
				sim.Exact = sample
			}
			refit, err := fitters.FitInto(fam, sim, fitters.Options{}, &rec)
			if err != nil || !refit.Converged {
				t.Fatalf("%s: refit failed: %v %v", c.name, err, refit)
			}
			rd, err := member.New(refit.Estimates)
			if err != nil {
				t.Fatal(err)
			}
			edfStatistics(rd, sorted, &edf)
		}
		step() // warm the scratch pool
		if a := testing.AllocsPerRun(20, step); a != 0 && !raceEnabled {
			t.Errorf("%s: a replicate's step makes %v allocations, want 0", c.name, a)
		}
	}
}
