package infer

import (
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"reflect"
	"slices"
	"strings"
	"testing"

	"fitseal/fitters"
)

// TestKaplanMeierStatisticsOnCompleteData: without censoring the product-
// limit estimate is the empirical CDF, so the Kaplan–Meier D and ψ² are the
// usual D and W² of edfStatistics, to rounding, in both frames (reflected
// for left-censored data) and with ties.
func TestKaplanMeierStatisticsOnCompleteData(t *testing.T) {
	tied := slices.Clone(ballBearings) // 68.64 is there twice
	for _, tc := range []struct {
		family string
		x      []float64
	}{
		{"weibull", ballBearings},
		{"lognormal", tied},
		{"normal", []float64{-1.2, 0.3, 0.3, 0.3, 0.9, 1.7, 2.2, 4.0}},
		{"exponential", []float64{0.01, 0.2, 0.7, 1.9, 3.3}},
		{"gamma", ballBearings[:5]},
	} {
		fam := family(t, tc.family)
		d := &fitters.Data{Exact: tc.x}
		dist, err := fam.New(fitOf(t, fam, d).Estimates)
		if err != nil {
			t.Fatal(err)
		}
		var want [3]float64
		edfStatistics(dist, d.SortedExact(), &want)
		for _, left := range []bool{false, true} {
			ks, cvm := kaplanMeierStatistics(dist, newOneSided(d, left))
			if !close(ks, want[0], 1e-12) || !close(cvm, want[1], 1e-11) {
				t.Errorf("%s (reflected %v): Kaplan–Meier D = %v, ψ² = %v; usual D = %v, W² = %v", tc.family, left, ks, cvm, want[0], want[1])
			}
		}
	}
}

// TestProductLimitByHand: failures at 1, 2, 2, 4 and suspensions at 2, 3
// (n = 6). By hand: S(1) = 5/6; at 2 the suspension is still at risk
// (failures first), r = 5, S(2) = 5/6 · 3/5 = 1/2; at 4 one unit is at
// risk and fails, S(4) = 0.
func TestProductLimitByHand(t *testing.T) {
	pl := newProductLimit([]float64{1, 2, 2, 4}, []float64{2, 3})
	want := []step{{1, 1.0 / 6}, {2, 0.5}, {4, 1}}
	if len(pl.Steps) != len(want) || pl.Max != 4 || !pl.ReachesOne || pl.Survival != 0 {
		t.Fatalf("product limit %+v", pl)
	}
	for i, s := range pl.Steps {
		if s.T != want[i].T || !close(s.F, want[i].F, 1e-15) {
			t.Errorf("step %d: %+v, want %+v", i, s, want[i])
		}
	}
	// The reverse estimate (censoring distribution): suspensions at 2 and 3
	// are its events; at 2 the failures there are at risk (r = 5), at 3
	// r = 2: G(2) = 1/5, G(3) = 1 − 4/5 · 1/2 = 3/5; the failure at 4 leaves
	// 2/5 at +∞.
	g := newProductLimit([]float64{2, 3}, []float64{1, 2, 2, 4})
	if len(g.Steps) != 2 || !close(g.Steps[0].F, 0.2, 1e-15) || !close(g.Steps[1].F, 0.6, 1e-15) ||
		!close(g.Survival, 0.4, 1e-15) || g.ReachesOne || g.Max != 4 {
		t.Errorf("reverse product limit %+v", g)
	}
	// A final suspension: the estimate stops short of 1 and is defined up
	// to the suspension only.
	pl = newProductLimit([]float64{1, 2}, []float64{5})
	if pl.ReachesOne || pl.Max != 5 || !close(pl.Steps[1].F, 1-2.0/3*1.0/2, 1e-15) {
		t.Errorf("final suspension: %+v", pl)
	}
}

