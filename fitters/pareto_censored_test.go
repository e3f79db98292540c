package fitters

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strings"
	"testing"
)

// paretoScenarios are censoredScenarios with non-detects or intervals
// (suspensions alone have the closed form) and one more where the
// maximum often lies on the edge scale = smallest exact value: a
// non-detect limit at the median for every third value, the others exact.
var paretoScenarios = []censoredScenario{
	censoredScenarios[0], censoredScenarios[2], censoredScenarios[3],
	{"non-detects at the median for a third", func(dist Dist, r *rand.Rand, n int) *Data {
		l := dist.Quantile(0.5)
		d := &Data{}
		for i := 0; i < n; i++ {
			x := dist.Rand(r)
			if i%3 == 0 && x < l {
				d.Left = append(d.Left, l)
				continue
			}
			d.Exact = append(d.Exact, x)
		}
		return d
	}},
}

// TestParetoCensoredNewtonAgreesWithBFGS compares the censored Pareto
// Newton route with the generic BFGS route (two starts inside the bound
// and the edge scale = smallest exact value) on seeded censored datasets
// (96, or 480 with FITSEAL_LONG=1) from shapes 0.6 (very heavy tail), 2.5
// and 12 (values close to the scale). Tolerance on the estimates 1e-8
// relative (BFGS's own stopping error).
func TestParetoCensoredNewtonAgreesWithBFGS(t *testing.T) {
	c := newtonAgreementCase{name: "pareto", truths: [][]float64{{1, 0.6}, {2, 2.5}, {10, 12}}, scenarios: paretoScenarios,
		takes: func(d *Data) bool { return len(d.Left) > 0 || len(d.Lower) > 0 }}
	seeds := agreementSeeds()
	compared, _ := agreeWithGeneric(t, c, seeds, 1e-8)
	t.Logf("%d datasets compared with BFGS", compared)
	if compared < len(c.truths)*len(c.scenarios)*seeds*8/10 {
		t.Errorf("only %d datasets compared", compared)
	}
}

// paretoGPDReference is testdata/censored_newton/reference_pareto_gpd.json
// (Pareto, GPD and beta),
// written by make_reference_pareto_gpd.py there: scipy maxima polished by
// Newton's method in mpmath at 40 digits.
type paretoGPDReference struct {
	Fits []struct {
		Family, Kind string
		Edge         bool
		Threshold    float64
		Data         struct {
			Exact, Left, Right []float64
			Lower              []float64
			Upper              []*float64
		}
		Scipy struct {
			Estimates []float64
			Loglik    float64
		}
		Estimates []float64
		Loglik    float64
	}
}

func loadParetoGPDReference(t *testing.T) *paretoGPDReference {
	t.Helper()
	b, err := os.ReadFile("../testdata/censored_newton/reference_pareto_gpd.json")
	if err != nil {
		t.Fatalf("%v (regenerate with /usr/bin/python3 testdata/censored_newton/make_reference_pareto_gpd.py)", err)
	}
	var r paretoGPDReference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return &r
}

// checkParetoGPDReference fits family to its datasets of
// reference_pareto_gpd.json (limits with suspensions, bins with exact
// values, non-detects at the median, intervals only, random and heavy
// suspensions) and checks the Newton route against the mpmath maximum:
// the fit takes the route and converges, its log-likelihood is within
// 1e-12 relative of the reference's, its estimates within estTol relative
// (absolute for a shape below 1 in size), and the edge maxima of the
// Pareto are reported on the edge with the boundary note. It returns the
// number of datasets.
func checkParetoGPDReference(t *testing.T, family string, estTol float64) int {
	ref := loadParetoGPDReference(t)
	f, _ := Lookup(family)
	count := 0
	for _, c := range ref.Fits {
		if c.Family != family {
			continue
		}
		count++
		d := &Data{Exact: c.Data.Exact, Left: c.Data.Left, Right: c.Data.Right, Lower: c.Data.Lower}
		for _, u := range c.Data.Upper {
			if u == nil {
				d.Upper = append(d.Upper, math.Inf(1))
			} else {
				d.Upper = append(d.Upper, *u)
			}
		}
		if family == "beta" {
			// A bin from 0 is the open-ended bin (−∞, u]: F(0) = 0, and
			// the beta takes no recorded value at 0.
			for i, l := range d.Lower {
				if l <= 0 {
					d.Lower[i] = math.Inf(-1)
				}
			}
		}
		opt := Options{}
		if family == "gpd" {
			opt.Fixed = Fixed{"threshold": c.Threshold}
		}
		label := family + "/" + c.Kind
		fit, err := f.Fit(d, opt)
		if err != nil {
			t.Fatalf("%s: %v", label, err)
		}
		if !fit.Converged || !strings.HasPrefix(fit.Method, "censored Newton") {
			t.Errorf("%s: %q converged %v (%s)", label, fit.Method, fit.Converged, fit.Reason)
			continue
		}
		scale := math.Max(1, math.Abs(c.Loglik))
		if math.Abs(fit.LogLik-c.Loglik) > 1e-12*scale {
			t.Errorf("%s: logL %.17g, mpmath %.17g", label, fit.LogLik, c.Loglik)
		}
		if c.Scipy.Loglik > c.Loglik+1e-12*scale {
			t.Errorf("%s: scipy's logL %.17g above the polished %.17g", label, c.Scipy.Loglik, c.Loglik)
		}
		worst, worstScipy := 0.0, 0.0
		for i, want := range c.Estimates {
			den := math.Max(math.Abs(want), 1)
			rel := math.Abs(fit.Estimates[i]-want) / den
			worst = math.Max(worst, rel)
			worstScipy = math.Max(worstScipy, math.Abs(c.Scipy.Estimates[i]-want)/den)
			if rel > estTol {
				t.Errorf("%s: %s %.15g, mpmath %.15g (rel %.2g)", label, f.Parameters()[i], fit.Estimates[i], want, rel)
			}
		}
		if family == "pareto" && c.Edge != (fit.Note == paretoBoundaryNote) {
			t.Errorf("%s: edge maximum %v, fit's note %q", label, c.Edge, fit.Note)
		}
		t.Logf("%s: %d iterations; estimates within %.1e of mpmath (scipy's within %.1e)", label, fit.Iterations, worst, worstScipy)
	}
	return count
}

