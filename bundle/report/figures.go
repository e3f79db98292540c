package report

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"sort"
	"strconv"
	"sync"

	"git.sr.ht/~sbinet/gg"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// FigureInput is one analysis's material for its figures, in plain values:
// the caller evaluates its fitted models into [Curve] funcs and computes the
// empirical CDF (Kaplan–Meier or Turnbull for censored data).
type FigureInput struct {
	Analysis string
	Units    string // axis labels carry them
	Quantity string // what was measured, for axis labels (default "value")
	Discrete bool
	// Observations are the exact (uncensored) values: the histogram's
	// content. Censored values are not in the histogram; Censored counts
	// them so the caption can say so.
	Observations []float64
	Censored     int
	// Candidates are the fitted families, best first; density and CDF
	// figures show the first MaxCurves of them, Q–Q and P–P the first.
	Candidates []Curve
	// Empirical is the empirical CDF as a right-continuous step function,
	// in increasing X; EmpiricalLabel names it ("empirical", "Kaplan–Meier",
	// "Turnbull"). Empty: the ECDF of Observations is used.
	Empirical      []Step
	EmpiricalLabel string
	// Probability gives the observed values with their plotting
	// probabilities for Q–Q and P–P plots (from Empirical for censored
	// data). Empty: Observations at Hazen positions (i − 0.5)/n.
	Probability []ProbPoint
	// Envelope is an optional pointwise simulation envelope for the Q–Q
	// and P–P plots, in data units, one entry per Probability point (same
	// order): e.g. from the parametric bootstrap's simulated samples.
	Envelope *Envelope
	// BinEnvelope is an optional pointwise simulation envelope for the
	// empirical CDF of binned data, drawn around it in the CDF figure.
	BinEnvelope *BinEnvelope
	// ReturnLevels of the best candidate with their intervals, and the
	// observed annual maxima to plot at their empirical return periods.
	ReturnLevels []ReturnLevelPoint
	Maxima       []float64
	// Profiles are profile log-likelihood curves, one figure each.
	Profiles []Profile
}

// MaxCurves is how many candidates the density and CDF figures show.
const MaxCurves = 4

// Curve is one fitted candidate evaluated as functions. PDF is the density
// (for discrete data the probability mass at integer x); CDF is P(X ≤ x);
// Quantile inverts CDF.
type Curve struct {
	Family   string
	Weight   float64 // Akaike weight, shown in the legend (NaN: not shown)
	PDF      func(x float64) float64
	CDF      func(x float64) float64
	Quantile func(p float64) float64
}

// Step is one step of an empirical CDF: F(x) = P for X ≤ x < the next X.
type Step struct{ X, P float64 }

// ProbPoint is an observed value and its plotting probability.
type ProbPoint struct{ Value, Prob float64 }

// Envelope is a pointwise band of simulated order statistics (data units),
// or, for censored data (Censored), of the simulated samples' empirical
// quantiles at the plotting probabilities.
type Envelope struct {
	Lower, Upper []float64
	Level        float64 // e.g. 0.95
	Censored     bool
}

// BinEnvelope is a pointwise simulation envelope of the empirical CDF of
// binned data: at each bin edge Edges[k] (ascending), the band
// [Lower[k], Upper[k]] of the cumulative proportions of Replicates samples
// of the best candidate (Family) recorded in the data's bins. A sample's
// step CDF, like the data's, keeps its value at an edge up to the next
// edge, so the band is drawn as steps from the first edge on.
type BinEnvelope struct {
	Edges, Lower, Upper []float64
	Level               float64
	Family              string
	Replicates          int
}

// ReturnLevelPoint is the level exceeded on average once in Period years.
type ReturnLevelPoint struct{ Period, Level, Lower, Upper float64 }

// Profile is a profile log-likelihood curve for one parameter; the interval
// [Lower, Upper] is where it stays above Cutoff (max ln L − χ²₁(level)/2).
type Profile struct {
	Family, Parameter              string
	Values, LogLik                 []float64
	Estimate, Lower, Upper, Cutoff float64
}

// RenderedFigure is one figure in both formats. Name is the file name
// without extension (SLUG-KIND, e.g. "seal-life-qq").
type RenderedFigure struct {
	Name    string
	Kind    string // density, cdf, qq, pp, return-level, profile-FAMILY-PARAMETER
	Caption string
	SVG     []byte
	PNG     []byte
	plot    *plot.Plot
}

// ForPDF returns the figure for [Analysis.Figures].
func (f RenderedFigure) ForPDF() Figure {
	return Figure{Name: f.Name + ".png", Caption: f.Caption, PNG: f.PNG, plot: f.plot}
}

