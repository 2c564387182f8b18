package plot

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Default and limiting figure sizes, in pixels of a PNG. SVG and PDF
// documents get the same size at 96 pixels per inch (1200 px = 900 pt =
// 12.5 in).
const (
	DefaultWidth  = 1200
	DefaultHeight = 800
	minWidth      = 400
	minHeight     = 300
	maxSide       = 10000
	// DefaultMaxPoints is the default number of readings drawn before the
	// thermogram is thinned (see the package documentation).
	DefaultMaxPoints = 4000
	dpi              = 96
)

// Options sets the size and the time unit of a figure. The zero value
// asks for the defaults.
type Options struct {
	// Width and Height are the size in pixels of a PNG (default
	// 1200×800, at least 400×300, at most 10000 a side); SVG and PDF take
	// the same size at 96 px per inch (1200 px = 900 pt). Text and lines
	// scale with the figure.
	Width, Height int
	// TimeUnit is the unit of the thermogram's time axis: "s", "min", or
	// "" to choose minutes when the log spans more than 20 min.
	TimeUnit string
	// MaxPoints is the number of readings drawn before thinning (default
	// 4000, at least 100).
	MaxPoints int
}

// Formats lists the document formats the figures can be written in.
var Formats = []string{"svg", "png", "pdf"}

// FormatFromName returns the format ("svg", "png" or "pdf") named by the
// extension of a file name, in any case.
func FormatFromName(name string) (string, error) {
	ext := strings.ToLower(filepath.Ext(name))
	for _, f := range Formats {
		if ext == "."+f {
			return f, nil
		}
	}
	if ext == "" {
		return "", fmt.Errorf("plot file %q: no extension; name it .svg, .png or .pdf", name)
	}
	return "", fmt.Errorf("plot file %q: extension %q is not one of .svg, .png, .pdf", name, ext)
}

// size checks the options and returns the figure size in pixels.
func (o Options) size() (w, h int, err error) {
	w, h = o.Width, o.Height
	if w == 0 {
		w = DefaultWidth
	}
	if h == 0 {
		h = DefaultHeight
	}
	if w < minWidth || h < minHeight || w > maxSide || h > maxSide {
		return 0, 0, fmt.Errorf("figure size %d×%d px is outside %d×%d to %d×%d px",
			w, h, minWidth, minHeight, maxSide, maxSide)
	}
	return w, h, nil
}

func (o Options) maxPoints() (int, error) {
	switch {
	case o.MaxPoints == 0:
		return DefaultMaxPoints, nil
	case o.MaxPoints < 100:
		return 0, fmt.Errorf("maximum of %d drawn points is below the least of 100", o.MaxPoints)
	}
	return o.MaxPoints, nil
}

// newCanvas returns a blank canvas of w×h px for the format and the canvas
// to draw on. Figures are laid out for the default 1200×800 px; at other
// sizes text, lines and markers are scaled by s = min(w/1200, h/800),
// within 0.75–4, so a larger figure looks the same, only sharper, and a
// smaller one stays legible. A PNG gets the scale through its resolution
// (96·s pixels per inch, crisp text); SVG and PDF documents are w×h × 0.75
// pt (96 px per inch) and are scaled by a transform.
func newCanvas(format string, w, h int) (vg.CanvasWriterTo, draw.Canvas, error) {
	s := min(max(min(float64(w)/DefaultWidth, float64(h)/DefaultHeight), 0.75), 4)
	switch strings.ToLower(format) {
	case "png":
		d := int(math.Round(dpi * s))
		wl, hl := vg.Length(w)*vg.Inch/vg.Length(d), vg.Length(h)*vg.Inch/vg.Length(d)
		c := vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(wl, hl), vgimg.UseDPI(d))}
		return c, draw.New(c), nil
	case "svg", "pdf":
		wl, hl := vg.Length(w)*vg.Inch/dpi, vg.Length(h)*vg.Inch/dpi
		var c vg.CanvasWriterTo
		if strings.ToLower(format) == "svg" {
			c = vgsvg.New(wl, hl)
		} else {
			c = vgpdf.New(wl, hl)
		}
		c.Scale(s, s)
		return c, draw.NewCanvas(c, wl/vg.Length(s), hl/vg.Length(s)), nil
	}
	return nil, draw.Canvas{}, fmt.Errorf("format %q is not one of %s", format, strings.Join(Formats, ", "))
}

