package infer

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"testing"

	"fitseal/fitters"
)

// TestCensoredEnvelope: the envelope of samples censored as the data were
// holds most of the data's empirical quantiles when the model fits (weibull
// lifetimes, each suspended at its own uniform time, fitted by the
// weibull) and visibly fewer when it does not (a normal fitted to an even
// mixture of weibull(4, 50) and weibull(4, 150), suspended the same way);
// non-detects likewise (lognormal concentrations below two detection
// limits, fitted by the lognormal, and by a normal). Bounds are ordered,
// and the same seed gives the same envelope. Invented data, fixed seeds.
func TestCensoredEnvelope(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	suspended := func(draw func() float64) *fitters.Data {
		d := &fitters.Data{}
		for range 120 {
			x, c := draw(), 250*rng.Float64()
			if x > c {
				d.Right = append(d.Right, c)
			} else {
				d.Exact = append(d.Exact, x)
			}
		}
		return d
	}
	weib := func(k, s float64) float64 { return s * math.Pow(-math.Log(1-rng.Float64()), 1/k) }
	fitting := suspended(func() float64 { return weib(1.8, 100) })
	mixture := suspended(func() float64 {
		if rng.Float64() < 0.5 {
			return weib(4, 50)
		}
		return weib(4, 150)
	})
	nonDetects := &fitters.Data{}
	for i := range 120 {
		x, limit := math.Exp(0.5+rng.NormFloat64()), []float64{0.8, 1.4}[i%2]
		if x < limit {
			nonDetects.Left = append(nonDetects.Left, limit)
		} else {
			nonDetects.Exact = append(nonDetects.Exact, x)
		}
	}
	inside := func(name string, d *fitters.Data, famName string) float64 {
		t.Helper()
		fam := family(t, famName)
		fit := fitOf(t, fam, d)
		dist, err := fam.New(fit.Estimates)
		if err != nil {
			t.Fatal(err)
		}
		var step *fitters.StepCDF
		if len(d.Left) > 0 {
			step, err = fitters.ReverseKaplanMeier(d.Exact, d.Left)
		} else {
			step, err = fitters.KaplanMeier(d.Exact, d.Right)
		}
		if err != nil {
			t.Fatal(err)
		}
		x := slices.Sorted(slices.Values(d.Exact))
		probs := make([]float64, len(x))
		for j, v := range x {
			probs[j] = (step.At(math.Nextafter(v, math.Inf(-1))) + step.At(v)) / 2
		}
		lo, hi, ok := CensoredEnvelope(dist, d, probs, 199, 0.95, 42)
		lo2, hi2, _ := CensoredEnvelope(dist, d, probs, 199, 0.95, 42)
		same := func(a, b []float64) bool {
			return slices.EqualFunc(a, b, func(x, y float64) bool { return x == y || math.IsNaN(x) && math.IsNaN(y) })
		}
		if !ok || !same(lo, lo2) || !same(hi, hi2) {
			t.Fatalf("%s: ok %v, or not the same envelope from the same seed", name, ok)
		}
		in, defined := 0, 0
		for j, v := range x {
			if math.IsNaN(lo[j]) || math.IsNaN(hi[j]) {
				continue
			}
			defined++
			if lo[j] > hi[j] {
				t.Errorf("%s: at p = %v the envelope is [%v, %v]", name, probs[j], lo[j], hi[j])
			}
			if lo[j] <= v && v <= hi[j] {
				in++
			}
		}
		if defined < len(x)*3/4 {
			t.Errorf("%s: the envelope is defined at %d of %d points", name, defined, len(x))
		}
		share := float64(in) / float64(defined)
		t.Logf("%s (%s): %d of %d points inside", name, famName, in, defined)
		return share
	}
	for _, c := range []struct {
		name       string
		d          *fitters.Data
		right, bad string
	}{
		{"suspensions", fitting, "weibull", ""},
		{"mixture", mixture, "", "normal"},
		{"non-detects", nonDetects, "lognormal", "normal"},
	} {
		if c.right != "" {
			if s := inside(c.name, c.d, c.right); s < 0.8 {
				t.Errorf("%s: the fitting %s holds %.2f of the points, want at least 0.8", c.name, c.right, s)
			}
		}
		if c.bad != "" {
			if s := inside(c.name, c.d, c.bad); s > 0.7 {
				t.Errorf("%s: the %s holds %.2f of the points, want at most 0.7", c.name, c.bad, s)
			}
		}
	}
	if _, _, ok := CensoredEnvelope(fitters.Normal{Mu: 0, Sigma: 1}, fitters.Complete([]float64{1, 2, 3}), []float64{0.5}, 9, 0.95, 1); ok {
		t.Error("complete data: want no censored envelope")
	}
}

