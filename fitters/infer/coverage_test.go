package infer

import (
	"fmt"
	"math"
	"os"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"fitseal/fitters"
)

// coverageCase is one family of the coverage study: the true parameters,
// the parameter whose intervals are checked, and the 0.99 quantile.
type coverageCase struct {
	family string
	truth  []float64
	param  int
}

var coverageCases = []coverageCase{
	{"exponential", []float64{0.5}, 0},
	{"normal", []float64{10, 2}, 1},
	{"gamma", []float64{2, 0.5}, 0},
	{"weibull", []float64{1.5, 100}, 0},
	{"gev", []float64{10, 2, 0.1}, 2},
}

// coverageCell counts, for one family, n, quantity and method, the
// datasets whose interval covered the truth.
type coverageCell struct {
	family, quantity, method string
	n, covered, noInterval   int
	datasets, failedFits     int
	// below and above count the misses with the truth below the lower end
	// and above the upper end.
	below, above int
	// hardBoot counts the datasets in which more than 2.5% of the
	// bootstrap replicates could not be refitted, hardCovered those of them
	// whose interval covered.
	hardBoot, hardCovered int
}

var methods = []Method{MethodWald, MethodProfile, MethodBootstrap}

// runCoverage simulates `datasets` samples of size n from each case
// (dataset i from Stream{Master: 2026, Analysis: "coverage/n", Family,
// Purpose: "dataset"}), fits each, and counts how often the Wald, profile
// and bootstrap (B replicates) intervals at 95% cover the true parameter
// and the true 0.99 quantile. Datasets run in parallel; the counts do not
// depend on the number of workers.
func runCoverage(t testing.TB, cases []coverageCase, ns []int, datasets, B int) []coverageCell {
	var out []coverageCell
	for _, c := range cases {
		fam := family(t, c.family)
		truthDist, err := fam.New(c.truth)
		if err != nil {
			t.Fatal(err)
		}
		q99 := truthDist.Quantile(0.99)
		for _, n := range ns {
			stream := Stream{Master: 2026, Analysis: "coverage/" + strconv.Itoa(n), Family: c.family, Purpose: "dataset"}
			// covered[i][m] for the parameter (m) and the quantile (3+m); -1 no interval.
			res := make([][6]int, datasets)
			failed := make([]bool, datasets)
			hard := make([]bool, datasets)
			var next atomic.Int64
			var wg sync.WaitGroup
			for w := 0; w < runtime.GOMAXPROCS(0); w++ {
				wg.Add(1)
				go func() {
					defer wg.Done()
					x := make([]float64, n)
					for {
						i := int(next.Add(1) - 1)
						if i >= datasets {
							return
						}
						r := stream.Rand(i)
						for j := range x {
							x[j] = truthDist.Rand(r)
						}
						d := fitters.Complete(append([]float64(nil), x...))
						fit, err := fam.Fit(d, fitters.Options{})
						if err != nil || !fit.Converged {
							failed[i] = true
							continue
						}
						// One bootstrap per dataset, with the replicates'
						// information, serves the parameter and the quantile.
						s := Settings{Level: 0.95}
						if info, err := ObservedInformation(fam, fit, d); err == nil {
							s.Information = info
						}
						rep, err := Bootstrap(fam, fit, d, BootstrapOptions{Replicates: B, Workers: 1, NoStatistics: true, Information: true,
							Stream: Stream{Master: 2026, Analysis: stream.Analysis + "/" + strconv.Itoa(i), Family: c.family}})
						if err != nil {
							t.Error(err)
							failed[i] = true
							continue
						}
						s.Replicates = rep
						hard[i] = rep.Failed*40 > B
						for m, method := range methods {
							rows, _ := Intervals(fam, fit, d, method, s)
							res[i][m] = covers(rows[c.param].Lower, rows[c.param].Upper, c.truth[c.param])
							dv, _ := Derived(fam, fit, d, Quantile, 0.99, method, s)
							res[i][3+m] = covers(dv.Lower, dv.Upper, q99)
						}
					}
				}()
			}
			wg.Wait()
			for k := 0; k < 6; k++ {
				cell := coverageCell{family: c.family, n: n, datasets: datasets, method: string(methods[k%3]),
					quantity: fam.Parameters()[c.param]}
				if k >= 3 {
					cell.quantity = "quantile 0.99"
				}
				for i := range res {
					switch {
					case failed[i]:
						cell.failedFits++
					case res[i][k] == 1:
						cell.covered++
					case res[i][k] == -1:
						cell.noInterval++
					case res[i][k] == 0:
						cell.below++
					case res[i][k] == 2:
						cell.above++
					}
					if !failed[i] && hard[i] {
						cell.hardBoot++
						if res[i][k] == 1 {
							cell.hardCovered++
						}
					}
				}
				out = append(out, cell)
			}
		}
	}
	return out
}

