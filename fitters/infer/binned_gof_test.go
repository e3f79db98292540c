package infer

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"fitseal/fitters"
)

// binnedCase is one dataset of testdata/censored/binned_gof.json: counts
// in the bins (Edges[k], Edges[k+1]], the last one open above.
type binnedCase struct {
	Name, Family string
	Edges        []float64
	Counts       []int
	Params       map[string]float64
	LogLik       float64
	Chisq        float64
	Cells        int
}

// binnedData builds the data of c: an interval per value, the open last
// bin as suspensions.
func binnedData(c binnedCase) *fitters.Data {
	d := &fitters.Data{}
	for k, n := range c.Counts {
		for range n {
			if k == len(c.Edges)-1 {
				d.Right = append(d.Right, c.Edges[k])
			} else {
				d.Lower, d.Upper = append(d.Lower, c.Edges[k]), append(d.Upper, c.Edges[k+1])
			}
		}
	}
	return d
}

// TestBinnedChiSquareReference: Pearson's X² over the bins against scipy
// (testdata/censored/make_binned_gof.py: its own maximum-likelihood fit of
// the binned data and its own X² with the same pooling), for weibull
// lifetimes in ten bins and an open one that no value reached, and
// lognormal concentrations with an open top bin. fitseal's fit matches
// scipy's log-likelihood within 1e-6; at scipy's estimates the statistic
// and the pooled cells agree to 1e-10, at fitseal's own within 1e-6
// (the two optima differ by about 1e-7 relative).
func TestBinnedChiSquareReference(t *testing.T) {
	b, err := os.ReadFile("../../testdata/censored/binned_gof.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct{ Cases []binnedCase }
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	for _, c := range ref.Cases {
		fam := family(t, c.Family)
		d := binnedData(c)
		theta := make([]float64, len(fam.Parameters()))
		for i, name := range fam.Parameters() {
			theta[i] = c.Params[name]
		}
		scipyDist, err := fam.New(theta)
		if err != nil {
			t.Fatal(err)
		}
		plan, why := newBinnedPlan(scipyDist, d)
		if plan == nil {
			t.Fatalf("%s: not binned: %s", c.Name, why)
		}
		x2, cells := plan.chiSquare(scipyDist, plan.counts)
		if math.Abs(x2-c.Chisq) > 1e-10*c.Chisq || cells != c.Cells {
			t.Errorf("%s: at scipy's estimates X² = %v over %d cells, scipy %v over %d", c.Name, x2, cells, c.Chisq, c.Cells)
		}
		fit := fitOf(t, fam, d)
		if fit.LogLik < c.LogLik-1e-6 {
			t.Errorf("%s: logL %v, scipy %v", c.Name, fit.LogLik, c.LogLik)
		}
		g, err := CheckFit(fam, fit, d, BootstrapOptions{})
		if err != nil || !g.Applicable || len(g.Statistics) != 1 || g.Statistics[0].Name != ChiSquare {
			t.Fatalf("%s: %+v, %v", c.Name, g, err)
		}
		if s := g.Statistics[0]; math.Abs(s.Value-c.Chisq) > 1e-6*c.Chisq || !strings.Contains(s.Note, "recorded in the same bins") {
			t.Errorf("%s: X² %v (note %q), scipy %v", c.Name, s.Value, s.Note, c.Chisq)
		}
	}
}

// TestBinnedBootstrap: the replicates are recorded in the data's bins
// (an empty bin, between two or above the last, included), the p-value is
// not small for the generating family and small for a clearly wrong one
// (a normal against the skewed lognormal concentrations), the result does
// not depend on the workers, and overlapping intervals are not binned
// data. Invented data.
func TestBinnedBootstrap(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 12))
	edges := []float64{0, 0.25, 0.5, 1, 2, 4}
	d := &fitters.Data{}
	for range 150 {
		x := math.Exp(0.8 * rng.NormFloat64())
		k := 0
		for k+1 < len(edges) && x > edges[k+1] {
			k++
		}
		if k == len(edges)-1 {
			d.Right = append(d.Right, edges[k])
		} else {
			d.Lower, d.Upper = append(d.Lower, edges[k]), append(d.Upper, edges[k+1])
		}
	}
	pValue := func(name string, workers int) (float64, *Replicates) {
		fam := family(t, name)
		fit := fitOf(t, fam, d)
		opt := BootstrapOptions{Replicates: 99, Workers: workers, Stream: Stream{Master: 5, Analysis: "bins", Family: name}}
		rep, err := Bootstrap(fam, fit, d, opt)
		if err != nil {
			t.Fatal(err)
		}
		g, err := CheckFitFrom(fam, fit, d, rep)
		if err != nil || !g.Applicable {
			t.Fatalf("%s: %+v %v", name, g, err)
		}
		return g.Statistics[0].PValue, rep
	}
	p1, rep1 := pValue("lognormal", 1)
	p2, rep2 := pValue("lognormal", 2)
	if p1 != p2 || rep1.Failed != rep2.Failed {
		t.Errorf("p-value %v with one worker, %v with two", p1, p2)
	}
	if p1 < 0.1 {
		t.Errorf("lognormal on its own binned data: p = %v, want ≥ 0.1", p1)
	}
	if p, _ := pValue("normal", 2); p > 0.02 {
		t.Errorf("normal on skewed binned data: p = %v, want ≤ 0.02", p)
	}
	// Recording: a draw above the last bin's lower end is a suspension
	// there, one in the gap (1, 2] an interval of its own.
	gap := &fitters.Data{Lower: []float64{0, 2}, Upper: []float64{1, 4}, Right: []float64{4}}
	plan, why := newBinnedPlan(fitters.LogNormal{Mu: 0, Sigma: 1}, gap)
	if plan == nil {
		t.Fatal(why)
	}
	sim, skip := plan.simulate([]float64{0.5, 1.5, 3, 7}, nil)
	if skip != "" || len(sim.Right) != 1 || sim.Right[0] != 4 || len(sim.Lower) != 3 || sim.Lower[1] != 1 || sim.Upper[1] != 2 {
		t.Errorf("recorded %+v (%s)", sim, skip)
	}
	overlap := &fitters.Data{Lower: []float64{0, 1}, Upper: []float64{2, 3}}
	if plan, why := newBinnedPlan(fitters.LogNormal{Mu: 0, Sigma: 1}, overlap); plan != nil || !strings.Contains(why, "overlap") {
		t.Errorf("overlapping intervals: plan %v, reason %q", plan, why)
	}
}
