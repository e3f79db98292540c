package infer

import (
	"fmt"
	"runtime"
	"sync/atomic"

	"fitseal/fitters"

	"gonum.org/v1/gonum/mat"
)

// replicateSlots is what both replicate loops (complete data: Bootstrap;
// censored or binned data: bootstrapCensored) share: the settings of the
// refits, one slot per replicate for its estimates, covariance and
// statistics in flat arrays, the failure reasons, and the counter that
// hands out replicate numbers. Each replicate writes only its own slots,
// so the result does not depend on which worker ran it.
type replicateSlots struct {
	opt     BootstrapOptions
	B       int
	stream  Stream
	fitOpt  fitters.Options
	workers int
	k       int // parameters per replicate
	names   []string
	est     []float64
	stats   []float64
	free    []int
	rep     *Replicates
	reasons []string
	noCov   []string
	next    atomic.Int64
}

// newReplicateSlots sets up B = opt.Replicates slots for replicates of fit
// whose statistics are names.
func newReplicateSlots(fit *fitters.Fit, opt BootstrapOptions, names []string) (*replicateSlots, error) {
	B := opt.Replicates
	if B <= 0 {
		return nil, fmt.Errorf("bootstrap needs at least one replicate, got %d", B)
	}
	s := &replicateSlots{opt: opt, B: B, stream: opt.Stream, fitOpt: refitOptions(fit, opt.Fit),
		workers: opt.Workers, k: len(fit.Estimates), names: names, free: freeIndices(fit)}
	if s.stream.Purpose == "" {
		s.stream.Purpose = "bootstrap"
	}
	if s.workers <= 0 {
		s.workers = runtime.GOMAXPROCS(0)
	}
	s.workers = min(s.workers, B)
	s.est = make([]float64, B*s.k)
	s.stats = make([]float64, B*len(names))
	s.rep = &Replicates{Requested: B, StatNames: names, Estimates: make([][]float64, B), Statistics: make([][]float64, B)}
	s.reasons = make([]string, B)
	if opt.Information {
		s.rep.Covariances = make([]*mat.SymDense, B)
		s.noCov = make([]string, B)
	}
	return s, nil
}

// take returns the next replicate to run and counts it as drawn for the
// progress display, or false when every replicate has been started.
func (s *replicateSlots) take() (int, bool) {
	r := int(s.next.Add(1) - 1)
	if r >= s.B {
		return 0, false
	}
	if s.opt.Drawn != nil {
		s.opt.Drawn.Add(1)
	}
	return r, true
}

// failed records why replicate r has no refit when err is set or the
// refit did not converge, and reports whether it did.
func (s *replicateSlots) failed(r int, refit *fitters.Fit, err error) bool {
	switch {
	case err != nil:
		s.reasons[r] = err.Error()
	case !refit.Converged:
		s.reasons[r] = "refit did not converge: " + refit.Reason
	default:
		return false
	}
	return true
}

// keep stores replicate r's refit estimates and, when the options ask for
// it, the inverse observed information of the refit on sim, the data it
// was fitted to.
func (s *replicateSlots) keep(r int, fam fitters.Family, refit *fitters.Fit, sim *fitters.Data) {
	row := s.est[r*s.k : (r+1)*s.k]
	copy(row, refit.Estimates)
	s.rep.Estimates[r] = row
	if s.opt.Information {
		s.rep.Covariances[r], s.noCov[r] = replicateCovariance(fam, refit, sim, s.free)
	}
}

// statistics returns replicate r's slot for its statistics, marking them
// given.
func (s *replicateSlots) statistics(r int) []float64 {
	row := s.stats[r*len(s.names) : (r+1)*len(s.names)]
	s.rep.Statistics[r] = row
	return row
}

// run runs work on the workers (and on lent goroutines, runReplicates) and
// tallies the failures.
func (s *replicateSlots) run(work func() bool) *Replicates {
	runReplicates(s.B, s.workers, &s.next, s.opt.Share, work)
	s.rep.tally(s.reasons, s.noCov)
	return s.rep
}