// Figure size and raster resolution.
const (
	figureWidth  = 5 * vg.Inch
	figureHeight = 3.6 * vg.Inch
	figureDPI    = 144
)

// RenderFigures draws every figure the input allows: density (or pmf) over a
// histogram, empirical against fitted CDFs, Q–Q and P–P of the best
// candidate, a return-level plot and profile-likelihood curves. name (a slug) names
// the files (see [Slugs]). The bytes depend only on the input.
func RenderFigures(name string, in FigureInput) ([]RenderedFigure, error) {
	type maker struct {
		kind    string
		caption string
		build   func() (*plot.Plot, error)
	}
	var makers []maker
	obs := finite(in.Observations)
	if len(obs) > 0 && len(in.Candidates) > 0 {
		what := "fitted densities"
		if in.Discrete {
			what = "fitted probability mass functions"
		}
		cap := fmt.Sprintf("%s: %s of the leading candidates over a histogram of the %d observations", in.Analysis, what, len(obs))
		if in.Censored > 0 {
			cap = fmt.Sprintf("%s: %s of the leading candidates over a histogram of the %d exact observations (%d censored values are not in the histogram)", in.Analysis, what, len(obs), in.Censored)
		}
		makers = append(makers, maker{"density", cap, func() (*plot.Plot, error) { return densityPlot(in, obs) }})
	}
	if len(in.Candidates) > 0 && (len(in.Empirical) > 0 || len(obs) > 0) {
		label := in.EmpiricalLabel
		if len(in.Empirical) == 0 || label == "" {
			label = "empirical"
		}
		env := ""
		if e := in.BinEnvelope; e != nil {
			env = fmt.Sprintf(", with a %s %% pointwise simulation envelope of the best candidate (%s) at the bin edges (%d samples of the fit recorded in the data's bins)",
				g(e.Level*100), e.Family, e.Replicates)
		}
		makers = append(makers, maker{"cdf", fmt.Sprintf("%s: %s CDF against the fitted CDFs%s", in.Analysis, label, env), func() (*plot.Plot, error) { return cdfPlot(in, obs) }})
	}
	points := in.Probability
	if len(points) == 0 {
		points = hazenPoints(obs)
	}
	if len(in.Candidates) > 0 && len(points) > 1 && in.Candidates[0].Quantile != nil {
		env := ""
		if in.Envelope != nil {
			env = fmt.Sprintf(", with a %s %% pointwise simulation envelope", g(in.Envelope.Level*100))
			if in.Envelope.Censored {
				env += " (samples of the fit censored as the data were)"
			}
		}
		best := in.Candidates[0].Family
		makers = append(makers,
			maker{"qq", fmt.Sprintf("%s: Q–Q plot of the best candidate (%s)%s", in.Analysis, best, env), func() (*plot.Plot, error) { return qqPlot(in, points) }},
			maker{"pp", fmt.Sprintf("%s: P–P plot of the best candidate (%s)%s", in.Analysis, best, env), func() (*plot.Plot, error) { return ppPlot(in, points) }})
	}
	if len(in.ReturnLevels) > 0 {
		makers = append(makers, maker{"return-level", fmt.Sprintf("%s: return levels with their intervals; points are the observed annual maxima at empirical return periods (n + 1)/rank", in.Analysis),
			func() (*plot.Plot, error) { return returnLevelPlot(in) }})
	}
	for _, pr := range in.Profiles {
		pr := pr
		makers = append(makers, maker{"profile-" + slug(pr.Family) + "-" + slug(pr.Parameter),
			fmt.Sprintf("%s: profile log-likelihood of %s's %s; the dashed line is the interval's cut-off", in.Analysis, pr.Family, pr.Parameter),
			func() (*plot.Plot, error) { return profilePlot(in, pr) }})
	}

	out := make([]RenderedFigure, 0, len(makers))
	for _, m := range makers {
		p, err := m.build()
		if err != nil {
			return nil, fmt.Errorf("figure %s of %s: %w", m.kind, in.Analysis, err)
		}
		svg, png, err := encode(p)
		if err != nil {
			return nil, fmt.Errorf("figure %s of %s: %w", m.kind, in.Analysis, err)
		}
		out = append(out, RenderedFigure{Name: name + "-" + m.kind, Kind: m.kind, Caption: m.caption, SVG: svg, PNG: png, plot: p})
	}
	return out, nil
}

