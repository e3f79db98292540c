package fitters_test

// Cross-family checks of the fitting core against outside references.
//
// Source of every value here: Debian's scipy 1.10 with mpmath, through the
// scripts in testdata/reference/ (make_mle.py → mle.json, make_spot.py →
// spot.json; refdist.py holds the formulas). Rerun them with /usr/bin/python3
// to regenerate; `go test` needs no Python.
//
// Subtests are named by family (TestReferenceMLE/gamma/n250,
// TestReferenceSpot/gamma/1, …) so one family can be run alone:
//
//	go test ./fitters -run 'TestReference.*/gamma/' -count=1

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"fitseal/fitters"
)

// refNumber is a float64 read from the reference JSON, where infinities are
// written as the strings "+Inf" and "-Inf" (JSON has no infinity) and a
// missing value as null (NaN).
type refNumber float64

func (r *refNumber) UnmarshalJSON(b []byte) error {
	s := string(b)
	switch s {
	case `"+Inf"`, `"Inf"`:
		*r = refNumber(math.Inf(1))
		return nil
	case `"-Inf"`:
		*r = refNumber(math.Inf(-1))
		return nil
	case "null":
		*r = refNumber(math.NaN())
		return nil
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return fmt.Errorf("reference number %s: %w", s, err)
	}
	*r = refNumber(f)
	return nil
}

// mleReference is one dataset of mle.json with its reference maximum.
type mleReference struct {
	Family string               `json:"family"`
	Name   string               `json:"name"`
	N      int                  `json:"n"`
	Seed   int                  `json:"seed"`
	Params map[string]refNumber `json:"params"`
	Fixed  map[string]float64   `json:"fixed"`
	// Limit names parameters whose optimum is at a limit ("+Inf").
	Limit  map[string]string `json:"limit"`
	LogLik refNumber         `json:"loglik"`
	Note   string            `json:"note"`
	Data   []float64         `json:"data"`
}

func loadJSON(t testing.TB, name string, v any) {
	t.Helper()
	path := filepath.Join("..", "testdata", "reference", name)
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("reading reference values: %v (regenerate with /usr/bin/python3 testdata/reference/make_*.py)", err)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
}

func loadMLE(t testing.TB) []mleReference {
	var doc struct {
		Datasets []mleReference `json:"datasets"`
	}
	loadJSON(t, "mle.json", &doc)
	if len(doc.Datasets) == 0 {
		t.Fatal("mle.json has no datasets")
	}
	return doc.Datasets
}

// lookup returns the family or fails the (sub)test saying it is not yet registered.
func lookup(t testing.TB, name string) fitters.Family {
	t.Helper()
	f, ok := fitters.Lookup(name)
	if !ok {
		t.Fatalf("family %q is not registered: fitters.Lookup(%q) found nothing", name, name)
	}
	return f
}

// paramVector orders values given by name into f's parameter order; every
// name of f.Parameters() must be present in one of the maps.
func paramVector(t testing.TB, f fitters.Family, maps ...map[string]float64) []float64 {
	t.Helper()
	names := f.Parameters()
	v := make([]float64, len(names))
	for i, n := range names {
		found := false
		for _, m := range maps {
			if x, ok := m[n]; ok {
				v[i], found = x, true
				break
			}
		}
		if !found {
			t.Fatalf("%s: parameter %q of the family has no reference value (reference names: %v)", f.Name(), n, keysOf(maps...))
		}
	}
	return v
}

func keysOf(maps ...map[string]float64) []string {
	var k []string
	for _, m := range maps {
		for n := range m {
			k = append(k, n)
		}
	}
	sort.Strings(k)
	return k
}

func floats(m map[string]refNumber) map[string]float64 {
	out := make(map[string]float64, len(m))
	for k, v := range m {
		out[k] = float64(v)
	}
	return out
}

// specK is the number of free parameters of each continuous family with
// nothing fixed, from SPEC.md's family table (gpd's threshold is always fixed).
var specK = map[string]int{
	"normal": 2, "lognormal": 2, "exponential": 1, "gamma": 2, "weibull": 2, "gumbel": 2,
	"gev": 3, "logistic": 2, "loglogistic": 2, "invgauss": 2, "pareto": 2, "gpd": 2,
	"beta": 2, "studentt": 3, "weibull3": 3, "lognormal3": 3,
}