// covers is 1 when [lo, hi] contains truth, 0 when truth < lo, 2 when
// truth > hi and −1 when there is no interval.
func covers(lo, hi, truth float64) int {
	switch {
	case math.IsNaN(lo) || math.IsNaN(hi):
		return -1
	case truth < lo:
		return 0
	case truth > hi:
		return 2
	}
	return 1
}

// TestCoverageSmoke is the small version of the coverage study that runs
// with every `+"`make test`"+`: 60 exponential and normal datasets of n = 15 and
// 50, B = 99. At 95% nominal coverage, fewer than 50 of 60 covered has
// probability below 0.1% (binomial), so a broken interval shows. Profile
// and bootstrap-t intervals are held to that at both n (for the exponential
// rate and 0.99 quantile and the normal σ and 0.99 quantile the bootstrap-t
// pivot's law is free of the parameters, so its coverage is nominal up to
// the Monte-Carlo error of B = 99). Wald intervals under-cover at n = 15
// (the normal 0.99 quantile's delta-method interval covered 49 of 60 in the
// recorded run) and are only required to cover 40 of 60 there.
func TestCoverageSmoke(t *testing.T) {
	cells := runCoverage(t, coverageCases[:2], []int{15, 50}, 60, 99)
	for _, c := range cells {
		t.Logf("%s n=%d %s %s: covered %d of 60", c.family, c.n, c.quantity, c.method, c.covered)
		if c.failedFits > 0 || c.noInterval > 0 {
			t.Errorf("%s n=%d %s %s: %d failed fits, %d without interval", c.family, c.n, c.quantity, c.method, c.failedFits, c.noInterval)
		}
		least := 50
		if c.n == 15 && c.method == string(MethodWald) {
			least = 40
		}
		if c.covered < least {
			t.Errorf("%s n=%d %s %s: covered %d of 60, want at least %d", c.family, c.n, c.quantity, c.method, c.covered, least)
		}
	}
}

