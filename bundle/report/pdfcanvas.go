package report

import (
	"image"
	"image/color"
	"math"

	"github.com/jung-kurt/gofpdf"
	stdfont "golang.org/x/image/font"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
)

// pdfCanvas draws a gonum/plot figure straight into a gofpdf page as
// vector graphics, inside a box whose top-left corner is (x0, y0) mm. It
// keeps its own affine transform (vg's y-up points to the page's y-down
// millimetres), so the figure is crisp at any zoom and nothing in it
// depends on map order: gofpdf writes raster images in an order that ties
// are broken by Go's randomised map iteration, so embedded PNGs of equal
// width would make the file's bytes vary between runs.
type pdfCanvas struct {
	f      *gofpdf.Fpdf
	x0, y0 float64 // box corner on the page, mm
	w, h   vg.Length
	scale  float64 // mm per vg point
	st     canvasState
	stack  []canvasState
}

type canvasState struct {
	m      [6]float64 // x' = m0 x + m2 y + m4, y' = m1 x + m3 y + m5 (vg points)
	width  vg.Length
	dashes []vg.Length
	offs   vg.Length
	colour color.Color
}

func newPDFCanvas(f *gofpdf.Fpdf, x0, y0, widthMM float64, w, h vg.Length) *pdfCanvas {
	return &pdfCanvas{f: f, x0: x0, y0: y0, w: w, h: h, scale: widthMM / float64(w),
		st: canvasState{m: [6]float64{1, 0, 0, 1, 0, 0}, width: vg.Points(1), colour: color.Black}}
}

var _ vg.Canvas = (*pdfCanvas)(nil)

func (c *pdfCanvas) Size() (vg.Length, vg.Length) { return c.w, c.h }

func (c *pdfCanvas) SetLineWidth(w vg.Length) { c.st.width = w }

func (c *pdfCanvas) SetLineDash(d []vg.Length, offs vg.Length) {
	c.st.dashes = append([]vg.Length(nil), d...)
	c.st.offs = offs
}

func (c *pdfCanvas) SetColor(clr color.Color) {
	if clr == nil {
		clr = color.Black
	}
	c.st.colour = clr
}

// mul post-multiplies the current transform by n.
func (c *pdfCanvas) mul(n [6]float64) {
	m := c.st.m
	c.st.m = [6]float64{
		m[0]*n[0] + m[2]*n[1], m[1]*n[0] + m[3]*n[1],
		m[0]*n[2] + m[2]*n[3], m[1]*n[2] + m[3]*n[3],
		m[0]*n[4] + m[2]*n[5] + m[4], m[1]*n[4] + m[3]*n[5] + m[5],
	}
}

func (c *pdfCanvas) Rotate(t float64) {
	s, co := math.Sincos(t)
	c.mul([6]float64{co, s, -s, co, 0, 0})
}

func (c *pdfCanvas) Translate(pt vg.Point) {
	c.mul([6]float64{1, 0, 0, 1, float64(pt.X), float64(pt.Y)})
}

func (c *pdfCanvas) Scale(x, y float64) { c.mul([6]float64{x, 0, 0, y, 0, 0}) }

func (c *pdfCanvas) Push() {
	s := c.st
	s.dashes = append([]vg.Length(nil), c.st.dashes...)
	c.stack = append(c.stack, s)
}

func (c *pdfCanvas) Pop() {
	if n := len(c.stack); n > 0 {
		c.st = c.stack[n-1]
		c.stack = c.stack[:n-1]
	}
}

// page maps a vg point to page millimetres.
func (c *pdfCanvas) page(x, y float64) (float64, float64) {
	m := c.st.m
	px, py := m[0]*x+m[2]*y+m[4], m[1]*x+m[3]*y+m[5]
	return c.x0 + px*c.scale, c.y0 + (float64(c.h)-py)*c.scale
}

// lengthScale is how much the transform stretches lengths (mm per point).
func (c *pdfCanvas) lengthScale() float64 {
	m := c.st.m
	return math.Sqrt(math.Abs(m[0]*m[3]-m[1]*m[2])) * c.scale
}

func (c *pdfCanvas) rgb() (int, int, int, float64) {
	r, g, b, a := c.st.colour.RGBA()
	if a == 0 {
		return 0, 0, 0, 0
	}
	// Un-premultiply.
	return int(r * 255 / a), int(g * 255 / a), int(b * 255 / a), float64(a) / 0xffff
}