// binnedDraws records values in the bins (edges[k], edges[k+1]], the last
// one open above; with nonDetect the first bin is recorded as the
// non-detect (−∞, edges[1]].
func binnedDraws(x []float64, edges []float64, nonDetect bool) *fitters.Data {
	d := &fitters.Data{}
	for _, v := range x {
		k := 0
		for k+1 < len(edges) && v > edges[k+1] {
			k++
		}
		switch {
		case k == len(edges)-1:
			d.Right = append(d.Right, edges[k])
		case k == 0 && nonDetect:
			d.Left = append(d.Left, edges[1])
		default:
			d.Lower, d.Upper = append(d.Lower, edges[k]), append(d.Upper, edges[k+1])
		}
	}
	return d
}

// cumulativeProportion is the share of d's observations known to lie at
// or below x: those whose upper end is at most x (for disjoint bins with
// x an edge, the Turnbull estimate there).
func cumulativeProportion(d *fitters.Data, x float64) float64 {
	c := 0
	for _, u := range d.Left {
		if u <= x {
			c++
		}
	}
	for _, u := range d.Upper {
		if u <= x {
			c++
		}
	}
	return float64(c) / float64(d.N())
}

// TestBinnedEnvelope: the envelope of samples recorded in the data's bins
// holds nearly all of the data's cumulative proportions at the bin edges
// when the model fits, and misses many when it does not: lognormal
// concentrations (the lowest bin a non-detect) fitted by the lognormal and
// by a normal; weibull(3, 50) lifetimes in 10-hour bins fitted by the weibull and by
// the exponential. The band is a step CDF's: edges ascending, lower ≤
// upper within [0, 1], both non-decreasing; the same seed gives the same
// envelope and another seed another. Overlapping intervals, exact values
// among intervals or censored both ways, and complete data get none.
// Invented data, fixed seeds.
func TestBinnedEnvelope(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	var conc, life []float64
	for range 200 {
		conc = append(conc, math.Exp(0.8*rng.NormFloat64()))
		life = append(life, 50*math.Pow(-math.Log(1-rng.Float64()), 1.0/3))
	}
	concentrations := binnedDraws(conc, []float64{0, 0.25, 0.5, 0.75, 1, 1.5, 2, 3, 4, 6}, true)
	lifetimes := binnedDraws(life, []float64{0, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100}, false)
	for _, c := range []struct {
		name, family string
		d            *fitters.Data
		min, max     float64 // bounds on the share of edges inside
	}{
		{"concentrations", "lognormal", concentrations, 0.9, 1},
		{"concentrations", "normal", concentrations, 0, 0.5},
		{"lifetimes", "weibull", lifetimes, 0.9, 1},
		{"lifetimes", "exponential", lifetimes, 0, 0.5},
	} {
		t.Run(c.name+"/"+c.family, func(t *testing.T) {
			fam := family(t, c.family)
			fit := fitOf(t, fam, c.d)
			dist, err := fam.New(fit.Estimates)
			if err != nil {
				t.Fatal(err)
			}
			edges, lo, hi, ok := BinnedEnvelope(dist, c.d, 199, 0.95, 42)
			if !ok || len(edges) < 5 || len(lo) != len(edges) || len(hi) != len(edges) {
				t.Fatalf("ok %v, %d edges, %d and %d bounds", ok, len(edges), len(lo), len(hi))
			}
			edges2, lo2, hi2, _ := BinnedEnvelope(dist, c.d, 199, 0.95, 42)
			if !slices.Equal(edges, edges2) || !slices.Equal(lo, lo2) || !slices.Equal(hi, hi2) {
				t.Error("the same seed gave another envelope")
			}
			if _, lo3, hi3, _ := BinnedEnvelope(dist, c.d, 199, 0.95, 43); slices.Equal(lo, lo3) && slices.Equal(hi, hi3) {
				t.Error("another seed gave the same envelope")
			}
			in := 0
			for k, x := range edges {
				if k > 0 && !(x > edges[k-1]) {
					t.Errorf("edges %v not ascending", edges)
				}
				if !(0 <= lo[k] && lo[k] <= hi[k] && hi[k] <= 1) {
					t.Errorf("at %v the envelope is [%v, %v]", x, lo[k], hi[k])
				}
				if k > 0 && (lo[k] < lo[k-1] || hi[k] < hi[k-1]) {
					t.Errorf("at %v the envelope [%v, %v] falls below [%v, %v] at %v", x, lo[k], hi[k], lo[k-1], hi[k-1], edges[k-1])
				}
				if p := cumulativeProportion(c.d, x); lo[k] <= p && p <= hi[k] {
					in++
				}
			}
			share := float64(in) / float64(len(edges))
			t.Logf("%d of %d edges inside", in, len(edges))
			if share < c.min || share > c.max {
				t.Errorf("%.2f of the edges inside, want between %v and %v", share, c.min, c.max)
			}
		})
	}
	if _, _, _, ok := BinnedEnvelope(fitters.Normal{Mu: 1, Sigma: 1}, concentrations, 0, 0.95, 1); ok {
		t.Error("no samples: want no envelope")
	}
	// Data that are not a disjoint binning get none.
	inf := math.Inf(1)
	for _, c := range []struct {
		name string
		d    *fitters.Data
	}{
		{"overlapping intervals", &fitters.Data{Lower: []float64{0, 1, 2}, Upper: []float64{2, 3, 4}}},
		{"exact values and intervals", &fitters.Data{Exact: []float64{0.5, 2.5}, Lower: []float64{0, 1}, Upper: []float64{1, 2}}},
		{"exact values censored both ways", &fitters.Data{Exact: []float64{1, 2, 3}, Left: []float64{0.5}, Right: []float64{4}}},
		{"suspensions", &fitters.Data{Exact: []float64{1, 2, 3}, Right: []float64{4, 5}}},
		{"open intervals only", &fitters.Data{Lower: []float64{1, math.Inf(-1)}, Upper: []float64{inf, 2}}},
		{"complete", fitters.Complete([]float64{1, 2, 3})},
	} {
		if edges, _, _, ok := BinnedEnvelope(fitters.LogNormal{Mu: 0, Sigma: 1}, c.d, 19, 0.95, 1); ok || edges != nil {
			t.Errorf("%s: envelope at %v, want none", c.name, edges)
		}
	}
}