// TestProductLimitMatchesFitters: the lean product limit of the statistics
// (no variance, inputs already sorted) is fitters.KaplanMeier's estimate,
// the one the report draws, on data rounded so that failures and
// suspensions tie, and its reverse (suspensions as events) likewise.
func TestProductLimitMatchesFitters(t *testing.T) {
	rng := rand.New(rand.NewPCG(71, 72))
	for trial := range 50 {
		var events, censored []float64
		for range 5 + trial {
			v := math.Round(10 * rng.ExpFloat64())
			if rng.Float64() < 0.35 {
				censored = append(censored, v)
			} else {
				events = append(events, v)
			}
		}
		slices.Sort(events)
		slices.Sort(censored)
		for _, swap := range []bool{false, true} {
			e, c := events, censored
			if swap {
				e, c = censored, events
			}
			pl := newProductLimit(e, c)
			km, err := fitters.KaplanMeier(e, c)
			if err != nil {
				if len(e)+len(c) == 0 {
					continue
				}
				t.Fatal(err)
			}
			if len(pl.Steps) != len(km.Times) {
				t.Fatalf("trial %d: %d steps, fitters.KaplanMeier %d", trial, len(pl.Steps), len(km.Times))
			}
			for i, s := range pl.Steps {
				if s.T != km.Times[i] || math.Abs(s.F-km.CDF[i]) > 1e-15 {
					t.Errorf("trial %d step %d: %+v, fitters.KaplanMeier (%v, %v)", trial, i, s, km.Times[i], km.CDF[i])
				}
			}
			if n := len(km.CDF); n > 0 && pl.ReachesOne != (km.CDF[n-1] == 1) {
				t.Errorf("trial %d: reaches one %v, fitters.KaplanMeier ends at %v", trial, pl.ReachesOne, km.CDF[n-1])
			}
		}
	}
}

// TestKaplanMeierStatisticsByHand: exponential(1) against failures at 1,
// 2, 2, 4 and suspensions at 2, 3 (the estimate above). D and ψ² from the
// definitions with F(t) = 1 − e^(−t), written out term by term.
func TestKaplanMeierStatisticsByHand(t *testing.T) {
	fam := family(t, "exponential")
	dist, err := fam.New([]float64{1})
	if err != nil {
		t.Fatal(err)
	}
	F := func(t float64) float64 { return 1 - math.Exp(-t) }
	steps := []float64{0, 1.0 / 6, 0.5, 1} // Fₙ before 1, on [1,2), [2,4), from 4
	times := []float64{1, 2, 4}
	var ks float64
	for i, ti := range times {
		ks = max(ks, math.Abs(steps[i]-F(ti)), math.Abs(steps[i+1]-F(ti)))
	}
	seg := func(c, a, b float64) float64 { return (math.Pow(b-c, 3) - math.Pow(a-c, 3)) / 3 }
	cvm := 6 * (seg(0, 0, F(1)) + seg(1.0/6, F(1), F(2)) + seg(0.5, F(2), F(4)) + seg(1, F(4), 1))
	d := &fitters.Data{Exact: []float64{4, 1, 2, 2}, Right: []float64{3, 2}}
	gotKS, gotCvM := kaplanMeierStatistics(dist, newOneSided(d, false))
	if !close(gotKS, ks, 1e-14) || !close(gotCvM, cvm, 1e-13) {
		t.Errorf("D = %v, ψ² = %v; by hand %v, %v", gotKS, gotCvM, ks, cvm)
	}
	// The same data as non-detects, mirrored: the reflected fit of −x.
	mirrored := &fitters.Data{Exact: []float64{-4, -1, -2, -2}, Left: []float64{-3, -2}}
	refl := reflectedExponential{dist}
	gotKS, gotCvM = kaplanMeierStatistics(refl, newOneSided(mirrored, true))
	if !close(gotKS, ks, 1e-14) || !close(gotCvM, cvm, 1e-13) {
		t.Errorf("mirrored non-detects: D = %v, ψ² = %v; by hand %v, %v", gotKS, gotCvM, ks, cvm)
	}
}

// reflectedExponential is the law of −X for X exponential: its CDF at x
// is S_X(−x), its survival F_X(−x).
type reflectedExponential struct{ fitters.Dist }

func (r reflectedExponential) LogCDF(x float64) float64      { return r.Dist.LogSurvival(-x) }
func (r reflectedExponential) LogSurvival(x float64) float64 { return r.Dist.LogCDF(-x) }

// censoredGOFCase is one entry of testdata/censored/censored_gof.json.
type censoredGOFCase struct {
	Name, Family       string
	Exact, Right, Left []float64
	Parameters         []string
	Estimates          []float64
	Loglik, KS, CvM    float64
}

