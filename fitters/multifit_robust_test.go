package fitters

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Location–scale equivariance (a property of every maximum-likelihood fit
// of a location–scale family): fitting a + c·x must give the location
// a + c·μ, the scale c·σ, the same shape and the log-likelihood less n ln c.
// Scales 1e-6 and 1e5 with offsets far from zero exercise tiny and huge
// values and data like 1e7 ± 0.1.
func TestMultiEquivariance(t *testing.T) {
	type tr struct{ a, c float64 }
	transforms := []tr{{0, 1e-6}, {0, 1e5}, {1e7, 0.05}, {-3e4, 7}}
	cases := []struct {
		family string
		dist   Dist
		fixed  Fixed // of the untransformed data
		// mapped returns the expected estimates after x → a + c x.
		mapped func(p []float64, a, c float64) []float64
		unit   func(p []float64) []float64 // per-parameter comparison unit
	}{
		{"gev", GEV{10, 2, 0.2}, nil,
			func(p []float64, a, c float64) []float64 { return []float64{a + c*p[0], c * p[1], p[2]} },
			func(p []float64) []float64 { return []float64{p[1], p[1], 1} }},
		{"studentt", StudentT{3, 2, 5}, nil,
			func(p []float64, a, c float64) []float64 { return []float64{a + c*p[0], c * p[1], p[2]} },
			func(p []float64) []float64 { return []float64{p[1], p[1], p[2]} }},
		{"gpd", GPD{5, 0.2, 30}, Fixed{"threshold": 30},
			func(p []float64, a, c float64) []float64 { return []float64{c * p[0], p[1], a + c*p[2]} },
			func(p []float64) []float64 { return []float64{p[0], 1, p[0]} }},
		{"weibull3", Weibull3{2.5, 10, 5}, nil,
			func(p []float64, a, c float64) []float64 { return []float64{p[0], c * p[1], a + c*p[2]} },
			func(p []float64) []float64 { return []float64{p[0], p[1], p[1]} }},
		{"lognormal3", Lognormal3{1, 0.5, 10}, nil,
			func(p []float64, a, c float64) []float64 { return []float64{p[0] + math.Log(c), p[1], a + c*p[2]} },
			func(p []float64) []float64 { return []float64{1, p[1], math.Exp(p[0]) * p[1]} }},
	}
	for _, cs := range cases {
		f, _ := Lookup(cs.family)
		r := rand.New(rand.NewPCG(31, 32))
		x := make([]float64, 150)
		for i := range x {
			x[i] = cs.dist.Rand(r)
		}
		base, err := f.Fit(Complete(x), Options{Fixed: cs.fixed})
		if err != nil || !base.Converged {
			t.Fatalf("%s: base fit %v %+v", cs.family, err, base)
		}
		for _, tf := range transforms {
			y := make([]float64, len(x))
			for i, v := range x {
				y[i] = tf.a + tf.c*v
			}
			var fixed Fixed
			if u, ok := cs.fixed["threshold"]; ok {
				fixed = Fixed{"threshold": tf.a + tf.c*u}
			}
			fit, err := f.Fit(Complete(y), Options{Fixed: fixed})
			if err != nil || !fit.Converged {
				t.Errorf("%s a=%v c=%v: %v %+v", cs.family, tf.a, tf.c, err, fit)
				continue
			}
			want := cs.mapped(base.Estimates, tf.a, tf.c)
			unit := cs.unit(want)
			for i := range want {
				if math.Abs(fit.Estimates[i]-want[i]) > 1e-5*unit[i] {
					t.Errorf("%s a=%v c=%v: %s = %.12g, want %.12g", cs.family, tf.a, tf.c, fit.Parameters[i], fit.Estimates[i], want[i])
				}
			}
			wantLL := base.LogLik - float64(len(x))*math.Log(tf.c)
			if math.Abs(fit.LogLik-wantLL) > 1e-7*math.Max(1, math.Abs(wantLL)) {
				t.Errorf("%s a=%v c=%v: loglik %.12g, want %.12g", cs.family, tf.a, tf.c, fit.LogLik, wantLL)
			}
		}
	}
}

// Small samples, as small as each family allows, and rounded data with
// ties: every fit either converges to a point no nearby vector beats, or
// says why it did not.
func TestMultiSmallSamplesAndTies(t *testing.T) {
	cases := []struct {
		family string
		x      []float64
		fixed  Fixed
	}{
		{"gev", []float64{3.1, 4.7, 2.2, 5.9}, nil},
		{"gpd", []float64{31.2, 30.4}, Fixed{"threshold": 30}},
		{"beta", []float64{0.2, 0.45}, nil},
		{"studentt", []float64{1.1, 2.3, 1.9, 5.2}, nil},
		{"weibull3", []float64{12.5, 13.1, 15.9, 14.2}, nil},
		{"lognormal3", []float64{12.5, 13.1, 15.9, 14.2}, nil},
		{"weibull3", []float64{31.2, 30.4}, Fixed{"threshold": 30}},
		{"gev", []float64{2.1, 2.1, 2.3, 2.3, 2.3, 2.6, 2.9, 2.9, 3.4, 4.1}, nil},
		{"studentt", []float64{2.1, 2.1, 2.3, 2.3, 2.3, 2.6, 2.9, 2.9, 3.4, 4.1}, nil},
		{"beta", []float64{0.1, 0.1, 0.2, 0.2, 0.2, 0.3, 0.3, 0.5}, nil},
		{"weibull3", []float64{2.1, 2.1, 2.3, 2.3, 2.3, 2.6, 2.9, 2.9, 3.4, 4.1}, nil},
		{"lognormal3", []float64{2.1, 2.1, 2.3, 2.3, 2.3, 2.6, 2.9, 2.9, 3.4, 4.1}, nil},
	}
	for _, c := range cases {
		f, _ := Lookup(c.family)
		fit, err := f.Fit(Complete(c.x), Options{Fixed: c.fixed})
		if err != nil {
			t.Errorf("%s %v: %v", c.family, c.x, err)
			continue
		}
		if !fit.Converged {
			if fit.Reason == "" {
				t.Errorf("%s %v: not converged without a reason", c.family, c.x)
			}
			t.Logf("%s n=%d: not converged: %s", c.family, len(c.x), fit.Reason)
			continue
		}
		if c.family == "weibull3" || c.family == "lognormal3" {
			if c.fixed == nil {
				checkIrregular(t, fit, c.x)
				continue
			}
		}
		multiCheckNearby(t, f, fit, Complete(c.x))
		t.Logf("%s n=%d: %v loglik %v note %q", c.family, len(c.x), fit.Estimates, fit.LogLik, fit.Note)
	}
}

// The staged route for large samples (starts on a subsample, whitened
// polish on all values) must reach the same maximum as the plain
// multi-start on all values.
func TestMultiStagedMatchesFull(t *testing.T) {
	r := rand.New(rand.NewPCG(41, 42))
	x := make([]float64, stageAbove+1000)
	for i := range x {
		x[i] = GEV{10, 2, 0.1}.Rand(r)
	}
	d := Complete(x)
	fit, err := gevFamily{}.Fit(d, Options{})
	if err != nil || !fit.Converged {
		t.Fatalf("%v %+v", err, fit)
	}
	dist := func(t []float64) Dist { return GEV{t[0], math.Exp(t[1]), t[2]} }
	o := minimizeRestarted(likelihoodProblem(3, gevNLL(x), dist, d), gevStarts(x), Options{})
	if !o.converged {
		t.Fatalf("full multi-start: %s", o.reason)
	}
	if math.Abs(fit.LogLik-(-o.negLogLik)) > 1e-10*math.Abs(fit.LogLik) {
		t.Errorf("staged loglik %.15g, full %.15g", fit.LogLik, -o.negLogLik)
	}
	full := []float64{o.theta[0], math.Exp(o.theta[1]), o.theta[2]}
	for i := range full {
		if math.Abs(fit.Estimates[i]-full[i]) > 1e-5*math.Max(fit.Estimates[1], math.Abs(full[i])) {
			t.Errorf("%s staged %.12g, full %.12g", fit.Parameters[i], fit.Estimates[i], full[i])
		}
	}
	t.Logf("%s; staged %v, full %v", fit.Method, fit.Estimates, full)
}