// encode draws p as SVG (fonts referenced, not embedded) and as an opaque
// PNG; neither format carries a time stamp, so the bytes repeat.
func encode(p *plot.Plot) (svg, png []byte, err error) {
	sc := vgsvg.New(figureWidth, figureHeight)
	p.Draw(draw.New(sc))
	var sb bytes.Buffer
	if _, err := sc.WriteTo(&sb); err != nil {
		return nil, nil, err
	}
	img := rasters.Get().(*image.RGBA)
	defer rasters.Put(img)
	// The canvas is the whole pixel grid; NewWith paints it white first.
	// With UseWH instead, vgimg would allocate the image and gg copy it.
	ctx := gg.NewContextForRGBA(img)
	ctx.SetLineCapButt()
	ctx.InvertY()
	ic := vgimg.NewWith(vgimg.UseImageWithContext(img, ctx), vgimg.UseDPI(figureDPI))
	p.Draw(draw.New(ic))
	var pb bytes.Buffer
	if err := pngEncoder.Encode(&pb, img); err != nil {
		return nil, nil, err
	}
	return sb.Bytes(), pb.Bytes(), nil
}

// rasters lends the PNG figures their pixels: an RGBA image of
// figureWidth × figureHeight at figureDPI, rounded to whole pixels
// (720 × 518), whose 1.5 MB would otherwise be allocated, cleared and, by
// gg, copied once more for every figure. The PNG's layout spans exactly
// those pixels (5 × 3.597 in, the SVG's 5 × 3.6 in less the 0.4 pixel
// that rounding used to cut from the top).
var rasters = sync.Pool{New: func() any {
	px := func(l vg.Length) int { return int(float64(l/vg.Inch)*figureDPI + 0.5) }
	return image.NewRGBA(image.Rect(0, 0, px(figureWidth), px(figureHeight)))
}}

// pngEncoder writes the figures' PNGs at zlib's fastest level: on the
// demo's figures (720 × 518 pixels) 30–50 % less time than the default
// level (8–12 against 11–16 ms a figure) for 3–5 % more bytes. Every
// decoder reads any level; the bytes still depend only on the image.
//
// Its buffer pool hands each encoding the zlib writer and row buffers of
// an earlier one (reset, so the bytes do not change): a fresh zlib writer
// is some hundred kilobytes of state allocated and cleared per figure.
var pngEncoder = &png.Encoder{CompressionLevel: png.BestSpeed, BufferPool: &pngBuffers{}}

// pngBuffers is a png.EncoderBufferPool safe for the figures drawn on
// several workers at once.
type pngBuffers struct{ pool sync.Pool }

func (b *pngBuffers) Get() *png.EncoderBuffer {
	if e, ok := b.pool.Get().(*png.EncoderBuffer); ok {
		return e
	}
	return nil
}

func (b *pngBuffers) Put(e *png.EncoderBuffer) { b.pool.Put(e) }

func (in FigureInput) valueLabel() string {
	q := in.Quantity
	if q == "" {
		q = "value"
	}
	if in.Units != "" {
		return q + " (" + in.Units + ")"
	}
	return q
}

func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	// Liberation Sans throughout: the PDF embeds the same font, so text
	// measured by the plot sits right when drawn into the PDF.
	for _, f := range []*font.Font{&p.Title.TextStyle.Font, &p.X.Label.TextStyle.Font, &p.Y.Label.TextStyle.Font,
		&p.X.Tick.Label.Font, &p.Y.Tick.Label.Font, &p.Legend.TextStyle.Font} {
		f.Typeface, f.Variant = "Liberation", "Sans"
	}
	p.Title.Padding = vg.Points(6)
	p.Title.Text = title
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.Legend.Top = true
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	p.X.Tick.Marker = plainTicks{}
	p.Y.Tick.Marker = plainTicks{}
	p.Legend.ThumbnailWidth = vg.Points(18)
	p.Add(plotter.NewGrid())
	return p
}

// curveStyle gives candidate i its colour and dash pattern, so the figures
// stay readable in grey print.
func curveStyle(i int) draw.LineStyle {
	colours := []color.RGBA{{0, 90, 181, 255}, {220, 50, 32, 255}, {0, 140, 70, 255}, {150, 80, 170, 255}}
	dashes := [][]vg.Length{nil, {vg.Points(6), vg.Points(3)}, {vg.Points(2), vg.Points(2)}, {vg.Points(8), vg.Points(3), vg.Points(2), vg.Points(3)}}
	return draw.LineStyle{Color: colours[i%len(colours)], Width: vg.Points(1.6), Dashes: dashes[i%len(dashes)]}
}

func legendName(c Curve) string {
	if math.IsNaN(c.Weight) {
		return c.Family
	}
	return fmt.Sprintf("%s (w = %.2f)", c.Family, c.Weight)
}

func leading(cs []Curve) []Curve {
	if len(cs) > MaxCurves {
		return cs[:MaxCurves]
	}
	return cs
}

var histFill = color.RGBA{205, 215, 230, 255}

