package infer

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"strings"
	"testing"

	"fitseal/fitters"

	"gonum.org/v1/gonum/mat"
)

// normalWithInformation is the normal family with its observed information
// in closed form: for complete data, with S₁ = Σ(x−μ), S₂ = Σ(x−μ)²,
//
//	−∂²ℓ/∂μ² = n/σ²,  −∂²ℓ/∂μ∂σ = 2S₁/σ³,  −∂²ℓ/∂σ² = −n/σ² + 3S₂/σ⁴.
type normalWithInformation struct{ fitters.Family }

func (normalWithInformation) ObservedInformation(p []float64, d *fitters.Data, h *mat.SymDense) bool {
	if !d.IsComplete() {
		return false
	}
	mu, s := p[0], p[1]
	var s1, s2 float64
	for _, x := range d.Exact {
		s1 += x - mu
		s2 += (x - mu) * (x - mu)
	}
	n := float64(len(d.Exact))
	h.SetSym(0, 0, n/(s*s))
	h.SetSym(0, 1, 2*s1/(s*s*s))
	h.SetSym(1, 1, -n/(s*s)+3*s2/(s*s*s*s))
	return true
}

// TestInformationAnalyticAndNumeric: the analytic hook is used when a
// family offers it, and the finite-difference Hessian agrees with the
// closed form at the MLE and away from it (where the cross term is not 0).
func TestInformationAnalyticAndNumeric(t *testing.T) {
	fam := normalWithInformation{family(t, "normal")}
	d := fitters.Complete(ballBearings)
	fit := fitOf(t, fam, d)
	for _, shift := range []float64{0, 5} {
		f := *fit
		f.Estimates = []float64{fit.Estimates[0] + shift, fit.Estimates[1] * (1 + shift/50)}
		an, err := ObservedInformation(fam, &f, d)
		if err != nil || an.Method != "analytic" {
			t.Fatalf("analytic: %v, method %q", err, an.Method)
		}
		num, err := observedInformation(fam, &f, d, false)
		if err != nil || num.Method != numericMethod {
			t.Fatalf("numeric: %v, method %q", err, num.Method)
		}
		for i := 0; i < 2; i++ {
			for j := 0; j < 2; j++ {
				a, b := an.Hessian.At(i, j), num.Hessian.At(i, j)
				if math.Abs(a-b) > 1e-8*math.Sqrt(an.Hessian.At(i, i)*an.Hessian.At(j, j)) {
					t.Errorf("shift %v: H[%d][%d] numeric %v, analytic %v", shift, i, j, b, a)
				}
			}
		}
	}
}

// TestInformationNotInvertible: an estimate that is not a maximum (σ at
// three times its MLE, where ∂²ℓ/∂σ² = n/σ² − 3S₂/σ⁴ > 0) gives an
// indefinite information, and a parameter the likelihood ignores a
// singular one; neither is inverted.
func TestInformationNotInvertible(t *testing.T) {
	fam := family(t, "normal")
	d := fitters.Complete(ballBearings)
	fit := fitOf(t, fam, d)
	f := *fit
	f.Estimates = []float64{fit.Estimates[0], 3 * fit.Estimates[1]}
	info, err := ObservedInformation(fam, &f, d)
	if !errors.Is(err, ErrIndefiniteHessian) || info.Covariance != nil || !math.IsNaN(info.StdErrors[0]) {
		t.Errorf("saddle: err %v, covariance %v", err, info.Covariance)
	}
	ig := ignoring{fam}
	info, err = ObservedInformation(ig, fit, d)
	if !errors.Is(err, ErrSingularHessian) || info.Covariance != nil {
		t.Errorf("ignored parameter: err %v", err)
	}
	rows, err := Intervals(ig, fit, d, MethodWald, Settings{})
	if err != nil || !math.IsNaN(rows[0].Lower) || rows[0].Note == "" {
		t.Errorf("Wald with a singular information: %+v, %v; want no interval and a note", rows[0], err)
	}
}

// ignoring is a normal whose log-likelihood ignores σ beyond its sign.
type ignoring struct{ fitters.Family }

func (f ignoring) LogLik(p []float64, d *fitters.Data) float64 {
	if !(p[1] > 0) {
		return math.Inf(-1)
	}
	return f.Family.LogLik([]float64{p[0], 30}, d)
}

// plateau is a one-parameter test family whose log-likelihood
//
//	ℓ(θ) = −(ln θ)² for θ ≤ 1,  −(1 − 1/θ)/2 for θ > 1
//
// peaks at θ = 1 and levels off at −1/2 above it, never reaching the 95%
// cut-off −χ²₁(0.95)/2 = −1.92: the profile interval's upper side is open,
// its lower end is exp(−√(χ²₁(0.95)/2)).
type plateau struct{ fitters.Family }

func (plateau) Name() string         { return "plateau" }
func (plateau) Parameters() []string { return []string{"scale"} }
func (plateau) New(p []float64) (fitters.Dist, error) {
	if !(p[0] > 0) || math.IsInf(p[0], 0) {
		return nil, errors.New("plateau: scale must be positive")
	}
	return fitters.Exponential{Rate: 1 / p[0]}, nil
}
func (plateau) LogLik(p []float64, _ *fitters.Data) float64 {
	if !(p[0] > 0) {
		return math.Inf(-1)
	}
	if p[0] <= 1 {
		l := math.Log(p[0])
		return -l * l
	}
	return -(1 - 1/p[0]) / 2
}

