package plot

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"
	"time"

	"calred/calorimeter"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ChartPoint is one run on a control chart: when it was recorded, its
// value of the charted quantity and its run id.
type ChartPoint struct {
	Time  time.Time
	Value float64
	Label string // run id
}

// WriteControlChart draws chart, an individuals chart of quantity (in
// unit, as in "Heat capacity", "J/K"), in format "svg", "png" or "pdf" and
// writes the document to w.
//
// points gives the time and run id of each value of chart.Values, in the
// same order; its Values must equal the chart's (to 1 part in 10⁹) so that
// a chart and its points cannot be paired by mistake. When every point has
// a time and the times do not decrease, the x axis is the date (UTC);
// otherwise, or when points is nil, it is the run order 1, 2, ….
//
// The values are joined in order by a line; the centre is drawn solid
// black, the ±2σ warning limits dashed orange and the ±3σ action limits
// solid vermillion, each labelled with its value at the right end; points
// that break a run rule are overdrawn with a reddish-purple diamond and
// their run id. Options.TimeUnit and MaxPoints are not used.
func WriteControlChart(w io.Writer, format string, chart calorimeter.ControlChart, points []ChartPoint, quantity, unit string, opt Options) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("control chart: drawing failed: %v", r)
		}
	}()
	n := len(chart.Values)
	if n == 0 {
		return fmt.Errorf("control chart: the chart has no values")
	}
	if points != nil && len(points) != n {
		return fmt.Errorf("control chart: %d points given for %d values", len(points), n)
	}
	for i, v := range chart.Values {
		if !finite(v) {
			return fmt.Errorf("control chart: value %d is %v, not a finite number", i+1, v)
		}
		if points != nil && math.Abs(points[i].Value-v) > 1e-9*math.Max(1, math.Abs(v)) {
			return fmt.Errorf("control chart: point %d (%s) has value %g but the chart has %g",
				i+1, points[i].Label, points[i].Value, v)
		}
	}
	for _, l := range []float64{chart.Centre, chart.Sigma, chart.Upper2, chart.Lower2, chart.Upper3, chart.Lower3} {
		if !finite(l) {
			return fmt.Errorf("control chart: centre or limit %v is not a finite number", l)
		}
	}
	// Dates only when every point has one and they keep the run order
	// (a clock set back between two runs falls back to run order).
	dated := points != nil
	for i := range points {
		if points[i].Time.IsZero() || (i > 0 && points[i].Time.Before(points[i-1].Time)) {
			dated = false
			break
		}
	}
	wpx, hpx, err := opt.size()
	if err != nil {
		return fmt.Errorf("control chart: %w", err)
	}
	c, dc, err := newCanvas(format, wpx, hpx)
	if err != nil {
		return fmt.Errorf("control chart: %w", err)
	}
	drawControl(dc, chart, points, dated, quantity, unit)
	if err := write(w, c); err != nil {
		return fmt.Errorf("control chart: write %s: %w", format, err)
	}
	return nil
}

// Styles of the control chart.
var (
	styleCentre  = draw.LineStyle{Color: colBlack, Width: vg.Points(1.2)}
	styleWarn    = draw.LineStyle{Color: colOrange, Width: vg.Points(1.3), Dashes: []vg.Length{vg.Points(6), vg.Points(3)}}
	styleAction  = draw.LineStyle{Color: colVermilion, Width: vg.Points(1.5)}
	glyphValue   = draw.GlyphStyle{Color: colBlue, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}
	glyphViolate = draw.GlyphStyle{Color: colPurple, Radius: vg.Points(6.5), Shape: diamondGlyph{}}
)