func densityPlot(in FigureInput, obs []float64) (*plot.Plot, error) {
	lo, hi := obs[0], obs[len(obs)-1]
	var h *plotter.Histogram
	if in.Discrete {
		p := newPlot(in.Analysis+": probability mass", in.valueLabel(), "relative frequency")
		counts := map[float64]int{}
		for _, x := range obs {
			counts[math.Round(x)]++
		}
		h = &plotter.Histogram{FillColor: histFill, LineStyle: plotter.DefaultLineStyle, Width: 1}
		var marks plotter.XYs // the points drawn, which the legend must not cover
		for k := math.Round(lo); k <= math.Round(hi); k++ {
			h.Bins = append(h.Bins, plotter.HistogramBin{Min: k - 0.5, Max: k + 0.5, Weight: float64(counts[k]) / float64(len(obs))})
		}
		p.Add(h)
		ymax := maxWeight(h)
		for i, c := range leading(in.Candidates) {
			var xys plotter.XYs
			for k := math.Max(0, math.Round(lo)-1); k <= math.Round(hi)+1; k++ {
				if y := c.PDF(k); finiteNum(y) {
					xys = append(xys, plotter.XY{X: k, Y: y})
					ymax = math.Max(ymax, y)
				}
			}
			if len(xys) == 0 {
				continue
			}
			l, s, err := plotter.NewLinePoints(xys)
			if err != nil {
				return nil, err
			}
			l.LineStyle = curveStyle(i)
			s.Color = curveStyle(i).Color
			s.Radius = vg.Points(2.5)
			p.Add(l, s)
			p.Legend.Add(legendName(c), l, s)
			marks = append(marks, xys...)
		}
		p.Y.Min, p.Y.Max = 0, ymax*1.08
		placeLegend(p, h.Bins, marks)
		return p, nil
	}

	p := newPlot(in.Analysis+": fitted densities", in.valueLabel(), "density")
	// Sturges' rule, ⌈log₂ n⌉ + 1 bins, kept between 5 and 30 (common practice).
	bins := int(math.Ceil(math.Log2(float64(len(obs))))) + 1
	bins = max(5, min(30, bins))
	width := (hi - lo) / float64(bins)
	if width <= 0 {
		width = math.Max(math.Abs(lo)*0.1, 1)
		lo -= width / 2
		bins = 1
	}
	h = &plotter.Histogram{FillColor: histFill, LineStyle: plotter.DefaultLineStyle, Width: width}
	for b := range bins {
		h.Bins = append(h.Bins, plotter.HistogramBin{Min: lo + float64(b)*width, Max: lo + float64(b+1)*width})
	}
	for _, x := range obs {
		b := int((x - lo) / width)
		b = max(0, min(bins-1, b))
		h.Bins[b].Weight++
	}
	for i := range h.Bins {
		h.Bins[i].Weight /= float64(len(obs)) * width
	}
	p.Add(h)
	histMax := maxWeight(h)
	xlo, xhi := lo-0.15*(hi-lo), hi+0.15*(hi-lo)
	if lo >= 0 && xlo < 0 {
		xlo = 0
	}
	curveMax := 0.0
	var marks plotter.XYs // the curves drawn, which the legend must not cover
	for i, c := range leading(in.Candidates) {
		xys := sample(c.PDF, xlo, xhi, 241)
		if len(xys) == 0 {
			continue
		}
		for _, pt := range xys {
			curveMax = math.Max(curveMax, pt.Y)
		}
		marks = append(marks, xys...)
		l, err := plotter.NewLine(xys)
		if err != nil {
			return nil, err
		}
		l.LineStyle = curveStyle(i)
		p.Add(l)
		p.Legend.Add(legendName(c), l)
	}
	// A density that runs off to infinity (a Weibull with shape < 1 at 0)
	// must not flatten the histogram: cap the axis at three times its top.
	top := math.Max(histMax, curveMax)
	if histMax > 0 && top > 3*histMax {
		top = 3 * histMax
	}
	p.Y.Min, p.Y.Max = 0, top*1.08
	p.X.Min, p.X.Max = xlo, xhi
	placeLegend(p, h.Bins, marks)
	return p, nil
}

