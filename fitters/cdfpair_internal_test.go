package fitters

import (
	"math"
	"testing"
)

// TestMillsRatioShort: the 32-term continued fraction equals the 80-term
// one (millsRatio, whose use TestReferenceSpot checks against exact values)
// to 2 ulps from 5 to 1e6.
func TestMillsRatioShort(t *testing.T) {
	worst := 0.0
	for x := 5.0; x < 1e6; x *= 1.0007 {
		want := millsRatio(x)
		worst = math.Max(worst, math.Abs(millsRatioShort(x)-want)/want)
	}
	if worst > 0x1p-51 {
		t.Errorf("largest relative difference %.3g", worst)
	}
}