// TestBinnedEnvelopeReference checks the simulation against scipy
// (testdata/censored/make_binned_envelope.py → binned_envelope.json): the
// bins the samples are recorded in (the data's, and the gap or the bin
// below the first that the fitted model has mass in) and each bin's
// probability under the model, within 1e-13; and, since the count at or
// below an edge is Binomial(n, F(edge)) under the model, that an envelope
// of 19999 samples puts its bounds at scipy's exact binomial 2.5 % and
// 97.5 % points: each bound's count c has P(N ≤ c) ≥ q − δ and
// P(N ≤ c − 1) ≤ q + δ, δ = 0.005, about 4.5 standard errors of a
// proportion near 0.025 over 19999 samples (and so within one count of
// scipy's binom.ppf). The models are the binned
// check's reference fits (make_binned_gof.py) and two variants.
func TestBinnedEnvelopeReference(t *testing.T) {
	b, err := os.ReadFile("../../testdata/censored/binned_envelope.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Name, Family   string
			Params         map[string]float64
			Edges          []float64
			Counts         []int
			N              int
			Bins           [][2]*float64
			BinProbability []float64 `json:"bin_probability"`
			Points         []struct {
				Edge, CDF  float64
				LowerCount int       `json:"lower_count"`
				UpperCount int       `json:"upper_count"`
				CountFrom  int       `json:"binom_cdf_from"`
				BinomCDF   []float64 `json:"binom_cdf"`
			}
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) != 4 {
		t.Fatalf("%d cases in binned_envelope.json", len(ref.Cases))
	}
	end := func(p *float64, inf float64) float64 {
		if p == nil {
			return inf
		}
		return *p
	}
	for _, c := range ref.Cases {
		t.Run(c.Name, func(t *testing.T) {
			fam := family(t, c.Family)
			theta := make([]float64, len(fam.Parameters()))
			for i, name := range fam.Parameters() {
				theta[i] = c.Params[name]
			}
			dist, err := fam.New(theta)
			if err != nil {
				t.Fatal(err)
			}
			d := binnedData(binnedCase{Edges: c.Edges, Counts: c.Counts})
			if d.N() != c.N {
				t.Fatalf("%d values, scipy's case has %d", d.N(), c.N)
			}
			plan, why := newBinnedPlan(dist, d)
			if plan == nil || len(plan.lo) != len(c.Bins) {
				t.Fatalf("plan %+v (%s), scipy's bins %d", plan, why, len(c.Bins))
			}
			for k, bin := range c.Bins {
				lo, hi := end(bin[0], math.Inf(-1)), end(bin[1], math.Inf(1))
				if plan.lo[k] != lo || plan.hi[k] != hi {
					t.Errorf("bin %d is (%v, %v], scipy's (%v, %v]", k, plan.lo[k], plan.hi[k], lo, hi)
				}
				if p, want := binProbability(dist, lo, hi), c.BinProbability[k]; math.Abs(p-want) > 1e-13 {
					t.Errorf("P(%v < X ≤ %v) = %v, scipy %v", lo, hi, p, want)
				}
			}
			edges, lower, upper, ok := BinnedEnvelope(dist, d, 19999, 0.95, 7)
			if !ok || len(edges) != len(c.Points) {
				t.Fatalf("ok %v, edges %v, scipy's %d", ok, edges, len(c.Points))
			}
			const delta = 0.005
			for k, pt := range c.Points {
				if edges[k] != pt.Edge {
					t.Errorf("edge %d is %v, scipy's %v", k, edges[k], pt.Edge)
				}
				// P(N ≤ c) from scipy's table (0 below it, 1 above: it
				// spans P from 1e-4 to 1 − 1e-4).
				cdf := func(count int) float64 {
					switch i := count - pt.CountFrom; {
					case i < 0:
						return 0
					case i >= len(pt.BinomCDF):
						return 1
					default:
						return pt.BinomCDF[i]
					}
				}
				for _, bound := range []struct {
					q, v float64
					ppf  int
				}{{0.025, lower[k], pt.LowerCount}, {0.975, upper[k], pt.UpperCount}} {
					count := int(math.Round(bound.v * float64(c.N)))
					if cdf(count) < bound.q-delta || cdf(count-1) > bound.q+delta || count < bound.ppf-1 || count > bound.ppf+1 {
						t.Errorf("at %v the %v bound is %d of %d values, P(N ≤ %d) = %v and P(N ≤ %d) = %v under Binomial(%d, %v) (scipy)",
							pt.Edge, bound.q, count, c.N, count, cdf(count), count-1, cdf(count-1), c.N, pt.CDF)
					}
				}
			}
		})
	}
}
