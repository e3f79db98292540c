package bundle

import "testing"

// TestShowInterval: show writes an interval's open end (the profile stays
// above the cut-off as far as it was followed) as "open" with a round
// bracket, a bound not computed as "–", and numbers to six digits.
func TestShowInterval(t *testing.T) {
	for _, c := range []struct {
		lo, hi string
		n      rowNote
		want   string
	}{
		{"0.5051891", "1.25", rowNote{}, "[0.505189, 1.25]"},
		{"0.5051891", "", rowNote{upperOpen: true}, "[0.505189, open)"},
		{"", "3", rowNote{lowerOpen: true}, "(open, 3]"},
		{"", "", rowNote{}, "–"},
		{"", "", rowNote{lowerOpen: true, upperOpen: true}, "(open, open)"},
		{"2", "", rowNote{}, "[2, –]"},
	} {
		if got := interval(c.lo, c.hi, c.n); got != c.want {
			t.Errorf("interval(%q, %q, %+v) = %q, want %q", c.lo, c.hi, c.n, got, c.want)
		}
	}
}
