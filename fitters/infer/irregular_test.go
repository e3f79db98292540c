package infer

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"fitseal/fitters"
)

// auditSample redraws sample rep of n = 25 of TestProfileBoundsAreCrossings
// for fam (the same stream: each repetition draws n = 25, then n = 200)
// with its censoring kind, and fits it.
func auditSample(t *testing.T, fam fitters.Family, rep int, kind string) (*fitters.Fit, *fitters.Data) {
	t.Helper()
	d0, opt := familyTestData(fam)
	fit0, err := fam.Fit(d0, opt)
	if err != nil {
		t.Fatal(err)
	}
	dist, err := fam.New(fit0.Estimates)
	if err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewPCG(uint64(len(fam.Name())), 99))
	var x []float64
	for k := 0; k <= rep; k++ {
		for _, n := range []int{25, 200} {
			v := make([]float64, n)
			for i := range v {
				v[i] = dist.Rand(r)
			}
			if k == rep && n == 25 {
				x = v
			}
		}
	}
	d := auditCensoring(x, kind)
	fit, err := fam.Fit(d, opt)
	if err != nil || !fit.Converged {
		t.Fatalf("sample not fitted: %v", err)
	}
	return fit, d
}

// TestIrregularProfileBounds checks bounds of irregular families that the
// long audit found not to be crossings before the irregular profiles were
// guarded (guardIrregular), each now either a crossing by the audit's
// definition or left empty with a "not confirmed" note. Beside each case:
// the old bound, and what an independent maximisation at it showed (18
// starts around the MLE's nuisance values and the continuation's, the
// highest admissible maximum; docs/INFERENCE.md): which side was wrong.
func TestIrregularProfileBounds(t *testing.T) {
	if testing.Short() {
		t.Skip("profiles some 20 intervals")
	}
	for _, c := range []struct {
		family, kind string
		rep          int
		what         string // parameter, or quantity:argument
		upper        bool
		old          float64
		want         string // "crossing", "unconfirmed" or "crossing or noted"
		moved        int    // sign of the change from old a crossing must show (0: none required)
	}{
		// the audit was wrong: its start from the MLE ran into the unbounded
		// corner (threshold at the smallest value, shape 0.44); the walk's
		// branch (shape 5.2, threshold −73) crosses at the old bound
		{"weibull3", "complete", 8, "scale", true, 148.04826288845277, "crossing", 0},
		// the audit was wrong: its path started beyond ξ = −1 (ξ̂ = −1.30);
		// started inside, ℓp − cut-off is +0.0021 / −0.0021 either side
		{"gpd", "right", 5, "shape", true, -0.5191320510368124, "crossing", 0},
		// the bound was wrong: the solve for the scale failed from the
		// walk's state (the quantile's log undefined), taken for the edge;
		// from the MLE's values ℓp is 1.15 above the cut-off beyond it
		// (the walk now meets a jump of its own maximisations before the
		// crossing and leaves the bound empty with a note: no longer a
		// silent wrong number, but no number either)
		{"weibull3", "left", 9, "quantile:0.1", false, 13.027714038141148, "crossing or noted", -1},
		// the bound was wrong: the walk followed df → ∞ while a maximum at
		// df = 1.2 is 0.43 above the cut-off
		{"studentt", "left", 3, "quantile:0.9", true, 157.524309754975, "crossing", +1},
		// the bound was wrong: the walk stayed on the edge ξ = −1 while an
		// interior maximum (ξ = −0.77) is 0.25 above the cut-off
		{"gpd", "right", 5, "quantile:0.9", true, 156.72684474770585, "crossing", +1},
		// the bound was wrong: ℓp flattens towards the two-parameter limit
		// (shape 546, threshold −16,946), 0.84 above the cut-off; no
		// maximum is attained there (the walk now goes on along the ridge
		// until its maximisations jump, and leaves the bound empty)
		{"weibull3", "left", 8, "shape", true, 546.4360998825586, "unconfirmed", 0},
		// the bound was wrong: at the old bound two maxima of the other
		// parameters coexist, (shape 1.27, threshold 30.2) reached from the
		// MLE's values and the walk's last point, ℓp at the cut-off, and
		// (shape 1.95, threshold 20.5) reached along a path from the
		// estimate, 0.20 above it; on that branch the profile crosses at
		// 59.7 (bestAt now also starts at the end of such a path)
		{"weibull3", "right", 6, "scale", true, 57.805190642643005, "crossing", +1},
		// a bracket closed on points where no maximum of the other
		// parameters was found is no crossing: ℓp is about 1 above the
		// cut-off from 3 to 11 (the threshold running off below the data),
		// where the search with the path of the case above had put 5.52;
		// the bound is now not confirmed, with a note
		{"weibull3", "left", 8, "quantile:0.1", false, 5.524302881100296, "unconfirmed", 0},
		// the same towards the normal limit (σ 5e−5, threshold −7e5): the
		// maximisations from different starts disagree by up to 5 units
		{"lognormal3", "complete", 2, "sigma", false, 2.1254622655103614e-05, "unconfirmed", 0},
	} {
		name := fmt.Sprintf("%s/%d/%s/%s/upper=%v", c.family, c.rep, c.kind, c.what, c.upper)
		t.Run(name, func(t *testing.T) {
			fam := family(t, c.family)
			fit, d := auditSample(t, fam, c.rep, c.kind)
			s := Settings{Level: 0.95}
			info, _ := s.information(fam, fit, d)
			var (
				p               *profiler
				sc              Scale
				est, se, lo, hi float64
				loOpen, hiOpen  bool
				note            string
			)
			if q, arg, ok := strings.Cut(c.what, ":"); ok {
				var a float64
				fmt.Sscan(arg, &a)
				dv, err := Derived(fam, fit, d, Quantity(q), a, MethodProfile, s)
				if err != nil {
					t.Fatal(err)
				}
				g, _ := quantityFunc(fam, Quantity(q), a)
				sc = quantityScale(fam, fit, Quantity(q), dv.Estimate)
				grad := quantityGradient(g, sc, fit.Estimates, freeIndices(fit), info)
				p, _ = quantityProfiler(fam, fit, fitters.LogLikFunc(fam, d), g, quantityGap(fam, Quantity(q), Quantity(q).probability(a)), sc, grad, info)
				est, se, lo, hi, loOpen, hiOpen, note = dv.Estimate, dv.StdError, dv.Lower, dv.Upper, dv.LowerOpen, dv.UpperOpen, dv.Note
			} else {
				rows, err := Intervals(fam, fit, d, MethodProfile, s)
				if err != nil {
					t.Fatal(err)
				}
				scales := scalesOf(fam, fit.Estimates)
				for i, r := range rows {
					if r.Parameter == c.what {
						p, sc = parameterProfiler(fam, fit, fitters.LogLikFunc(fam, d), scales, i), scales[i]
						est, se, lo, hi, loOpen, hiOpen, note = r.Estimate, r.StdError, r.Lower, r.Upper, r.LowerOpen, r.UpperOpen, r.Note
					}
				}
			}
			guardIrregular(p, fam, fit, d)
			b, open, dir := lo, loOpen, -1.0
			if c.upper {
				b, open, dir = hi, hiOpen, 1
			}
			switch c.want {
			case "unconfirmed":
				if !(open || (math.IsNaN(b) && (strings.Contains(note, "not confirmed") || strings.Contains(note, "jumps")))) {
					t.Fatalf("bound %v (open %v), note %q: want it open, or empty with a note (not confirmed, or a jump)", b, open, note)
				}
			case "crossing", "crossing or noted":
				if c.want == "crossing or noted" && math.IsNaN(b) && (strings.Contains(note, "not confirmed") || strings.Contains(note, "jumps")) {
					return
				}
				if math.IsNaN(b) || open {
					t.Fatalf("bound %v open %v (%s), want a closed bound", b, open, note)
				}
				target := fit.LogLik - chiSquareCut(0.95)
				delta := 1e-3 * se / math.Abs(sc.Deriv(est))
				vhat, vb := sc.To(est), sc.To(b)
				in := continuedProfile(p, vhat, vb-dir*delta)
				out := continuedProfile(p, vhat, vb+dir*delta)
				if !(in >= target-1e-6) || !(out <= target+1e-6) {
					t.Errorf("bound %v: ℓp − cut-off %.4g just inside, %.4g just outside, want a crossing", b, in-target, out-target)
				}
				if c.moved == 0 && math.Abs(b-c.old) > 1e-6*math.Abs(c.old) {
					t.Errorf("bound %v, want the old %v (it was right)", b, c.old)
				}
				if c.moved != 0 && !(float64(c.moved)*(b-c.old) > 0) {
					t.Errorf("bound %v, want it beyond the old %v", b, c.old)
				}
			}
		})
	}
}

