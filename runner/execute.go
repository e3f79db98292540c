package runner

import (
	"context"
	"fmt"
	"io"
	"runtime"
	"sync"
	"sync/atomic"

	"fitseal/fitters"
)

// RunOptions controls the execution of a plan; none of them changes a
// result.
type RunOptions struct {
	// Workers is the number of fits run at once (default runtime.NumCPU()).
	Workers int
	// Progress, when not nil, receives a progress line (tasks done / total,
	// elapsed time, estimated time left), redrawn in place; the caller
	// passes a terminal only.
	Progress io.Writer
	// RankOnly fits and ranks but skips intervals, derived quantities and
	// goodness of fit (for `fitseal fit`, which prints the ranking only).
	RankOnly bool
	// Shard, when not nil, runs only the shard's analyses (see [ShardOf]);
	// Results.Plan still names the whole plan.
	Shard *Shard
}

// taskResult is the outcome of one task.
type taskResult struct {
	fit *fitters.Fit
	err error
	// inf is what package infer adds to a converged fit; infErr says why it
	// could not (the fit itself stands).
	inf    *inference
	infErr error
}

// Run reads the project's datasets, fits every task of the plan on a pool
// of workers and assembles the results in plan order. Cancelling ctx stops
// the run; Run then returns ctx's error and no results.
func Run(ctx context.Context, p *Project, opt RunOptions) (*Results, error) {
	TracePhase("read data")
	data, err := readAll(p, opt.Workers)
	if err != nil {
		return nil, err
	}
	plan := MakePlan(p, data)
	full := plan.Names()
	if opt.Shard != nil {
		plan = plan.Only(*opt.Shard)
	}
	TracePhase("fit")
	out, err := Execute(ctx, p, plan, opt)
	if err != nil {
		return nil, err
	}
	out.Data = data
	out.Plan = full
	return out, nil
}

// ReadAll reads every dataset that an analysis uses, in project order. A
// dataset that is not split must have at least one observation. Each file
// is parsed on every core.
func ReadAll(p *Project) (map[string]*DatasetData, error) {
	return readAll(p, 0)
}

// readAll is ReadAll parsing each file on at most workers goroutines
// (0: every core).
func readAll(p *Project, workers int) (map[string]*DatasetData, error) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	used := map[string]bool{}
	for _, a := range p.Analyses {
		used[a.Dataset] = true
	}
	data := map[string]*DatasetData{}
	for _, d := range p.Datasets {
		if !used[d.Name] {
			continue
		}
		dd, err := readDataset(p, d, workers)
		if err != nil {
			return nil, err
		}
		if len(dd.Groups) == 0 || (d.SplitBy == "" && dd.Groups[0].Data.N() == 0) {
			if d.fitFlags {
				return nil, &DataError{File: d.errorName(), Msg: fmt.Sprintf("no observations (%d rows, %d missing)", dd.Rows, dd.Missing),
					Hint: "check --column (or --lower_column and --upper_column) and --missing"}
			}
			return nil, &DataError{File: d.errorName(), Msg: fmt.Sprintf("dataset %q has no observations (%d rows, %d left out by where, %d missing)", d.Name, dd.Rows, dd.Filtered, dd.Missing),
				Hint: "check column, where and missing in the project file"}
		}
		data[d.Name] = dd
	}
	return data, nil
}

// Execute runs the plan's tasks on opt.Workers workers. Each task writes
// only its own slot, and everything after the fits runs in plan order, so
// the results do not depend on the number of workers.
func Execute(ctx context.Context, p *Project, plan *Plan, opt RunOptions) (*Results, error) {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	// Bootstrap replicates run inside a task: in parallel only when there are
	// fewer tasks than workers. Neither changes a number.
	bootWorkers := 1
	if len(plan.Tasks) < workers {
		bootWorkers = workers
	}
	workers = min(workers, max(1, len(plan.Tasks)))
	results := make([]taskResult, len(plan.Tasks))
	idle := newIdleHelp(len(plan.Tasks))
	var done, drawn atomic.Int64
	var failOnce sync.Once
	var failure error
	parent := ctx
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	var prog *progress
	if opt.Progress != nil {
		prog = startProgress(opt.Progress, len(plan.Tasks), &done, &drawn)
	}
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for ctx.Err() == nil {
				i, ok := idle.take()
				if !ok {
					idle.helpUntilDone()
					return
				}
				err := runTask(p, plan, i, bootWorkers, opt.RankOnly, &drawn, idle.shareFor(i), &results[i])
				idle.done(i)
				if err != nil {
					failOnce.Do(func() { failure = err })
					cancel()
					return
				}
				done.Add(1)
			}
		}()
	}
	finished := make(chan struct{})
	go func() {
		wg.Wait()
		close(finished)
	}()
	// A fit has no context and cannot be interrupted: on cancellation, return
	// at once and leave the fits under way to end in the background (their
	// results are never read).
	select {
	case <-finished:
	case <-parent.Done():
	}
	if prog != nil {
		prog.stop()
	}
	if err := parent.Err(); err != nil {
		return nil, err
	}
	<-finished
	if failure != nil {
		return nil, failure
	}
	return assemble(p, plan, results, workers)
}

// NoObservations says why a group of a split dataset has no observations,
// for the note of each of its families: every row of the group that `where`
// kept was skipped as missing (a group exists only for a row that `where`
// kept, and a row is either an observation, missing, or an error). A dataset
// that is not split and has no observations is an error (ReadAll) instead.
func NoObservations(g *Group) string {
	if g.Rows == 1 {
		return "the group has no observations: its one row is missing"
	}
	return fmt.Sprintf("the group has no observations: its %d rows are all missing", g.Rows)
}

// runTask fits one family; a panic inside a family is turned into an error
// that names the task, so one broken family does not take the process down
// silently.
func runTask(p *Project, plan *Plan, i, bootWorkers int, rankOnly bool, drawn *atomic.Int64, share func(func() bool), out *taskResult) (err error) {
	t := plan.Tasks[i]
	a := plan.Analyses[t.Analysis]
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("internal error fitting %s to analysis %q: %v (please report this with the project)", t.Family, a.Name, r)
		}
	}()
	fam, ok := fitters.Lookup(t.Family)
	if !ok {
		return fmt.Errorf("internal error: family %q vanished from the catalogue", t.Family)
	}
	d := &a.Group.Data
	if d.N() == 0 {
		out.err = &fitters.InapplicableError{Family: t.Family, Reason: NoObservations(a.Group)}
		return nil
	}
	opt := fitters.Options{
		Tolerance:     p.Settings.Tolerance,
		MaxIterations: p.Settings.MaxIterations,
		Fixed:         fitters.Fixed(a.Candidates.Fixed[t.Family]),
	}
	out.fit, out.err = fam.Fit(d, opt)
	if !rankOnly && out.err == nil && out.fit != nil && out.fit.Converged {
		out.inf, out.infErr = inferFit(p, a, fam, out.fit, opt, bootWorkers, drawn, share)
	}
	return nil
}
