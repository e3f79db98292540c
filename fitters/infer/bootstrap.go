package infer

import (
	"errors"
	"fmt"
	"math/rand/v2"
	"slices"
	"sync"
	"sync/atomic"

	"fitseal/fitters"

	"gonum.org/v1/gonum/mat"
)

// BootstrapOptions configures a parametric bootstrap.
type BootstrapOptions struct {
	// Replicates is B, the number of simulated datasets.
	Replicates int
	// Workers run replicates in parallel; 0 means runtime.GOMAXPROCS(0).
	// The result does not depend on it.
	Workers int
	// Stream identifies the random streams (Purpose defaults to "bootstrap").
	Stream Stream
	// Fit holds the refit settings (tolerance, iterations). Parameters fixed
	// in the original fit are held at the same values in every refit.
	Fit fitters.Options
	// NoStatistics skips the goodness-of-fit statistics of each replicate,
	// for replicates that serve intervals only.
	NoStatistics bool
	// Information also computes the observed information of each refit on
	// its simulated data (ObservedInformation: analytic where the family has
	// it, finite differences otherwise) and keeps the free-parameter
	// covariance, which the bootstrap-t intervals studentize by.
	Information bool
	// Drawn, when not nil, is incremented as each replicate starts, for a
	// progress display; it never changes a result.
	Drawn *atomic.Int64
	// Share, when not nil, is called once as the replicates start with a
	// function by which any other goroutine may help: help runs replicates
	// of this bootstrap until none is left to start, and reports whether
	// it found one to run (false: this bootstrap needs no more help; it
	// may already have returned). A runner whose workers have no tasks
	// left lends them so; each replicate still fills only its own slot,
	// so the result does not depend on who ran it.
	Share func(help func() bool)
}

// ErrBootstrapNotApplicable is matched by the error Bootstrap returns for
// data it cannot simulate.
var ErrBootstrapNotApplicable = errors.New("parametric bootstrap not applicable")

// Replicates holds the outcome of a parametric bootstrap: for each of the
// B simulated datasets, the refitted estimates and the goodness-of-fit
// statistics of the refitted model on that dataset.
type Replicates struct {
	Requested int
	// Estimates[r] are replicate r's refitted parameters, nil when its
	// refit failed or did not converge.
	Estimates [][]float64
	// Statistics[r] are the statistics named StatNames for replicate r
	// (nil when it failed, or when they were not asked for).
	StatNames  []string
	Statistics [][]float64
	// Covariances[r] is the inverse observed information of replicate r's
	// refit over the free parameters of the original fit (in
	// Information.Free order), when BootstrapOptions.Information asked for
	// it; nil when the refit failed or its information was singular,
	// indefinite or not finite.
	Covariances []*mat.SymDense
	// NoCovariance counts replicates that gave estimates but no covariance
	// (asked for); FirstNoCovariance is the reason of the lowest-numbered one.
	NoCovariance      int
	FirstNoCovariance string
	// firstNoCovariance and firstNoCovarianceWhy are that replicate's
	// number and bare reason, for the bootstrap-t notes.
	firstNoCovariance    int
	firstNoCovarianceWhy string
	// Censored is true for replicates of censored data (drawn as the data
	// were censored or binned: bootstrapCensored), and PValueNote says how,
	// for the notes of the p-values that rest on them ("" when the
	// statistic's own note says it).
	Censored   bool
	PValueNote string
	// Failed counts replicates whose refit failed or did not converge;
	// FirstFailure is the reason of the lowest-numbered one.
	Failed       int
	FirstFailure string
}

// Succeeded is the number of replicates that gave estimates.
func (r *Replicates) Succeeded() int { return r.Requested - r.Failed }

// statNames lists the statistics computed for a family's data.
func statNames(kind fitters.Kind) []string {
	if kind == fitters.Discrete {
		return []string{ChiSquare}
	}
	return []string{KolmogorovSmirnov, CramerVonMises, AndersonDarling}
}

// bootstrapApplicable says whether complete data d can be simulated from a
// fitted model: per-observation trials only for the binomial-type families.
// (Censored data go to bootstrapCensored, which says which it can simulate.)
func bootstrapApplicable(d *fitters.Data, dist fitters.Dist) error {
	if d.Trials != nil {
		if _, ok := withTrials(dist, 1); !ok {
			return fmt.Errorf("%w: the data give numbers of trials, which this family does not take", ErrBootstrapNotApplicable)
		}
	}
	if len(d.Exact) == 0 {
		return fmt.Errorf("%w: no observations", ErrBootstrapNotApplicable)
	}
	return nil
}