// paramTolerance is the tolerance on parameter name of family at reference
// value ref: 1e-6 relative. Where a parameter may sit near zero, relative
// error is meaningless, so a floor is used in the parameter's natural unit:
// a location or threshold is compared to 1e-6 of the scale (σ, or for the
// lognormal3 threshold the spread e^μ·σ), a log-scale μ to 1e-6 of σ, and
// the extreme-value shape ξ (dimensionless, O(1)) to 1e-6 absolute.
func paramTolerance(family, name string, ref float64, p map[string]float64) float64 {
	floor := 0.0
	switch {
	case name == "location":
		floor = p["scale"]
	case family == "normal" && name == "mu":
		floor = p["sigma"]
	case (family == "lognormal" || family == "lognormal3") && name == "mu":
		floor = p["sigma"]
	case family == "weibull3" && name == "threshold":
		floor = p["scale"]
	case family == "lognormal3" && name == "threshold":
		floor = math.Exp(p["mu"]) * p["sigma"]
	case (family == "gev" || family == "gpd") && name == "shape":
		floor = 1
	}
	return 1e-6 * math.Max(math.Abs(ref), floor)
}

// TestReferenceMLE checks every family's maximum-likelihood fit on the
// datasets of mle.json against the reference maxima computed with scipy and
// polished in mpmath at 60 digits (testdata/reference/make_mle.py):
//
//   - the fit converged;
//   - fitseal's log-likelihood ≥ reference − 1e-9·max(1, |reference|);
//   - the reported log-likelihood is the family's LogLik at the reported
//     estimates (to 1e-9 relative);
//   - every parameter within 1e-6 relative (floors in paramTolerance);
//   - k as in SPEC.md's table.
//
// At a limit (studentt with df → ∞, dataset normal_limit), the reference is
// the normal limit: its log-likelihood, location = mean and scale = ML
// standard deviation are compared as above, df must be reported as +Inf or
// at least 1e6 (where the log-likelihood deficit of a finite df, about
// n/(4df²)·… , is below the tolerance anyway), and the fit must say so in
// its Note (SPEC.md: "the fit says so").
func TestReferenceMLE(t *testing.T) {
	for _, ref := range loadMLE(t) {
		ref := ref
		t.Run(ref.Family+"/"+ref.Name, func(t *testing.T) {
			f := lookup(t, ref.Family)
			data := append([]float64(nil), ref.Data...)
			d := fitters.Complete(data)
			fit, err := f.Fit(d, fitters.Options{Fixed: fitters.Fixed(ref.Fixed)})
			if err != nil {
				t.Fatalf("Fit: %v", err)
			}
			if !fit.Converged {
				t.Errorf("fit not converged: %s (method %s, %d iterations, gradient norm %.3g)",
					fit.Reason, fit.Method, fit.Iterations, fit.GradientNorm)
			}
			want := float64(ref.LogLik)
			tolLL := 1e-9 * math.Max(1, math.Abs(want))
			if !(fit.LogLik >= want-tolLL) {
				t.Errorf("log-likelihood %.15g below the reference %.15g by %.3g (tolerance %.3g); estimates %v = %v",
					fit.LogLik, want, want-fit.LogLik, tolLL, fit.Parameters, fit.Estimates)
			}
			if ll := f.LogLik(fit.Estimates, d); math.Abs(ll-fit.LogLik) > tolLL {
				t.Errorf("reported log-likelihood %.15g is not LogLik at the reported estimates (%.15g)", fit.LogLik, ll)
			}
			if k := specK[ref.Family] - len(ref.Fixed); ref.Family != "gpd" && fit.K != k {
				t.Errorf("k = %d, SPEC.md's table gives %d free parameters", fit.K, k)
			}
			if ref.Family == "gpd" && fit.K != 2 {
				t.Errorf("gpd with fixed threshold: k = %d, want 2", fit.K)
			}
			p := floats(ref.Params)
			for name, rv := range p {
				got := fit.Estimate(name)
				tol := paramTolerance(ref.Family, name, rv, p)
				if !(math.Abs(got-rv) <= tol) {
					t.Errorf("%s = %.15g, reference %.15g (difference %.3g, relative %.3g; tolerance %.3g)",
						name, got, rv, got-rv, (got-rv)/rv, tol)
				}
			}
			for name, lim := range ref.Limit {
				got := fit.Estimate(name)
				if lim != "+Inf" {
					t.Fatalf("unknown limit %q in mle.json", lim)
				}
				if !(got >= 1e6) {
					t.Errorf("%s = %.6g: the reference optimum is at the limit %s → ∞ (%s)", name, got, name, ref.Note)
				}
				if fit.Note == "" && fit.Reason == "" {
					t.Errorf("optimum at the limit %s → ∞ but the fit record says nothing (Note and Reason empty)", name)
				}
			}
		})
	}
}

