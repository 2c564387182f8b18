package plot

import (
	"image/color"
	"math"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The plotters below draw in data coordinates, clip to the data area and
// take no part in choosing the axis ranges: the figures set the ranges
// themselves.

// xy is a point in data coordinates.
type xy struct{ X, Y float64 }

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// frameBox draws a thin frame around the data area.
type frameBox struct{}

func (frameBox) Plot(c draw.Canvas, _ *gplot.Plot) {
	c.StrokeLines(draw.LineStyle{Color: colFrame, Width: vg.Points(0.6)},
		[]vg.Point{c.Min, {X: c.Max.X, Y: c.Min.Y}, c.Max, {X: c.Min.X, Y: c.Max.Y}, c.Min})
}

// band shades the full height of the data area between two abscissae.
type band struct {
	x0, x1 float64
	fill   color.Color
	edge   color.Color // outline of the legend thumbnail
}

func (b band) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, _ := p.Transforms(&c)
	x0, x1 := max(c.Min.X, trX(b.x0)), min(c.Max.X, trX(b.x1))
	if !(x1 > x0) {
		return
	}
	c.FillPolygon(b.fill, []vg.Point{{X: x0, Y: c.Min.Y}, {X: x1, Y: c.Min.Y}, {X: x1, Y: c.Max.Y}, {X: x0, Y: c.Max.Y}})
}

func (b band) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	pts := []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}}
	c.FillPolygon(b.fill, pts)
	if b.edge != nil {
		c.StrokeLines(draw.LineStyle{Color: b.edge, Width: vg.Points(0.5)}, append(pts, pts[0]))
	}
}

// vline is a vertical line across the data area with an optional label at
// its top, set to the left or right of the line.
type vline struct {
	x         float64
	style     draw.LineStyle
	label     string
	labelLeft bool
}

func (v vline) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, _ := p.Transforms(&c)
	x := trX(v.x)
	if !finite(v.x) || x < c.Min.X || x > c.Max.X {
		return
	}
	c.StrokeLine2(v.style, x, c.Min.Y, x, c.Max.Y)
	if v.label == "" {
		return
	}
	sty := textStyle(sizeNote, v.style.Color)
	sty.YAlign = draw.YTop
	dx := vg.Points(3)
	if v.labelLeft {
		sty.XAlign = draw.XRight
		dx = -dx
	}
	c.FillText(sty, vg.Point{X: x + dx, Y: c.Max.Y - vg.Points(3)}, v.label)
}

func (v vline) Thumbnail(c *draw.Canvas) {
	x := (c.Min.X + c.Max.X) / 2
	c.StrokeLine2(v.style, x, c.Min.Y, x, c.Max.Y)
}

// hline is a horizontal line across the data area with an optional label
// at its right end, above the line.
type hline struct {
	y     float64
	style draw.LineStyle
	label string
}

func (h hline) Plot(c draw.Canvas, p *gplot.Plot) {
	_, trY := p.Transforms(&c)
	y := trY(h.y)
	if !finite(h.y) || y < c.Min.Y || y > c.Max.Y {
		return
	}
	c.StrokeLine2(h.style, c.Min.X, y, c.Max.X, y)
	if h.label == "" {
		return
	}
	sty := textStyle(sizeNote, h.style.Color)
	sty.XAlign = draw.XRight
	c.FillText(sty, vg.Point{X: c.Max.X - vg.Points(4), Y: y + vg.Points(2)}, h.label)
}

func (h hline) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(h.style, c.Min.X, y, c.Max.X, y)
}

// polyline joins points in order; non-finite points break the line.
type polyline struct {
	pts   []xy
	style draw.LineStyle
}

func (l polyline) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	var lines [][]vg.Point
	var cur []vg.Point
	for _, q := range l.pts {
		if !finite(q.X) || !finite(q.Y) {
			if len(cur) > 1 {
				lines = append(lines, cur)
			}
			cur = nil
			continue
		}
		cur = append(cur, vg.Point{X: trX(q.X), Y: trY(q.Y)})
	}
	if len(cur) > 1 {
		lines = append(lines, cur)
	}
	if len(lines) > 0 {
		c.StrokeLines(l.style, c.ClipLinesXY(lines...)...)
	}
}

func (l polyline) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(l.style, c.Min.X, y, c.Max.X, y)
}

// markers draws a glyph at each point. With clamp, points beyond the
// vertical range are drawn on the frame instead of being dropped.
type markers struct {
	pts   []xy
	glyph draw.GlyphStyle
	clamp bool
}

func (m markers) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, q := range m.pts {
		if !finite(q.X) || !finite(q.Y) {
			continue
		}
		pt := vg.Point{X: trX(q.X), Y: trY(q.Y)}
		if m.clamp {
			pt.Y = min(max(pt.Y, c.Min.Y), c.Max.Y)
		}
		c.DrawGlyph(m.glyph, pt)
	}
}

func (m markers) Thumbnail(c *draw.Canvas) {
	c.DrawGlyph(m.glyph, c.Center())
}

// crossGlyph is an × drawn as one stroked path of width w.
type crossGlyph struct{ w vg.Length }

func (g crossGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.w})
	r := sty.Radius * 0.7071
	var p vg.Path
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y + r})
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y - r})
	c.Stroke(p)
}

// diamondGlyph is a filled diamond with a white edge, drawn over a point
// to mark it.
type diamondGlyph struct{}

