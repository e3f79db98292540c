package infer_test

import (
	"fmt"

	"fitseal/fitters"
	"fitseal/fitters/infer"
)

// The 95% profile-likelihood interval of an exponential rate, and the
// 100-year return level with its delta-method interval, for Lieblein &
// Zelen's ball-bearing endurance times.
func ExampleIntervals() {
	x := []float64{17.88, 28.92, 33.00, 41.52, 42.12, 45.60, 48.48, 51.84, 51.96,
		54.12, 55.56, 67.80, 68.64, 68.64, 68.88, 84.12, 93.12, 98.64, 105.12, 105.84, 127.92, 128.04, 173.40}
	fam, _ := fitters.Lookup("exponential")
	d := fitters.Complete(x)
	fit, _ := fam.Fit(d, fitters.Options{})
	rows, _ := infer.Intervals(fam, fit, d, infer.MethodProfile, infer.Settings{Level: 0.95})
	for _, r := range rows {
		fmt.Printf("%s %.5f [%.5f, %.5f] %s\n", r.Parameter, r.Estimate, r.Lower, r.Upper, r.Method)
	}
	rl, _ := infer.Derived(fam, fit, d, infer.ReturnLevel, 100, infer.MethodWald, infer.Settings{Level: 0.95})
	fmt.Printf("return level %.1f [%.1f, %.1f] %s\n", rl.Estimate, rl.Lower, rl.Upper, rl.Method)
	// Output:
	// rate 0.01385 [0.00893, 0.02030] profile likelihood
	// return level 332.6 [221.0, 500.5] delta method (log scale)
}

// Goodness of fit of a gamma to the same data: the statistics with their
// parametric-bootstrap p-values (each replicate refitted), reproducible
// from the master seed and the task's identity.
func ExampleCheckFit() {
	x := []float64{17.88, 28.92, 33.00, 41.52, 42.12, 45.60, 48.48, 51.84, 51.96,
		54.12, 55.56, 67.80, 68.64, 68.64, 68.88, 84.12, 93.12, 98.64, 105.12, 105.84, 127.92, 128.04, 173.40}
	fam, _ := fitters.Lookup("gamma")
	d := fitters.Complete(x)
	fit, _ := fam.Fit(d, fitters.Options{})
	g, _ := infer.CheckFit(fam, fit, d, infer.BootstrapOptions{Replicates: 999,
		Stream: infer.Stream{Master: 20261202, Analysis: "bearings", Family: "gamma"}})
	for _, s := range g.Statistics {
		fmt.Printf("%s %.4f p = %.3f (B = %d)\n", s.Name, s.Value, s.PValue, s.Replicates)
	}
	// Output:
	// ks 0.1230 p = 0.463 (B = 999)
	// cvm 0.0391 p = 0.689 (B = 999)
	// ad 0.2154 p = 0.861 (B = 999)
}