// TestReferenceLogLik evaluates each family's LogLik at the reference
// parameters of mle.json and compares it with the reference log-likelihood
// computed at 60 digits (to 1e-10·max(1, |ref|)): it checks the likelihood
// itself, constants included, independently of the optimiser.
func TestReferenceLogLik(t *testing.T) {
	for _, ref := range loadMLE(t) {
		ref := ref
		if len(ref.Limit) > 0 {
			continue // no finite parameter vector attains a limit's log-likelihood
		}
		t.Run(ref.Family+"/"+ref.Name, func(t *testing.T) {
			f := lookup(t, ref.Family)
			d := fitters.Complete(append([]float64(nil), ref.Data...))
			v := paramVector(t, f, floats(ref.Params), ref.Fixed)
			got := f.LogLik(v, d)
			want := float64(ref.LogLik)
			if tol := 1e-10 * math.Max(1, math.Abs(want)); !(math.Abs(got-want) <= tol) {
				t.Errorf("LogLik(%v) = %.17g, reference %.17g (difference %.3g, tolerance %.3g)", v, got, want, got-want, tol)
			}
		})
	}
}

// spotMember is one family member of spot.json with its exact values.
type spotMember struct {
	Family string             `json:"family"`
	Params map[string]float64 `json:"params"`
	XScale float64            `json:"xscale"` // the interquartile range
	// LocationFamily: the median sits at the reference point r (normal,
	// gumbel, logistic, studentt, gev), so quantile errors are measured in
	// units of at least the IQR.
	LocationFamily bool `json:"location_family"`
	Points         []struct {
		X      float64   `json:"x"`
		LogPDF refNumber `json:"logpdf"`
		LogCDF refNumber `json:"logcdf"`
		LogSF  refNumber `json:"logsf"`
		// Cond holds each value's condition number, |(x − r) v'(x)|/|v|.
		Cond struct {
			LogPDF float64 `json:"logpdf"`
			LogCDF float64 `json:"logcdf"`
			LogSF  float64 `json:"logsf"`
		} `json:"cond"`
	} `json:"points"`
	Quantiles []struct {
		P    float64   `json:"p"`
		X    refNumber `json:"x"`
		R    float64   `json:"r"`    // reference point: location, threshold, scale, 0 or beta's bound
		Cond float64   `json:"cond"` // |p Q'(p)/(Q − r)| (1 − p for p ≥ 1/2)
	} `json:"quantiles"`
}

func loadSpot(t testing.TB) []spotMember {
	var doc struct {
		Members []spotMember `json:"members"`
	}
	loadJSON(t, "spot.json", &doc)
	if len(doc.Members) == 0 {
		t.Fatal("spot.json has no members")
	}
	return doc.Members
}

// memberNames gives each member of spot.json a subtest name "family/1", "family/2", ….
func memberNames(ms []spotMember) []string {
	seen := map[string]int{}
	out := make([]string, len(ms))
	for i, m := range ms {
		seen[m.Family]++
		out[i] = fmt.Sprintf("%s/%d", m.Family, seen[m.Family])
	}
	return out
}

func paramString(p map[string]float64) string {
	var s []string
	for _, k := range keysOf(p) {
		s = append(s, fmt.Sprintf("%s=%g", k, p[k]))
	}
	return strings.Join(s, ",")
}

