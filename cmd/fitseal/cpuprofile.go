package main

import (
	"fmt"
	"io"
	"os"
	"runtime/pprof"
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
