//go:build race

package infer

// raceEnabled: the race detector is on. sync.Pool then drops some of what
// is returned to it on purpose, so counts of allocations are not the
// program's: the zero-allocation checks are skipped.
const raceEnabled = true
