package report

import (
	"bytes"
	"image/png"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// sealFigures builds figure input from a seeded Weibull sample with known
// generating models as the "fitted" curves: the test checks drawing, not
// fitting.
func sealFigures(seed uint64) FigureInput {
	r := rand.New(rand.NewPCG(seed, 1))
	w := distuv.Weibull{K: 1.8, Lambda: 9000}
	ln := distuv.LogNormal{Mu: math.Log(8000), Sigma: 0.6}
	exp := distuv.Exponential{Rate: 1.0 / 8000}
	obs := make([]float64, 40)
	for i := range obs {
		obs[i] = w.Quantile(r.Float64())
	}
	sort.Float64s(obs)
	curve := func(name string, weight float64, pdf, cdf, q func(float64) float64) Curve {
		return Curve{Family: name, Weight: weight, PDF: pdf, CDF: cdf, Quantile: q}
	}
	// A simple envelope: pointwise 2.5 % and 97.5 % of 99 simulated sorted
	// samples from the Weibull.
	const reps = 99
	sims := make([][]float64, reps)
	for b := range sims {
		s := make([]float64, len(obs))
		for i := range s {
			s[i] = w.Quantile(r.Float64())
		}
		sort.Float64s(s)
		sims[b] = s
	}
	env := &Envelope{Level: 0.95, Lower: make([]float64, len(obs)), Upper: make([]float64, len(obs))}
	for i := range obs {
		col := make([]float64, reps)
		for b := range sims {
			col[b] = sims[b][i]
		}
		sort.Float64s(col)
		env.Lower[i], env.Upper[i] = col[2], col[96]
	}
	prof := Profile{Family: "weibull", Parameter: "shape", Estimate: 1.8, Lower: 1.4, Upper: 2.25, Cutoff: -1.92}
	for i := range 41 {
		v := 1.2 + float64(i)*0.03
		prof.Values = append(prof.Values, v)
		prof.LogLik = append(prof.LogLik, -0.5*(v-1.8)*(v-1.8)/0.05)
	}
	return FigureInput{
		Analysis: "seal-life", Units: "h", Quantity: "running hours",
		Observations: obs, Censored: 3,
		Candidates: []Curve{
			curve("weibull", 0.7, w.Prob, w.CDF, w.Quantile),
			curve("lognormal", 0.2, ln.Prob, ln.CDF, ln.Quantile),
			curve("exponential", 0.1, exp.Prob, exp.CDF, exp.Quantile),
		},
		Envelope: env,
		Profiles: []Profile{prof},
	}
}

func rainFigures() FigureInput {
	gum := func(p float64) float64 { return 24 - 6.5*math.Log(-math.Log(p)) }
	cdf := func(x float64) float64 { return math.Exp(-math.Exp(-(x - 24) / 6.5)) }
	pdf := func(x float64) float64 { z := (x - 24) / 6.5; return math.Exp(-z-math.Exp(-z)) / 6.5 }
	r := rand.New(rand.NewPCG(7, 7))
	var maxima []float64
	for range 40 {
		maxima = append(maxima, gum(r.Float64()))
	}
	var rl []ReturnLevelPoint
	for _, t := range []float64{10, 50, 100} {
		x := gum(1 - 1/t)
		rl = append(rl, ReturnLevelPoint{Period: t, Level: x, Lower: x * 0.85, Upper: x * 1.2})
	}
	return FigureInput{Analysis: "storm-rainfall", Units: "mm", Quantity: "annual maximum hourly rainfall",
		Observations: maxima, Maxima: maxima, ReturnLevels: rl,
		Candidates: []Curve{{Family: "gumbel", Weight: 0.7, PDF: pdf, CDF: cdf, Quantile: gum}}}
}

func defectFigures() FigureInput {
	po := distuv.Poisson{Lambda: 2.4}
	quantile := func(p float64) float64 {
		k := 0.0
		for po.CDF(k) < p {
			k++
		}
		return k
	}
	r := rand.New(rand.NewPCG(3, 3))
	var obs []float64
	for range 60 {
		obs = append(obs, quantile(r.Float64()))
	}
	return FigureInput{Analysis: "defects", Units: "defects per batch", Discrete: true, Observations: obs,
		Candidates: []Curve{{Family: "poisson", Weight: 1, PDF: po.Prob, CDF: po.CDF, Quantile: quantile}}}
}

func TestRenderFiguresKindsAndLabels(t *testing.T) {
	for _, c := range []struct {
		in    FigureInput
		kinds string
		texts []string
	}{
		{sealFigures(1), "density cdf qq pp profile-weibull-shape", []string{"running hours (h)", "observed (h)", "fitted quantile (h)", "95 % envelope", "weibull (w = 0.70)"}},
		{rainFigures(), "density cdf qq pp return-level", []string{"return level (mm)", "return period (years, log scale)", "annual maxima"}},
		{defectFigures(), "density cdf qq pp", []string{"value (defects per batch)", "relative frequency"}},
	} {
		figs, err := RenderFigures(slug(c.in.Analysis), c.in)
		if err != nil {
			t.Fatal(err)
		}
		var kinds []string
		var allSVG string
		for _, f := range figs {
			kinds = append(kinds, f.Kind)
			if !strings.HasPrefix(f.Name, slug(c.in.Analysis)+"-") {
				t.Errorf("figure name %q", f.Name)
			}
			if !bytes.HasPrefix(f.SVG, []byte("<?xml")) || !bytes.Contains(f.SVG, []byte("<svg")) {
				t.Errorf("%s: not an SVG", f.Name)
			}
			img, err := png.Decode(bytes.NewReader(f.PNG))
			if err != nil {
				t.Fatalf("%s: %v", f.Name, err)
			}
			if b := img.Bounds(); b.Dx() != 720 || b.Dy() != 518 {
				t.Errorf("%s: PNG %v, want 720×518 (5×3.6 in at 144 dpi)", f.Name, b)
			}
			allSVG += string(f.SVG)
		}
		if got := strings.Join(kinds, " "); got != c.kinds {
			t.Errorf("%s: kinds %q, want %q", c.in.Analysis, got, c.kinds)
		}
		for _, s := range c.texts {
			if !strings.Contains(allSVG, s) {
				t.Errorf("%s: no figure text %q", c.in.Analysis, s)
			}
		}
	}
}

// TestRenderFiguresDeterministic renders twice and compares the bytes.
// FITSEAL_KEEP_FIGURES=DIR keeps the PNGs for looking at.
func TestRenderFiguresDeterministic(t *testing.T) {
	for _, in := range []FigureInput{sealFigures(1), rainFigures(), defectFigures()} {
		a, err := RenderFigures("x", in)
		if err != nil {
			t.Fatal(err)
		}
		b, err := RenderFigures("x", in)
		if err != nil {
			t.Fatal(err)
		}
		for i := range a {
			if !bytes.Equal(a[i].SVG, b[i].SVG) || !bytes.Equal(a[i].PNG, b[i].PNG) {
				t.Errorf("%s %s: bytes differ between two renderings", in.Analysis, a[i].Kind)
			}
			if dir := os.Getenv("FITSEAL_KEEP_FIGURES"); dir != "" {
				os.WriteFile(filepath.Join(dir, slug(in.Analysis)+"-"+a[i].Kind+".png"), a[i].PNG, 0o644)
				os.WriteFile(filepath.Join(dir, slug(in.Analysis)+"-"+a[i].Kind+".svg"), a[i].SVG, 0o644)
			}
		}
	}
}

func TestRenderFiguresSurvivesUnboundedDensity(t *testing.T) {
	// A Weibull with shape < 1 has an infinite density at 0; the figure must
	// still draw, with the axis capped by the histogram.
	w := distuv.Weibull{K: 0.6, Lambda: 10}
	r := rand.New(rand.NewPCG(5, 5))
	var obs []float64
	for range 30 {
		obs = append(obs, w.Quantile(r.Float64()))
	}
	figs, err := RenderFigures("heavy", FigureInput{Analysis: "heavy", Observations: obs,
		Candidates: []Curve{{Family: "weibull", Weight: math.NaN(), PDF: w.Prob, CDF: w.CDF, Quantile: w.Quantile}}})
	if err != nil || len(figs) != 4 {
		t.Fatalf("%d figures, err %v", len(figs), err)
	}
	if _, err := RenderFigures("none", FigureInput{Analysis: "none"}); err != nil {
		t.Errorf("no material must give no figures, not an error: %v", err)
	}
}

// TestPlaceLegend: the density plot's legend goes to the top corner whose
// bars and curves are lower, and the y-axis is raised just enough that
// nothing under that corner reaches into the legend's box.
func TestPlaceLegend(t *testing.T) {
	bars := func(heights ...float64) []plotter.HistogramBin {
		var out []plotter.HistogramBin
		for i, h := range heights {
			out = append(out, plotter.HistogramBin{Min: float64(i), Max: float64(i + 1), Weight: h})
		}
		return out
	}
	for _, c := range []struct {
		name     string
		bins     []plotter.HistogramBin
		wantLeft bool
	}{
		{"tall on the right", bars(1, 2, 3, 5, 8, 10), true},
		{"tall on the left", bars(10, 8, 5, 3, 2, 1), false},
		{"tall in the middle", bars(1, 1, 1, 1, 2, 10, 10, 2, 1, 1, 1, 1), false},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := newPlot("test", "x", "density")
			h := &plotter.Histogram{Bins: c.bins, Width: 1}
			p.Add(h)
			for i, name := range []string{"lognormal (w = 0.56)", "gamma (w = 0.33)", "weibull (w = 0.11)"} {
				l, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
				if err != nil {
					t.Fatal(err)
				}
				l.LineStyle = curveStyle(i)
				p.Legend.Add(name, l)
			}
			top, xmax := maxWeight(h)*1.08, c.bins[len(c.bins)-1].Max
			p.Y.Min, p.Y.Max = 0, top
			p.X.Min, p.X.Max = 0, xmax
			placeLegend(p, c.bins, nil)
			if p.Legend.Left != c.wantLeft {
				t.Errorf("legend left = %v, want %v", p.Legend.Left, c.wantLeft)
			}
			if p.Y.Max < top {
				t.Errorf("y-axis lowered from %v to %v", top, p.Y.Max)
			}
			// The legend's box on the data area, by the plot's own measure.
			da := p.DataCanvas(draw.NewCanvas(&recorder.Canvas{}, figureWidth, figureHeight))
			box := p.Legend.Rectangle(da).Size()
			legendBottom := p.Y.Max * (1 - float64(box.Y)/float64(da.Size().Y))
			x0, x1 := xmax*(1-float64(box.X)/float64(da.Size().X)), xmax
			if p.Legend.Left {
				x0, x1 = 0, xmax*float64(box.X)/float64(da.Size().X)
			}
			for _, b := range c.bins {
				if b.Max > x0 && b.Min < x1 && b.Weight > legendBottom {
					t.Errorf("bar [%v, %v] of height %v reaches into the legend (its bottom at %v, axis top %v)", b.Min, b.Max, b.Weight, legendBottom, p.Y.Max)
				}
			}
			if c.name == "tall in the middle" && p.Y.Max != top {
				t.Errorf("nothing under the corner, yet the axis was raised from %v to %v", top, p.Y.Max)
			}
		})
	}
}
