package fitters

import (
	"errors"
	"slices"
	"strings"
	"testing"
)

// TestFixableParameters: FixableParameters says what each family's
// Applicable accepts. Fixing a parameter it lists passes Applicable's check
// of the fixed names; fixing any other parameter is refused as "cannot be
// fixed"; a family that must have a parameter fixed is inapplicable
// without it and applicable with it.
func TestFixableParameters(t *testing.T) {
	want := map[string]struct{ fixable, required []string }{
		"gpd":        {[]string{"threshold"}, []string{"threshold"}},
		"weibull3":   {[]string{"threshold"}, nil},
		"lognormal3": {[]string{"threshold"}, nil},
	}
	// Data every family's support takes: in (0, 1) for beta, counts for
	// the count families (out of 10 trials), above the threshold 0.05.
	continuous := &Data{Exact: []float64{0.2, 0.35, 0.5, 0.55, 0.7, 0.8}}
	counts := &Data{Exact: []float64{1, 2, 2, 3, 5, 4}, Trials: []int{10, 10, 10, 10, 10, 10}}
	for _, f := range Families() {
		t.Run(f.Name(), func(t *testing.T) {
			fixable, required := FixableParameters(f)
			w := want[f.Name()]
			if !slices.Equal(fixable, w.fixable) || !slices.Equal(required, w.required) {
				t.Fatalf("FixableParameters = %v, %v; want %v, %v", fixable, required, w.fixable, w.required)
			}
			d := continuous
			if f.Kind() == Discrete {
				d = counts
			}
			for _, p := range f.Parameters() {
				err := f.Applicable(d, Fixed{p: 0.05})
				refused := err != nil && strings.Contains(err.Error(), "cannot be fixed")
				if refused == slices.Contains(fixable, p) {
					t.Errorf("Applicable with %s fixed: %v (fixable: %v)", p, err, fixable)
				}
			}
			if len(required) > 0 {
				if err := f.Applicable(d, nil); !errors.Is(err, ErrInapplicable) || !strings.Contains(err.Error(), "fixed") {
					t.Errorf("Applicable without %v fixed: %v, want inapplicable saying it must be fixed", required, err)
				}
				fixed := Fixed{}
				for _, p := range required {
					fixed[p] = 0.05
				}
				if err := f.Applicable(d, fixed); err != nil {
					t.Errorf("Applicable with %v fixed: %v", required, err)
				}
			}
		})
	}
}
