package infer

import (
	"math"
	"strings"
	"testing"

	"fitseal/fitters"
)

// Two samples of 15 drawn from a GEV(10, 2, 0.1) with a fixed seed (test
// data only, from the coverage study's streams, rounded to 8 digits).
var (
	gevSmallHeavy = []float64{8.0382985, 9.6951641, 14.932777, 8.5554481, 14.602491, 10.129751, 15.339715,
		11.823977, 10.581409, 7.6495126, 7.3900228, 11.776933, 9.8449219, 12.923502, 8.1432584}
	gevSmallShort = []float64{8.0128563, 12.204374, 14.674949, 10.499369, 13.043715, 15.705839, 15.05254,
		9.7801747, 6.6409997, 10.640677, 15.592302, 11.900682, 12.597703, 10.85594, 11.606682}
)

// TestGEVProfilesStayRegular: the GEV likelihood is unbounded for shape
// ξ < −1 (Smith, 1985), so a profile that wandered there would report a
// runaway "maximum" above the fit. Profiles are taken over ξ > −1: the
// shape's interval never reaches below −1 and no profile exceeds the fit;
// the 0.99 quantile's profile interval exists on both sides, also where
// its maximum over the other parameters sits on a sharp ridge.
func TestGEVProfilesStayRegular(t *testing.T) {
	fam := family(t, "gev")
	for _, x := range [][]float64{gevSmallHeavy, gevSmallShort} {
		d := fitters.Complete(x)
		fit := fitOf(t, fam, d)
		rows, err := Intervals(fam, fit, d, MethodProfile, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range rows {
			if math.IsNaN(r.Lower) || math.IsNaN(r.Upper) || strings.Contains(r.Note, "exceeds") {
				t.Errorf("%s: [%v, %v] %q", r.Parameter, r.Lower, r.Upper, r.Note)
			}
		}
		if shape := rows[2]; shape.Lower < -1 || (shape.LowerOpen && shape.Lower != -1) {
			t.Errorf("shape lower end %v (open %v), want ≥ −1", shape.Lower, shape.LowerOpen)
		}
		q, err := Derived(fam, fit, d, Quantile, 0.99, MethodProfile, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		if math.IsNaN(q.Lower) || math.IsNaN(q.Upper) || !(q.Lower < q.Estimate && q.Estimate < q.Upper) {
			t.Errorf("0.99 quantile %v: [%v, %v] %q", q.Estimate, q.Lower, q.Upper, q.Note)
		}
	}
}