func (c *pdfCanvas) Stroke(p vg.Path) {
	if c.st.width <= 0 {
		return
	}
	r, g, b, a := c.rgb()
	if a == 0 {
		return
	}
	k := c.lengthScale()
	c.f.SetDrawColor(r, g, b)
	c.f.SetLineWidth(float64(c.st.width) * k)
	c.f.SetLineCapStyle("butt")
	c.f.SetLineJoinStyle("round")
	if len(c.st.dashes) > 0 {
		d := make([]float64, len(c.st.dashes))
		for i, x := range c.st.dashes {
			d[i] = float64(x) * k
		}
		c.f.SetDashPattern(d, float64(c.st.offs)*k)
	}
	c.path(p, "D", a)
	if len(c.st.dashes) > 0 {
		c.f.SetDashPattern(nil, 0)
	}
}

func (c *pdfCanvas) Fill(p vg.Path) {
	r, g, b, a := c.rgb()
	if a == 0 {
		return
	}
	c.f.SetFillColor(r, g, b)
	c.path(p, "f", a)
}

func (c *pdfCanvas) path(p vg.Path, style string, alpha float64) {
	if len(p) == 0 {
		return
	}
	if alpha < 1 {
		c.f.SetAlpha(alpha, "Normal")
		defer c.f.SetAlpha(1, "Normal")
	}
	started := false
	var cur vg.Point
	for _, comp := range p {
		switch comp.Type {
		case vg.MoveComp:
			c.f.MoveTo(c.page(float64(comp.Pos.X), float64(comp.Pos.Y)))
			cur, started = comp.Pos, true
		case vg.LineComp:
			c.f.LineTo(c.page(float64(comp.Pos.X), float64(comp.Pos.Y)))
			cur = comp.Pos
		case vg.ArcComp:
			// Arcs become short chords: at most π/24 each, which keeps
			// glyph circles round at print sizes.
			n := int(math.Ceil(math.Abs(comp.Angle) / (math.Pi / 24)))
			n = max(n, 4)
			for i := 0; i <= n; i++ {
				t := comp.Start + comp.Angle*float64(i)/float64(n)
				x := float64(comp.Pos.X) + float64(comp.Radius)*math.Cos(t)
				y := float64(comp.Pos.Y) + float64(comp.Radius)*math.Sin(t)
				if i == 0 && !started {
					c.f.MoveTo(c.page(x, y))
					started = true
				} else {
					c.f.LineTo(c.page(x, y))
				}
				cur = vg.Point{X: vg.Length(x), Y: vg.Length(y)}
			}
		case vg.CurveComp:
			switch len(comp.Control) {
			case 1:
				// Quadratic to cubic: control points at 2/3 of the way.
				q := comp.Control[0]
				c1 := vg.Point{X: cur.X + 2*(q.X-cur.X)/3, Y: cur.Y + 2*(q.Y-cur.Y)/3}
				c2 := vg.Point{X: comp.Pos.X + 2*(q.X-comp.Pos.X)/3, Y: comp.Pos.Y + 2*(q.Y-comp.Pos.Y)/3}
				c.cubic(c1, c2, comp.Pos)
			case 2:
				c.cubic(comp.Control[0], comp.Control[1], comp.Pos)
			}
			cur = comp.Pos
		case vg.CloseComp:
			c.f.ClosePath()
		}
	}
	c.f.DrawPath(style)
}

func (c *pdfCanvas) cubic(c1, c2, to vg.Point) {
	x1, y1 := c.page(float64(c1.X), float64(c1.Y))
	x2, y2 := c.page(float64(c2.X), float64(c2.Y))
	x, y := c.page(float64(to.X), float64(to.Y))
	c.f.CurveBezierCubicTo(x1, y1, x2, y2, x, y)
}

// FillString writes text with the report's embedded Liberation Sans at the
// size the plot asked for; the plot measures its text with the same font,
// so labels sit where the plot placed them.
func (c *pdfCanvas) FillString(fnt font.Face, pt vg.Point, str string) {
	r, g, b, _ := c.rgb()
	style := ""
	if fnt.Font.Weight >= stdfont.WeightBold {
		style += "B"
	}
	if fnt.Font.Style == stdfont.StyleItalic {
		style += "I"
	}
	if style == "BI" {
		style = "B"
	}
	k := c.lengthScale()
	c.f.SetFont("sans", style, float64(fnt.Font.Size)*k*72/25.4)
	c.f.SetTextColor(r, g, b)
	x, y := c.page(float64(pt.X), float64(pt.Y))
	m := c.st.m
	angle := math.Atan2(m[1], m[0]) * 180 / math.Pi
	if math.Abs(angle) > 1e-9 {
		c.f.TransformBegin()
		c.f.TransformRotate(angle, x, y)
		c.f.Text(x, y, str)
		c.f.TransformEnd()
	} else {
		c.f.Text(x, y, str)
	}
	c.f.SetTextColor(0, 0, 0)
}

// DrawImage is not used by the report's figures; raster images are left
// out rather than embedded (see the type's comment).
func (c *pdfCanvas) DrawImage(vg.Rectangle, image.Image) {}