func TestProfileOpenSide(t *testing.T) {
	fam := plateau{family(t, "exponential")}
	fit := &fitters.Fit{Family: "plateau", Parameters: []string{"scale"}, Estimates: []float64{1},
		Fixed: []bool{false}, LogLik: 0, K: 1, N: 1, Convergence: fitters.Convergence{Converged: true}}
	rows, err := Intervals(fam, fit, fitters.Complete([]float64{1}), MethodProfile, Settings{Level: 0.95})
	if err != nil {
		t.Fatal(err)
	}
	r := rows[0]
	want := math.Exp(-math.Sqrt(chi95 / 2))
	if !close(r.Lower, want, 1e-8) || r.LowerOpen {
		t.Errorf("lower %v (open %v), want %v", r.Lower, r.LowerOpen, want)
	}
	if !r.UpperOpen || !math.IsInf(r.Upper, 1) || r.Note == "" {
		t.Errorf("upper %v open %v note %q: want an open side reported", r.Upper, r.UpperOpen, r.Note)
	}
}

// TestInformationIsUnitFree: the same seven values in six units (×1e-12 …
// ×1e9, as concentrations in kg/L or ng/L) give every scale-type family the
// same standard errors relative to the estimates (and the same absolute
// ones for shapes and for lognormal's mu): the checks of the information
// work per relative change of the parameters. Before, the raw eigenvalue
// ratio of a gamma (shape ≈ 2 beside rate ≈ 1e9) read as singular and the
// family lost its standard errors, and with them its place in the model
// average, in some units only.
func TestInformationIsUnitFree(t *testing.T) {
	base := []float64{1.2, 3.4, 0.5, 2.2, 7.1, 1.9, 4.4}
	units := []float64{1, 1e-12, 1e-9, 1e-6, 1e3, 1e9}
	for _, name := range []string{"gamma", "weibull", "loglogistic", "lognormal", "invgauss", "exponential", "gev", "gumbel", "normal", "logistic"} {
		fam := family(t, name)
		var ref []float64 // se/|estimate| (or se) at unit 1
		for _, c := range units {
			x := make([]float64, len(base))
			for i, v := range base {
				x[i] = v * c
			}
			d := fitters.Complete(x)
			fit := fitOf(t, fam, d)
			info, err := ObservedInformation(fam, fit, d)
			if err != nil {
				t.Errorf("%s ×%g: %v", name, c, err)
				continue
			}
			rel := make([]float64, len(fit.Estimates))
			for i, se := range info.StdErrors {
				rel[i] = se / math.Abs(fit.Estimates[i])
				if name == "lognormal" && fit.Parameters[i] == "mu" {
					rel[i] = se // mu moves by ln c: its se does not scale
				}
			}
			if ref == nil {
				ref = rel
				continue
			}
			for i := range rel {
				if math.Abs(rel[i]-ref[i]) > 1e-6*ref[i] {
					t.Errorf("%s ×%g: %s: relative se %.10g, at ×1 %.10g", name, c, fit.Parameters[i], rel[i], ref[i])
				}
			}
		}
	}
}

// TestInformationAtParetoCorner: a Pareto scale estimated at a corner of
// the likelihood (an interval's lower end, where the slope in the scale
// jumps; testdata/censored/pareto_bins.json, bins of relative width 0.5,
// whose corner lies above the smallest lower end, so that differences
// across it stay finite) has no observed information, as the scale at the
// smallest exact value has none (there the Hessian is not finite): no
// standard errors and a reason naming the corner, instead of a finite
// difference taken across it. A maximum between the corners (bins of
// relative width 0.1) keeps its standard errors.
func TestInformationAtParetoCorner(t *testing.T) {
	b, err := os.ReadFile("../../testdata/censored/pareto_bins.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Fits []struct {
			Name                             string
			Kind                             string
			Exact, Left, Right, Lower, Upper []float64
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	fam := family(t, "pareto")
	seen := map[string]bool{}
	for _, c := range ref.Fits {
		if c.Name != "relative width 0.5" && c.Name != "relative width 0.1" {
			continue
		}
		seen[c.Kind] = true
		d := &fitters.Data{Exact: c.Exact, Left: c.Left, Right: c.Right, Lower: c.Lower, Upper: c.Upper}
		fit := fitOf(t, fam, d)
		info, err := ObservedInformation(fam, fit, d)
		switch c.Kind {
		case "corner":
			if !errors.Is(err, ErrNonFiniteHessian) || !strings.Contains(err.Error(), "corner") || info.Covariance != nil ||
				!math.IsNaN(info.StdErrors[0]) || !math.IsNaN(info.StdErrors[1]) {
				t.Errorf("%s: at the corner %v: error %v, standard errors %v", c.Name, fit.Estimates[0], err, info.StdErrors)
			}
		case "interior":
			if err != nil || !(info.StdErrors[0] > 0) || !(info.StdErrors[1] > 0) {
				t.Errorf("%s: between corners: error %v, standard errors %v", c.Name, err, info.StdErrors)
			}
		}
	}
	if !seen["corner"] || !seen["interior"] {
		t.Errorf("cases %v", seen)
	}
}