// placeLegend puts a density plot's legend in the top corner where the bars
// and curves under it are lower, and raises the y-axis just enough that they
// stay below it: the legend's box (measured with the plot's own fonts on a
// figureWidth × figureHeight canvas) takes the top fraction fh of the data
// area's height and the fraction fw of its width, so with m the highest bar
// or curve point under that corner the axis must reach m/(1 − fh). Points
// above the axis (a density capped at three times the histogram) are
// clipped there anyway and count at the axis' top.
func placeLegend(p *plot.Plot, bins []plotter.HistogramBin, marks plotter.XYs) {
	if !(p.Y.Max > p.Y.Min) {
		return
	}
	da := p.DataCanvas(draw.NewCanvas(&recorder.Canvas{}, figureWidth, figureHeight))
	box := p.Legend.Rectangle(da).Size()
	if box.Y <= 0 {
		return // no legend
	}
	em := p.Legend.TextStyle.Rectangle(" ").Max.X
	fw := float64(box.X+2*em) / float64(da.Size().X)
	fh := float64(box.Y+em) / float64(da.Size().Y)
	if fw >= 1 || fh >= 0.6 {
		return // a legend this large covers the plot wherever it goes
	}
	span, top := p.X.Max-p.X.Min, p.Y.Max
	under := func(x0, x1 float64) float64 {
		m := 0.0
		for _, b := range bins {
			if b.Max > x0 && b.Min < x1 {
				m = math.Max(m, math.Min(b.Weight, top))
			}
		}
		for _, pt := range marks {
			if pt.X >= x0 && pt.X <= x1 {
				m = math.Max(m, math.Min(pt.Y, top))
			}
		}
		return m
	}
	right := under(p.X.Max-fw*span, p.X.Max)
	left := under(p.X.Min, p.X.Min+fw*span)
	m := right
	p.Legend.Left = left < right
	if p.Legend.Left {
		m = left
	}
	p.Y.Max = math.Max(p.Y.Max, m/(1-fh))
}

func cdfPlot(in FigureInput, obs []float64) (*plot.Plot, error) {
	p := newPlot(in.Analysis+": cumulative distribution", in.valueLabel(), "cumulative probability")
	steps := in.Empirical
	label := in.EmpiricalLabel
	if len(steps) == 0 {
		steps = ecdf(obs)
		label = "empirical"
	}
	if label == "" {
		label = "empirical"
	}
	lo, hi := steps[0].X, steps[len(steps)-1].X
	if len(obs) > 0 {
		lo, hi = math.Min(lo, obs[0]), math.Max(hi, obs[len(obs)-1])
	}
	env := in.BinEnvelope
	if env != nil && (len(env.Edges) == 0 || len(env.Lower) != len(env.Edges) || len(env.Upper) != len(env.Edges)) {
		env = nil
	}
	if env != nil {
		lo, hi = math.Min(lo, env.Edges[0]), math.Max(hi, env.Edges[len(env.Edges)-1])
	}
	pad := 0.1 * (hi - lo)
	if pad == 0 {
		pad = 1
	}
	xlo, xhi := lo-pad, hi+pad
	if lo >= 0 && xlo < 0 {
		xlo = 0
	}
	xys := plotter.XYs{{X: xlo, Y: 0}}
	for _, s := range steps {
		xys = append(xys, plotter.XY{X: s.X, Y: xys[len(xys)-1].Y}, plotter.XY{X: s.X, Y: s.P})
	}
	xys = append(xys, plotter.XY{X: xhi, Y: xys[len(xys)-1].Y})
	emp, err := plotter.NewLine(xys)
	if err != nil {
		return nil, err
	}
	emp.LineStyle = draw.LineStyle{Color: color.Gray{40}, Width: vg.Points(1.2)}
	var band *plotter.Polygon
	if env != nil {
		// Steps as the samples' CDFs take them: the bounds at each edge
		// held up to the next edge, the last to the axis' end.
		var lower, upper plotter.XYs
		for k, x := range env.Edges {
			next := xhi
			if k+1 < len(env.Edges) {
				next = env.Edges[k+1]
			}
			lower = append(lower, plotter.XY{X: x, Y: env.Lower[k]}, plotter.XY{X: next, Y: env.Lower[k]})
			upper = append(upper, plotter.XY{X: x, Y: env.Upper[k]}, plotter.XY{X: next, Y: env.Upper[k]})
		}
		if band, err = bandPolygon(lower, upper); err != nil {
			return nil, err
		}
		p.Add(band) // under the lines
	}
	p.Add(emp)
	p.Legend.Add(label, emp)
	if band != nil {
		p.Legend.Add(fmt.Sprintf("%s %% simulation envelope (%s)", g(env.Level*100), env.Family), band)
	}
	for i, c := range leading(in.Candidates) {
		var curve plotter.XYs
		if in.Discrete {
			// The fitted CDF of counts is a step function too.
			for k := math.Floor(xlo); k <= math.Ceil(xhi); k++ {
				y := c.CDF(k)
				if finiteNum(y) {
					curve = append(curve, plotter.XY{X: k, Y: y}, plotter.XY{X: k + 1, Y: y})
				}
			}
		} else {
			curve = sample(c.CDF, xlo, xhi, 241)
		}
		if len(curve) == 0 {
			continue
		}
		l, err := plotter.NewLine(curve)
		if err != nil {
			return nil, err
		}
		l.LineStyle = curveStyle(i)
		p.Add(l)
		p.Legend.Add(legendName(c), l)
	}
	p.Legend.Top = false
	p.Legend.Left = false
	p.Legend.YOffs = vg.Points(4)
	p.Y.Min, p.Y.Max = 0, 1
	p.X.Min, p.X.Max = xlo, xhi
	return p, nil
}

