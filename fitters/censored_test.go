package fitters

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// censoredCase is one entry of testdata/censored/reference.json, made by
// testdata/censored/make_reference.py: a simulated dataset of one
// continuous family censored one way (left: three detection limits; right:
// three suspension times; interval: half exact, half binned with open end
// bins; binned: every value binned) and the maximum of its log-likelihood
// built from Debian's scipy logpdf/logcdf/logsf, found by multi-start
// Nelder–Mead and Newton polishing.
type censoredCase struct {
	Family     string
	Kind       string
	Params     map[string]float64
	Loglik     float64
	Boundary   string
	StrictMax  bool `json:"strict_local_maximum"`
	Generating map[string]float64
	Data       struct {
		Exact, Left, Right []float64
		Lower, Upper       []*float64
	}
}

type censoredReference struct {
	GPDThreshold float64 `json:"gpd_threshold"`
	Cases        []censoredCase
}

func loadCensoredReference(t testing.TB) *censoredReference {
	t.Helper()
	b, err := os.ReadFile("../testdata/censored/reference.json")
	if err != nil {
		t.Fatalf("reading the censored reference: %v (regenerate with /usr/bin/python3 testdata/censored/make_reference.py)", err)
	}
	var r censoredReference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return &r
}

// data turns the stored case into Data; null interval ends are open (±Inf).
func (c *censoredCase) data() *Data {
	d := &Data{Exact: c.Data.Exact, Left: c.Data.Left, Right: c.Data.Right}
	for i := range c.Data.Lower {
		l, u := math.Inf(-1), math.Inf(1)
		if c.Data.Lower[i] != nil {
			l = *c.Data.Lower[i]
		}
		if c.Data.Upper[i] != nil {
			u = *c.Data.Upper[i]
		}
		d.Lower = append(d.Lower, l)
		d.Upper = append(d.Upper, u)
	}
	return d
}

// censoredOptions fixes gpd's threshold at the one the reference used.
func censoredOptions(family string, ref *censoredReference) Options {
	if family == "gpd" {
		return Options{Fixed: Fixed{"threshold": ref.GPDThreshold}}
	}
	return Options{}
}

// paramsOf returns the family's parameter vector from named values (fixed
// ones from opt).
func paramsOf(f Family, named map[string]float64, opt Options) []float64 {
	p := make([]float64, 0, 3)
	for _, name := range f.Parameters() {
		if v, ok := opt.Fixed[name]; ok {
			p = append(p, v)
			continue
		}
		p = append(p, named[name])
	}
	return p
}

// TestCensoredReference checks that every continuous family's fit accepts
// left-, right- and interval-censored data (several limits in one dataset,
// open interval ends) and reaches the reference maximum: log-likelihood ≥
// reference − 1e-9 relative, every estimate within 1e-6 relative (absolute
// below 1). It also checks the family's LogLik at the reference estimates
// against scipy's value, which tells a likelihood error from an optimiser
// that stopped short. A family whose file has not landed fails its subtests.
func TestCensoredReference(t *testing.T) {
	ref := loadCensoredReference(t)
	for i := range ref.Cases {
		c := &ref.Cases[i]
		t.Run(c.Family+"/"+c.Kind, func(t *testing.T) {
			f, ok := Lookup(c.Family)
			if !ok {
				t.Fatalf("family %q is not registered: its file has not landed in fitters/", c.Family)
			}
			d := c.data()
			if err := d.Validate(); err != nil {
				t.Fatal(err)
			}
			opt := censoredOptions(c.Family, ref)
			refP := paramsOf(f, c.Params, opt)
			if ll := f.LogLik(refP, d); !(math.Abs(ll-c.Loglik) <= 1e-9*math.Abs(c.Loglik)) {
				t.Errorf("LogLik at the reference estimates %v = %.12g, scipy gives %.12g", refP, ll, c.Loglik)
			}
			fit, err := f.Fit(d, opt)
			if err != nil {
				t.Fatalf("Fit refused the data: %v", err)
			}
			if !fit.Converged {
				t.Errorf("not converged (%s): %s", fit.Method, fit.Reason)
			}
			if fit.LogLik < c.Loglik-1e-9*math.Abs(c.Loglik) {
				t.Errorf("loglik %.12g below the reference %.12g by %.3g (%s)", fit.LogLik, c.Loglik, c.Loglik-fit.LogLik, fit.Method)
			}
			if ll := f.LogLik(fit.Estimates, d); !(math.Abs(ll-fit.LogLik) <= 1e-12*math.Abs(ll)) {
				t.Errorf("reported loglik %.15g, LogLik at the estimates %.15g", fit.LogLik, ll)
			}
			for _, name := range f.Parameters() {
				want, ok := c.Params[name]
				if !ok {
					continue // fixed (gpd threshold)
				}
				got := fit.Estimate(name)
				if !(math.Abs(got-want) <= 1e-6*math.Max(1, math.Abs(want))) {
					t.Errorf("%s = %.10g, reference %.10g (relative difference %.2g)", name, got, want, (got-want)/want)
				}
			}
			if fit.N != d.N() || fit.NCensored != d.NCensored() {
				t.Errorf("N = %d, NCensored = %d; want %d, %d", fit.N, fit.NCensored, d.N(), d.NCensored())
			}
		})
	}
}

// TestCensoredUnidentified checks that every continuous family refuses, as
// a failure with a reason, data that are entirely censored (every value a
// suspension, or every value a non-detect): no maximum-likelihood estimate
// exists, the likelihood runs to a boundary. Either an error or a fit with
// Converged = false and a reason passes.
func TestCensoredUnidentified(t *testing.T) {
	ref := loadCensoredReference(t)
	for i := range ref.Cases {
		c := &ref.Cases[i]
		var d *Data
		var name string
		switch c.Kind {
		case "right": // every value a suspension
			name = "all-suspended"
			d = &Data{Right: append(append([]float64(nil), c.Data.Right...), c.Data.Exact...)}
		case "left": // every value a non-detect
			name = "all-non-detects"
			d = &Data{Left: append(append([]float64(nil), c.Data.Left...), c.Data.Exact...)}
		default:
			continue
		}
		t.Run(c.Family+"/"+name, func(t *testing.T) {
			f, ok := Lookup(c.Family)
			if !ok {
				t.Fatalf("family %q is not registered: its file has not landed in fitters/", c.Family)
			}
			fit, err := f.Fit(d, censoredOptions(c.Family, ref))
			switch {
			case err != nil:
				t.Logf("refused: %v", err)
			case fit.Converged:
				t.Errorf("fully censored data (%d values) gave a converged fit %v = %v, loglik %.6g; want a failure with a reason",
					d.N(), fit.Parameters, fit.Estimates, fit.LogLik)
			case fit.Reason == "":
				t.Errorf("non-converged fit without a reason")
			default:
				t.Logf("failed with: %s", fit.Reason)
			}
		})
	}
}
