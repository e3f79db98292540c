package infer

import (
	"math"
	"strings"
	"testing"

	"fitseal/fitters"
)

// TestProfileEndsAtGenuineJump: datasets 100 and 224 of the coverage
// study's gev samples at n = 15 (docs/COVERAGE.md; truth location 10,
// scale 2, shape 0.1) have a 0.99-quantile profile that falls from above
// the cut-off to below it at a jump, however the other parameters are
// started: the upper bound is the jump, with a note saying so, not left
// empty (as it was), and the interval holds the estimate. (Rounding moves
// where the profile is evaluated: on arm64 dataset 100's walk meets a
// plain crossing instead; each must get a finite bound, and at least one
// end at a jump.)
func TestProfileEndsAtGenuineJump(t *testing.T) {
	fam := family(t, "gev")
	truth, err := fam.New([]float64{10, 2, 0.1})
	if err != nil {
		t.Fatal(err)
	}
	jumps := 0
	for _, i := range []int{100, 224} {
		stream := Stream{Master: 2026, Analysis: "coverage/15", Family: "gev", Purpose: "dataset"}
		r := stream.Rand(i)
		x := make([]float64, 15)
		for j := range x {
			x[j] = truth.Rand(r)
		}
		d := fitters.Complete(x)
		fit, err := fam.Fit(d, fitters.Options{})
		if err != nil || !fit.Converged {
			t.Fatalf("dataset %d: %v %v", i, err, fit)
		}
		dv, err := Derived(fam, fit, d, Quantile, 0.99, MethodProfile, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		if !(dv.Lower < dv.Estimate && dv.Estimate < dv.Upper) || math.IsInf(dv.Upper, 0) {
			t.Errorf("dataset %d: interval [%v, %v] around %v", i, dv.Lower, dv.Upper, dv.Estimate)
		}
		if strings.Contains(dv.Note, "at a jump of the profile log-likelihood") {
			jumps++
		}
	}
	if jumps == 0 {
		t.Error("no interval ended at a jump")
	}
}
