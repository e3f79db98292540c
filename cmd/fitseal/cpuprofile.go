package main

import (
	"fmt"
	"io"
	"os"
	"runtime/pprof"
	"runtime/trace"

	"fitseal/bundle"
)

// startCPUProfile writes a CPU profile of the whole process to the file
// named by $FITSEAL_CPUPROFILE, when it is set (a developer's aid for
// docs/PERFORMANCE.md; read it with `go tool pprof`). The returned stop
// function ends the profile; it is a no-op when profiling is off.
func startCPUProfile(getenv func(string) string, stderr io.Writer) (stop func()) {
	return startRecording(getenv, stderr, "FITSEAL_CPUPROFILE", "profiling", pprof.StartCPUProfile, pprof.StopCPUProfile)
}

// startTrace writes an execution trace of the whole process to the file
// named by $FITSEAL_TRACE, when it is set (a developer's aid: it shows when
// a core sits idle, which a CPU profile cannot; read it with `go tool trace`).
// The returned stop function ends the trace; it is a no-op when tracing is off.
func startTrace(getenv func(string) string, stderr io.Writer) (stop func()) {
	return startRecording(getenv, stderr, "FITSEAL_TRACE", "tracing", trace.Start, trace.Stop)
}

// startRecording starts a recording of the process (start, ended by end)
// into the file named by the environment variable env, when it is set; a
// file that cannot be made or a recording that cannot start is a warning,
// never an error of the command ("not " + doing).
func startRecording(getenv func(string) string, stderr io.Writer, env, doing string, start func(io.Writer) error, end func()) (stop func()) {
	path := getenv(env)
	if path == "" {
		return func() {}
	}
	f, err := os.Create(path)
	if err != nil {
		fmt.Fprintf(stderr, "fitseal: warning: %s: %v; not %s\n", env, bundle.PlainPathError(err), doing)
		return func() {}
	}
	if err := start(f); err != nil {
		f.Close()
		fmt.Fprintf(stderr, "fitseal: warning: %s: %v; not %s\n", env, err, doing)
		return func() {}
	}
	return func() {
		end()
		if err := f.Close(); err != nil {
			fmt.Fprintf(stderr, "fitseal: warning: %s: %v\n", env, err)
		}
	}
}
