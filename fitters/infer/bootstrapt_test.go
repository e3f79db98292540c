package infer

import (
	"encoding/json"
	"math"
	"os"
	"slices"
	"strings"
	"testing"

	"fitseal/fitters"
)

// exactInterval is one row of testdata/infer/bootstrap_t.json: an exact
// 95% interval of the ball-bearing data from a pivot whose law does not
// depend on the parameters (made with scipy by bootstrap_t_reference.py).
type exactInterval struct {
	Family, Quantity string
	Lower, Upper     float64
}

func loadExactIntervals(t *testing.T) map[string]exactInterval {
	t.Helper()
	b, err := os.ReadFile("../../testdata/infer/bootstrap_t.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Intervals []exactInterval `json:"intervals"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	out := map[string]exactInterval{}
	for _, e := range doc.Intervals {
		out[e.Family+" "+e.Quantity] = e
	}
	return out
}

// bootstrapTB is the number of replicates of the exact-interval checks:
// the Monte-Carlo standard deviation of a 2.5% pivot quantile is then
// about 0.05 (√(0.025·0.975/B)/φ(1.96)), some 1.3% of the interval's
// width, so an end within 5% of the width is four standard deviations.
const bootstrapTB = 4000

// ballSettings draws the replicates of a ball-bearing fit once, with
// their information, for intervals and derived quantities alike.
func ballSettings(t *testing.T, fam fitters.Family, fit *fitters.Fit, d *fitters.Data) Settings {
	t.Helper()
	rep, err := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: bootstrapTB, NoStatistics: true, Information: true,
		Stream: Stream{Master: 3, Analysis: "ball", Family: fam.Name()}})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Failed > 0 || rep.NoCovariance > 0 {
		t.Fatalf("%s: %d failed, %d without covariance (%s %s)", fam.Name(), rep.Failed, rep.NoCovariance, rep.FirstFailure, rep.FirstNoCovariance)
	}
	return Settings{Level: 0.95, Replicates: rep}
}

// withinWidth says whether lo and hi are each within frac of the exact
// interval's width of its ends.
func withinWidth(lo, hi float64, e exactInterval, frac float64) bool {
	w := e.Upper - e.Lower
	return math.Abs(lo-e.Lower) <= frac*w && math.Abs(hi-e.Upper) <= frac*w
}

// TestQuantile6: the pivot quantiles follow Hyndman & Fan's type 6,
// checked against numpy.quantile(method="weibull") including the clamped
// positions (testdata/infer/bootstrap_t.json).
func TestQuantile6(t *testing.T) {
	b, err := os.ReadFile("../../testdata/infer/bootstrap_t.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Type6 []struct {
			Values, Probs, Quantiles []float64
		}
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Type6) == 0 {
		t.Fatal("no type-6 cases")
	}
	for _, c := range doc.Type6 {
		v := append([]float64(nil), c.Values...)
		slices.Sort(v)
		m := float64(len(v))
		for k, p := range c.Probs {
			got, clamped := quantile6(v, p)
			wantClamped := (m+1)*p < 1 || (m+1)*p > m
			if !close(got, c.Quantiles[k], 1e-12) || clamped != wantClamped {
				t.Errorf("m = %v, p = %v: %v (clamped %v), numpy %v (clamped %v)", m, p, got, clamped, c.Quantiles[k], wantClamped)
			}
		}
	}
}

// TestBootstrapTEveryFamily draws every family's replicates with their
// information (the data as in TestEveryFamily) and checks that a
// bootstrap row is either a bootstrap-t interval, a percentile one whose
// note says why, or, for an estimate on an edge the data set, the profile
// one with a note saying so, that no row lacks an interval without a reason, and that
// the regular continuous families get finite bootstrap-t intervals for
// every parameter and derived quantity.
func TestBootstrapTEveryFamily(t *testing.T) {
	for _, fam := range fitters.Families() {
		t.Run(fam.Name(), func(t *testing.T) {
			d, opt := familyTestData(fam)
			fit, err := fam.Fit(d, opt)
			if err != nil || !fit.Converged {
				t.Skipf("no converged fit: %v", err)
			}
			rep, err := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 49, NoStatistics: true, Information: true,
				Stream: Stream{Master: 1, Family: fam.Name()}})
			if err != nil {
				t.Skipf("no bootstrap: %v", err)
			}
			s := Settings{Level: 0.9, Replicates: rep}
			check := func(what, method, note string, lo, hi float64) {
				t.Helper()
				t.Logf("%s: [%v, %v] %s; %s", what, lo, hi, method, note)
				switch {
				case strings.HasPrefix(method, "bootstrap-t ("):
				case strings.HasPrefix(method, "bootstrap percentile") && strings.Contains(note, "percentile interval instead of bootstrap-t"):
				case method == "bootstrap-t" && note != "":
				case method == "profile likelihood" && strings.Contains(note, "a bootstrap interval is not valid at an estimate on an edge the data set"):
					// pareto's scale at the sample minimum (TestBootstrapAtDataEdge)
				default:
					t.Errorf("%s: method %q, note %q", what, method, note)
				}
				if (math.IsNaN(lo) || math.IsNaN(hi)) && note == "" {
					t.Errorf("%s: no interval and no reason", what)
				}
				if regularFamilies[fam.Name()] && (!strings.HasPrefix(method, "bootstrap-t (") || math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0)) {
					t.Errorf("%s: [%v, %v] %q %q, want a finite bootstrap-t interval", what, lo, hi, method, note)
				}
			}
			rows, err := Intervals(fam, fit, d, MethodBootstrap, s)
			if err != nil {
				t.Fatal(err)
			}
			for _, r := range rows {
				if !r.Fixed {
					check(r.Parameter, r.Method, r.Note, r.Lower, r.Upper)
				}
			}
			for _, q := range []struct {
				q   Quantity
				arg float64
			}{{Quantile, 0.5}, {ReturnLevel, 100}, {Exceedance, 0.5 * ballBearings[22]}} {
				if fam.Name() == "beta" && q.q == Exceedance {
					q.arg = 0.5
				}
				dv, err := Derived(fam, fit, d, q.q, q.arg, MethodBootstrap, s)
				if err != nil {
					t.Fatal(err)
				}
				if d.Trials != nil {
					continue // no single value: the note says so
				}
				check(string(q.q), dv.Method, dv.Note, dv.Lower, dv.Upper)
			}
		})
	}
}
