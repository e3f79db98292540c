package main

import "runtime"

// useCores holds the process to at most workers cores (runtime.GOMAXPROCS)
// while a command runs with -j workers below the cores it has, so that
// `-j 1` is one core, garbage collection included, as a batch scheduler
// that granted one core expects; 0 (the default: every core) changes
// nothing. It returns the function that restores the previous setting.
// Results never depend on it. On the batch benchmark `-j 1` so took 1.00–1.05 s
// and 0.99–1.02 s of CPU, against 1.07–1.18 s and 1.15 s with the
// collector on the second core (docs/PERFORMANCE.md).
func useCores(workers int) (restore func()) {
	if workers <= 0 || workers >= runtime.GOMAXPROCS(0) {
		return func() {}
	}
	prev := runtime.GOMAXPROCS(workers)
	return func() { runtime.GOMAXPROCS(prev) }
}