// The Okabe–Ito palette (Okabe & Ito 2008, "Color Universal Design").
var (
	colBlack     = color.NRGBA{0x00, 0x00, 0x00, 0xFF}
	colOrange    = color.NRGBA{0xE6, 0x9F, 0x00, 0xFF}
	colSky       = color.NRGBA{0x56, 0xB4, 0xE9, 0xFF}
	colGreen     = color.NRGBA{0x00, 0x9E, 0x73, 0xFF}
	colYellow    = color.NRGBA{0xF0, 0xE4, 0x42, 0xFF}
	colBlue      = color.NRGBA{0x00, 0x72, 0xB2, 0xFF}
	colVermilion = color.NRGBA{0xD5, 0x5E, 0x00, 0xFF}
	colPurple    = color.NRGBA{0xCC, 0x79, 0xA7, 0xFF}

	// Neutral greys for frames, grids and points outside the periods.
	colGrid  = color.NRGBA{0xDD, 0xDD, 0xDD, 0xFF}
	colFrame = color.NRGBA{0x55, 0x55, 0x55, 0xFF}
	colGrey  = color.NRGBA{0x88, 0x88, 0x88, 0xFF}
)

// tint returns c with opacity a (0–1), drawn over white as a light tint.
func tint(c color.NRGBA, a float64) color.NRGBA {
	c.A = uint8(a*255 + 0.5)
	return c
}

var sansFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

// Font sizes, in points (a 1200×800 px figure is 900×600 pt).
const (
	sizeTitle  = 14
	sizeLabel  = 12
	sizeTick   = 10.5
	sizeLegend = 10.5
	sizeNote   = 10
)

func textStyle(size vg.Length, c color.Color) text.Style {
	return text.Style{
		Color:   c,
		Font:    font.From(sansFont, size),
		Handler: gplot.DefaultTextHandler,
		XAlign:  draw.XLeft,
		YAlign:  draw.YBottom,
	}
}

// newPanel returns a plot with the house look: sans-serif text, no axis
// padding (the data area is framed by frameBox), and the given labels.
func newPanel(xlabel, ylabel string) *gplot.Plot {
	p := gplot.New()
	p.Title.TextStyle.Font = font.From(sansFont, sizeTitle)
	for _, a := range []*gplot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sansFont, sizeLabel)
		a.Tick.Label.Font = font.From(sansFont, sizeTick)
		a.Padding = 0
		a.Color = colFrame
		a.Tick.Color = colFrame
		a.Tick.Label.Color = colBlack
	}
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.Legend.TextStyle.Font = font.From(sansFont, sizeLegend)
	return p
}

// unitLabel joins a quantity and its unit in the ISO 80000-1 manner,
// "quantity / unit", parenthesising a compound unit: "Heat capacity / (J/K)".
func unitLabel(quantity, unit string) string {
	switch {
	case unit == "":
		return quantity
	case strings.ContainsAny(unit, "/· "):
		return quantity + " / (" + unit + ")"
	}
	return quantity + " / " + unit
}

// unlabelled keeps the tick marks of a ticker but blanks their labels, for
// the time axis of an upper panel that shares it with the panel below.
type unlabelled struct{ gplot.Ticker }

func (u unlabelled) Ticks(lo, hi float64) []gplot.Tick {
	ts := u.Ticker.Ticks(lo, hi)
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = " "
		}
	}
	return ts
}

// legendBlock is a legend followed by lines of notes, drawn in the column
// to the right of the panels.
type legendBlock struct {
	legend gplot.Legend
	notes  []string
}

