package fitters

import (
	"math/rand/v2"
	"reflect"
	"testing"
)

// fitIntoCases are the continuous families whose complete-data fits
// FitInto covers, each with a member to draw samples from.
var fitIntoCases = []struct {
	name string
	dist Dist
}{
	{"normal", Normal{3, 2}},
	{"lognormal", LogNormal{1, 0.6}},
	{"exponential", Exponential{0.2}},
	{"gamma", Gamma{2.5, 0.4}},
	{"weibull", Weibull{1.8, 120}},
	{"gumbel", Gumbel{10, 3}},
	{"logistic", Logistic{-4, 1.5}},
	{"loglogistic", LogLogistic{20, 3}},
	{"invgauss", InvGauss{5, 12}},
}

// TestFitIntoAllocatesNothing checks that a complete-data refit into a
// reused FitRecord makes no allocation (scratch pool warm) for every
// covered family, where fam.Fit makes at least one, and that it gives the
// same record as fam.Fit, field by field.
func TestFitIntoAllocatesNothing(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 1))
	for _, c := range fitIntoCases {
		fam, ok := Lookup(c.name)
		if !ok {
			t.Fatalf("%s not registered", c.name)
		}
		x := make([]float64, 500)
		FillRand(c.dist, r, x)
		d := Complete(x)
		var rec FitRecord
		for _, opt := range []Options{{}, {Tolerance: 1e-8, MaxIterations: 50}} {
			want, err := fam.Fit(d, opt)
			if err != nil {
				t.Fatal(err)
			}
			got, err := FitInto(fam, d, opt, &rec)
			if err != nil {
				t.Fatal(err)
			}
			if got != &rec.box.fit {
				t.Errorf("%s: FitInto did not fill the record", c.name)
			}
			if !reflect.DeepEqual(got, want) {
				t.Errorf("%s: FitInto gives %+v, fam.Fit %+v", c.name, *got, *want)
			}
			allocs := testing.AllocsPerRun(20, func() {
				if _, err := FitInto(fam, d, opt, &rec); err != nil {
					t.Fatal(err)
				}
			})
			if allocs != 0 && !raceEnabled {
				t.Errorf("%s: FitInto makes %v allocations per fit, want 0", c.name, allocs)
			}
		}
	}
}

// TestFitIntoRecordReset checks that a record reused across families and
// datasets carries nothing over: fixed flags, K, N, the reason of a failed
// fit.
func TestFitIntoRecordReset(t *testing.T) {
	var rec FitRecord
	r := rand.New(rand.NewPCG(2, 9))
	x := make([]float64, 50)
	FillRand(Gamma{2, 1}, r, x)
	d := Complete(x)
	prev := ""
	for _, c := range fitIntoCases {
		fam, _ := Lookup(c.name)
		want, err := fam.Fit(d, Options{})
		if err != nil {
			t.Fatal(err)
		}
		got, err := FitInto(fam, d, Options{}, &rec)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("%s after %s: FitInto gives %+v, fam.Fit %+v", c.name, prev, *got, *want)
		}
		prev = c.name
	}
	// Censored data and fixed parameters take the allocating route and
	// leave the record alone.
	before := rec.box.fit
	cd := &Data{Exact: x[:40], Right: x[40:]}
	fam, _ := Lookup("weibull")
	got, err := FitInto(fam, cd, Options{}, &rec)
	if err != nil {
		t.Fatal(err)
	}
	if got == &rec.box.fit || !reflect.DeepEqual(rec.box.fit, before) {
		t.Errorf("censored data: FitInto used the record")
	}
}

// TestParameterNamesShared checks that fits of a registered family share
// its one names slice, equal to Parameters().
func TestParameterNamesShared(t *testing.T) {
	x := []float64{1, 2, 3, 4, 7}
	for _, name := range []string{"normal", "gamma", "weibull", "poisson"} {
		fam, _ := Lookup(name)
		a, err := fam.Fit(Complete(x), Options{})
		if err != nil {
			t.Fatal(err)
		}
		b, err := fam.Fit(Complete(x[1:]), Options{})
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(a.Parameters, fam.Parameters()) || &a.Parameters[0] != &b.Parameters[0] {
			t.Errorf("%s: names %v, not the shared %v", name, a.Parameters, fam.Parameters())
		}
	}
}
