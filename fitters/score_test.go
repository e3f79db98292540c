package fitters

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

// scoredFam is a family with an analytic score (score.go).
type scoredFam interface {
	Family
	Score(params []float64, d *Data) []float64
}

// scoredFamilies are the families of score.go.
var scoredFamilies = []string{"normal", "lognormal", "exponential", "gamma", "weibull", "gumbel", "logistic", "loglogistic", "invgauss"}

// scoreRef is one mle.json dataset of a scored family: parameters at the
// reference maximum (scipy, polished in mpmath at 60 digits,
// testdata/reference/make_mle.py) and the data.
type scoreRef struct {
	Family string             `json:"family"`
	Name   string             `json:"name"`
	Params map[string]float64 `json:"params"`
	Data   []float64          `json:"data"`
}

// loadScoreRefs reads the mle.json datasets of the scored families.
func loadScoreRefs(t *testing.T) []scoreRef {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "mle.json"))
	if err != nil {
		t.Fatalf("reading reference values: %v", err)
	}
	var doc struct {
		Datasets []json.RawMessage `json:"datasets"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	want := map[string]bool{}
	for _, n := range scoredFamilies {
		want[n] = true
	}
	var out []scoreRef
	for _, raw := range doc.Datasets {
		var head struct {
			Family string `json:"family"`
		}
		if err := json.Unmarshal(raw, &head); err != nil {
			t.Fatal(err)
		}
		if !want[head.Family] {
			continue // other families may hold "+Inf" parameters
		}
		var r scoreRef
		if err := json.Unmarshal(raw, &r); err != nil {
			t.Fatalf("%s: %v", head.Family, err)
		}
		out = append(out, r)
	}
	if len(out) == 0 {
		t.Fatal("mle.json has no dataset of a scored family")
	}
	return out
}

// scoredFamily unwraps the registered family (checkedFamily) and asserts it
// has a Score.
func scoredFamily(t *testing.T, name string) scoredFam {
	t.Helper()
	f, ok := registry[name]
	if !ok {
		t.Fatalf("family %q is not registered", name)
	}
	if c, ok := f.(checkedFamily); ok {
		f = c.Family
	}
	s, ok := f.(scoredFam)
	if !ok {
		t.Fatalf("%s has no Score method", name)
	}
	return s
}

// scoreUnit is the natural unit of a parameter: the scale for a location
// (and for the lognormal's μ, σ), else its magnitude.
func scoreUnit(family, name string, p map[string]float64) float64 {
	switch {
	case name == "location":
		return p["scale"]
	case name == "mu":
		return p["sigma"]
	}
	return math.Abs(p[name])
}

func (r scoreRef) vector(f Family) []float64 {
	names := f.Parameters()
	v := make([]float64, len(names))
	for i, n := range names {
		v[i] = r.Params[n]
	}
	return v
}

// TestScoreFiniteDifference checks each analytic score against central
// finite differences of LogLik (gonum diff/fd, step 1e-5 of the parameter's
// unit) at random points near the reference optimum of every mle.json
// dataset, as TestPropertyScore does, with the same tolerance
// 1e-6·|fd| + 1e-9·max(1, |ℓ|)/h. It runs on complete data, and on the same
// data with the lowest two values made non-detects, the highest three
// suspensions and one value an interval, where the censored terms are
// themselves finite differences (censoredScore).
func TestScoreFiniteDifference(t *testing.T) {
	rng := rand.New(rand.NewPCG(20261202, 7))
	for _, ref := range loadScoreRefs(t) {
		for _, censored := range []bool{false, true} {
			label := ref.Family + "/" + ref.Name + "/complete"
			if censored {
				label = ref.Family + "/" + ref.Name + "/censored"
			}
			t.Run(label, func(t *testing.T) {
				f := scoredFamily(t, ref.Family)
				d := Complete(append([]float64(nil), ref.Data...))
				if censored {
					d = censorForScore(ref.Data)
				}
				base := ref.vector(f)
				names := f.Parameters()
				for trial := 0; trial < 3; trial++ {
					theta := append([]float64(nil), base...)
					for i, n := range names {
						theta[i] += 0.01 * rng.NormFloat64() * scoreUnit(ref.Family, n, ref.Params)
					}
					ll := f.LogLik(theta, d)
					g := f.Score(theta, d)
					if len(g) != len(theta) {
						t.Fatalf("Score returned %d components for %d parameters", len(g), len(theta))
					}
					for i, n := range names {
						h := 1e-5 * scoreUnit(ref.Family, n, ref.Params)
						num := fd.Derivative(func(v float64) float64 {
							th := append([]float64(nil), theta...)
							th[i] = v
							return f.LogLik(th, d)
						}, theta[i], &fd.Settings{Formula: fd.Central, Step: h})
						tol := 1e-6*math.Abs(num) + 1e-9*math.Max(1, math.Abs(ll))/h
						if !(math.Abs(g[i]-num) <= tol) {
							t.Errorf("at %v: score[%s] = %.12g, finite difference %.12g (tolerance %.3g)", theta, n, g[i], num, tol)
						}
					}
				}
			})
		}
	}
}

// censorForScore turns sorted copies of x into mixed data: the two lowest
// values non-detects at their value, the three highest suspensions, and the
// middle value an interval (0.9x, 1.1x] (x > 0 here, or around x for the
// real-line families, whose middle value is not 0 in mle.json).
func censorForScore(x []float64) *Data {
	s := append([]float64(nil), x...)
	sortFloats(s)
	n := len(s)
	mid := n / 2
	d := &Data{Left: s[:2:2], Right: s[n-3:]}
	for i := 2; i < n-3; i++ {
		if i == mid {
			a, b := 0.9*s[i], 1.1*s[i]
			if a > b {
				a, b = b, a
			}
			d.Lower, d.Upper = []float64{a}, []float64{b}
			continue
		}
		d.Exact = append(d.Exact, s[i])
	}
	return d
}

// sortFloats is an insertion sort (the datasets are small).
func sortFloats(s []float64) {
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
}

// TestScoreZeroAtReferenceMLE checks that the score vanishes at the
// reference maximum-likelihood estimates of mle.json (scipy, polished in
// mpmath at 60 digits; testdata/reference/make_mle.py): |∂ℓ/∂θᵢ|·unitᵢ is
// at most 1e-7·n, the size left by rounding the estimates to float64
// (common practice).
func TestScoreZeroAtReferenceMLE(t *testing.T) {
	for _, ref := range loadScoreRefs(t) {
		t.Run(ref.Family+"/"+ref.Name, func(t *testing.T) {
			f := scoredFamily(t, ref.Family)
			d := Complete(append([]float64(nil), ref.Data...))
			g := f.Score(ref.vector(f), d)
			n := float64(len(ref.Data))
			for i, name := range f.Parameters() {
				u := scoreUnit(ref.Family, name, ref.Params)
				if !(math.Abs(g[i])*u <= 1e-7*n) {
					t.Errorf("score[%s] = %.6g at the reference MLE (×unit %.3g = %.3g, limit %.3g)", name, g[i], u, math.Abs(g[i])*u, 1e-7*n)
				}
			}
		})
	}
}

// TestScoreInvalidParameters checks that a score at invalid parameters is
// NaN in every component, never a number that could steer an optimiser.
func TestScoreInvalidParameters(t *testing.T) {
	d := Complete([]float64{1, 2, 3})
	for _, name := range scoredFamilies {
		f := scoredFamily(t, name)
		p := make([]float64, len(f.Parameters()))
		for i := range p {
			p[i] = -1
		}
		for i, v := range f.Score(p, d) {
			if !math.IsNaN(v) {
				t.Errorf("%s: Score(%v)[%d] = %v, want NaN", name, p, i, v)
			}
		}
	}
}

// TestAnalyticScore checks that AnalyticScore finds the score of exactly
// the scored families through Lookup's wrapper, and that it is their Score.
func TestAnalyticScore(t *testing.T) {
	want := map[string]bool{}
	for _, n := range scoredFamilies {
		want[n] = true
	}
	d := Complete([]float64{0.5, 1.5, 2.5, 4})
	for _, f := range Families() {
		score, ok := AnalyticScore(f)
		if ok != want[f.Name()] {
			t.Errorf("AnalyticScore(%s) found = %v, want %v", f.Name(), ok, want[f.Name()])
			continue
		}
		if !ok {
			continue
		}
		p := make([]float64, len(f.Parameters()))
		for i := range p {
			p[i] = 1.5
		}
		got, direct := score(p, d), scoredFamily(t, f.Name()).Score(p, d)
		for i := range got {
			if got[i] != direct[i] {
				t.Errorf("%s: AnalyticScore gives %v, Score gives %v", f.Name(), got, direct)
				break
			}
		}
	}
}