// TestParetoCensoredReference checks the Pareto route against the four
// mpmath maxima of reference_pareto_gpd.json (two of them on the edge
// scale = smallest exact value): estimates within 1e-10 relative.
func TestParetoCensoredReference(t *testing.T) {
	if n := checkParetoGPDReference(t, "pareto", 1e-10); n < 4 {
		t.Errorf("only %d reference fits", n)
	}
}

// TestParetoCensoredDerivatives checks paretoCensoredPoint's analytic
// score and Hessian against differences of its own ℓ and score, with
// every kind of observation (a suspension below the bound, an interval
// reaching below the scale), and its ℓ against the family's LogLik.
func TestParetoCensoredDerivatives(t *testing.T) {
	d := &Data{Exact: []float64{1.3, 2.2, 1.1, 5.8, 1.6, 3.3},
		Left: []float64{1.05, 1.5, 1.5}, Right: []float64{0.9, 4, 20, 4},
		Lower: []float64{1.2, 2.5, 0, 1.02}, Upper: []float64{1.9, 6, 1.4, 1.25}}
	f, _ := Lookup("pareto")
	s, ok := newParetoCensoredSample(d)
	if !ok || s.bound != 1.05 || s.atBound {
		t.Fatalf("sample %v bound %v at bound %v", ok, s.bound, s.atBound)
	}
	eval := func(la, lh float64) newton2Point { return paretoCensoredPoint(&s, la, lh) }
	for _, pt := range [][2]float64{{0, math.Log(0.1)}, {math.Log(0.4), math.Log(0.02)}, {math.Log(3), 0.5}, {math.Log(12), math.Log(0.3)}} {
		a, h := math.Exp(pt[0]), math.Exp(pt[1])
		scale := s.bound * math.Exp(-h/a)
		if want, got := f.LogLik([]float64{scale, a}, d), eval(pt[0], pt[1]).ll; math.Abs(got-want) > 1e-12*math.Abs(want) {
			t.Errorf("(%v, %v): ℓ %.17g, LogLik %.17g", pt[0], pt[1], got, want)
		}
		checkPointDerivatives(t, "pareto", eval, pt[0], pt[1], 1e-3, 1e-7)
	}
}

// TestParetoCensoredFallbackAndDeterminism checks the honest fallback
// (with one iteration allowed the route cannot converge; the fit comes
// from BFGS and the method says why) and that the same data give the same
// bits twice.
func TestParetoCensoredFallbackAndDeterminism(t *testing.T) {
	d := &Data{Exact: []float64{1.3, 2.2, 1.1, 5.8, 1.6, 3.3, 1.25}, Left: []float64{1.05, 1.05, 1.5}, Right: []float64{4, 4}}
	f, _ := Lookup("pareto")
	fit, err := f.Fit(d, Options{MaxIterations: 1})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(fit.Method, "BFGS") || !strings.Contains(fit.Method, "censored Newton route did not converge first (iteration limit 1 reached)") {
		t.Errorf("method %q", fit.Method)
	}
	a, err1 := f.Fit(d, Options{})
	b, err2 := f.Fit(d, Options{})
	if err1 != nil || err2 != nil || !a.Converged || !strings.HasPrefix(a.Method, "censored Newton") {
		t.Fatalf("%v %v %+v", err1, err2, a)
	}
	if a.LogLik != b.LogLik || a.Estimates[0] != b.Estimates[0] || a.Estimates[1] != b.Estimates[1] || a.Iterations != b.Iterations {
		t.Errorf("%+v then %+v", a, b)
	}
}

