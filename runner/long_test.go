package runner

import (
	"context"
	"os"
	"runtime"
	"strconv"
	"sync"
	"testing"
	"time"
)

// longSettings are the study's settings: Wald intervals and no bootstrap
// (999 refits of each of 9,000 fits is a different study).
const longSettings = "intervals = \"wald\"\nbootstrap = 0"

// largeFamilies are nine continuous families that take positive lifetimes.
const largeFamilies = `"weibull", "lognormal", "gamma", "exponential", "normal", "gumbel", "gev", "loglogistic", "invgauss"`

// TestLargeRun fits 9 families to each of 1,000 groups of a split dataset
// (n = 1,000 each, one suspension in seven) and reports the time and the
// peak heap. It runs with FITSEAL_LONG=1; FITSEAL_LONG_GROUPS overrides
// the number of groups (e.g. for a quick estimate).
//
// Measured 2026-12-02 on the shared 2-core build machine (load average
// 7–20 from other work): 9,000 fits with Wald intervals and derived
// quantities in 7 min 30 s, peak heap in use 131 MiB, 675 MiB allocated in
// all, maximum resident set 206 MiB; fitting and ranking alone took
// 14 min 23 s under a heavier load (peak heap 101 MiB).
func TestLargeRun(t *testing.T) {
	if os.Getenv("FITSEAL_LONG") != "1" {
		t.Skip("long study: set FITSEAL_LONG=1")
	}
	groups := 1000
	if s := os.Getenv("FITSEAL_LONG_GROUPS"); s != "" {
		groups, _ = strconv.Atoi(s)
	}
	path := splitProject(t, groups, 1000, largeFamilies, longSettings, true)
	runtime.GC()
	var peak uint64
	stop := make(chan struct{})
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		var ms runtime.MemStats
		for {
			runtime.ReadMemStats(&ms)
			peak = max(peak, ms.HeapInuse)
			select {
			case <-stop:
				return
			case <-time.After(200 * time.Millisecond):
			}
		}
	}()
	start := time.Now()
	p, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), p, RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	fitted := time.Since(start)
	files, err := res.Files()
	if err != nil {
		t.Fatal(err)
	}
	total := time.Since(start)
	close(stop)
	wg.Wait()
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	ranked, failed := 0, 0
	for _, a := range res.Analyses {
		for _, r := range a.Comparison.Rows {
			if r.Rank > 0 {
				ranked++
			} else {
				failed++
			}
		}
	}
	if peak > 1<<30 {
		t.Errorf("peak heap in use %d MiB, want under 1 GiB", peak>>20)
	}
	if len(res.Analyses) != groups || ranked+failed != 9*groups {
		t.Fatalf("%d analyses and %d rows, want %d and %d", len(res.Analyses), ranked+failed, groups, 9*groups)
	}
	t.Logf("%d groups × 9 families, n = 1000: fits %v, with tables %v on %d cores; %d ranked, %d not ranked; peak heap in use %.0f MiB, total allocated %.0f MiB; fits.csv %d bytes",
		groups, fitted.Round(time.Millisecond), total.Round(time.Millisecond), runtime.NumCPU(), ranked, failed,
		float64(peak)/(1<<20), float64(ms.TotalAlloc)/(1<<20), len(files[FitsFile]))
}