// TestReferenceSpot compares LogPDF, LogCDF, LogSurvival and Quantile with
// exact values (mpmath at 60 digits, cross-checked against scipy; see
// make_spot.py) at points across the support, far tails included (lower-
// and upper-tail probabilities down to 1e-30; the normal at ±40σ, where
// ln S ≈ −804.6 must be finite), and outside bounded supports.
//
// Tolerances: 1e-10 relative, loosened only where the value itself is
// ill-conditioned in its argument: tol = max(1e-10, 8·ε·κ), ε = 2^−52, with
// κ = |(x − r)·v'(x)|/|v| from spot.json, r being the point from which x is
// measured exactly (the location, the threshold, pareto's scale, 0, or
// beta's nearer bound; see make_spot.py). Even an evaluation that is exact
// for x − r a few ulps away errs by about ε·κ. In the stored points this
// loosens only gev and gpd with ξ < 0 next to the upper end of their
// support, where forming 1 + ξz cancels (gev: κ ≈ 3e9 at x = 3.83333333,
// endpoint 3.8333…; gpd: κ ≈ 1e8 at 16.9999994, endpoint 17).
//   - LogPDF: absolute tol·max(1, |ref|), i.e. the density to tol relative;
//   - LogCDF and LogSurvival: tol relative to |ref| with no floor, because
//     near 0 (ln F ≈ −1e-30 in the upper tail) the digits that matter are
//     those of the complementary probability; exact 0 and −Inf must match;
//   - Quantile: tol·|ref − r| — relative to the distance from the point
//     the quantile is measured from, so that gamma(0.3)'s Quantile(1e-6) ≈
//     7e-26 or a gpd quantile just above its threshold must be accurate in
//     its own digits — and at least tol·IQR for location families, whose
//     median sits at r.
func TestReferenceSpot(t *testing.T) {
	ms := loadSpot(t)
	names := memberNames(ms)
	for i, m := range ms {
		m := m
		t.Run(names[i], func(t *testing.T) {
			f := lookup(t, m.Family)
			dist, err := f.New(paramVector(t, f, m.Params))
			if err != nil {
				t.Fatalf("New(%s): %v", paramString(m.Params), err)
			}
			for _, pt := range m.Points {
				checks := []struct {
					what      string
					got, want float64
					cond      float64
					floorOne  bool
				}{
					{"LogPDF", dist.LogPDF(pt.X), float64(pt.LogPDF), pt.Cond.LogPDF, true},
					{"LogCDF", dist.LogCDF(pt.X), float64(pt.LogCDF), pt.Cond.LogCDF, false},
					{"LogSurvival", dist.LogSurvival(pt.X), float64(pt.LogSF), pt.Cond.LogSF, false},
				}
				for _, c := range checks {
					if !spotClose(c.got, c.want, spotTolerance(c.cond), c.floorOne) {
						t.Errorf("%s %s(%.17g) = %.17g, exact %.17g (relative error %.3g, tolerance %.3g)",
							paramString(m.Params), c.what, pt.X, c.got, c.want, relErr(c.got, c.want), spotTolerance(c.cond))
					}
				}
			}
			for _, q := range m.Quantiles {
				got, want := dist.Quantile(q.P), float64(q.X)
				unit := math.Abs(want - q.R)
				if m.LocationFamily {
					unit = math.Max(unit, m.XScale)
				}
				tol := spotTolerance(q.Cond) * unit
				if !(math.Abs(got-want) <= tol) {
					t.Errorf("%s Quantile(%.17g) = %.17g, exact %.17g (error %.3g relative to |x − %g|, tolerance %.3g)",
						paramString(m.Params), q.P, got, want, math.Abs(got-want)/unit, q.R, spotTolerance(q.Cond))
				}
			}
		})
	}
}

// spotTolerance is the relative tolerance of a spot value whose condition
// number in its argument is cond: 1e-10, or 8ε·cond where that is larger.
func spotTolerance(cond float64) float64 {
	const eps = 0x1p-52
	return math.Max(1e-10, 8*eps*cond)
}

func spotClose(got, want, tol float64, floorOne bool) bool {
	if math.IsInf(want, 0) || want == 0 {
		return got == want
	}
	scale := math.Abs(want)
	if floorOne {
		scale = math.Max(1, scale)
	}
	return math.Abs(got-want) <= tol*scale
}

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}