func qqPlot(in FigureInput, pts []ProbPoint) (*plot.Plot, error) {
	best := in.Candidates[0]
	p := newPlot(in.Analysis+": Q–Q plot, "+best.Family, "fitted quantile"+unitSuffix(in.Units), "observed"+unitSuffix(in.Units))
	var xys plotter.XYs
	lo, hi := math.Inf(1), math.Inf(-1)
	var band []plotter.XY
	var bandBack []plotter.XY
	for i, pt := range pts {
		q := best.Quantile(pt.Prob)
		if !finiteNum(q) || !finiteNum(pt.Value) {
			continue
		}
		xys = append(xys, plotter.XY{X: q, Y: pt.Value})
		lo, hi = math.Min(lo, math.Min(q, pt.Value)), math.Max(hi, math.Max(q, pt.Value))
		if e := in.Envelope; e != nil && i < len(e.Lower) && i < len(e.Upper) && finiteNum(e.Lower[i]) && finiteNum(e.Upper[i]) {
			band = append(band, plotter.XY{X: q, Y: e.Lower[i]})
			bandBack = append(bandBack, plotter.XY{X: q, Y: e.Upper[i]})
			lo, hi = math.Min(lo, e.Lower[i]), math.Max(hi, e.Upper[i])
		}
	}
	if len(xys) == 0 {
		return nil, fmt.Errorf("no finite Q–Q points")
	}
	if err := addBand(p, band, bandBack, in.Envelope); err != nil {
		return nil, err
	}
	if err := addIdentity(p, lo, hi); err != nil {
		return nil, err
	}
	if err := addPoints(p, xys, "observations"); err != nil {
		return nil, err
	}
	p.Legend.Left = true // the points run up the diagonal; the top-left is free
	return p, nil
}

func ppPlot(in FigureInput, pts []ProbPoint) (*plot.Plot, error) {
	best := in.Candidates[0]
	p := newPlot(in.Analysis+": P–P plot, "+best.Family, "fitted probability F(x)", "empirical probability")
	var xys, band, bandBack plotter.XYs
	for i, pt := range pts {
		f := best.CDF(pt.Value)
		if !finiteNum(f) || !finiteNum(pt.Prob) {
			continue
		}
		xys = append(xys, plotter.XY{X: f, Y: pt.Prob})
		if e := in.Envelope; e != nil && i < len(e.Lower) && i < len(e.Upper) {
			// The envelope of simulated order statistics, mapped through the
			// fitted CDF, bounds F(x₍ᵢ₎) at this plotting probability.
			l, u := best.CDF(e.Lower[i]), best.CDF(e.Upper[i])
			if finiteNum(l) && finiteNum(u) {
				band = append(band, plotter.XY{X: l, Y: pt.Prob})
				bandBack = append(bandBack, plotter.XY{X: u, Y: pt.Prob})
			}
		}
	}
	if len(xys) == 0 {
		return nil, fmt.Errorf("no finite P–P points")
	}
	if err := addBand(p, band, bandBack, in.Envelope); err != nil {
		return nil, err
	}
	if err := addIdentity(p, 0, 1); err != nil {
		return nil, err
	}
	if err := addPoints(p, xys, "observations"); err != nil {
		return nil, err
	}
	p.Legend.Left = true
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 1, 0, 1
	return p, nil
}