// TestCoverageLong is the coverage study of docs/COVERAGE.md: 400 datasets
// for each family and n ∈ {15, 50, 200}, B = 199 bootstrap replicates.
// It runs with FITSEAL_LONG=1 (make check-long) and rewrites the note.
func TestCoverageLong(t *testing.T) {
	if os.Getenv("FITSEAL_LONG") != "1" {
		t.Skip("long study: set FITSEAL_LONG=1")
	}
	const datasets, B = 400, 199
	start := time.Now()
	cells := runCoverage(t, coverageCases, []int{15, 50, 200}, datasets, B)
	gev := coverageCases[4]
	lrRejected, lrUsed, shapes := lrRejections(t, gev, 15, datasets)
	irregular := 0
	for _, xi := range shapes {
		if xi < -0.5 {
			irregular++
		}
	}
	elapsed := time.Since(start)
	if err := os.WriteFile("../../docs/COVERAGE.md", []byte(coverageReport(cells, datasets, B, elapsed, lrRejected, lrUsed, irregular)), 0o644); err != nil {
		t.Fatal(err)
	}
	// Profile and bootstrap-t intervals must be within three binomial
	// standard errors of 95%, except the gev at n = 15, whose shortfall
	// COVERAGE.md explains (the likelihood-ratio statistic's χ²₁
	// approximation, and replicates that cannot be refitted); there they
	// must still cover 85%.
	se := math.Sqrt(0.95 * 0.05 / datasets)
	for _, c := range cells {
		if c.method == string(MethodWald) {
			continue
		}
		used := c.datasets - c.failedFits
		p := float64(c.covered) / float64(used)
		if c.family == "gev" && c.n == 15 {
			if p < 0.85 {
				t.Errorf("%s n=%d %s %s: coverage %.3f, below even the 0.85 recorded for this small-sample case", c.family, c.n, c.quantity, c.method, p)
			}
			continue
		}
		if math.Abs(p-0.95) > 3*se {
			t.Errorf("%s n=%d %s %s: coverage %.3f", c.family, c.n, c.quantity, c.method, p)
		}
	}
	// The profile interval of the gev shape at n = 15 must miss exactly the
	// datasets the direct likelihood-ratio test rejects (up to one or two
	// within the root-finding tolerance of the cut-off).
	prof := findCell(cells, "gev", 15, "shape", MethodProfile)
	if misses := prof.below + prof.above; lrUsed != prof.datasets-prof.failedFits || misses < lrRejected-2 || misses > lrRejected+2 {
		t.Errorf("gev n=15 shape: profile misses %d of %d datasets, the likelihood-ratio test rejects %d of %d", misses, prof.datasets-prof.failedFits, lrRejected, lrUsed)
	}
}

// findCell returns the cell of family, n, quantity and method.
func findCell(cells []coverageCell, family string, n int, quantity string, m Method) coverageCell {
	for _, c := range cells {
		if c.family == family && c.n == n && c.quantity == quantity && c.method == string(m) {
			return c
		}
	}
	return coverageCell{datasets: 1}
}

