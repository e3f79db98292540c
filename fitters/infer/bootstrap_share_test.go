package infer

import (
	"bytes"
	"sync"
	"sync/atomic"
	"testing"

	"fitseal/fitters"
)

// TestBootstrapHelpersChangeNothing: goroutines that join a bootstrap
// through BootstrapOptions.Share give the replicates of the bootstrap run
// alone, bit for bit; they do run replicates; and the help function, once
// the bootstrap has returned, does nothing and says so.
func TestBootstrapHelpersChangeNothing(t *testing.T) {
	for _, name := range []string{"gamma", "weibull", "poisson"} {
		fam := family(t, name)
		d := fitters.Complete(ballBearings)
		if name == "poisson" {
			d = fitters.Complete([]float64{0, 1, 1, 2, 0, 3, 1, 0, 2, 1, 4, 0, 1, 2, 1})
		}
		fit := fitOf(t, fam, d)
		stream := Stream{Master: 3, Analysis: "a", Family: name}
		alone, err := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 400, Workers: 1, Stream: stream, Information: true})
		if err != nil {
			t.Fatal(err)
		}
		var late func() bool
		var helped atomic.Int64
		var wg sync.WaitGroup
		share := func(help func() bool) {
			late = help
			for range 3 {
				wg.Add(1)
				go func() {
					defer wg.Done()
					for help() {
						helped.Add(1)
					}
				}()
			}
		}
		joined, err := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 400, Workers: 1, Stream: stream, Information: true, Share: share})
		if err != nil {
			t.Fatal(err)
		}
		wg.Wait()
		if !bytes.Equal(replicateBytes(joined), replicateBytes(alone)) {
			t.Errorf("%s: replicates with helpers differ from those run alone", name)
		}
		if helped.Load() == 0 {
			t.Logf("%s: the helpers found no replicate to run (the bootstrap's own worker was quicker)", name)
		}
		if late == nil || late() {
			t.Errorf("%s: help after the bootstrap returned ran replicates (or Share was never called)", name)
		}
	}
}