// gpdTruths are the GPD members of the agreement test: a bounded tail
// (shape −0.3), near-exponential (0.05), heavy (0.2) and very heavy (0.6),
// all over the threshold 10.
var gpdTruths = [][]float64{{8, -0.3, 10}, {1, 0.05, 10}, {5, 0.2, 10}, {2, 0.6, 10}}

// TestParetoNarrowBins: interval data whose bins are narrow (relative
// width 1e-6, an instrument's resolution of 0.001) have the Pareto maximum
// at a corner of the likelihood, the smallest interval lower end: it
// rises in the scale up to there and falls steeply beyond, where that
// interval's probability F(u) − F(scale) collapses. Such fits converge at
// the corner with the corner note; coarser bins may have the maximum at a
// corner further up (relative width 0.5) or inside (0.1, bins of 0.5),
// where no corner may be forced; bins beside exact values whose smallest
// is the bound keep the edge route. Against an independent profile
// maximisation of the same likelihood by scipy
// (testdata/censored/make_pareto_bins.py: the shape by Brent's method for
// each scale, the scale over every corner and between them): fitseal's
// log-likelihood not below the reference's − 1e-6 and equal to the
// family's LogLik at its estimates; the scale exactly the corner's
// recorded value (else within 1e-5 relative), the shape within 1e-6.
func TestParetoNarrowBins(t *testing.T) {
	b, err := os.ReadFile("../testdata/censored/pareto_bins.json")
	if err != nil {
		t.Fatalf("%v (regenerate with /usr/bin/python3 testdata/censored/make_pareto_bins.py)", err)
	}
	var ref struct {
		Fits []struct {
			Name                             string
			Exact, Left, Right, Lower, Upper []float64
			Estimates                        []float64
			LogLik                           float64 `json:"loglik"`
			Kind                             string
			CornerValue                      *float64 `json:"corner_value"`
			SmallestLowerEnd                 float64  `json:"smallest_lower_end"`
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	kinds := map[string]int{}
	f := mustFamily(t, "pareto")
	for _, c := range ref.Fits {
		kinds[c.Kind]++
		t.Run(c.Name, func(t *testing.T) {
			d := &Data{Exact: c.Exact, Left: c.Left, Right: c.Right, Lower: c.Lower, Upper: c.Upper}
			scale := math.Max(1, math.Abs(c.LogLik))
			if got := f.LogLik(c.Estimates, d); math.Abs(got-c.LogLik) > 1e-9*scale {
				t.Fatalf("the script's likelihood is not fitseal's: LogLik at its estimates %.15g, its value %.15g", got, c.LogLik)
			}
			fit, err := f.Fit(d, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if !fit.Converged {
				t.Fatalf("not converged: %s (%s)", fit.Reason, fit.Method)
			}
			if fit.LogLik < c.LogLik-1e-6 {
				t.Errorf("logL %.12g below the reference's %.12g", fit.LogLik, c.LogLik)
			}
			if got := f.LogLik(fit.Estimates, d); math.Abs(got-fit.LogLik) > 1e-9*scale {
				t.Errorf("reported logL %.15g, LogLik at the estimates %.15g", fit.LogLik, got)
			}
			if rel := relDiff(fit.Estimates[1], c.Estimates[1], 1); rel > 1e-6 {
				t.Errorf("shape %.12g, reference %.12g (rel %.2g)", fit.Estimates[1], c.Estimates[1], rel)
			}
			switch c.Kind {
			case "corner":
				if fit.Estimates[0] != *c.CornerValue {
					t.Errorf("scale %.17g, want the corner %.17g", fit.Estimates[0], *c.CornerValue)
				}
				if fit.Note != paretoCornerNote(paretoCorner{value: *c.CornerValue, interval: true}) {
					t.Errorf("note %q", fit.Note)
				}
			case "edge":
				if fit.Estimates[0] != c.Estimates[0] || fit.Note != paretoBoundaryNote {
					t.Errorf("scale %.17g, want the smallest exact value %.17g with the boundary note; note %q", fit.Estimates[0], c.Estimates[0], fit.Note)
				}
			case "interior":
				if rel := relDiff(fit.Estimates[0], c.Estimates[0], 1); rel > 1e-5 {
					t.Errorf("scale %.12g, reference %.12g (rel %.2g)", fit.Estimates[0], c.Estimates[0], rel)
				}
				if fit.Note != "" || slices.Contains(c.Lower, fit.Estimates[0]) || slices.Contains(c.Right, fit.Estimates[0]) {
					t.Errorf("an interior maximum reported at %v with note %q", fit.Estimates[0], fit.Note)
				}
			default:
				t.Fatalf("kind %q", c.Kind)
			}
			t.Logf("%s at %.10g (smallest lower end %.10g): %s, %d iterations", c.Kind, fit.Estimates[0], c.SmallestLowerEnd, fit.Method, fit.Iterations)
		})
	}
	if kinds["corner"] < 3 || kinds["interior"] < 2 || kinds["edge"] < 1 {
		t.Errorf("reference kinds %v: want corners, interior maxima and an edge", kinds)
	}
}
