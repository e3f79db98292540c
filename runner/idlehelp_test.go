package runner

import (
	"runtime"
	"sync"
	"sync/atomic"
	"testing"
)

// TestIdleHelpRunsOffersUntilTasksEnd: a worker with no task left runs the
// offered help, newest first, waits while a task is still running, and
// returns once none is; a finished task's untaken offers are dropped.
func TestIdleHelpRunsOffersUntilTasksEnd(t *testing.T) {
	h := newIdleHelp(3)
	var order []int
	var mu sync.Mutex
	offer := func(k int) func() bool {
		return func() bool {
			mu.Lock()
			order = append(order, k)
			mu.Unlock()
			return true
		}
	}
	i0, _ := h.take()
	i1, _ := h.take()
	i2, _ := h.take()
	if _, ok := h.take(); ok {
		t.Fatal("a fourth task from a plan of three")
	}
	h.shareFor(i0)(offer(0))
	h.shareFor(i1)(offer(1))
	h.shareFor(i2)(offer(2))
	h.done(i2) // task 2 ends before anyone helped it: its offer goes
	var returned atomic.Bool
	finished := make(chan struct{})
	go func() {
		h.helpUntilDone()
		returned.Store(true)
		close(finished)
	}()
	// The helper takes offers 1 then 0 and then waits for the running tasks.
	for {
		mu.Lock()
		n := len(order)
		mu.Unlock()
		if n == 2 {
			break
		}
		runtime.Gosched()
	}
	if returned.Load() {
		t.Fatal("helpUntilDone returned while tasks 0 and 1 still run")
	}
	h.shareFor(i0)(offer(3))
	h.done(i1)
	h.done(i0) // drops offer 3 if the helper has not taken it yet
	<-finished
	mu.Lock()
	defer mu.Unlock()
	if len(order) < 2 || order[0] != 1 || order[1] != 0 {
		t.Errorf("help ran in order %v, want the newest offer (1) first, then 0", order)
	}
	for _, k := range order {
		if k == 2 {
			t.Errorf("the offer of task 2 ran after the task had ended: %v", order)
		}
	}
	if len(h.offers) != 0 || h.running != 0 {
		t.Errorf("after every task: %d offers, %d running", len(h.offers), h.running)
	}
}