// Bootstrap runs a parametric bootstrap of fit (Efron & Tibshirani, 1993,
// §6.5): replicate r draws n values from the fitted model with the stream
// opt.Stream (replicate r), refits the family with the original fixed
// parameters, and records the refit's estimates and its goodness-of-fit
// statistics on the simulated values (and, with opt.Information, the
// inverse observed information of the refit on those values, which the
// bootstrap-t intervals need). Replicates run on opt.Workers
// goroutines; each writes only its own slot, so the result is the same for
// any number of workers. Each worker reuses its generator, its seeding
// text, its sample, sorted copy, sort scratch and cell buffers, its refit
// record (fitters.FitInto) and the home of its refitted model
// (fitters.Member): the loop itself allocates nothing per replicate
// (TestBootstrapLoopAllocatesNothing), and nor do the complete-data refits
// of the nine families of the batch workload (TestReplicateAllocatesNothing);
// other families' refits allocate their own Fit and model.
//
// Censored data are simulated as they were recorded instead
// (bootstrapCensored): data censored in one direction (suspensions alone
// or non-detects alone, besides exact values) by the conditional bootstrap
// for censored data, with the Kaplan–Meier statistics (ks, cvm); binned
// data by recording each draw in the data's bins, with Pearson's X².
// Overlapping intervals and data censored in both directions are not
// simulated (ErrBootstrapNotApplicable).
func Bootstrap(fam fitters.Family, fit *fitters.Fit, d *fitters.Data, opt BootstrapOptions) (*Replicates, error) {
	if !fit.Converged {
		return nil, fmt.Errorf("%s: the fit did not converge; there is no model to simulate from", fam.Name())
	}
	dist, err := fam.New(fit.Estimates)
	if err != nil {
		if limit := limitParameter(fit); limit != "" {
			return nil, fmt.Errorf("%w: %s, the optimum is the limiting family, which this family cannot simulate", ErrBootstrapNotApplicable, limit)
		}
		return nil, fmt.Errorf("%s: %w", fam.Name(), err)
	}
	if !d.IsComplete() {
		return bootstrapCensored(fam, fit, dist, d, opt)
	}
	if err := bootstrapApplicable(d, dist); err != nil {
		return nil, err
	}
	// Observations with their own numbers of trials are simulated from the
	// member with those trials, one member per distinct number.
	var groups *trialGroups
	var simDists []component
	if d.Trials != nil {
		groups = groupTrials(d.Trials)
		simDists, _ = groups.components(dist, nil)
	}
	slots, err := newReplicateSlots(fit, opt, statNames(fam.Kind()))
	if err != nil {
		return nil, err
	}
	n := len(d.Exact)
	// A model that draws its samples in order (weibull, exponential) needs
	// no sort per replicate.
	var sortedFill fitters.SortedRandFiller
	if groups == nil {
		sortedFill, _ = dist.(fitters.SortedRandFiller)
	}

	// work runs replicates until none is left to start; it reports whether
	// it ran one. Each call has its own generator and buffers.
	work := func() (ran bool) {
		pcg := rand.NewPCG(0, 0)
		rng := rand.New(pcg)
		seeds := slots.stream.seeder()
		sample := make([]float64, n)
		sorted := make([]float64, n)
		var sorter fitters.FloatSorter
		sim := &fitters.Data{Trials: d.Trials}
		var c cells
		comps := make([]component, 0, 8)
		var edf [3]float64
		var rec fitters.FitRecord // each refit's result, valid until the next
		member := fitters.NewMember(fam)
		for {
			r, ok := slots.take()
			if !ok {
				return ran
			}
			ran = true
			seeds.reseed(pcg, r)
			sim.Exact = sample
			switch {
			case groups != nil:
				for i := range sample {
					sample[i] = simDists[groups.index[i]].dist.Rand(rng)
				}
			case sortedFill != nil:
				// Drawn in order: the replicate is its own sorted view.
				sortedFill.RandFillSorted(rng, sorted)
				sim.Exact = sorted
			default:
				fitters.FillRand(dist, rng, sample) // Rand's values, in order
			}
			if !opt.NoStatistics && sortedFill == nil {
				sorter.SortInto(sorted, sample) // slices.Sort's result, in O(n)
			}
			refit, err := fitters.FitInto(fam, sim, slots.fitOpt, &rec)
			if slots.failed(r, refit, err) {
				continue
			}
			rd, err := member.New(refit.Estimates) // fam.New's model, in place
			if err != nil {
				// A refit at its limiting family (a betabinomial replicate
				// that is not overdispersed) is a valid refit: its statistic
				// is the limit's. Leaving it out would bias the p-value.
				if lim, ok := fitters.LimitDist(fam, refit, sim); ok && !opt.Information {
					rd = lim
				} else {
					slots.reasons[r] = err.Error()
					continue
				}
			}
			// sim.Exact is still replicate r's sample: the refit's
			// information is taken on the data it was fitted to.
			slots.keep(r, fam, refit, sim)
			if opt.NoStatistics {
				continue
			}
			srow := slots.statistics(r)
			if fam.Kind() == fitters.Discrete {
				if groups != nil {
					comps, _ = groups.components(rd, comps)
				} else {
					comps = append(comps[:0], component{rd, float64(n)})
				}
				srow[0], _ = chiSquareCounts(comps, sorted, &c)
			} else {
				edfStatistics(rd, sorted, &edf)
				copy(srow, edf[:])
			}
		}
	}
	return slots.run(work), nil
}

