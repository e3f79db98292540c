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
						if k == 0 {
							cell.failedFits++
						}
					case res[i][k] == 1:
						cell.covered++
					case res[i][k] == -1:
						cell.noInterval++
					}
				}
				out = append(out, cell)
			}
		}
	}
	return out
}

func covers(lo, hi, truth float64) int {
	if math.IsNaN(lo) || math.IsNaN(hi) {
		return -1
	}
	if lo <= truth && truth <= hi {
		return 1
	}
	return 0
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
	elapsed := time.Since(start)
	if err := os.WriteFile("../../docs/COVERAGE.md", []byte(coverageReport(cells, datasets, B, elapsed)), 0o644); err != nil {
		t.Fatal(err)
	}
	// Profile intervals for n ≥ 50, and percentile-bootstrap ones at
	// n = 200, must be within three binomial standard errors of 95% (the
	// percentile bootstrap under-covers at n = 50 for the normal σ and the
	// gamma shape: 91.5% and 89.2% in the recorded run).
	se := math.Sqrt(0.95 * 0.05 / datasets)
	for _, c := range cells {
		if c.n < 50 || c.method == string(MethodWald) || (c.method == string(MethodBootstrap) && c.n < 200) {
			continue
		}
		used := c.datasets - c.failedFits
		if p := float64(c.covered) / float64(used); math.Abs(p-0.95) > 3*se {
			t.Errorf("%s n=%d %s %s: coverage %.3f", c.family, c.n, c.quantity, c.method, p)
		}
	}
}

func coverageReport(cells []coverageCell, datasets, B int, elapsed time.Duration) string {
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
quantities), profile likelihood, and parametric-bootstrap percentiles.
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
	lowCut := 95 - 200*se
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
				if p < lowCut {
					low = append(low, fmt.Sprintf("%s %s %.1f", c.family, c.quantity, p))
				}
			}
			if cnt == 0 {
				continue
			}
			fmt.Fprintf(&b, "- %s, n = %d: mean coverage %.1f%%", m, n, sum/float64(cnt))
			if len(low) > 0 {
				fmt.Fprintf(&b, "; below %.1f%%: %s", lowCut, strings.Join(low, "; "))
			} else {
				fmt.Fprintf(&b, "; none below %.1f%%", lowCut)
			}
			b.WriteString("\n")
		}
	}
	b.WriteString(`
Wald intervals rest on the estimate being close to normal, which fails at
small n for skewed quantities (shape parameters, far quantiles); the
profile likelihood does not assume it. Percentile-bootstrap intervals
inherit the small-sample bias of the estimator (for the normal σ at n = 15
their coverage is P(χ²₁₄ ≥ 8.61) ≈ 0.86 in theory), so they run short of
nominal at small and moderate n; the B used here also puts Monte-Carlo
noise into their ends. Of the three, the profile likelihood is the one to
trust at small n, which is why it is fitseal's default.
`)
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
