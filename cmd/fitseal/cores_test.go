package main

import (
	"runtime"
	"testing"
)

// TestUseCores: -j below the cores sets GOMAXPROCS to it and restores the
// previous value; -j 0 (every core) and -j at or above the cores leave it.
func TestUseCores(t *testing.T) {
	prev := runtime.GOMAXPROCS(0)
	if prev < 2 {
		t.Skip("one core: nothing to limit")
	}
	restore := useCores(1)
	if got := runtime.GOMAXPROCS(0); got != 1 {
		t.Errorf("useCores(1): GOMAXPROCS %d, want 1", got)
	}
	restore()
	if got := runtime.GOMAXPROCS(0); got != prev {
		t.Errorf("after restore: GOMAXPROCS %d, want %d", got, prev)
	}
	for _, w := range []int{0, prev, prev + 3} {
		useCores(w)()
		if got := runtime.GOMAXPROCS(0); got != prev {
			t.Errorf("useCores(%d): GOMAXPROCS %d, want %d unchanged", w, got, prev)
		}
	}
}
