package fitters_test

import (
	"fmt"

	"fitseal/fitters"
)

// The product-limit estimate of the 6-MP arm of the remission data of
// Freireich et al. (1963): weeks to relapse, with suspensions for patients
// still in remission.
func ExampleKaplanMeier() {
	relapse := []float64{6, 6, 6, 7, 10, 13, 16, 22, 23}
	suspended := []float64{6, 9, 10, 11, 17, 19, 20, 25, 32, 32, 34, 35}
	km, _ := fitters.KaplanMeier(relapse, suspended)
	for i, t := range km.Times {
		fmt.Printf("t=%2v at risk %2d relapses %d  S=%.3f\n", t, km.AtRisk[i], km.Events[i], 1-km.CDF[i])
	}
	// Output:
	// t= 6 at risk 21 relapses 3  S=0.857
	// t= 7 at risk 17 relapses 1  S=0.807
	// t=10 at risk 15 relapses 1  S=0.753
	// t=13 at risk 12 relapses 1  S=0.690
	// t=16 at risk 11 relapses 1  S=0.627
	// t=22 at risk  7 relapses 1  S=0.538
	// t=23 at risk  6 relapses 1  S=0.448
}

// Counts that are not overdispersed give the negative binomial's Poisson
// limit, reported as a converged fit with a note.
func ExampleLookup_negbinomialLimit() {
	nb, _ := fitters.Lookup("negbinomial")
	fit, _ := nb.Fit(fitters.Complete([]float64{2, 3, 3, 4, 2, 3, 4, 3, 2, 3}), fitters.Options{})
	fmt.Println(fit.Estimates, fit.Converged)
	fmt.Println(fit.Note)
	// Output:
	// [+Inf 2.9] true
	// size → ∞: the data are not overdispersed (variance 0.49 ≤ mean 2.9); the estimate is the Poisson limit with rate = mean, and its log-likelihood is reported
}