// TestCensoredStatisticsReference compares fitseal's censored fit and its
// Kaplan–Meier statistics with testdata/censored/make_censored_gof.py:
// scipy's censored MLE, and ks and cvm from an implementation written
// there independently (left-censored data without reflecting; every step
// integral also by quadrature).
//
// At scipy's estimates the two implementations must agree to rounding
// (1e-10). At fitseal's own fit they differ by what the two optima differ
// by: the estimates agree to 1e-6 relative (checked), and D and ψ² move by
// at most about n·max f̂·|Δθ| ≈ 1e-4 relative for such a change at these
// sample sizes, so 1e-4 is the tolerance there.
func TestCensoredStatisticsReference(t *testing.T) {
	b, err := os.ReadFile("../../testdata/censored/censored_gof.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct{ Cases []censoredGOFCase }
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) != 2 {
		t.Fatalf("%d cases", len(ref.Cases))
	}
	for _, c := range ref.Cases {
		t.Run(c.Name, func(t *testing.T) {
			fam := family(t, c.Family)
			d := &fitters.Data{Exact: c.Exact, Right: c.Right, Left: c.Left}
			at, err := fam.New(c.Estimates)
			if err != nil {
				t.Fatal(err)
			}
			o, _, why := oneSidedView(d)
			if o == nil {
				t.Fatal(why)
			}
			ks, cvm := kaplanMeierStatistics(at, o)
			if !close(ks, c.KS, 1e-10) || !close(cvm, c.CvM, 1e-10) {
				t.Errorf("at scipy's estimates: ks %v cvm %v, reference %v %v", ks, cvm, c.KS, c.CvM)
			}
			fit := fitOf(t, fam, d)
			if !close(fit.LogLik, c.Loglik, 1e-9) {
				t.Errorf("loglik %v, scipy %v", fit.LogLik, c.Loglik)
			}
			for i, e := range fit.Estimates {
				if !close(e, c.Estimates[i], 1e-6) {
					t.Errorf("%s = %v, scipy %v", c.Parameters[i], e, c.Estimates[i])
				}
			}
			g, err := CheckFit(fam, fit, d, BootstrapOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if !g.Applicable || len(g.Statistics) != 2 || g.Statistics[0].Name != "ks" || g.Statistics[1].Name != "cvm" {
				t.Fatalf("statistics %+v", g)
			}
			if !close(g.Statistics[0].Value, c.KS, 1e-4) || !close(g.Statistics[1].Value, c.CvM, 1e-4) {
				t.Errorf("at fitseal's fit: ks %v cvm %v, reference %v %v", g.Statistics[0].Value, g.Statistics[1].Value, c.KS, c.CvM)
			}
			for _, s := range g.Statistics {
				if !strings.Contains(s.Note, "Kaplan–Meier") || !strings.Contains(s.Note, "no ad") || !math.IsNaN(s.PValue) {
					t.Errorf("%s: note %q, p %v", s.Name, s.Note, s.PValue)
				}
			}
		})
	}
}

// suspendedWeibull draws n weibull(1.5, 100) lifetimes, each censored by
// its own uniform(0, 250) time: the recorded value is the smaller.
func suspendedWeibull(seed uint64, n int) *fitters.Data {
	rng := rand.New(rand.NewPCG(seed, 1))
	w := fitters.Weibull{Shape: 1.5, Scale: 100}
	d := &fitters.Data{}
	for range n {
		x, c := w.Rand(rng), 250*rng.Float64()
		if x <= c {
			d.Exact = append(d.Exact, x)
		} else {
			d.Right = append(d.Right, c)
		}
	}
	return d
}

// nonDetectLognormal draws n lognormal(0, 1) concentrations measured in
// turn against detection limits 0.3 and 0.7.
func nonDetectLognormal(seed uint64, n int) *fitters.Data {
	rng := rand.New(rand.NewPCG(seed, 2))
	d := &fitters.Data{}
	for i := range n {
		x := math.Exp(rng.NormFloat64())
		if L := []float64{0.3, 0.7}[i%2]; x < L {
			d.Left = append(d.Left, L)
		} else {
			d.Exact = append(d.Exact, x)
		}
	}
	return d
}

// TestCensoredBootstrapWorkers: the censored replicates (estimates,
// statistics, covariances, failures) are the same for 1 and 3 workers and
// for a lent helper, for suspensions and for non-detects.
func TestCensoredBootstrapWorkers(t *testing.T) {
	for _, tc := range []struct {
		family string
		d      *fitters.Data
	}{
		{"weibull", suspendedWeibull(11, 40)},
		{"lognormal", nonDetectLognormal(12, 40)},
	} {
		fam := family(t, tc.family)
		fit := fitOf(t, fam, tc.d)
		run := func(workers int, share bool) *Replicates {
			opt := BootstrapOptions{Replicates: 24, Workers: workers, Information: true,
				Stream: Stream{Master: 5, Analysis: "a", Family: tc.family}}
			if share {
				opt.Share = func(help func() bool) { go func() { help() }() }
			}
			rep, err := Bootstrap(fam, fit, tc.d, opt)
			if err != nil {
				t.Fatal(err)
			}
			return rep
		}
		one := run(1, false)
		if !one.Censored || one.Succeeded() < 20 || !slices.Equal(one.StatNames, []string{"ks", "cvm"}) {
			t.Fatalf("%s: %+v", tc.family, one)
		}
		for _, other := range []*Replicates{run(3, false), run(2, true)} {
			if !reflect.DeepEqual(one, other) {
				t.Errorf("%s: replicates depend on the workers", tc.family)
			}
		}
	}
}

// TestCensoredBootstrapTypeI: with a common censoring time τ (every
// suspension at τ, every failure before it) the conditional bootstrap is
// the model's draws censored at τ. Replicate r is rebuilt here from
// Stream.Rand(r): n draws in order, those above τ suspended at τ.
func TestCensoredBootstrapTypeI(t *testing.T) {
	const tau = 120.0
	full := suspendedWeibull(21, 50)
	d := &fitters.Data{}
	for _, x := range append(slices.Clone(full.Exact), full.Right...) {
		if x <= tau {
			d.Exact = append(d.Exact, x)
		}
	}
	for len(d.Exact)+len(d.Right) < 50 {
		d.Right = append(d.Right, tau)
	}
	fam := family(t, "weibull")
	fit := fitOf(t, fam, d)
	dist, _ := fam.New(fit.Estimates)
	stream := Stream{Master: 9, Analysis: "typeI", Family: "weibull", Purpose: "bootstrap"}
	rep, err := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 15, Stream: stream})
	if err != nil {
		t.Fatal(err)
	}
	for r := range 15 {
		rng := stream.Rand(r)
		sim := &fitters.Data{}
		for range 50 {
			if x := dist.Rand(rng); x <= tau {
				sim.Exact = append(sim.Exact, x)
			} else {
				sim.Right = append(sim.Right, tau)
			}
		}
		refit := fitOf(t, fam, sim)
		rd, _ := fam.New(refit.Estimates)
		ks, cvm := kaplanMeierStatistics(rd, newOneSided(sim, false))
		if !slices.Equal(rep.Estimates[r], refit.Estimates) || !slices.Equal(rep.Statistics[r], []float64{ks, cvm}) {
			t.Errorf("replicate %d: %v %v, censored at τ: %v %v", r, rep.Estimates[r], rep.Statistics[r], refit.Estimates, []float64{ks, cvm})
		}
	}
}