func returnLevelPlot(in FigureInput) (*plot.Plot, error) {
	title := in.Analysis + ": return levels"
	if len(in.Candidates) > 0 {
		title += ", " + in.Candidates[0].Family
	}
	p := newPlot(title, "return period (years, log scale)", "return level"+unitSuffix(in.Units))
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = plot.LogTicks{Prec: -1}
	rl := append([]ReturnLevelPoint(nil), in.ReturnLevels...)
	sort.Slice(rl, func(i, j int) bool { return rl[i].Period < rl[j].Period })
	tmax := math.Max(rl[len(rl)-1].Period*1.5, 2)
	maxima := finite(in.Maxima)
	n := float64(len(maxima))
	if n+1 > tmax {
		tmax = n + 1
	}
	var band, bandBack plotter.XYs
	var bars plotter.XYs
	var errs plotter.YErrors
	for _, r := range rl {
		if r.Period <= 1 || !finiteNum(r.Level) {
			continue
		}
		if finiteNum(r.Lower) && finiteNum(r.Upper) {
			band = append(band, plotter.XY{X: r.Period, Y: r.Lower})
			bandBack = append(bandBack, plotter.XY{X: r.Period, Y: r.Upper})
			bars = append(bars, plotter.XY{X: r.Period, Y: r.Level})
			errs = append(errs, struct{ Low, High float64 }{r.Level - r.Lower, r.Upper - r.Level})
		}
	}
	if len(band) > 1 {
		if err := addBand(p, band, bandBack, nil); err != nil {
			return nil, err
		}
	}
	if len(in.Candidates) > 0 && in.Candidates[0].Quantile != nil {
		q := in.Candidates[0].Quantile
		var curve plotter.XYs
		for i := 0; i <= 200; i++ {
			// From T = 1.1 to tmax, evenly in log T.
			t := math.Exp(math.Log(1.1) + float64(i)/200*(math.Log(tmax)-math.Log(1.1)))
			if y := q(1 - 1/t); finiteNum(y) {
				curve = append(curve, plotter.XY{X: t, Y: y})
			}
		}
		if len(curve) > 0 {
			l, err := plotter.NewLine(curve)
			if err != nil {
				return nil, err
			}
			l.LineStyle = curveStyle(0)
			p.Add(l)
			p.Legend.Add(in.Candidates[0].Family, l)
		}
	}
	if len(bars) > 0 {
		eb := struct {
			plotter.XYs
			plotter.YErrors
		}{bars, errs}
		e, err := plotter.NewYErrorBars(eb)
		if err != nil {
			return nil, err
		}
		e.LineStyle.Width = vg.Points(1.2)
		p.Add(e)
	}
	if len(maxima) > 0 {
		sort.Float64s(maxima)
		var xys plotter.XYs
		for i, x := range maxima {
			rank := n - float64(i) // largest is rank 1
			xys = append(xys, plotter.XY{X: (n + 1) / rank, Y: x})
		}
		if err := addPoints(p, xys, "annual maxima"); err != nil {
			return nil, err
		}
	}
	p.X.Min, p.X.Max = 1, tmax
	p.Legend.Top = false
	p.Legend.Left = false
	p.Legend.YOffs = vg.Points(4)
	return p, nil
}

func profilePlot(in FigureInput, pr Profile) (*plot.Plot, error) {
	p := newPlot(in.Analysis+": profile, "+pr.Family+" "+pr.Parameter, pr.Parameter, "profile log-likelihood")
	var xys plotter.XYs
	for i := range pr.Values {
		if i < len(pr.LogLik) && finiteNum(pr.Values[i]) && finiteNum(pr.LogLik[i]) {
			xys = append(xys, plotter.XY{X: pr.Values[i], Y: pr.LogLik[i]})
		}
	}
	if len(xys) < 2 {
		return nil, fmt.Errorf("profile of %s %s has fewer than two finite points", pr.Family, pr.Parameter)
	}
	sort.Slice(xys, func(i, j int) bool { return xys[i].X < xys[j].X })
	l, err := plotter.NewLine(xys)
	if err != nil {
		return nil, err
	}
	l.LineStyle = curveStyle(0)
	p.Add(l)
	xlo, xhi := xys[0].X, xys[len(xys)-1].X
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for _, pt := range xys {
		ylo, yhi = math.Min(ylo, pt.Y), math.Max(yhi, pt.Y)
	}
	if finiteNum(pr.Cutoff) {
		cut, err := plotter.NewLine(plotter.XYs{{X: xlo, Y: pr.Cutoff}, {X: xhi, Y: pr.Cutoff}})
		if err != nil {
			return nil, err
		}
		cut.LineStyle = draw.LineStyle{Color: color.Gray{90}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}
		p.Add(cut)
		p.Legend.Add("cut-off", cut)
		ylo = math.Min(ylo, pr.Cutoff)
	}
	for _, v := range []struct {
		x    float64
		name string
		dash []vg.Length
	}{{pr.Estimate, "estimate", nil}, {pr.Lower, "interval", []vg.Length{vg.Points(2), vg.Points(2)}}, {pr.Upper, "", []vg.Length{vg.Points(2), vg.Points(2)}}} {
		if !finiteNum(v.x) {
			continue
		}
		vl, err := plotter.NewLine(plotter.XYs{{X: v.x, Y: ylo}, {X: v.x, Y: yhi}})
		if err != nil {
			return nil, err
		}
		vl.LineStyle = draw.LineStyle{Color: color.RGBA{220, 50, 32, 255}, Width: vg.Points(0.9), Dashes: v.dash}
		p.Add(vl)
		if v.name != "" {
			p.Legend.Add(v.name, vl)
		}
	}
	// The curve peaks inside the range and falls towards both ends: the
	// top-left corner is free.
	p.Legend.Left = true
	return p, nil
}