// runReplicates runs work on workers goroutines, and on any goroutine that
// share lends (BootstrapOptions.Share), until next has counted past the B
// replicates; work takes replicate numbers from next and fills only their
// own slots, so who ran a replicate never changes the result.
func runReplicates(B, workers int, next *atomic.Int64, share func(help func() bool), work func() bool) {
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			work()
		}()
	}
	// Helpers join under helpMu until the bootstrap closes; once its own
	// workers are done every replicate has been started, and it waits for
	// the helpers still running one.
	var helpMu sync.Mutex
	var helpers sync.WaitGroup
	closed := false
	if share != nil {
		share(func() bool {
			helpMu.Lock()
			if closed || next.Load() >= int64(B) {
				helpMu.Unlock()
				return false
			}
			helpers.Add(1)
			helpMu.Unlock()
			defer helpers.Done()
			return work()
		})
	}
	wg.Wait()
	helpMu.Lock()
	closed = true
	helpMu.Unlock()
	helpers.Wait()
}

// tally counts the failed replicates and those without a covariance from
// their reasons (empty: none), naming the lowest-numbered of each.
func (rep *Replicates) tally(reasons, noCov []string) {
	for r, why := range reasons {
		if why != "" {
			if rep.Failed == 0 {
				rep.FirstFailure = fmt.Sprintf("replicate %d: %s", r, why)
			}
			rep.Failed++
		}
	}
	for r, why := range noCov {
		if why != "" {
			if rep.NoCovariance == 0 {
				rep.FirstNoCovariance = fmt.Sprintf("replicate %d: %s", r, why)
				rep.firstNoCovariance, rep.firstNoCovarianceWhy = r, why
			}
			rep.NoCovariance++
		}
	}
}

// refitOptions returns the options of a refit: the caller's tolerance and
// iteration cap, with every parameter fixed in fit held at its value.
func refitOptions(fit *fitters.Fit, base fitters.Options) fitters.Options {
	o := fitters.Options{Tolerance: base.Tolerance, MaxIterations: base.MaxIterations}
	for i, fixed := range fit.Fixed {
		if fixed {
			if o.Fixed == nil {
				o.Fixed = fitters.Fixed{}
			}
			o.Fixed[fit.Parameters[i]] = fit.Estimates[i]
		}
	}
	for name, v := range base.Fixed {
		if o.Fixed == nil {
			o.Fixed = fitters.Fixed{}
		}
		o.Fixed[name] = v
	}
	return o
}

// replicateCovariance is the inverse observed information of a replicate's
// refit on its own data, over the original fit's free parameters, or nil
// and the reason there is none (the bootstrap-t intervals count and name
// such replicates).
func replicateCovariance(fam fitters.Family, refit *fitters.Fit, sim *fitters.Data, free []int) (*mat.SymDense, string) {
	info, err := ObservedInformation(fam, refit, sim)
	switch {
	case err != nil:
		return nil, err.Error()
	case !slices.Equal(info.Free, free):
		return nil, "the refit's free parameters are not the fit's (opt.Fit fixes more)"
	case info.Covariance == nil && len(free) > 0:
		return nil, "no covariance"
	}
	return info.Covariance, ""
}