// TestIrregularFalseMaxima: two samples on which a profile reported a
// log-likelihood above the fit's ("the fit is not the maximum") where
// scipy finds the fit to be the maximum from every start
// (testdata/infer/make_false_maxima.py → false_maxima.json). For the
// Student t the profile of df had gone below 1/(n − 1), where a spike on
// one observation makes the likelihood unbounded; guarded, its lower bound
// is scipy's crossing of the profile with the cut-off. For the
// three-parameter lognormal the profile of the threshold had gone 10¹³
// below the data, where the log-likelihood has lost its last digits; that
// side is now empty with a note (a ridge towards the normal limit, or a
// jump of the maximisations), with no claim that the fit is beaten.
func TestIrregularFalseMaxima(t *testing.T) {
	b, err := os.ReadFile("../../testdata/infer/false_maxima.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Studentt struct {
			X         []float64 `json:"x"`
			LogLikHat float64   `json:"loglik_hat"`
			DfLower   float64   `json:"df_lower"`
		} `json:"studentt"`
		Lognormal3 struct {
			X         []float64 `json:"x"`
			LogLikHat float64   `json:"loglik_hat"`
		} `json:"lognormal3"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		family, parameter string
		x                 []float64
		loglik            float64
		lower             float64 // NaN: not confirmed, with a note
	}{
		{"studentt", "df", ref.Studentt.X, ref.Studentt.LogLikHat, ref.Studentt.DfLower},
		{"lognormal3", "threshold", ref.Lognormal3.X, ref.Lognormal3.LogLikHat, math.NaN()},
	} {
		fam := family(t, c.family)
		d := fitters.Complete(c.x)
		fit, err := fam.Fit(d, fitters.Options{})
		if err != nil || !fit.Converged {
			t.Fatalf("%s: not fitted: %v", c.family, err)
		}
		if math.Abs(fit.LogLik-c.loglik) > 1e-9 {
			t.Errorf("%s: log-likelihood %v, scipy %v", c.family, fit.LogLik, c.loglik)
		}
		rows, err := Intervals(fam, fit, d, MethodProfile, Settings{Level: 0.95})
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range rows {
			if r.AboveFit || strings.Contains(r.Note, "not the maximum") {
				t.Errorf("%s %s: the fit is said to be beaten: %q", c.family, r.Parameter, r.Note)
			}
			if r.Parameter != c.parameter {
				continue
			}
			switch {
			case math.IsNaN(c.lower):
				// amd64 meets the ridge rule first; arm64, whose last bits
				// differ, meets a jump of the maximisations first
				if !math.IsNaN(r.Lower) || !(strings.Contains(r.Note, "lower: not confirmed near") && strings.Contains(r.Note, "ridge") ||
					strings.Contains(r.Note, "lower: the profile log-likelihood jumps")) {
					t.Errorf("%s %s: lower bound %v, note %q; want none, not confirmed on a ridge or a jump", c.family, r.Parameter, r.Lower, r.Note)
				}
			case !(math.Abs(r.Lower-c.lower) <= 1e-8*c.lower):
				t.Errorf("%s %s: lower bound %v, scipy's profile crosses at %v (%q)", c.family, r.Parameter, r.Lower, c.lower, r.Note)
			}
		}
	}
}

// TestIrregularScaleBoundMatchesScipy: the upper profile bound of a
// three-parameter Weibull's scale on a right-censored sample, which was put
// at 57.8 on a lower branch of the other parameters' maximum, is scipy's
// crossing of the profile on the higher one
// (testdata/infer/make_weibull3_scale.py → weibull3_scale_profile.json; the
// sample is TestProfileBoundsAreCrossings' own, weibull3_sample6_right.json).
func TestIrregularScaleBoundMatchesScipy(t *testing.T) {
	var sample struct {
		Exact []float64 `json:"exact"`
		Right []float64 `json:"right"`
	}
	var ref struct {
		LogLikHat  float64 `json:"loglik_hat"`
		ScaleUpper float64 `json:"scale_upper"`
		Old        float64 `json:"old_bound"`
		AboveAtOld float64 `json:"above_cut_at_old_bound"`
	}
	for file, v := range map[string]any{"weibull3_sample6_right.json": &sample, "weibull3_scale_profile.json": &ref} {
		b, err := os.ReadFile("../../testdata/infer/" + file)
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(b, v); err != nil {
			t.Fatal(err)
		}
	}
	fam := family(t, "weibull3")
	// The sample as stored (drawn on amd64; arm64's math library draws it
	// with other last bits), fitted as the audit fits it.
	_, audit := auditSample(t, fam, 6, "right")
	close := func(a, b []float64) bool {
		if len(a) != len(b) {
			return false
		}
		for i := range a {
			if math.Abs(a[i]-b[i]) > 1e-9*math.Abs(b[i]) {
				return false
			}
		}
		return true
	}
	if !close(audit.Exact, sample.Exact) || !close(audit.Right, sample.Right) {
		t.Fatal("weibull3_sample6_right.json is not the audit's sample 6")
	}
	d := &fitters.Data{Exact: sample.Exact, Right: sample.Right}
	_, opt := familyTestData(fam)
	fit, err := fam.Fit(d, opt)
	if err != nil || !fit.Converged {
		t.Fatalf("not fitted: %v", err)
	}
	if math.Abs(fit.LogLik-ref.LogLikHat) > 1e-8 {
		t.Errorf("log-likelihood %v, scipy %v", fit.LogLik, ref.LogLikHat)
	}
	if !(ref.AboveAtOld > 0.1) {
		t.Fatalf("the reference does not show the old bound %v inside (%v above the cut-off)", ref.Old, ref.AboveAtOld)
	}
	rows, err := Intervals(fam, fit, d, MethodProfile, Settings{Level: 0.95})
	if err != nil {
		t.Fatal(err)
	}
	if got := rows[1].Upper; rows[1].Parameter != "scale" || !(math.Abs(got-ref.ScaleUpper) <= 1e-8*ref.ScaleUpper) {
		t.Errorf("%s upper bound %v (%s), scipy's crossing %v", rows[1].Parameter, got, rows[1].Note, ref.ScaleUpper)
	}
}