func newLegendBlock() *legendBlock {
	l := gplot.NewLegend()
	l.TextStyle = textStyle(sizeLegend, colBlack)
	l.Top, l.Left = true, true
	l.ThumbnailWidth = vg.Points(24)
	l.Padding = vg.Points(3)
	return &legendBlock{legend: l}
}

const (
	margin = vg.Length(10) // around the figure, points
	gap    = vg.Length(14) // between the panels and the legend column
)

// width is the width the block needs.
func (b *legendBlock) width(c draw.Canvas) vg.Length {
	w := b.legend.Rectangle(c).Size().X
	sty := textStyle(sizeNote, colBlack)
	for _, n := range b.notes {
		w = max(w, sty.Width(n))
	}
	return w
}

// draw draws the block from the top of c downwards.
func (b *legendBlock) draw(c draw.Canvas) {
	b.legend.Draw(c)
	h := b.legend.Rectangle(c).Size().Y
	sty := textStyle(sizeNote, colBlack)
	sty.YAlign = draw.YTop
	line := sty.Height("Mg") * 1.3
	y := c.Max.Y - h - line
	for _, n := range b.notes {
		c.FillText(sty, vg.Point{X: c.Min.X, Y: y}, n)
		y -= line
	}
}

// layout splits the figure into a title strip, the panel area and the
// legend column. It returns the panel area and the legend column.
func layout(dc draw.Canvas, title string, b *legendBlock) (panels, column draw.Canvas) {
	dc = draw.Crop(dc, margin, -margin, margin, -margin)
	if title != "" {
		sty := textStyle(sizeTitle, colBlack)
		sty.XAlign = draw.XCenter
		sty.YAlign = draw.YTop
		dc.FillText(sty, vg.Point{X: (dc.Min.X + dc.Max.X) / 2, Y: dc.Max.Y}, title)
		dc = draw.Crop(dc, 0, 0, 0, -(sty.Height(title) + vg.Points(8)))
	}
	w := min(b.width(dc), (dc.Max.X-dc.Min.X)*0.4)
	panels = draw.Crop(dc, 0, -(w + gap), 0, 0)
	column = draw.Crop(dc, dc.Max.X-dc.Min.X-w, 0, 0, 0)
	return panels, column
}

// write renders the canvas to w.
func write(w io.Writer, c vg.CanvasWriterTo) error {
	_, err := c.WriteTo(w)
	return err
}

// niceTicks places major ticks at multiples of 1, 2, 2.5 or 5 × 10ᵏ, about
// n of them across the axis, with minor ticks between.
type niceTicks struct{ n int }

func (t niceTicks) Ticks(lo, hi float64) []gplot.Tick {
	span := hi - lo
	if !(span > 0) || !finite(span) || t.n < 1 {
		return gplot.DefaultTicks{}.Ticks(lo, hi)
	}
	raw := span / float64(t.n)
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	// The step of 1, 2, 2.5 or 5 × 10ᵏ whose tick count is nearest n.
	step, minor, best := mag, 5, math.Inf(1)
	for _, k := range []float64{0.1, 1, 10} {
		for _, m := range []struct {
			f     float64
			minor int
		}{{1, 5}, {2, 4}, {2.5, 5}, {5, 5}} {
			s := m.f * mag * k
			if d := math.Abs(span/s - float64(t.n)); d < best {
				step, minor, best = s, m.minor, d
			}
		}
	}
	dec := max(0, -int(math.Floor(math.Log10(step)+1e-9)))
	if math.Abs(step/math.Pow(10, math.Floor(math.Log10(step)+1e-9))-2.5) < 1e-9 {
		dec++
	}
	var ts []gplot.Tick
	sub := step / float64(minor)
	for k := math.Ceil(lo/sub - 1e-9); k*sub <= hi+sub*1e-9; k++ {
		v := k * sub
		if int64(k)%int64(minor) != 0 {
			ts = append(ts, gplot.Tick{Value: v})
			continue
		}
		if math.Abs(v) < sub*1e-6 {
			v = 0
		}
		ts = append(ts, gplot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', dec, 64)})
	}
	return ts
}