func addBand(p *plot.Plot, lower, upper plotter.XYs, env *Envelope) error {
	if len(lower) < 2 {
		return nil
	}
	poly, err := bandPolygon(lower, upper)
	if err != nil {
		return err
	}
	p.Add(poly)
	if env != nil {
		p.Legend.Add(g(env.Level*100)+" % envelope", poly)
	} else {
		p.Legend.Add("interval", poly)
	}
	return nil
}

// bandPolygon is the shaded region between the lower and the upper
// boundary (each in increasing x), unoutlined.
func bandPolygon(lower, upper plotter.XYs) (*plotter.Polygon, error) {
	ring := append(plotter.XYs{}, lower...)
	for i := len(upper) - 1; i >= 0; i-- {
		ring = append(ring, upper[i])
	}
	poly, err := plotter.NewPolygon(ring)
	if err != nil {
		return nil, err
	}
	poly.Color = color.RGBA{215, 225, 240, 255}
	poly.LineStyle.Width = 0
	return poly, nil
}

func addIdentity(p *plot.Plot, lo, hi float64) error {
	l, err := plotter.NewLine(plotter.XYs{{X: lo, Y: lo}, {X: hi, Y: hi}})
	if err != nil {
		return err
	}
	l.LineStyle = draw.LineStyle{Color: color.Gray{110}, Width: vg.Points(0.8), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}
	p.Add(l)
	return nil
}

func addPoints(p *plot.Plot, xys plotter.XYs, name string) error {
	s, err := plotter.NewScatter(xys)
	if err != nil {
		return err
	}
	s.GlyphStyle = draw.GlyphStyle{Color: color.RGBA{0, 60, 130, 255}, Radius: vg.Points(2.2), Shape: draw.CircleGlyph{}}
	p.Add(s)
	p.Legend.Add(name, s)
	return nil
}

func unitSuffix(u string) string {
	if u == "" {
		return ""
	}
	return " (" + u + ")"
}

func sample(f func(float64) float64, lo, hi float64, n int) plotter.XYs {
	var xys plotter.XYs
	if f == nil {
		return nil
	}
	for i := range n {
		x := lo + (hi-lo)*float64(i)/float64(n-1)
		if y := f(x); finiteNum(y) {
			xys = append(xys, plotter.XY{X: x, Y: y})
		}
	}
	return xys
}

// ecdf is the empirical CDF of sorted values: F = i/n at the i-th value.
func ecdf(sorted []float64) []Step {
	var out []Step
	n := float64(len(sorted))
	for i, x := range sorted {
		if i+1 < len(sorted) && sorted[i+1] == x {
			continue
		}
		out = append(out, Step{X: x, P: float64(i+1) / n})
	}
	return out
}

// hazenPoints gives sorted values the plotting positions (i − 0.5)/n
// (Hazen 1914).
func hazenPoints(sorted []float64) []ProbPoint {
	out := make([]ProbPoint, len(sorted))
	for i, x := range sorted {
		out[i] = ProbPoint{Value: x, Prob: (float64(i) + 0.5) / float64(len(sorted))}
	}
	return out
}

// finite returns the finite values, sorted.
func finite(v []float64) []float64 {
	out := make([]float64, 0, len(v))
	for _, x := range v {
		if finiteNum(x) {
			out = append(out, x)
		}
	}
	sort.Float64s(out)
	return out
}

func finiteNum(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func maxWeight(h *plotter.Histogram) float64 {
	m := 0.0
	for _, b := range h.Bins {
		m = math.Max(m, b.Weight)
	}
	return m
}

// plainTicks are gonum's default ticks labelled in plain decimals
// (0.00008 rather than 8e-05) between 1e-4 and 1e6.
type plainTicks struct{}

func (plainTicks) Ticks(lo, hi float64) []plot.Tick {
	ticks := plot.DefaultTicks{}.Ticks(lo, hi)
	for i, t := range ticks {
		if t.Label == "" {
			continue
		}
		// The default label is already rounded; re-reading it drops the
		// float noise of the tick arithmetic.
		v, err := strconv.ParseFloat(t.Label, 64)
		if err != nil {
			continue
		}
		if a := math.Abs(v); a == 0 || (a >= 1e-4 && a < 1e6) {
			ticks[i].Label = strconv.FormatFloat(v, 'f', -1, 64)
		}
	}
	return ticks
}