// TestCensoringPlanDraws: an exact observation's censoring time is drawn
// from the reverse Kaplan–Meier estimate beyond it, in proportion to its
// masses, +∞ included.
func TestCensoringPlanDraws(t *testing.T) {
	// Failures at 1, 4; suspensions at 2, 3. Reverse estimate: at 2 r = 3,
	// G = 1/3; at 3 r = 2, G = 1 − 2/3 · 1/2 = 2/3; 1/3 left at +∞.
	d := &fitters.Data{Exact: []float64{1, 4}, Right: []float64{2, 3}}
	p := newCensoringPlan(d, newOneSided(d, false))
	rng := rand.New(rand.NewPCG(3, 4))
	counts := map[float64]int{}
	const draws = 30000
	for range draws {
		counts[p.censoringTime(0, rng)]++ // exact value 1
	}
	for v, want := range map[float64]float64{2: 1.0 / 3, 3: 1.0 / 3, math.Inf(1): 1.0 / 3} {
		if got := float64(counts[v]) / draws; math.Abs(got-want) > 0.015 { // 5.5 standard errors
			t.Errorf("P(C* = %v | C > 1) = %v, want %v", v, got, want)
		}
	}
	// Beyond 2.5 only 3 and +∞ remain, each with mass 1/3: half each.
	counts = map[float64]int{}
	for range draws {
		counts[p.drawAfter(p.firstAfter(2.5), rng)]++
	}
	if got := float64(counts[3]) / draws; math.Abs(got-0.5) > 0.016 || counts[2] != 0 {
		t.Errorf("beyond 2.5: %v", counts)
	}
	if c := p.censoringTime(1, rng); !math.IsInf(c, 1) { // exact value 4
		t.Errorf("beyond the last suspension: %v, want +Inf", c)
	}
}

