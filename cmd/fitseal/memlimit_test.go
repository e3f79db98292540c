package main

import (
	"os"
	"path/filepath"
	"runtime/debug"
	"strings"
	"testing"

	"fitseal/runner"
)

func TestCountLines(t *testing.T) {
	for _, c := range []struct {
		in   string
		want int64
	}{{"", 0}, {"x\n", 1}, {"x\n1\n2", 2}, {strings.Repeat("1.5\n", 100000), 100000}} {
		if got, err := countLines(strings.NewReader(c.in)); err != nil || got != c.want {
			t.Errorf("countLines(%d bytes) = %d, %v; want %d", len(c.in), got, err, c.want)
		}
	}
}

// limitMemory sets held + 24 bytes per row for large data only, and leaves
// a limit the user set with GOMEMLIMIT alone.
func TestLimitMemory(t *testing.T) {
	old := debug.SetMemoryLimit(-1)
	t.Cleanup(func() { debug.SetMemoryLimit(old) })
	t.Setenv("GOMEMLIMIT", "")
	for _, c := range []struct {
		rows, held, want int64
	}{
		{largeDataRows - 1, 0, old},
		{10_000_000, 0, 240_000_000},
		{10_000_000, 5_000_000, 245_000_000},
	} {
		debug.SetMemoryLimit(old)
		limitMemory(c.rows, c.held)
		if got := debug.SetMemoryLimit(-1); got != c.want {
			t.Errorf("limitMemory(%d, %d): limit %d, want %d", c.rows, c.held, got, c.want)
		}
	}
	debug.SetMemoryLimit(old)
	t.Setenv("GOMEMLIMIT", "1GiB")
	limitMemory(10_000_000, 0)
	if got := debug.SetMemoryLimit(-1); got != old {
		t.Errorf("with GOMEMLIMIT set: limit %d, want it untouched (%d)", got, old)
	}
}

// run's limit is set by one large dataset read whole, sized from every
// data file's lines, and never by a file split into groups (thousands of
// small datasets, where a limit slowed the collector to a crawl).
func TestLimitMemoryForProject(t *testing.T) {
	dir := t.TempDir()
	big := strings.Repeat("1.5\n", largeDataRows)
	if err := os.WriteFile(filepath.Join(dir, "big.csv"), []byte("x\n"+big), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "small.csv"), []byte("x\n1\n2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	old := debug.SetMemoryLimit(-1)
	t.Cleanup(func() { debug.SetMemoryLimit(old) })
	t.Setenv("GOMEMLIMIT", "")
	for _, c := range []struct {
		name     string
		datasets []*runner.Dataset
		want     int64
	}{
		{"one large dataset", []*runner.Dataset{{File: "big.csv"}, {File: "small.csv"}},
			heapPerRow * (largeDataRows + 1 + 3)},
		{"the same file split into groups", []*runner.Dataset{{File: "big.csv", SplitBy: "g"}}, old},
		// one file behind a split dataset and then a whole one: large, and
		// its lines counted once
		{"split, then read whole", []*runner.Dataset{{File: "big.csv", SplitBy: "g"}, {File: "big.csv"}},
			heapPerRow * (largeDataRows + 1)},
		{"small data", []*runner.Dataset{{File: "small.csv"}}, old},
		{"a file that cannot be read", []*runner.Dataset{{File: "big.csv"}, {File: "missing.csv"}}, old},
	} {
		debug.SetMemoryLimit(old)
		limitMemoryForProject(&runner.Project{Dir: dir, Datasets: c.datasets})
		if got := debug.SetMemoryLimit(-1); got != c.want {
			t.Errorf("%s: limit %d, want %d", c.name, got, c.want)
		}
	}
}