func coverageReport(cells []coverageCell, datasets, B int, elapsed time.Duration, lrRejected, lrUsed, irregular int) string {
	var b strings.Builder
	se := math.Sqrt(0.95 * 0.05 / float64(datasets))
	fmt.Fprintf(&b, `# Coverage of fitseal's 95%% intervals

Written by TestCoverageLong in fitters/infer/coverage_test.go
(`+"`FITSEAL_LONG=1 go test ./fitters/infer -run TestCoverageLong -timeout 3h`"+`;
%d datasets per family and n; bootstrap with B = %d; %s on this machine).

Each dataset of size n is drawn from the family with the true parameters
below (seeded: dataset i of family F at size n uses the stream
"2026|coverage/n|F|dataset|i"), fitted by maximum likelihood, and given 95%%
intervals for one parameter and for the 0.99 quantile by three methods:
Wald (delta method for the quantile; on the log scale for positive
quantities), profile likelihood, and the parametric bootstrap-t
(studentized bootstrap on the Wald interval's scale: every replicate is
refitted and given its own observed information, and the pivot quantiles
are the (B + 1)p-th order statistics, the 5th and 195th of 199).
The table gives the share of datasets whose interval contains the truth.
With %d datasets the binomial standard error at 95%% is %.1f percentage
points, so anything within 95 ± %.1f (two standard errors) is as good as
nominal.

| family | truth | n | quantity | Wald | profile | bootstrap | failed fits |
|---|---|---|---|---|---|---|---|
`, datasets, B, elapsed.Round(time.Second), datasets, 100*se, 200*se)
	for i := 0; i < len(cells); i += 3 {
		c := cells[i]
		cs := cells[i : i+3]
		truth := ""
		for _, cc := range coverageCases {
			if cc.family == c.family {
				var parts []string
				fam, _ := fitters.Lookup(cc.family)
				for k, v := range cc.truth {
					parts = append(parts, fam.Parameters()[k]+" = "+strconv.FormatFloat(v, 'g', -1, 64))
				}
				truth = strings.Join(parts, ", ")
			}
		}
		fmt.Fprintf(&b, "| %s | %s | %d | %s | %s | %s | %s | %d |\n", c.family, truth, c.n, c.quantity,
			pct(cs[0]), pct(cs[1]), pct(cs[2]), c.failedFits)
	}
	b.WriteString(`
A cell reads "covered %" and, where some datasets gave no interval (a
singular information, a failed profile), "(k without)". Datasets whose fit
failed are left out of every method alike.

## Summary (computed from the table)

`)
	lowCut, highCut := 95-200*se, 95+200*se
	for _, m := range methods {
		for _, n := range []int{15, 50, 200} {
			var sum float64
			var cnt int
			var low []string
			for _, c := range cells {
				if c.method != string(m) || c.n != n {
					continue
				}
				p := 100 * float64(c.covered) / float64(c.datasets-c.failedFits)
				sum += p
				cnt++
				if p < lowCut || p > highCut {
					low = append(low, fmt.Sprintf("%s %s %.1f", c.family, c.quantity, p))
				}
			}
			if cnt == 0 {
				continue
			}
			fmt.Fprintf(&b, "- %s, n = %d: mean coverage %.1f%%", m, n, sum/float64(cnt))
			if len(low) > 0 {
				fmt.Fprintf(&b, "; outside %.2f–%.2f%%: %s", lowCut, highCut, strings.Join(low, "; "))
			} else {
				fmt.Fprintf(&b, "; none outside %.2f–%.2f%%", lowCut, highCut)
			}
			b.WriteString("\n")
		}
	}
	pc := func(c coverageCell) string {
		return strconv.FormatFloat(100*float64(c.covered)/float64(c.datasets-c.failedFits), 'f', 1, 64) + "%"
	}
	gevShape := findCell(cells, "gev", 15, "shape", MethodProfile)
	gevQ := findCell(cells, "gev", 15, "quantile 0.99", MethodProfile)
	bootShape := findCell(cells, "gev", 15, "shape", MethodBootstrap)
	bootQ50 := findCell(cells, "gev", 50, "quantile 0.99", MethodBootstrap)
	// The cells whose bootstrap-t pivot is exact, and those of them outside
	// the two-standard-error band.
	exact, exactOut := 0, []string{}
	for _, c := range cells {
		if c.method != string(MethodBootstrap) || (c.family != "exponential" && c.family != "normal" && c.family != "weibull") {
			continue
		}
		exact++
		if p := 100 * float64(c.covered) / float64(c.datasets-c.failedFits); p < 95-200*se || p > 95+200*se {
			exactOut = append(exactOut, fmt.Sprintf("%s %s at n = %d, %.1f%%", c.family, c.quantity, c.n, p))
		}
	}
	exactNote := "none lies outside the band"
	if len(exactOut) > 0 {
		verb := "lie"
		if len(exactOut) == 1 {
			verb = "lies"
		}
		exactNote = fmt.Sprintf("%d %s outside the band (%s), about what two-standard-error limits lead one to expect (one cell in twenty)",
			len(exactOut), verb, strings.Join(exactOut, "; "))
	}
	easy := bootShape.datasets - bootShape.failedFits - bootShape.hardBoot
	easyCovered := bootShape.covered - bootShape.hardCovered
	fmt.Fprintf(&b, `
## Reading the table

**Wald** intervals rest on the estimate being close to normal, which fails
at small n for skewed quantities (shape parameters, far quantiles).

**Profile** intervals do not assume it, and are within the band for
n ≥ 50. At n = 15 the gev shape covers %s and the gev 0.99 quantile %s.
For the shape that is a property of the likelihood at this sample size,
not of the interval code: the likelihood-ratio statistic at the true shape,
recomputed directly (location and scale maximised by Nelder–Mead outside
the profile code; lrRejections in coverage_lr_test.go), exceeds χ²₁(0.95)
in %d of %d datasets, and the profile interval misses %d (%d with the
truth below its lower end, %d above its upper end). So the shortfall is
the χ²₁ approximation of the likelihood-ratio statistic, which is poor for
the GEV at n = 15: ξ̂ is widely spread there, and %d of the %d samples
drawn with ξ = 0.1 are fitted with ξ̂ below −0.5, where the likelihood is
not regular (Smith, 1985). The quantile's profile was not checked this way.
Its profile log-likelihood often jumps at n = 15, where the best maximum
over the other parameters changes branch (the GEV's support moves with
them): where it falls from above the cut-off to below it however those
parameters are started (the walk's own start, the MLE's values, a path
from the estimate), the interval ends at the jump, with a note; where the
side beyond cannot be confirmed, or the profile keeps jumping, that end is
left empty rather than placed at a false crossing — %d datasets, counted
as not covered.
A Bartlett-type correction of the cut-off is the usual remedy (common
practice); fitseal does not apply one.

**Bootstrap-t** intervals studentize each replicate by its own standard
error, t* = (t(θ*) − t̂)/se*, and read the interval's ends off the
distribution of t*, so the estimator's small-sample bias and skewness,
which the percentile interval carried into its ends, are allowed for. For
the exponential rate and quantile, the normal σ and 0.99 quantile, and
the Weibull shape and 0.99 quantile (whose logarithm is a linear function
of the location and scale of the log data's Gumbel law) the pivot's law
is free of the parameters, so the coverage is nominal up to the
Monte-Carlo error of the study: of these %d cells, %s. The percentile
intervals they replace covered 86.8%%, 92.2%% and 93.3%% on average at
n = 15, 50 and 200 in the previous run of this study on the same datasets
and replicates (this file's history; that run counted the gev's 3 failed
fits at n = 15 as misses in all but the first column, which lowered those
cells by about 0.75 points), with the normal σ at n = 15 at 85.8%%
(P(χ²₁₄ ≥ 8.61) ≈ 0.86 in theory).

The exception is the gev shape at n = 15 (%s): of its %d misses, %d have
the truth above the upper end. In %d of the datasets more than 2.5%% of
the replicates could not be refitted (in the datasets inspected, samples
fitted with a negative ξ̂, whose replicates' likelihood grows without
bound as ξ < −1, Smith, 1985, as the refits' reason says), and the
bootstrap-t covers %d of those %d, against %d of the other %d. Such
replicates would have had estimates below −1, at the low end of the
pivot's distribution; left out, they pull the upper end of the interval
down. The percentile interval lost the same replicates (89.0%% in the
previous run). Each row's note says how many replicates were left out:
many failures on a small sample are the sign not to trust the interval.
Where the standard error is itself a noisy estimate the bootstrap-t can
err the other way, wide rather than short (a replicate with a small se*
gives a large |t*|): the gev 0.99 quantile at n = 50 covers %s.

Of the three methods, the profile likelihood needs no simulation and is
close to nominal except for the gev at n = 15 (see the summary for the
cells just outside the band), which is why it stays fitseal's default;
the bootstrap-t is the better choice where its pivot is exact or nearly
so, at any n, and costs B refits with their observed information.
`, pc(gevShape), pc(gevQ), lrRejected, lrUsed, gevShape.below+gevShape.above, gevShape.below, gevShape.above, irregular, lrUsed, gevQ.noInterval,
		exact, exactNote,
		pc(bootShape), bootShape.below+bootShape.above, bootShape.above, bootShape.hardBoot, bootShape.hardCovered, bootShape.hardBoot,
		easyCovered, easy, pc(bootQ50))
	return b.String()
}

func pct(c coverageCell) string {
	used := c.datasets - c.failedFits
	s := strconv.FormatFloat(100*float64(c.covered)/float64(used), 'f', 1, 64)
	if c.noInterval > 0 {
		s += fmt.Sprintf(" (%d without)", c.noInterval)
	}
	return s
}