// TestCensoredGOFPower: a clearly wrong family gets a small p-value and the
// generating one does not. Suspended data from an even mixture of
// weibull(4, 50) and weibull(4, 150) fitted by a normal (the mixture is
// bimodal, far from any normal), and suspended weibull(1.5, 100) data
// fitted by the weibull; non-detects likewise: a normal against lognormal
// concentrations (sigma 1: strongly skewed), and the lognormal itself.
// B = 99, so the smallest possible p is 0.01. The bounds have a margin:
// the wrong families' statistics lie beyond every replicate's, and the
// generating families' p-values are far above 0.05 for these seeds.
func TestCensoredGOFPower(t *testing.T) {
	if testing.Short() {
		t.Skip("refits 400 replicates")
	}
	rng := rand.New(rand.NewPCG(31, 7))
	mixture := &fitters.Data{}
	for i := range 120 {
		w := fitters.Weibull{Shape: 4, Scale: []float64{50, 150}[i%2]}
		x, c := w.Rand(rng), 250*rng.Float64()
		if x <= c {
			mixture.Exact = append(mixture.Exact, x)
		} else {
			mixture.Right = append(mixture.Right, c)
		}
	}
	p := func(fam string, d *fitters.Data) float64 {
		f := family(t, fam)
		g, err := CheckFit(f, fitOf(t, f, d), d, BootstrapOptions{Replicates: 99, Stream: Stream{Master: 1, Family: fam}})
		if err != nil {
			t.Fatal(err)
		}
		if !g.Applicable || g.Statistics[1].Replicates < 95 {
			t.Fatalf("%s: %+v", fam, g)
		}
		return g.Statistics[1].PValue // cvm
	}
	if v := p("normal", mixture); v > 0.02 {
		t.Errorf("normal on a suspended bimodal mixture: p = %v, want ≤ 0.02", v)
	}
	if v := p("weibull", suspendedWeibull(41, 120)); v < 0.1 {
		t.Errorf("weibull on suspended weibull data: p = %v, want ≥ 0.1", v)
	}
	if v := p("normal", nonDetectLognormal(43, 120)); v > 0.02 {
		t.Errorf("normal on lognormal data with non-detects: p = %v, want ≤ 0.02", v)
	}
	if v := p("lognormal", nonDetectLognormal(43, 120)); v < 0.1 {
		t.Errorf("lognormal on lognormal data with non-detects: p = %v, want ≥ 0.1", v)
	}
}

// TestCensoredNotApplicable: interval-censored data and data censored in
// both directions keep no statistic and no bootstrap, with a reason that
// says what is covered; bootstrap intervals there have no replicates.
func TestCensoredNotApplicable(t *testing.T) {
	fam := family(t, "weibull")
	for name, d := range map[string]*fitters.Data{
		"both directions": {Exact: ballBearings[2:20], Left: []float64{20, 20}, Right: []float64{150, 150, 150}},
		"interval":        {Exact: ballBearings[:20], Lower: []float64{10, 60}, Upper: []float64{30, 90}},
	} {
		fit := fitOf(t, fam, d)
		g, err := CheckFit(fam, fit, d, BootstrapOptions{Replicates: 9})
		if err != nil {
			t.Fatal(err)
		}
		if g.Applicable || !strings.HasPrefix(g.Reason, NotApplicableCensored) || len(g.Statistics) != 0 {
			t.Errorf("%s: %+v, want not applicable", name, g)
		}
		_, err = Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 9})
		if !errors.Is(err, ErrBootstrapNotApplicable) || !strings.Contains(err.Error(), "one direction") {
			t.Errorf("%s: bootstrap: %v, want ErrBootstrapNotApplicable", name, err)
		}
		rows, err := Intervals(fam, fit, d, MethodBootstrap, Settings{Bootstrap: BootstrapOptions{Replicates: 9}})
		if err != nil || !math.IsNaN(rows[0].Lower) || rows[0].Note == "" {
			t.Errorf("%s: bootstrap interval: %+v %v, want no interval and a note", name, rows[0], err)
		}
	}
}