func (diamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius
	var p vg.Path
	p.Move(vg.Point{X: pt.X, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y})
	p.Line(vg.Point{X: pt.X, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X - r, Y: pt.Y})
	p.Close()
	c.Fill(p)
	c.SetLineStyle(draw.LineStyle{Color: color.White, Width: vg.Points(0.8)})
	c.Stroke(p)
}

// area fills a polygon given in data coordinates.
type area struct {
	pts  []xy
	fill color.Color
}

func (a area) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	pts := make([]vg.Point, 0, len(a.pts))
	for _, q := range a.pts {
		if finite(q.X) && finite(q.Y) {
			pts = append(pts, vg.Point{X: trX(q.X), Y: trY(q.Y)})
		}
	}
	if len(pts) < 3 {
		return
	}
	c.FillPolygon(a.fill, c.ClipPolygonXY(pts))
}

func (a area) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	c.FillPolygon(a.fill, []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}})
}

// arrow is a vertical double-headed arrow from (x, y0) to (x, y1) with a
// boxed label beside its middle.
type arrow struct {
	x, y0, y1 float64
	label     string
	color     color.Color
}

const arrowHead = vg.Length(7) // length of an arrowhead, points

func (a arrow) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	x, y0, y1 := trX(a.x), trY(a.y0), trY(a.y1)
	if x < c.Min.X || x > c.Max.X {
		return
	}
	lo, hi := min(y0, y1), max(y0, y1)
	lo, hi = max(lo, c.Min.Y), min(hi, c.Max.Y)
	if hi < lo {
		return
	}
	sty := draw.LineStyle{Color: a.color, Width: vg.Points(1.4)}
	if hi-lo >= 2.5*arrowHead {
		c.StrokeLine2(sty, x, lo+arrowHead*0.8, x, hi-arrowHead*0.8)
		w := arrowHead * 0.45
		c.FillPolygon(a.color, []vg.Point{{X: x, Y: hi}, {X: x - w, Y: hi - arrowHead}, {X: x + w, Y: hi - arrowHead}})
		c.FillPolygon(a.color, []vg.Point{{X: x, Y: lo}, {X: x - w, Y: lo + arrowHead}, {X: x + w, Y: lo + arrowHead}})
	} else {
		// Too short for heads: a segment with end bars.
		c.StrokeLine2(sty, x, lo, x, hi)
		c.StrokeLine2(sty, x-4, lo, x+4, lo)
		c.StrokeLine2(sty, x-4, hi, x+4, hi)
	}
	if a.label == "" {
		return
	}
	ts := textStyle(sizeLabel, colBlack)
	ts.YAlign = draw.YCenter
	tw, th := ts.Width(a.label), ts.Height(a.label)
	pad := vg.Points(4)
	lx := x + vg.Points(8)
	if lx+tw+2*pad > c.Max.X {
		lx = x - vg.Points(8) - tw - 2*pad
	}
	ly := (lo + hi) / 2
	box := []vg.Point{{X: lx, Y: ly - th/2 - pad}, {X: lx + tw + 2*pad, Y: ly - th/2 - pad},
		{X: lx + tw + 2*pad, Y: ly + th/2 + pad}, {X: lx, Y: ly + th/2 + pad}}
	c.FillPolygon(color.NRGBA{0xFF, 0xFF, 0xFF, 0xE6}, box)
	c.StrokeLines(draw.LineStyle{Color: a.color, Width: vg.Points(0.6)}, append(box, box[0]))
	c.FillText(ts, vg.Point{X: lx + pad, Y: ly}, a.label)
}

func (a arrow) Thumbnail(c *draw.Canvas) {
	x := (c.Min.X + c.Max.X) / 2
	lo, hi := c.Min.Y+1, c.Max.Y-1
	h, w := min(arrowHead*0.6, (hi-lo)/3), arrowHead*0.35
	c.StrokeLine2(draw.LineStyle{Color: a.color, Width: vg.Points(1.2)}, x, lo+h, x, hi-h)
	c.FillPolygon(a.color, []vg.Point{{X: x, Y: hi}, {X: x - w, Y: hi - h}, {X: x + w, Y: hi - h}})
	c.FillPolygon(a.color, []vg.Point{{X: x, Y: lo}, {X: x - w, Y: lo + h}, {X: x + w, Y: lo + h}})
}

// note writes text at a fixed place in the data area: fx, fy in 0–1 from
// the lower left corner.
type note struct {
	text   string
	fx, fy float64
	style  text.Style
}

func (n note) Plot(c draw.Canvas, _ *gplot.Plot) {
	c.FillText(n.style, vg.Point{X: c.X(n.fx), Y: c.Y(n.fy)}, n.text)
}

// segments strokes separate two-point segments as one path, for the
// ranges of thinned buckets.
type segments struct {
	segs  [][2]xy
	style draw.LineStyle
}

func (s segments) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	var path vg.Path
	for _, sg := range s.segs {
		a := vg.Point{X: trX(sg[0].X), Y: trY(sg[0].Y)}
		b := vg.Point{X: trX(sg[1].X), Y: trY(sg[1].Y)}
		if !c.ContainsX(a.X) || !c.ContainsX(b.X) {
			continue
		}
		a.Y = min(max(a.Y, c.Min.Y), c.Max.Y)
		b.Y = min(max(b.Y, c.Min.Y), c.Max.Y)
		path.Move(a)
		path.Line(b)
	}
	if len(path) > 0 {
		c.SetLineStyle(s.style)
		c.Stroke(path)
	}
}