func drawControl(dc draw.Canvas, chart calorimeter.ControlChart, points []ChartPoint, dated bool, quantity, unit string) {
	n := len(chart.Values)
	xs := make([]float64, n)
	xlabel := "Run order"
	for i := range xs {
		xs[i] = float64(i + 1)
		if dated {
			xs[i] = float64(points[i].Time.UnixNano()) / 1e9
		}
	}
	p := newPanel(xlabel, unitLabel(quantity, unit))
	if dated {
		p.X.Label.Text = "Date (UTC)"
		p.X.Tick.Marker = dateTicks{}
	} else {
		p.X.Tick.Marker = integerTicks{}
	}
	p.Y.Tick.Marker = niceTicks{n: 7}

	grid := plotter.NewGrid()
	grid.Vertical.Color = nil
	grid.Horizontal.Color, grid.Horizontal.Width = colGrid, vg.Points(0.5)
	p.Add(grid)

	fmtv := func(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }
	limits := []hline{
		{y: chart.Upper3, style: styleAction, label: "+3σ " + fmtv(chart.Upper3)},
		{y: chart.Upper2, style: styleWarn, label: "+2σ " + fmtv(chart.Upper2)},
		{y: chart.Centre, style: styleCentre, label: "centre " + fmtv(chart.Centre)},
		{y: chart.Lower2, style: styleWarn, label: "−2σ " + fmtv(chart.Lower2)},
		{y: chart.Lower3, style: styleAction, label: "−3σ " + fmtv(chart.Lower3)},
	}
	if chart.Sigma == 0 {
		limits = limits[2:3] // the limits coincide with the centre
	}
	for _, l := range limits {
		p.Add(l)
	}

	pts := make([]xy, n)
	ylo, yhi := math.Min(chart.Lower3, chart.Centre), math.Max(chart.Upper3, chart.Centre)
	for i, v := range chart.Values {
		pts[i] = xy{xs[i], v}
		ylo, yhi = math.Min(ylo, v), math.Max(yhi, v)
	}
	join := polyline{pts: pts, style: draw.LineStyle{Color: colBlue, Width: vg.Points(1)}}
	vals := markers{pts: pts, glyph: glyphValue}
	p.Add(join, vals)

	flagged := map[int][]string{}
	var order []int
	for _, v := range chart.Violations {
		if v.Index < 0 || v.Index >= n {
			continue
		}
		if _, ok := flagged[v.Index]; !ok {
			order = append(order, v.Index)
		}
		flagged[v.Index] = append(flagged[v.Index], v.Rule)
	}
	viol := markers{glyph: glyphViolate}
	for _, i := range order {
		viol.pts = append(viol.pts, pts[i])
	}
	if len(viol.pts) > 0 {
		p.Add(viol)
		names := make([]string, len(order))
		for k, i := range order {
			names[k] = strconv.Itoa(i + 1)
			if points != nil && points[i].Label != "" {
				names[k] = points[i].Label
			}
		}
		p.Add(pointLabels{pts: viol.pts, labels: names})
	}
	p.Add(frameBox{})

	pad := (yhi - ylo) * 0.08
	if pad == 0 {
		pad = math.Max(math.Abs(chart.Centre)*0.01, 1)
	}
	p.Y.Min, p.Y.Max = ylo-pad, yhi+pad
	// Room on the right for the limit labels.
	xpad := (xs[n-1] - xs[0]) * 0.04
	if xpad == 0 {
		xpad = 1
		if dated {
			xpad = 3600
		}
	}
	p.X.Min, p.X.Max = xs[0]-xpad, xs[n-1]+4*xpad

	block := newLegendBlock()
	block.legend.Add("values", join, vals)
	block.legend.Add("centre (mean)", limits[min(2, len(limits)-1)])
	if chart.Sigma > 0 {
		block.legend.Add("±2σ warning limits", limits[1])
		block.legend.Add("±3σ action limits", limits[0])
	}
	if len(viol.pts) > 0 {
		block.legend.Add("rule violation", viol)
	}
	block.notes = append(block.notes,
		fmt.Sprintf("%d runs", n),
		"σ = mean moving range / 1.128",
		fmt.Sprintf("   = %s / 1.128 = %s", fmtv(chart.MovingRangeMean), fmtv(chart.Sigma)))
	if unit != "" {
		block.notes = append(block.notes, "values in "+unit)
	}
	if len(order) > 0 {
		block.notes = append(block.notes, "", "rules broken:")
		for _, i := range order {
			name := "#" + strconv.Itoa(i+1)
			if points != nil && points[i].Label != "" {
				name = points[i].Label
			}
			for _, r := range flagged[i] {
				block.notes = append(block.notes, "  "+name+": "+r)
			}
		}
	}
	const maxNotes = 22
	if len(block.notes) > maxNotes {
		more := len(block.notes) - maxNotes + 1
		block.notes = append(block.notes[:maxNotes-1], fmt.Sprintf("  … and %d more", more))
	}

	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	title := "Control chart"
	if quantity != "" {
		title += ": " + quantity
	}
	panels, column := layout(dc, title, block)
	p.Draw(panels)
	column.Max.Y = p.DataCanvas(panels).Max.Y
	block.draw(column)
}

// dateTicks marks whole hours, days or weeks (UTC) on an axis of Unix
// seconds, at most 8 labelled ticks.
type dateTicks struct{}

func (dateTicks) Ticks(lo, hi float64) []gplot.Tick {
	const h, d = 3600.0, 86400.0
	steps := []float64{h, 2 * h, 3 * h, 6 * h, 12 * h, d, 2 * d, 7 * d, 14 * d, 28 * d, 91 * d, 182 * d, 364 * d}
	step := steps[len(steps)-1]
	for _, s := range steps {
		if (hi-lo)/s <= 8 {
			step = s
			break
		}
	}
	for step*8 < hi-lo {
		step *= 2
	}
	format := "2006-01-02"
	if step < d {
		format = "01-02 15:04"
	}
	var ts []gplot.Tick
	for v := math.Ceil(lo/step) * step; v <= hi; v += step {
		ts = append(ts, gplot.Tick{Value: v, Label: time.Unix(int64(v), 0).UTC().Format(format)})
	}
	return ts
}

// integerTicks labels whole run numbers only.
type integerTicks struct{}

func (integerTicks) Ticks(lo, hi float64) []gplot.Tick {
	step := 1 // 1, 2, 5, 10, 20, … until at most 10 ticks
	for k := 1; float64(step)*10 < hi-lo; k++ {
		step = []int{1, 2, 5}[k%3] * int(math.Pow(10, float64(k/3)))
	}
	var ts []gplot.Tick
	for v := int(math.Ceil(lo/float64(step))) * step; float64(v) <= hi; v += step {
		if v >= 1 {
			ts = append(ts, gplot.Tick{Value: float64(v), Label: strconv.Itoa(v)})
		}
	}
	return ts
}

// pointLabels writes a label above each point.
type pointLabels struct {
	pts    []xy
	labels []string
}

func (l pointLabels) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := textStyle(sizeNote, colBlack)
	sty.XAlign = draw.XCenter
	for i, q := range l.pts {
		pt := vg.Point{X: trX(q.X), Y: trY(q.Y) + vg.Points(8)}
		if !c.Contains(pt) {
			continue
		}
		c.FillText(sty, pt, l.labels[i])
	}
}
