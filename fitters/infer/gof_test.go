package infer

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strconv"
	"strings"
	"testing"

	"fitseal/fitters"
)

type edfCase struct {
	Data          string    `json:"data"`
	X             []float64 `json:"x"`
	Family        string    `json:"family"`
	Params        []float64 `json:"params"`
	KS, CvM, AD   float64
	Chisq         float64   `json:"chisq"`
	Cells         int       `json:"cells"`
	Observed      []float64 `json:"observed"`
	Expected      []float64 `json:"expected"`
	Statistic     string    `json:"statistic"`
	Value, PValue float64
	Replicates    int       `json:"replicates"`
	Fitted        []float64 `json:"fitted"`
	Trials        []int     `json:"trials"`
}

func loadCases(t *testing.T, file string) (cases, chisq []edfCase) {
	t.Helper()
	b, err := os.ReadFile("../../testdata/infer/" + file)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Cases []edfCase `json:"cases"`
		Chisq []edfCase `json:"chisq"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	return doc.Cases, doc.Chisq
}

// TestEDFStatisticsAgainstScipy compares KS, CvM and AD for given
// parameters with scipy.stats.kstest, scipy.stats.cramervonmises and A²
// from scipy's logcdf/logsf (testdata/infer/make_reference.py, and
// make_edf_families.py for the other families with a CDFTails of their
// own), including a point 40 standard deviations out, where A² must not hit
// ln 0. Each is computed through the family's CDFTails and, hidden behind
// plainDist, through LogCDF and LogSurvival.
func TestEDFStatisticsAgainstScipy(t *testing.T) {
	cases, chisq := loadCases(t, "edf_statistics.json")
	more, _ := loadCases(t, "edf_families.json")
	for _, c := range append(cases, more...) {
		t.Run(c.Data+"/"+c.Family, func(t *testing.T) {
			d, err := family(t, c.Family).New(c.Params)
			if err != nil {
				t.Fatal(err)
			}
			x := slices.Clone(c.X)
			slices.Sort(x)
			for _, dd := range []fitters.Dist{d, plainDist{d}} {
				var got [3]float64
				edfStatistics(dd, x, &got)
				for i, want := range []float64{c.KS, c.CvM, c.AD} {
					if !close(got[i], want, 1e-9) {
						t.Errorf("%T: %s = %.15g, scipy %.15g", dd, statNames(fitters.Continuous)[i], got[i], want)
					}
				}
			}
		})
	}
	for _, c := range chisq {
		d, err := family(t, c.Family).New(c.Params)
		if err != nil {
			t.Fatal(err)
		}
		comps := []component{{d, float64(len(c.X))}}
		if c.Trials != nil {
			comps, _ = groupTrials(c.Trials).components(d, nil)
		}
		x := slices.Clone(c.X)
		slices.Sort(x)
		var cl cells
		got, n := chiSquareCounts(comps, x, &cl)
		if n != c.Cells || !close(got, c.Chisq, 1e-9) {
			t.Errorf("%s chi-square %.15g on %d cells, scipy.stats.chisquare %.15g on %d", c.Data, got, n, c.Chisq, c.Cells)
		}
		for i := range cl.obs {
			if cl.obs[i] != c.Observed[i] || !close(cl.exp[i], c.Expected[i], 1e-12) {
				t.Errorf("cell %d: %v/%v, want %v/%v", i, cl.obs[i], cl.exp[i], c.Observed[i], c.Expected[i])
			}
		}
	}
}

// plainDist hides a distribution's optional methods (CDFTails), leaving
// the Dist interface only.
type plainDist struct{ fitters.Dist }

// TestEDFStatisticsBothRoutes compares the statistics computed through each
// family's CDFTails with those through LogCDF and LogSurvival (the route
// TestEDFStatisticsAgainstScipy checks against scipy for six families), on
// seeded samples of 2000 drawn from the distribution itself and on the same
// samples shifted a tail's width out, for every family that has CDFTails.
func TestEDFStatisticsBothRoutes(t *testing.T) {
	for _, c := range edfBenchCases {
		d, err := family(t, c.family).New(c.params)
		if err != nil {
			t.Fatal(err)
		}
		if _, ok := d.(fitters.CDFTailer); !ok {
			t.Errorf("%s has no CDFTails", c.family)
			continue
		}
		r := rand.New(rand.NewPCG(5, 6))
		x := make([]float64, 2000)
		for i := range x {
			x[i] = d.Rand(r)
		}
		slices.Sort(x)
		spread := d.Quantile(0.999) - d.Quantile(0.5)
		shifted := make([]float64, len(x))
		for i, v := range x {
			shifted[i] = v + spread
		}
		for _, s := range [][]float64{x, shifted} {
			var own, plain [3]float64
			edfStatistics(d, s, &own)
			edfStatistics(plainDist{d}, s, &plain)
			for i := range own {
				if !close(own[i], plain[i], 1e-9) {
					t.Errorf("%s %s: %.15g through CDFTails, %.15g through LogCDF/LogSurvival", c.family, statNames(fitters.Continuous)[i], own[i], plain[i])
				}
			}
		}
	}
}

// TestBootstrapPValuesAgainstScipy compares parametric-bootstrap p-values
// with scipy.stats.goodness_of_fit on the same data (normal and gamma with
// known location 0): both are Monte Carlo estimates, so they must agree
// within 4 standard errors √(p(1−p)(1/B₁ + 1/B₂)). The statistic and the
// fitted parameters must agree closely.
func TestBootstrapPValuesAgainstScipy(t *testing.T) {
	cases, _ := loadCases(t, "gof_pvalues.json")
	results := map[string]*GoodnessOfFit{}
	const B = 1999
	for _, c := range cases {
		fam := family(t, c.Family)
		d := fitters.Complete(c.X)
		fit := fitOf(t, fam, d)
		g := results[c.Family]
		if g == nil {
			var err error
			g, err = CheckFit(fam, fit, d, BootstrapOptions{Replicates: B, Stream: Stream{Master: 1, Analysis: "ball", Family: c.Family}})
			if err != nil {
				t.Fatal(err)
			}
			results[c.Family] = g
		}
		// scipy's gamma is (a, loc, scale); fitseal's (shape, rate).
		want := c.Fitted
		if c.Family == "gamma" {
			want = []float64{c.Fitted[0], 1 / c.Fitted[2]}
		}
		for i := range want {
			if !close(fit.Estimates[i], want[i], 1e-5) {
				t.Errorf("%s %s = %v, scipy %v", c.Family, fit.Parameters[i], fit.Estimates[i], want[i])
			}
		}
		var s Statistic
		for _, st := range g.Statistics {
			if st.Name == c.Statistic {
				s = st
			}
		}
		if !close(s.Value, c.Value, 1e-5) {
			t.Errorf("%s %s = %v, scipy %v", c.Family, c.Statistic, s.Value, c.Value)
		}
		t.Logf("%s %s: fitseal p = %v (B = %d), scipy p = %v (B = %d)", c.Family, c.Statistic, s.PValue, s.Replicates, c.PValue, c.Replicates)
		p := (s.PValue + c.PValue) / 2
		tol := 4 * math.Sqrt(p*(1-p)*(1/float64(s.Replicates)+1/float64(c.Replicates)))
		if s.Replicates != B || math.Abs(s.PValue-c.PValue) > tol {
			t.Errorf("%s %s p = %v (B = %d), scipy %v (B = %d): differ by more than %v",
				c.Family, c.Statistic, s.PValue, s.Replicates, c.PValue, c.Replicates, tol)
		}
	}
}

// replicateBytes serialises a bootstrap's every number exactly.
func replicateBytes(r *Replicates) []byte {
	var b bytes.Buffer
	for i := range r.Estimates {
		for _, v := range r.Estimates[i] {
			b.WriteString(strconv.FormatUint(math.Float64bits(v), 16) + " ")
		}
		for _, v := range r.Statistics[i] {
			b.WriteString(strconv.FormatUint(math.Float64bits(v), 16) + " ")
		}
		b.WriteByte('\n')
	}
	b.WriteString(strconv.Itoa(r.Failed) + r.FirstFailure)
	return b.Bytes()
}

// TestBootstrapDeterministicAcrossWorkers: 1, 2 and 8 workers give the
// same bytes, and a different master seed gives different ones.
func TestBootstrapDeterministicAcrossWorkers(t *testing.T) {
	counts := []float64{0, 1, 1, 2, 0, 3, 1, 0, 2, 1, 4, 0, 1, 2, 1}
	trials := []int{4, 4, 5, 5, 3, 6, 4, 2, 5, 5, 8, 3, 4, 6, 2}
	for _, c := range []struct {
		name string
		data *fitters.Data
	}{
		{"gamma", fitters.Complete(ballBearings)},
		{"weibull", fitters.Complete(ballBearings)},
		{"poisson", fitters.Complete(counts)},
		{"binomial", &fitters.Data{Exact: counts, Trials: trials}},
	} {
		fam := family(t, c.name)
		d := c.data
		fit := fitOf(t, fam, d)
		var first []byte
		for _, w := range []int{1, 2, 8} {
			rep, err := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 64, Workers: w,
				Stream: Stream{Master: 7, Analysis: "a", Family: c.name}})
			if err != nil {
				t.Fatal(err)
			}
			if rep.Failed > 0 {
				t.Errorf("%s: %d replicates failed: %s", c.name, rep.Failed, rep.FirstFailure)
			}
			b := replicateBytes(rep)
			if first == nil {
				first = b
			} else if !bytes.Equal(b, first) {
				t.Errorf("%s: %d workers give different replicates", c.name, w)
			}
		}
		rep, _ := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 64, Workers: 2,
			Stream: Stream{Master: 8, Analysis: "a", Family: c.name}})
		if bytes.Equal(replicateBytes(rep), first) {
			t.Errorf("%s: master seed 8 gives the replicates of seed 7", c.name)
		}
	}
}

// TestStreamSeed pins the documented derivation: the first 16 bytes of
// SHA-256("7|a|gamma|bootstrap|3"), big-endian (from `printf %s
// '7|a|gamma|bootstrap|3' | sha256sum`).
func TestStreamSeed(t *testing.T) {
	s := Stream{Master: 7, Analysis: "a", Family: "gamma", Purpose: "bootstrap"}
	if id := s.Identity(3); id != "7|a|gamma|bootstrap|3" {
		t.Fatalf("identity %q", id)
	}
	a, b := s.StreamSeed(3)
	got := strconv.FormatUint(a, 16) + strconv.FormatUint(b, 16)
	if got != sha256Prefix {
		t.Errorf("seed words %s, want %s", got, sha256Prefix)
	}
}

// sha256Prefix is the first 32 hex digits of sha256sum's output for
// "7|a|gamma|bootstrap|3".
const sha256Prefix = "e0672305facc14be41aac71b24bd6c5a"

// TestInfiniteStatistic: pareto's scale estimate is the sample minimum, so
// F(x₍₁₎) = 0 and A² = +∞: reported with a note and no p-value, while KS and
// CvM keep theirs.
func TestInfiniteStatistic(t *testing.T) {
	fam := family(t, "pareto")
	d := fitters.Complete(ballBearings)
	fit := fitOf(t, fam, d)
	g, err := CheckFit(fam, fit, d, BootstrapOptions{Replicates: 19, Stream: Stream{Master: 1, Family: "pareto"}})
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range g.Statistics {
		switch {
		case s.Name == AndersonDarling && (!math.IsInf(s.Value, 1) || !math.IsNaN(s.PValue) || s.Note == ""):
			t.Errorf("ad: %+v, want +Inf without p-value, with a note", s)
		case s.Name != AndersonDarling && (math.IsNaN(s.PValue) || s.Replicates != 19):
			t.Errorf("%s: %+v, want a p-value on 19 replicates", s.Name, s)
		}
	}
}

// TestEDFStatisticsAllocatesNothing: KS, CvM and AD in one pass with no
// buffer, whatever the family.
func TestEDFStatisticsAllocatesNothing(t *testing.T) {
	x := []float64{0.5, 1, 1.5, 2, 3, 5, 8, 13}
	for _, c := range edfBenchCases {
		d, err := family(t, c.family).New(c.params)
		if err != nil {
			t.Fatal(err)
		}
		var out [3]float64
		for _, dd := range []fitters.Dist{d, plainDist{d}} {
			if n := testing.AllocsPerRun(20, func() { edfStatistics(dd, x, &out) }); n != 0 {
				t.Errorf("%s (%T): %v allocations per call", c.family, dd, n)
			}
		}
	}
}

// TestUninformativeChiSquareHasNoPValue: seven batches of 40–50 items with
// 0–7 defects leave a binomial's expected counts so few that every cell
// pools into one; the statistic is then ~0 whatever the data, and however
// many replicates are drawn it gets no p-value (a p-value from it would
// look like evidence of fit), with the reason in its note.
func TestUninformativeChiSquareHasNoPValue(t *testing.T) {
	fam, _ := fitters.Lookup("binomial")
	d := &fitters.Data{Exact: []float64{3, 5, 2, 0, 7, 4, 1}, Trials: []int{50, 50, 40, 50, 50, 45, 50}}
	fit, err := fam.Fit(d, fitters.Options{})
	if err != nil || !fit.Converged {
		t.Fatalf("fit: %v %+v", err, fit)
	}
	g, err := CheckFit(fam, fit, d, BootstrapOptions{Replicates: 49, Stream: Stream{Master: 1, Analysis: "a", Family: "binomial"}})
	if err != nil {
		t.Fatal(err)
	}
	if len(g.Statistics) != 1 {
		t.Fatalf("statistics %+v", g.Statistics)
	}
	s := g.Statistics[0]
	if !s.Uninformative || !math.IsNaN(s.PValue) || !strings.Contains(s.Note, "no p-value") {
		t.Errorf("chi-square %+v: want uninformative, no p-value, and the note saying so", s)
	}
}

// TestLimitFitHasNoStatisticButAReason: betabinomial fitted to counts that
// are not overdispersed reaches its binomial limit (alpha, beta = +Inf); the
// goodness of fit and the bootstrap then say so instead of failing on the
// infinite parameters (which took the fit's intervals down with them).
func TestLimitFitHasNoStatisticButAReason(t *testing.T) {
	fam, _ := fitters.Lookup("betabinomial")
	d := &fitters.Data{Exact: []float64{5, 5, 4, 5, 6, 5}, Trials: []int{50, 50, 50, 50, 50, 50}}
	fit, err := fam.Fit(d, fitters.Options{})
	if err != nil || !fit.Converged || !math.IsInf(fit.Estimates[0], 1) {
		t.Fatalf("want the converged binomial limit, got %v %+v", err, fit)
	}
	g, err := CheckFit(fam, fit, d, BootstrapOptions{Replicates: 19, Stream: Stream{Master: 1, Analysis: "a", Family: "betabinomial"}})
	if err != nil {
		t.Fatalf("goodness of fit failed on the limit: %v", err)
	}
	if g.Applicable || !strings.Contains(g.Reason, "alpha = +Inf: the optimum is the limiting family") || strings.Contains(g.Reason, "; ") {
		t.Errorf("goodness of fit %+v: want none, with the limit as its reason (one clause)", g)
	}
	_, err = Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 19, Stream: Stream{Master: 1, Analysis: "a", Family: "betabinomial"}})
	if !errors.Is(err, ErrBootstrapNotApplicable) {
		t.Errorf("bootstrap of the limit: %v, want ErrBootstrapNotApplicable", err)
	}
}

