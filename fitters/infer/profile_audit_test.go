package infer

import (
	"fmt"
	"maps"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strings"
	"testing"

	"fitseal/fitters"
)

// TestProfileBoundsAreCrossings audits profile-likelihood intervals by their
// definition rather than against stored values: every closed bound b must be
// where the profile crosses the cut-off, so ℓp just inside b (10⁻³ standard
// errors) is at or above ℓ̂ − χ²₁(0.95)/2 and ℓp just outside is at or below
// it — ℓp evaluated here by continuation from the estimate in 16 steps, each
// maximisation started where the previous one ended, and also from the
// MLE's nuisance values, the higher kept. A bound put where the inner
// maximisation jumped to another branch or a lower local maximum fails
// (two such defects were found this way and in scipy's profiles:
// make_profile_derived.py). Samples: draws from each regular family fitted
// to familyTestData, n = 25 and 200, complete and with the top fifth
// right-censored; the parameters and the 0.1, 0.5, 0.9 quantiles and the
// 100-observation return level, and the probability of exceeding the
// sampled family's 0.8-quantile. FITSEAL_LONG=1 draws 10 samples of each
// kind instead of 1, adds left-censored and binned samples, and audits the
// irregular families too (thresholds, GPD, Student t, pareto), as strictly
// (loggedOnly would list a family whose failures are only logged):
// their profiles and this audit share guardIrregular's rule of which maxima
// count (none with a threshold run into the smallest value), and bounds the
// intervals leave empty as "not confirmed" are counted and logged. A GEV
// profile that reaches shape ξ < −½, beyond Smith's (1985) regular region,
// is logged only. FITSEAL_AUDIT_FAMILIES=a,b limits the run to families a, b.
func TestProfileBoundsAreCrossings(t *testing.T) {
	if testing.Short() {
		t.Skip("profiles some 300 intervals")
	}
	long := os.Getenv("FITSEAL_LONG") != ""
	reps, kinds := 1, 2
	if long {
		reps, kinds = 10, 4
	}
	queries := []auditQuery{{Quantile, 0.1}, {Quantile, 0.5}, {Quantile, 0.9}, {ReturnLevel, 100}}
	checked, failed, unconfirmed := map[string]int{}, map[string]int{}, map[string]int{}
	for _, fam := range fitters.Families() {
		if fam.Kind() != fitters.Continuous || (!regularFamilies[fam.Name()] && !long) {
			continue
		}
		if only := os.Getenv("FITSEAL_AUDIT_FAMILIES"); only != "" && !slices.Contains(strings.Split(only, ","), fam.Name()) {
			continue
		}
		d0, opt := familyTestData(fam)
		fit0, err := fam.Fit(d0, opt)
		if err != nil || !fit0.Converged {
			t.Fatalf("%s: familyTestData not fitted: %v", fam.Name(), err)
		}
		dist, err := fam.New(fit0.Estimates)
		if err != nil {
			t.Fatal(err)
		}
		r := rand.New(rand.NewPCG(uint64(len(fam.Name())), 99))
		for rep := range reps {
			for _, n := range []int{25, 200} {
				x := make([]float64, n)
				for i := range x {
					x[i] = dist.Rand(r)
				}
				for _, censored := range []string{"complete", "right", "left", "interval"}[:kinds] {
					d := auditCensoring(x, censored)
					fit, err := fam.Fit(d, opt)
					if err != nil || !fit.Converged {
						continue
					}
					label := fmt.Sprintf("%s sample %d n=%d %s", fam.Name(), rep, n, censored)
					// and the probability of exceeding the 0.8-quantile of the
					// family the sample was drawn from
					qs := append(slices.Clone(queries), auditQuery{Exceedance, dist.Quantile(0.8)})
					c, f, u := auditProfiles(t, fam, fit, d, qs, label, !loggedOnly[fam.Name()])
					checked[fam.Name()] += c
					failed[fam.Name()] += f
					unconfirmed[fam.Name()] += u
				}
			}
		}
	}
	for _, name := range slices.Sorted(maps.Keys(checked)) {
		c := checked[name]
		t.Logf("%s: %d bounds audited, %d not crossings; %d bounds left empty as not confirmed (with a note)", name, c, failed[name], unconfirmed[name])
		if regularFamilies[name] && c == 0 {
			t.Errorf("%s: no bound audited", name)
		}
	}
}

