package main

import (
	"fmt"
	"io"
	"os"
	"runtime/pprof"
	"runtime/trace"
)

// startCPUProfile writes a CPU profile of the whole process to the file
// named by $FITSEAL_CPUPROFILE, when it is set (a developer's aid for
// docs/PERFORMANCE.md; read it with `go tool pprof`). The returned stop
// function ends the profile; it is a no-op when profiling is off.
func startCPUProfile(getenv func(string) string, stderr io.Writer) (stop func()) {
	path := getenv("FITSEAL_CPUPROFILE")
	if path == "" {
		return func() {}
	}
	f, err := os.Create(path)
	if err != nil {
		fmt.Fprintf(stderr, "fitseal: warning: FITSEAL_CPUPROFILE: %v; not profiling\n", err)
		return func() {}
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		f.Close()
		fmt.Fprintf(stderr, "fitseal: warning: FITSEAL_CPUPROFILE: %v; not profiling\n", err)
		return func() {}
	}
	return func() {
		pprof.StopCPUProfile()
		if err := f.Close(); err != nil {
			fmt.Fprintf(stderr, "fitseal: warning: FITSEAL_CPUPROFILE: %v\n", err)
		}
	}
}

// startTrace writes an execution trace of the whole process to the file
// named by $FITSEAL_TRACE, when it is set (a developer's aid: it shows when
// a core sits idle, which a CPU profile cannot; read it with `go tool trace`).
// The returned stop function ends the trace; it is a no-op when tracing is off.
func startTrace(getenv func(string) string, stderr io.Writer) (stop func()) {
	path := getenv("FITSEAL_TRACE")
	if path == "" {
		return func() {}
	}
	f, err := os.Create(path)
	if err != nil {
		fmt.Fprintf(stderr, "fitseal: warning: FITSEAL_TRACE: %v; not tracing\n", err)
		return func() {}
	}
	if err := trace.Start(f); err != nil {
		f.Close()
		fmt.Fprintf(stderr, "fitseal: warning: FITSEAL_TRACE: %v; not tracing\n", err)
		return func() {}
	}
	return func() {
		trace.Stop()
		if err := f.Close(); err != nil {
			fmt.Fprintf(stderr, "fitseal: warning: FITSEAL_TRACE: %v\n", err)
		}
	}
}
