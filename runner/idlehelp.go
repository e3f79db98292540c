package runner

import "sync"

// idleHelp lends the workers that have run out of tasks to the
// bootstraps still running (infer.BootstrapOptions.Share). Without it, a
// project with as many bootstraps as workers or more runs each bootstrap's
// replicates on its task's worker alone, and the last bootstraps leave the
// other cores idle: on 2 workers, 8 goodness-of-fit bootstraps of 999
// replicates ended with one core idle for about half a bootstrap.
type idleHelp struct {
	mu      sync.Mutex
	wake    sync.Cond // a help offer arrived or a task finished
	offers  []*helpOffer
	next    int // the next task to start
	tasks   int // tasks in the plan
	running int // tasks started and not finished
}

// helpOffer is one bootstrap's help function and the task it runs in.
type helpOffer struct {
	help func() bool
	task int
}

func newIdleHelp(tasks int) *idleHelp {
	h := &idleHelp{tasks: tasks}
	h.wake.L = &h.mu
	return h
}

// take claims the next task and counts it running; false when none is
// left.
func (h *idleHelp) take() (int, bool) {
	h.mu.Lock()
	defer h.mu.Unlock()
	if h.next >= h.tasks {
		return 0, false
	}
	i := h.next
	h.next++
	h.running++
	return i, true
}

// done marks task i finished and drops the offers of its bootstraps that
// no worker took: they are spent, and each holds its bootstrap's
// replicates, which would otherwise stay in memory to the end of the run.
func (h *idleHelp) done(i int) {
	h.mu.Lock()
	h.running--
	kept := h.offers[:0]
	for _, o := range h.offers {
		if o.task != i {
			kept = append(kept, o)
		}
	}
	clear(h.offers[len(kept):])
	h.offers = kept
	h.mu.Unlock()
	h.wake.Broadcast()
}

// shareFor is the Share option of the bootstraps of task i: it offers
// their help.
func (h *idleHelp) shareFor(i int) func(help func() bool) {
	return func(help func() bool) {
		h.mu.Lock()
		h.offers = append(h.offers, &helpOffer{help: help, task: i})
		h.mu.Unlock()
		h.wake.Broadcast()
	}
}

// helpUntilDone runs offered help, the newest offer first (the bootstrap
// with the most replicates left to start), until no task is running. An
// offer is spent once its help returns: help returns only when its
// bootstrap has no replicate left to start.
func (h *idleHelp) helpUntilDone() {
	h.mu.Lock()
	defer h.mu.Unlock()
	for {
		if k := len(h.offers); k > 0 {
			o := h.offers[k-1]
			h.offers = h.offers[:k-1]
			h.mu.Unlock()
			o.help()
			h.mu.Lock()
			continue
		}
		if h.running == 0 {
			return
		}
		h.wake.Wait()
	}
}