// loggedOnly are the families whose failing bounds the long audit logs
// without failing; none since weibull3's last one (sample 6, right-censored,
// the scale's upper bound 57.8 on a lower branch of the other parameters'
// maximum) was mended, see docs/INFERENCE.md.
var loggedOnly = map[string]bool{}

// auditCensoring is x as the audit records it: complete, with the top
// fifth right-censored, the bottom fifth left-censored, or every third value
// binned.
func auditCensoring(x []float64, kind string) *fitters.Data {
	switch kind {
	case "right":
		return topCensored(x, 0.8)
	case "left":
		return bottomCensored(x, 0.2)
	case "interval":
		return binned(x, 0.3)
	}
	return fitters.Complete(x)
}

// topCensored is x with its values above the q-quantile right-censored
// there (suspensions at the largest kept value).
func topCensored(x []float64, q float64) *fitters.Data { return censoredAt(x, q, false) }

// bottomCensored is x with its values below the q-quantile left-censored
// there (non-detects at the smallest kept value).
func bottomCensored(x []float64, q float64) *fitters.Data { return censoredAt(x, q, true) }

// censoredAt is x censored at its q-quantile: below it (left) or above it.
func censoredAt(x []float64, q float64, left bool) *fitters.Data {
	sorted := slices.Clone(x)
	slices.Sort(sorted)
	cut := sorted[int(q*float64(len(x)))]
	d := &fitters.Data{}
	for _, v := range x {
		switch {
		case left && v < cut:
			d.Left = append(d.Left, cut)
		case !left && v > cut:
			d.Right = append(d.Right, cut)
		default:
			d.Exact = append(d.Exact, v)
		}
	}
	return d
}

// binned is x with a fraction frac of its values (every third or so, by
// position) known only to a bin of ±10 % around them.
func binned(x []float64, frac float64) *fitters.Data {
	d := &fitters.Data{}
	step := int(1/frac + 0.5)
	for i, v := range x {
		if i%step == 0 {
			lo, hi := v-0.1*math.Abs(v), v+0.1*math.Abs(v)
			if lo == hi {
				lo, hi = v-0.1, v+0.1
			}
			d.Lower = append(d.Lower, lo)
			d.Upper = append(d.Upper, hi)
		} else {
			d.Exact = append(d.Exact, v)
		}
	}
	return d
}

// auditQuery is a derived quantity whose profile interval is audited.
type auditQuery struct {
	q   Quantity
	arg float64
}

