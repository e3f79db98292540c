package fitters

import (
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// Reference: testdata/families/beta.json (scipy beta, careful multi-start
// maximisation; spot values by mpmath at 60 digits, make_multi.py).
func TestBetaReferenceFits(t *testing.T) {
	multiCheckFits(t, "beta", 1e-6, func(int, []float64) float64 { return 0 })
}

func TestBetaSpotValues(t *testing.T) { multiCheckSpots(t, "beta", 1e-9) }

func TestBetaGradient(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	var s1, s2 float64
	for i := 0; i < 30; i++ {
		x := Beta{2, 5}.Rand(r)
		s1 += math.Log(x)
		s2 += math.Log1p(-x)
	}
	for _, th := range [][]float64{{0, 0}, {math.Log(2), math.Log(5)}, {-1, 3}, {4, 4}} {
		multiCheckGradient(t, "beta", betaNLL(30, s1, s2), th, 1e-6)
	}
	multiCheckRoundTrip(t, Beta{2, 5}, []float64{1e-6, 0.01, 0.3, 0.7, 0.99})
	multiCheckRoundTrip(t, Beta{0.5, 0.5}, []float64{1e-9, 0.01, 0.5, 0.999999})
}

func TestBetaApplicable(t *testing.T) {
	for _, x := range [][]float64{{0, 0.5, 0.7}, {0.2, 1, 0.4}, {0.2, -0.1}, {0.3}} {
		if err := (betaFamily{}).Applicable(Complete(x), nil); !errors.Is(err, ErrInapplicable) {
			t.Errorf("%v: got %v, want an InapplicableError", x, err)
		}
	}
}

func TestBetaCensored(t *testing.T) {
	// Non-detects below 0.05 and interval-censored values, as proportions
	// are often reported; the fit converges and is a local maximum.
	ref := loadMultiRef(t, "beta")
	d := &Data{}
	for i, v := range ref.Cases[0].Data {
		switch {
		case v < 0.1:
			d.Left = append(d.Left, 0.1)
		case i%7 == 0:
			d.Lower = append(d.Lower, math.Floor(v*10)/10)
			d.Upper = append(d.Upper, math.Floor(v*10)/10+0.1)
		default:
			d.Exact = append(d.Exact, v)
		}
	}
	fit, err := betaFamily{}.Fit(d, Options{})
	if err != nil || !fit.Converged {
		t.Fatalf("err %v fit %+v", err, fit)
	}
	multiCheckNearby(t, betaFamily{}, fit, d)
}

// trigammaPositive against mpmath.psi(1, x) at 30 digits (Debian
// python3-mpmath 1.2.1).
func TestTrigammaPositive(t *testing.T) {
	for _, c := range []struct{ x, want float64 }{
		{0.3, 12.245364546107731301}, {2.5, 0.49035775610023486497}, {6, 0.18132295573711532536},
		{40, 0.025315103841291028158}, {1e4, 0.00010000500016666666633},
	} {
		if got := trigammaPositive(c.x); math.Abs(got-c.want) > 1e-14*c.want {
			t.Errorf("ψ'(%v) = %.17g, mpmath %.17g", c.x, got, c.want)
		}
	}
}

// betaNewton reaches the root of the score from a nearby point: the
// gradient there is at rounding level.
func TestBetaNewton(t *testing.T) {
	ref := loadMultiRef(t, "beta")
	x := ref.Cases[0].Data
	var s1, s2 float64
	for _, v := range x {
		s1 += math.Log(v)
		s2 += math.Log1p(-v)
	}
	n := float64(len(x))
	th, ok := betaNewton(n, s1, s2, []float64{math.Log(2), math.Log(5)})
	if !ok {
		t.Fatal("Newton refused")
	}
	g := make([]float64, 2)
	betaNLL(n, s1, s2)(th, g)
	if infNorm(g) > 1e-9 {
		t.Errorf("score %v at %v", g, th)
	}
	if want := ref.Cases[0].Params; math.Abs(math.Exp(th[0])-want[0]) > 1e-6*want[0] || math.Abs(math.Exp(th[1])-want[1]) > 1e-6*want[1] {
		t.Errorf("Newton root (%v, %v), scipy %v", math.Exp(th[0]), math.Exp(th[1]), want)
	}
}

// TestBetaFitSmallProportions fits invented samples of very small
// proportions (around 1e-8, 1e-6 and 2e-8; β from 1e6 to 4e9) and checks
// the maximum against scipy's (testdata/reference/beta_small.json, made by
// make_beta_small.py: Nelder–Mead on an mpmath log-likelihood, polished on
// the score): converged, ln L within 1e-10 relative, the estimates within
// 1e-5 (the likelihood is flat along the mean there). With gonum's ln B the
// objective carried noise of ε·ln Γ(β) and the first of these stopped in a
// failed line search.
func TestBetaFitSmallProportions(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "testdata", "reference", "beta_small.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Fits []struct {
			Name                string
			X                   []string
			Alpha, Beta, LogLik string
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	for _, c := range ref.Fits {
		t.Run(c.Name, func(t *testing.T) {
			x := make([]float64, len(c.X))
			for i, s := range c.X {
				x[i] = parseRef(t, s)
			}
			fit, err := betaFamily{}.Fit(Complete(x), Options{})
			if err != nil {
				t.Fatal(err)
			}
			if !fit.Converged {
				t.Fatalf("not converged: %s", fit.Reason)
			}
			wantLL := parseRef(t, c.LogLik)
			if math.Abs(fit.LogLik-wantLL) > 1e-10*math.Abs(wantLL) {
				t.Errorf("ln L = %v, want %v (scipy/mpmath)", fit.LogLik, wantLL)
			}
			for i, w := range []string{c.Alpha, c.Beta} {
				if want := parseRef(t, w); math.Abs(fit.Estimates[i]-want) > 1e-5*want {
					t.Errorf("%s = %v, want %v (scipy/mpmath)", fit.Parameters[i], fit.Estimates[i], want)
				}
			}
		})
	}
}
