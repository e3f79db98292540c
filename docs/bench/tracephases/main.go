// Command tracephases reads an execution trace of `fitseal run`
// (FITSEAL_TRACE=trace.out) and prints, for each phase that run marks
// (runner.TracePhase), its wall time and the CPU time of all goroutines in
// it, whose ratio is the cores the phase kept busy; with -kinds, also that
// CPU time by goroutine (named by the function it was started with); with
// -lone N, also the time during which fewer than N goroutines ran (N = 2 on
// two cores: a core idle), by the goroutine that ran alone, or "idle" —
// what keeps a phase from using every core.
//
// It is a separate module so that fitseal itself does not depend on
// golang.org/x/exp/trace. Run from this folder:
//
//	go run . [-kinds] trace.out
package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"sort"

	"golang.org/x/exp/trace"
)

// loneBelow is the -lone flag.
var loneBelow int

type phase struct {
	name        string
	start, end  trace.Time
	busy        int64            // goroutine-nanoseconds running
	byGoroutine map[string]int64 // busy time by the goroutine's start function
	lone        map[string]int64 // time with fewer than -lone goroutines running, by the one running ("idle": none)
}

func main() {
	kinds := flag.Bool("kinds", false, "also print each phase's CPU time by goroutine")
	flag.IntVar(&loneBelow, "lone", 0, "also print each phase's time with fewer than `N` goroutines running, by the one running (0: not)")
	flag.Parse()
	if flag.NArg() != 1 {
		fmt.Fprintln(os.Stderr, "usage: tracephases [-kinds] [-lone N] trace.out")
		os.Exit(2)
	}
	f, err := os.Open(flag.Arg(0))
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	defer f.Close()
	phases, err := read(f)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	var wall, busy float64
	fmt.Printf("%-32s %9s %9s %6s\n", "phase", "wall ms", "cpu ms", "cores")
	for _, p := range phases {
		w := float64(p.end-p.start) / 1e6
		b := float64(p.busy) / 1e6
		wall, busy = wall+w, busy+b
		cores := 0.0
		if w > 0 {
			cores = b / w
		}
		fmt.Printf("%-32s %9.1f %9.1f %6.2f\n", p.name, w, b, cores)
		if *kinds {
			names := make([]string, 0, len(p.byGoroutine))
			for k := range p.byGoroutine {
				names = append(names, k)
			}
			sort.Slice(names, func(i, j int) bool { return p.byGoroutine[names[i]] > p.byGoroutine[names[j]] })
			for _, k := range names {
				if p.byGoroutine[k] < 50e3 {
					break // under 0.05 ms
				}
				fmt.Printf("    %9.1f ms  %s\n", float64(p.byGoroutine[k])/1e6, k)
			}
		}
		if loneBelow > 0 {
			var all int64
			names := make([]string, 0, len(p.lone))
			for k, v := range p.lone {
				names = append(names, k)
				all += v
			}
			sort.Slice(names, func(i, j int) bool { return p.lone[names[i]] > p.lone[names[j]] })
			fmt.Printf("    %9.1f ms with fewer than %d running\n", float64(all)/1e6, loneBelow)
			for _, k := range names {
				if p.lone[k] < 50e3 {
					break
				}
				fmt.Printf("      %9.1f ms  %s\n", float64(p.lone[k])/1e6, k)
			}
		}
	}
	fmt.Printf("%-32s %9.1f %9.1f %6.2f\n", "whole trace", wall, busy, busy/wall)
}

// read splits the trace at the "phase" log events: time before the first
// one is the phase "start".
func read(r io.Reader) ([]*phase, error) {
	tr, err := trace.NewReader(r)
	if err != nil {
		return nil, err
	}
	var phases []*phase
	cur := &phase{name: "start", byGoroutine: map[string]int64{}, lone: map[string]int64{}}
	running := map[trace.GoID]bool{}
	startFn := map[trace.GoID]string{}
	var last trace.Time
	first := true
	// account charges the time since the last event to the running goroutines.
	account := func(t trace.Time) {
		if t > last {
			for g := range running {
				cur.busy += int64(t - last)
				cur.byGoroutine[startFn[g]] += int64(t - last)
			}
			if len(running) < loneBelow {
				who := "idle"
				for g := range running {
					who = startFn[g] // one of them when loneBelow > 2
				}
				cur.lone[who] += int64(t - last)
			}
		}
		last = t
	}
	for {
		ev, err := tr.ReadEvent()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if first {
			cur.start, last, first = ev.Time(), ev.Time(), false
		}
		account(ev.Time())
		cur.end = ev.Time()
		switch ev.Kind() {
		case trace.EventLog:
			if l := ev.Log(); l.Category == "phase" {
				phases = append(phases, cur)
				cur = &phase{name: l.Message, start: ev.Time(), end: ev.Time(), byGoroutine: map[string]int64{}, lone: map[string]int64{}}
			}
		case trace.EventStateTransition:
			st := ev.StateTransition()
			if st.Resource.Kind != trace.ResourceGoroutine {
				continue
			}
			g := st.Resource.Goroutine()
			from, to := st.Goroutine()
			if _, ok := startFn[g]; !ok {
				startFn[g] = "(running before the trace began: main)"
				for fr := range st.Stack.Frames() {
					startFn[g] = fr.Func // the outermost frame is the last
				}
			}
			switch {
			case to == trace.GoRunning:
				running[g] = true
			case from == trace.GoRunning:
				delete(running, g)
			}
		}
	}
	return append(phases, cur), nil
}