// TestOpenIntervalsAreOneSided: intervals open at one end are the
// non-detects or suspensions they stand for, so the same data written
// either way get the same statistics and replicates; a closed interval
// keeps the check from applying.
func TestOpenIntervalsAreOneSided(t *testing.T) {
	fam := family(t, "lognormal")
	d := nonDetectLognormal(61, 50)
	asIntervals := &fitters.Data{Exact: d.Exact}
	for _, u := range d.Left {
		asIntervals.Lower = append(asIntervals.Lower, math.Inf(-1))
		asIntervals.Upper = append(asIntervals.Upper, u)
	}
	fit := fitOf(t, fam, d)
	opt := BootstrapOptions{Replicates: 9, Stream: Stream{Master: 3}}
	want, err := CheckFit(fam, fit, d, opt)
	if err != nil {
		t.Fatal(err)
	}
	got, err := CheckFit(fam, fitOf(t, fam, asIntervals), asIntervals, opt)
	if err != nil {
		t.Fatal(err)
	}
	if !want.Applicable || len(got.Statistics) != 2 {
		t.Fatalf("%+v / %+v", want, got)
	}
	for i, s := range got.Statistics {
		if w := want.Statistics[i]; !close(s.Value, w.Value, 1e-6) || s.PValue != w.PValue {
			t.Errorf("%s: as open intervals %v (p %v), as non-detects %v (p %v)", s.Name, s.Value, s.PValue, w.Value, w.PValue)
		}
	}
}

// TestCensoredBootstrapIntervals: the censored replicates carry their
// refits' observed information, so bootstrap-t intervals are given for
// suspended data, and they cover the estimate.
func TestCensoredBootstrapIntervals(t *testing.T) {
	fam := family(t, "weibull")
	d := suspendedWeibull(51, 60)
	fit := fitOf(t, fam, d)
	rows, err := Intervals(fam, fit, d, MethodBootstrap, Settings{Bootstrap: BootstrapOptions{Replicates: 39}})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		if !strings.HasPrefix(r.Method, "bootstrap-t") || !(r.Lower < r.Estimate && r.Estimate < r.Upper) {
			t.Errorf("%s: %+v", r.Parameter, r)
		}
	}
}

// TestCensoringEstimateTieAtTypeI: Type I censoring at τ = 100 with a
// failure tied at τ (invented: failures at 10 … 88 and 100, six units still
// running at 100). The failure at 100 came first, so it was not at risk of
// censoring there: Ĝ reaches 1 at 100, no mass lies beyond, and every
// exact observation's censoring time is 100, as the test design gives.
// Reading the tie the other way left 1/7 of Ĝ at +∞, and replicates
// observed past 100.
func TestCensoringEstimateTieAtTypeI(t *testing.T) {
	d := &fitters.Data{Exact: []float64{10, 23, 40, 55, 61, 70, 88, 100}, Right: []float64{100, 100, 100, 100, 100, 100}}
	p := newCensoringPlan(d, newOneSided(d, false))
	if p.atInfinity != 0 || len(p.times) != 1 || p.times[0] != 100 {
		t.Fatalf("censoring estimate: jumps %v, cumulative %v, at +∞ %v; want all its mass at 100", p.times, p.cumulative, p.atInfinity)
	}
	rng := rand.New(rand.NewPCG(5, 6))
	for j, y := range d.Exact[:7] {
		if c := p.censoringTime(j, rng); c != 100 {
			t.Errorf("exact value %v: censoring time %v, want 100", y, c)
		}
	}
	// The failure at 100 itself: no censoring time lies beyond it.
	if c := p.censoringTime(7, rng); !math.IsInf(c, 1) {
		t.Errorf("exact value 100: censoring time %v, want +Inf (none beyond)", c)
	}
	// The estimate of F reads the tie as before: the suspended units were
	// at risk of the failure at 100 (1 of 7).
	pl := newProductLimit([]float64{10, 23, 40, 55, 61, 70, 88, 100}, []float64{100, 100, 100, 100, 100, 100})
	last := pl.Steps[len(pl.Steps)-1]
	if want := 1 - (1-1.0/14)*(1-1.0/13)*(1-1.0/12)*(1-1.0/11)*(1-1.0/10)*(1-1.0/9)*(1-1.0/8)*(1-1.0/7); math.Abs(last.F-want) > 1e-15 {
		t.Errorf("F at 100: %v, want %v", last.F, want)
	}
}