// auditProfiles audits the profile intervals of fit's parameters and of
// queries; it returns the bounds audited and those that are not crossings,
// failing the test on them when strict.
func auditProfiles(t *testing.T, fam fitters.Family, fit *fitters.Fit, d *fitters.Data, queries []auditQuery, label string, strict bool) (checked, failed, unconfirmed int) {
	t.Helper()
	s := Settings{Level: 0.95}
	info, _ := s.information(fam, fit, d)
	target := fit.LogLik - chiSquareCut(0.95)
	report := t.Logf
	if strict {
		report = t.Errorf
	}
	audit := func(what string, p *profiler, sc Scale, est, se, lower, upper float64, lopen, uopen bool, note string) {
		if strings.Contains(note, "limiting family") || strings.Contains(note, "not the maximum") {
			return // said so, and no interval claimed from it
		}
		guardIrregular(p, fam, fit, d) // the same admissible maxima as the intervals
		unconfirmed += strings.Count(note, "not confirmed")
		vhat := sc.To(est)
		delta := 1e-3 * se / math.Abs(sc.Deriv(est))
		if !(delta > 0) || math.IsInf(delta, 0) {
			delta = 1e-4 * math.Max(1, math.Abs(vhat))
		}
		for side, b := range []float64{lower, upper} {
			if math.IsNaN(b) || (side == 0 && lopen) || (side == 1 && uopen) {
				continue // empty (with a note, checked elsewhere) or open
			}
			dir := float64(2*side - 1)
			vb := sc.To(b)
			in := continuedProfile(p, vhat, vb-dir*delta)
			out := continuedProfile(p, vhat, vb+dir*delta)
			checked++
			if !(in >= target-1e-6) || !(out <= target+1e-6) {
				failed++
				report := report
				if fam.Name() == "gev" && nonRegularShape(fam, p.theta) {
					report = t.Logf // beyond Smith's regular region: logged only
				}
				report("%s %s: bound %v is no crossing: ℓp − cut-off %.4g just inside, %.4g just outside (%s)", label, what, b, in-target, out-target, note)
			}
		}
	}
	rows, err := Intervals(fam, fit, d, MethodProfile, s)
	if err != nil {
		t.Fatal(err)
	}
	scales := scalesOf(fam, fit.Estimates)
	for i, row := range rows {
		if !row.Fixed {
			audit(row.Parameter, parameterProfiler(fam, fit, fitters.LogLikFunc(fam, d), scales, i), scales[i], row.Estimate, row.StdError,
				row.Lower, row.Upper, row.LowerOpen, row.UpperOpen, row.Note)
		}
	}
	for _, q := range queries {
		dv, err := Derived(fam, fit, d, q.q, q.arg, MethodProfile, s)
		if err != nil {
			t.Fatal(err)
		}
		if math.IsNaN(dv.Estimate) || math.IsNaN(dv.StdError) {
			continue
		}
		g, _ := quantityFunc(fam, q.q, q.arg)
		sc := quantityScale(fam, fit, q.q, dv.Estimate)
		grad := quantityGradient(g, sc, fit.Estimates, freeIndices(fit), info)
		p, _ := quantityProfiler(fam, fit, fitters.LogLikFunc(fam, d), g, quantityGap(fam, q.q, q.q.probability(q.arg)), sc, grad, info)
		audit(fmt.Sprintf("%s %v", q.q, q.arg), p, sc, dv.Estimate, dv.StdError, dv.Lower, dv.Upper, dv.LowerOpen, dv.UpperOpen, dv.Note)
	}
	return checked, failed, unconfirmed
}

// nonRegularShape reports whether theta has an extreme-value shape below
// −½, where the GEV and GPD likelihoods are not regular (Smith, 1985):
// lower local maxima where the endpoint meets an observation make the
// inner maximisations unreliable there.
func nonRegularShape(fam fitters.Family, theta []float64) bool {
	if !realShape[fam.Name()] {
		return false
	}
	for i, name := range fam.Parameters() {
		if name == "shape" && theta[i] < -0.5 {
			return true
		}
	}
	return false
}

// continuedProfile is ℓp(v) reached by continuation from vhat in 16 steps
// (each maximisation started where the previous one ended), or from the
// MLE's nuisance values, whichever is higher; −Inf past the edge of the
// parameter space.
func continuedProfile(p *profiler, vhat, v float64) float64 {
	const steps = 16
	best, warm := math.Inf(-1), p.u0
	for i := 1; i <= steps; i++ {
		ll, u, edge, ok := p.at(vhat+(v-vhat)*float64(i)/steps, warm)
		if edge && i == steps {
			return math.Inf(-1)
		}
		if edge {
			// An estimate outside the region profiled (a GPD fitted with
			// ξ̂ < −1) starts the path beyond its edge: go on.
			continue
		}
		if ok {
			warm = u
		}
		if i == steps {
			best = ll
		}
	}
	if ll, _, edge, ok := p.at(v, p.u0); !edge && ok {
		best = math.Max(best, ll)
	}
	return best
}