// TestLimitReplicatesCount: betabinomial fitted to mildly overdispersed
// counts; many of its bootstrap replicates are not overdispersed, and
// their refits reach the binomial limit. Those are valid refits whose
// statistic is the limit's: none may be left out as failed (which would
// bias the p-value toward the replicates that happen to be overdispersed).
func TestLimitReplicatesCount(t *testing.T) {
	fam, _ := fitters.Lookup("betabinomial")
	d := &fitters.Data{Exact: []float64{3, 9, 2, 0, 7, 4, 1, 6, 12, 5, 2, 8}, Trials: []int{50, 50, 50, 50, 50, 50, 50, 50, 50, 50, 50, 50}}
	fit, err := fam.Fit(d, fitters.Options{})
	if err != nil || !fit.Converged || math.IsInf(fit.Estimates[0], 0) {
		t.Fatalf("want an interior fit, got %v %+v", err, fit)
	}
	rep, err := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: 99, Stream: Stream{Master: 7, Analysis: "a", Family: "betabinomial"}})
	if err != nil {
		t.Fatal(err)
	}
	limits := 0
	for _, e := range rep.Estimates {
		if e != nil && math.IsInf(e[0], 1) {
			limits++
		}
	}
	if rep.Failed != 0 || limits == 0 {
		t.Errorf("%d of %d replicates failed (%s), %d reached the limit: want none failed and some at the limit", rep.Failed, rep.Requested, rep.FirstFailure, limits)
	}
}
