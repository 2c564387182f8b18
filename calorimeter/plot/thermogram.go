package plot

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"calred/units"
)

// celsiusOffset converts kelvin to degrees Celsius: t/°C = T/K − 273.15
// (the definition of the Celsius temperature, SI Brochure, 9th ed., 2.3.1).
const celsiusOffset = 273.15

// autoMinutes is the span above which the time axis is drawn in minutes
// when Options.TimeUnit is "": 20 min.
const autoMinutes = 20 * 60.0

// Line is a drift line θ(t) = Intercept + Slope·t, in kelvin with t in
// seconds on the time base of Thermogram.Time.
type Line struct {
	Slope     float64 // K/s
	Intercept float64 // K at t = 0
}

// At returns θ(t) in kelvin.
func (l Line) At(t float64) float64 { return l.Intercept + l.Slope*t }

// Thermogram is what WriteThermogram draws: the readings of one run and
// what the reduction made of them. Times are seconds since the first
// reading, temperatures kelvin (drawn in °C). A period is [start, end] in
// seconds; a period whose end is not after its start is taken as absent.
type Thermogram struct {
	Title       string
	Time        []float64 // s since the first reading, non-decreasing
	Temperature []float64 // K, one per reading

	Pre, Main, Post [2]float64 // fore, main and after periods, s
	PreLine         Line       // fore drift line
	PostLine        Line       // after drift line

	MixTime float64 // s, start of the process; NaN if unknown
	Tx      float64 // s, equal-area time; NaN if none

	DeltaT, UDeltaT float64 // corrected temperature change and its standard uncertainty, K
	Method          string  // method that gave DeltaT, as reported

	Excluded  []int     // indices of readings excluded as spikes
	Residuals []float64 // K per reading, NaN where none; nil: computed from the drift lines in the fore and after periods
	Curve     []float64 // K per reading, the fitted model curve; nil if none
}

// WriteThermogram draws th in format "svg", "png" or "pdf" (see
// FormatFromName) and writes the document to w.
//
// The upper panel shows the readings (small dots) over lightly shaded
// fore, main and after periods; the fore and after drift lines, solid
// over their periods and dashed where extrapolated across the main period;
// the model curve when given; the mixing time and the equal-area time tₓ as
// vertical lines; the two areas of the equal-area construction, between
// the readings and the fore line from the mixing time (or the start of the
// main period) to tₓ, and between the readings and the after line from tₓ
// to the end of the main period; the corrected change as a double arrow
// between the two lines, labelled "ΔT = … ± … K"; and excluded spikes as ×,
// pinned to the frame when off scale. The arrow stands at tₓ; without tₓ it
// stands where the gap between the lines equals ΔT (the effective
// equal-area time of a Regnault–Pfaundler or model result) when that falls
// in the main period, else at the mixing time. The lower panel shares the
// time axis and shows the drift residuals in mK, excluded spikes left out.
// A column on the right holds the legend and the key figures.
//
// Time is drawn in s, or in min when Options.TimeUnit is "min" or is ""
// and the log spans more than 20 min. Large logs are thinned as the
// package documentation describes.
func WriteThermogram(w io.Writer, format string, th Thermogram, opt Options) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("thermogram: drawing failed: %v", r)
		}
	}()
	fig, err := newThermoFigure(th, opt)
	if err != nil {
		return fmt.Errorf("thermogram: %w", err)
	}
	wpx, hpx, err := opt.size()
	if err != nil {
		return fmt.Errorf("thermogram: %w", err)
	}
	c, dc, err := newCanvas(format, wpx, hpx)
	if err != nil {
		return fmt.Errorf("thermogram: %w", err)
	}
	fig.draw(dc)
	if err := write(w, c); err != nil {
		return fmt.Errorf("thermogram: write %s: %w", format, err)
	}
	return nil
}

// thermoFigure holds a validated thermogram in display units: time in s or
// min, temperature in °C, residuals in mK.
type thermoFigure struct {
	th    Thermogram
	scale float64 // seconds per display time unit
	unit  string  // "s" or "min"
	limit int     // MaxPoints
	n     int

	excluded []bool
	keep     []int    // readings not excluded
	drawn    []int    // thinned keep
	pairs    [][2]int // buckets of drawn, nil when not thinned
	res      []float64
}

func newThermoFigure(th Thermogram, opt Options) (*thermoFigure, error) {
	n := len(th.Time)
	if len(th.Temperature) != n {
		return nil, fmt.Errorf("%d times but %d temperatures", n, len(th.Temperature))
	}
	if n < 2 {
		return nil, fmt.Errorf("%d readings, at least 2 are needed", n)
	}
	for i := range n {
		t, T := th.Time[i], th.Temperature[i]
		switch {
		case !finite(t):
			return nil, fmt.Errorf("reading %d: time %v s is not a finite number", i+1, t)
		case !finite(T):
			return nil, fmt.Errorf("reading %d: temperature %v K is not a finite number", i+1, T)
		case T <= 0:
			return nil, fmt.Errorf("reading %d: temperature %g K is not above absolute zero", i+1, T)
		case i > 0 && t < th.Time[i-1]:
			return nil, fmt.Errorf("reading %d at %g s is earlier than reading %d at %g s", i+1, t, i, th.Time[i-1])
		}
	}
	for _, l := range []struct {
		name string
		p    [2]float64
		l    Line
	}{{"fore", th.Pre, th.PreLine}, {"after", th.Post, th.PostLine}} {
		if has(l.p) && !(finite(l.l.Slope) && finite(l.l.Intercept)) {
			return nil, fmt.Errorf("%s drift line %g K + %g K/s·t is not finite", l.name, l.l.Intercept, l.l.Slope)
		}
	}
	if th.Residuals != nil && len(th.Residuals) != n {
		return nil, fmt.Errorf("%d residuals for %d readings", len(th.Residuals), n)
	}
	if th.Curve != nil && len(th.Curve) != n {
		return nil, fmt.Errorf("%d model curve values for %d readings", len(th.Curve), n)
	}
	limit, err := opt.maxPoints()
	if err != nil {
		return nil, err
	}
	f := &thermoFigure{th: th, limit: limit, n: n, excluded: make([]bool, n)}
	for _, i := range th.Excluded {
		if i < 0 || i >= n {
			return nil, fmt.Errorf("excluded reading index %d is outside 0…%d", i, n-1)
		}
		f.excluded[i] = true
	}
	span := th.Time[n-1] - th.Time[0]
	switch opt.TimeUnit {
	case "s":
		f.scale, f.unit = 1, "s"
	case "min":
		f.scale, f.unit = 60, "min"
	case "":
		f.scale, f.unit = 1, "s"
		if span > autoMinutes {
			f.scale, f.unit = 60, "min"
		}
	default:
		return nil, fmt.Errorf("time unit %q is not one of s, min", opt.TimeUnit)
	}
	for i := range n {
		if !f.excluded[i] {
			f.keep = append(f.keep, i)
		}
	}
	f.drawn, f.pairs = thin(f.keep, th.Temperature, limit)
	f.res = f.residuals()
	return f, nil
}

// has reports whether period p is present.
func has(p [2]float64) bool { return finite(p[0]) && finite(p[1]) && p[1] > p[0] }

func within(t float64, p [2]float64) bool { return has(p) && t >= p[0] && t <= p[1] }

// residuals returns the residuals in K: as given, or the readings less the
// drift line in the fore and after periods.
func (f *thermoFigure) residuals() []float64 {
	if f.th.Residuals != nil {
		return f.th.Residuals
	}
	r := make([]float64, f.n)
	for i, t := range f.th.Time {
		switch {
		case within(t, f.th.Pre):
			r[i] = f.th.Temperature[i] - f.th.PreLine.At(t)
		case within(t, f.th.Post):
			r[i] = f.th.Temperature[i] - f.th.PostLine.At(t)
		default:
			r[i] = math.NaN()
		}
	}
	return r
}

func (f *thermoFigure) x(t float64) float64 { return t / f.scale }

func celsius(T float64) float64 { return T - celsiusOffset }

// interp returns the temperature (K) at time t interpolated between the
// kept readings on either side.
func (f *thermoFigure) interp(t float64) float64 {
	tm := f.th.Time
	k := sort.Search(len(f.keep), func(j int) bool { return tm[f.keep[j]] >= t })
	switch {
	case len(f.keep) == 0:
		return math.NaN()
	case k == 0:
		return f.th.Temperature[f.keep[0]]
	case k == len(f.keep):
		return f.th.Temperature[f.keep[k-1]]
	}
	i, j := f.keep[k-1], f.keep[k]
	if tm[j] == tm[i] {
		return f.th.Temperature[j]
	}
	a := (t - tm[i]) / (tm[j] - tm[i])
	return f.th.Temperature[i] + a*(f.th.Temperature[j]-f.th.Temperature[i])
}

// keptIn returns the kept readings with a < t < b, thinned.
func (f *thermoFigure) keptIn(a, b float64) []int {
	var idx []int
	for _, i := range f.keep {
		if t := f.th.Time[i]; t > a && t < b {
			idx = append(idx, i)
		}
	}
	idx, _ = thin(idx, f.th.Temperature, f.limit)
	return idx
}

// lineSeg is a drift line drawn from time a to b (s), in display units.
func (f *thermoFigure) lineSeg(l Line, a, b float64) []xy {
	return []xy{{f.x(a), celsius(l.At(a))}, {f.x(b), celsius(l.At(b))}}
}

// arrowTime is where the ΔT arrow stands (s), or NaN when none is drawn.
func (f *thermoFigure) arrowTime() float64 {
	th := f.th
	if !has(th.Pre) || !has(th.Post) || !finite(th.DeltaT) {
		return math.NaN()
	}
	if finite(th.Tx) {
		return th.Tx
	}
	main := th.Main
	if !has(main) {
		main = [2]float64{th.Pre[1], th.Post[0]}
	}
	if dm := th.PostLine.Slope - th.PreLine.Slope; dm != 0 {
		t := (th.DeltaT - (th.PostLine.Intercept - th.PreLine.Intercept)) / dm
		if within(t, main) {
			return t
		}
	}
	if finite(th.MixTime) {
		return th.MixTime
	}
	return main[0]
}

// equalAreas returns the outlines of the two areas of the equal-area
// construction, or nil when tₓ or a drift line is missing.
func (f *thermoFigure) equalAreas() (left, right []xy) {
	th := f.th
	if !finite(th.Tx) || !has(th.Pre) || !has(th.Post) || !has(th.Main) || !within(th.Tx, th.Main) {
		return nil, nil
	}
	a := th.Main[0]
	if finite(th.MixTime) && th.MixTime >= th.Main[0] && th.MixTime < th.Tx {
		a = th.MixTime
	}
	b := th.Main[1]
	pt := func(t, T float64) xy { return xy{f.x(t), celsius(T)} }

	left = append(left, pt(a, f.interp(a)))
	for _, i := range f.keptIn(a, th.Tx) {
		left = append(left, pt(th.Time[i], th.Temperature[i]))
	}
	left = append(left, pt(th.Tx, f.interp(th.Tx)), pt(th.Tx, th.PreLine.At(th.Tx)), pt(a, th.PreLine.At(a)))

	right = append(right, pt(th.Tx, f.interp(th.Tx)))
	for _, i := range f.keptIn(th.Tx, b) {
		right = append(right, pt(th.Time[i], th.Temperature[i]))
	}
	right = append(right, pt(b, f.interp(b)), pt(b, th.PostLine.At(b)), pt(th.Tx, th.PostLine.At(th.Tx)))
	return left, right
}

// plusMinus formats v ± u with u to two significant digits and v to the
// same decimal place (units.Format, GUM 7.2.6); without a positive, finite
// u it writes v to four decimals.
func plusMinus(v, u float64, unit string) string {
	if !finite(u) || u <= 0 {
		return fmt.Sprintf("%.4f %s", v, unit)
	}
	return units.Format(v, u, unit)
}

// formatTime formats a time in seconds in the display unit.
func (f *thermoFigure) formatTime(t float64) string {
	if f.unit == "min" {
		return fmt.Sprintf("%.2f min", t/60)
	}
	return fmt.Sprintf("%.1f s", t)
}

func rms(r []float64, idx []int, p [2]float64, tm []float64) (float64, int) {
	var s float64
	var k int
	for _, i := range idx {
		if finite(r[i]) && within(tm[i], p) {
			s += r[i] * r[i]
			k++
		}
	}
	if k == 0 {
		return math.NaN(), 0
	}
	return math.Sqrt(s / float64(k)), k
}

// Styles of the thermogram.
var (
	styleMix      = draw.LineStyle{Color: colBlack, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(2), vg.Points(2)}}
	styleTx       = draw.LineStyle{Color: colBlack, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)}}
	dashExtrap    = []vg.Length{vg.Points(6), vg.Points(3.5)}
	glyphSpike    = draw.GlyphStyle{Color: colPurple, Radius: vg.Points(4.5), Shape: crossGlyph{w: vg.Points(1.6)}}
	fillPre       = tint(colBlue, 0.09)
	fillMain      = tint(colYellow, 0.20)
	fillPost      = tint(colVermilion, 0.08)
	fillAreaLeft  = tint(colSky, 0.55)
	fillAreaRight = tint(colOrange, 0.55)
)

func (f *thermoFigure) draw(dc draw.Canvas) {
	th := f.th
	tm, T := th.Time, th.Temperature
	block := newLegendBlock()
	top := newPanel("", "Temperature / °C")
	bottom := newPanel(unitLabel("Time", f.unit), "Residual / mK")
	top.X.Tick.Marker = unlabelled{niceTicks{n: 9}}
	bottom.X.Tick.Marker = niceTicks{n: 9}
	top.Y.Tick.Marker = niceTicks{n: 7}
	bottom.Y.Tick.Marker = niceTicks{n: 4}
	for _, p := range []*gplot.Plot{top, bottom} {
		p.X.Min, p.X.Max = f.x(tm[0]), f.x(tm[f.n-1])
	}

	// The temperature range covers the kept readings, the curve, the
	// drawn lines and the arrow; spikes off that range sit on the frame.
	ylo, yhi := math.Inf(1), math.Inf(-1)
	grow := func(y float64) {
		if finite(y) {
			ylo, yhi = math.Min(ylo, y), math.Max(yhi, y)
		}
	}
	for _, i := range f.keep {
		grow(celsius(T[i]))
	}

	// Period bands, under everything.
	for _, b := range []struct {
		p          [2]float64
		fill, edge color.NRGBA
		name       string
	}{
		{th.Pre, fillPre, colBlue, "fore period"},
		{th.Main, fillMain, colYellow, "main period"},
		{th.Post, fillPost, colVermilion, "after period"},
	} {
		if !has(b.p) {
			continue
		}
		bd := band{x0: f.x(b.p[0]), x1: f.x(b.p[1]), fill: b.fill, edge: b.edge}
		top.Add(bd)
		bottom.Add(bd)
		block.legend.Add(b.name, bd)
	}
	grid := plotter.NewGrid()
	grid.Vertical.Color, grid.Horizontal.Color = colGrid, colGrid
	grid.Vertical.Width, grid.Horizontal.Width = vg.Points(0.5), vg.Points(0.5)
	top.Add(grid)
	bottom.Add(grid)

	// Equal areas.
	left, right := f.equalAreas()
	al, ar := area{pts: left, fill: fillAreaLeft}, area{pts: right, fill: fillAreaRight}
	if left != nil {
		top.Add(al, ar)
	}

	// Model curve.
	var curve polyline
	if th.Curve != nil {
		var idx []int
		for i, v := range th.Curve {
			if finite(v) {
				idx = append(idx, i)
			}
		}
		idx, _ = thin(idx, th.Curve, f.limit)
		curve.style = draw.LineStyle{Color: colGreen, Width: vg.Points(1.6)}
		for _, i := range idx {
			q := xy{f.x(tm[i]), celsius(th.Curve[i])}
			curve.pts = append(curve.pts, q)
			grow(q.Y)
		}
		top.Add(curve)
	}

	// Readings: markers, joined per bucket when thinned.
	radius := vg.Points(1.0)
	switch {
	case len(f.drawn) <= 400:
		radius = vg.Points(1.9)
	case len(f.drawn) <= 1500:
		radius = vg.Points(1.4)
	}
	readings := markers{glyph: draw.GlyphStyle{Color: colBlack, Radius: radius, Shape: draw.CircleGlyph{}}}
	for _, i := range f.drawn {
		readings.pts = append(readings.pts, xy{f.x(tm[i]), celsius(T[i])})
	}
	if f.pairs != nil {
		top.Add(f.rangeBars(f.pairs, T, celsius, colBlack))
	}
	top.Add(readings)

	// Drift lines over the readings: solid over their period, dashed
	// where extrapolated across the main period.
	mainStart, mainEnd := th.Main[0], th.Main[1]
	if !has(th.Main) {
		mainStart, mainEnd = th.Pre[1], th.Post[0]
	}
	driftLine := func(l Line, p [2]float64, a, b float64, col color.NRGBA) polyline {
		if finite(a) && finite(b) && b > a {
			ext := polyline{pts: f.lineSeg(l, a, b), style: draw.LineStyle{Color: col, Width: vg.Points(1.4), Dashes: dashExtrap}}
			grow(ext.pts[0].Y)
			grow(ext.pts[1].Y)
			top.Add(ext)
		}
		solid := polyline{pts: f.lineSeg(l, p[0], p[1]), style: draw.LineStyle{Color: col, Width: vg.Points(1.6)}}
		grow(solid.pts[0].Y)
		grow(solid.pts[1].Y)
		top.Add(solid)
		return solid
	}
	var preLine, postLine polyline
	if has(th.Pre) {
		preLine = driftLine(th.PreLine, th.Pre, th.Pre[1], max(mainEnd, th.Pre[1]), colBlue)
	}
	if has(th.Post) {
		postLine = driftLine(th.PostLine, th.Post, min(mainStart, th.Post[0]), th.Post[0], colVermilion)
	}

	// Vertical lines, the ΔT arrow, the spikes.
	mix := vline{x: f.x(th.MixTime), style: styleMix, label: "mixing", labelLeft: true}
	tx := vline{x: f.x(th.Tx), style: styleTx, label: "tₓ"}
	if finite(th.MixTime) {
		top.Add(mix)
	}
	if finite(th.Tx) {
		top.Add(tx)
	}
	label := "ΔT = " + plusMinus(th.DeltaT, th.UDeltaT, "K")
	ta := f.arrowTime()
	dT := arrow{label: label, color: colBlack}
	if finite(ta) {
		dT.x, dT.y0, dT.y1 = f.x(ta), celsius(th.PreLine.At(ta)), celsius(th.PostLine.At(ta))
		grow(dT.y0)
		grow(dT.y1)
		top.Add(dT)
	}
	spikes := markers{glyph: glyphSpike, clamp: true}
	for i, ex := range f.excluded {
		if ex {
			spikes.pts = append(spikes.pts, xy{f.x(tm[i]), celsius(T[i])})
		}
	}
	if len(spikes.pts) > 0 {
		top.Add(spikes)
	}
	top.Add(frameBox{})
	if !finite(ylo) {
		ylo, yhi = -1, 1
	}
	pad := (yhi - ylo) * 0.06
	if pad == 0 {
		pad = 0.5
	}
	top.Y.Min, top.Y.Max = ylo-pad, yhi+pad*1.6 // room for the line labels

	// Legend, in reading order of the figure.
	legendDot := readings
	legendDot.glyph.Radius = vg.Points(2)
	block.legend.Add("readings", legendDot)
	if has(th.Pre) {
		block.legend.Add("fore drift line", preLine)
	}
	if has(th.Post) {
		block.legend.Add("after drift line", postLine)
	}
	if has(th.Pre) || has(th.Post) {
		block.legend.Add("extrapolated", polyline{style: draw.LineStyle{Color: colFrame, Width: vg.Points(1.4), Dashes: dashExtrap}})
	}
	if th.Curve != nil {
		block.legend.Add("model curve", curve)
	}
	if finite(th.MixTime) {
		block.legend.Add("mixing time", mix)
	}
	if finite(th.Tx) {
		block.legend.Add("equal-area time tₓ", tx)
	}
	if left != nil {
		block.legend.Add("area before tₓ", al)
		block.legend.Add("area after tₓ", ar)
	}
	if finite(ta) {
		name := "corrected ΔT"
		if finite(th.Tx) {
			name = "corrected ΔT at tₓ"
		}
		block.legend.Add(name, dT)
	}
	if len(spikes.pts) > 0 {
		block.legend.Add(fmt.Sprintf("excluded spikes (%d)", len(spikes.pts)), spikes)
	}

	f.residualPanel(bottom)
	block.notes = f.notes(label)
	title := th.Title
	if title == "" {
		title = "Thermogram"
	}
	f.layoutPanels(dc, title, top, bottom, block)
}

// rangeBars joins the lowest and highest value of each thinned bucket.
func (f *thermoFigure) rangeBars(pairs [][2]int, v []float64, conv func(float64) float64, c color.Color) segments {
	s := segments{style: draw.LineStyle{Color: c, Width: vg.Points(0.6)}}
	for _, p := range pairs {
		a, b := p[0], p[1]
		s.segs = append(s.segs, [2]xy{{f.x(f.th.Time[a]), conv(v[a])}, {f.x(f.th.Time[b]), conv(v[b])}})
	}
	return s
}

// residualPanel fills the lower panel: residuals in mK coloured by period,
// over a zero line.
func (f *thermoFigure) residualPanel(bottom *gplot.Plot) {
	th, tm := f.th, f.th.Time
	var idx []int
	for _, i := range f.keep {
		if finite(f.res[i]) {
			idx = append(idx, i)
		}
	}
	idx, pairs := thin(idx, f.res, max(f.limit/2, 1))
	colourOf := func(i int) color.NRGBA {
		switch {
		case within(tm[i], th.Pre):
			return colBlue
		case within(tm[i], th.Post):
			return colVermilion
		}
		return colGrey
	}
	mK := func(r float64) float64 { return 1000 * r }
	order := []color.NRGBA{colBlue, colVermilion, colGrey}
	radius := vg.Points(1.6)
	if len(idx) > 1500 {
		radius = vg.Points(1.0)
	}
	groups := map[color.NRGBA]*markers{}
	bars := map[color.NRGBA]*segments{}
	for _, c := range order {
		groups[c] = &markers{glyph: draw.GlyphStyle{Color: c, Radius: radius, Shape: draw.CircleGlyph{}}}
		bars[c] = &segments{style: draw.LineStyle{Color: c, Width: vg.Points(0.6)}}
	}
	rmax := 0.0
	for _, i := range idx {
		rmax = math.Max(rmax, math.Abs(mK(f.res[i])))
		g := groups[colourOf(i)]
		g.pts = append(g.pts, xy{f.x(tm[i]), mK(f.res[i])})
	}
	for _, p := range pairs {
		s := f.rangeBars([][2]int{p}, f.res, mK, nil)
		b := bars[colourOf(p[0])]
		b.segs = append(b.segs, s.segs...)
	}
	bottom.Add(hline{y: 0, style: draw.LineStyle{Color: colFrame, Width: vg.Points(0.8)}})
	for _, c := range order {
		if len(bars[c].segs) > 0 {
			bottom.Add(*bars[c])
		}
		if len(groups[c].pts) > 0 {
			bottom.Add(*groups[c])
		}
	}
	if len(idx) == 0 {
		sty := textStyle(sizeNote, colFrame)
		sty.XAlign, sty.YAlign = draw.XCenter, draw.YCenter
		bottom.Add(note{text: "no residuals", fx: 0.5, fy: 0.5, style: sty})
	}
	if rmax == 0 {
		rmax = 1
	}
	bottom.Y.Min, bottom.Y.Max = -rmax*1.15, rmax*1.15
	bottom.Add(frameBox{})
}

// notes returns the key figures shown under the legend.
func (f *thermoFigure) notes(label string) []string {
	th, tm := f.th, f.th.Time
	var ns []string
	if th.Method != "" {
		ns = append(ns, "method: "+th.Method)
	}
	if finite(th.DeltaT) {
		ns = append(ns, label)
	}
	if finite(th.MixTime) {
		ns = append(ns, "mixing at "+f.formatTime(th.MixTime))
	}
	if finite(th.Tx) {
		ns = append(ns, "tₓ at "+f.formatTime(th.Tx))
	}
	if has(th.Pre) {
		ns = append(ns, fmt.Sprintf("fore drift %+.3g K/min", th.PreLine.Slope*60))
	}
	if has(th.Post) {
		ns = append(ns, fmt.Sprintf("after drift %+.3g K/min", th.PostLine.Slope*60))
	}
	if s, k := rms(f.res, f.keep, th.Pre, tm); k > 0 {
		ns = append(ns, fmt.Sprintf("fore residuals rms %.3g mK", 1000*s))
	}
	if s, k := rms(f.res, f.keep, th.Post, tm); k > 0 {
		ns = append(ns, fmt.Sprintf("after residuals rms %.3g mK", 1000*s))
	}
	if len(f.drawn) < len(f.keep) {
		ns = append(ns, fmt.Sprintf("%d readings, %d drawn", f.n, len(f.drawn)))
	} else {
		ns = append(ns, fmt.Sprintf("%d readings", f.n))
	}
	return ns
}

// layoutPanels draws the title, the two panels (upper 70 % of the height,
// time axes aligned by plot.Align) and the legend column.
func (f *thermoFigure) layoutPanels(dc draw.Canvas, title string, top, bottom *gplot.Plot, block *legendBlock) {
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	panels, column := layout(dc, title, block)
	const padY = vg.Length(8)
	cs := gplot.Align([][]*gplot.Plot{{top}, {bottom}}, draw.Tiles{Rows: 2, Cols: 1, PadY: padY}, panels)
	// plot.Align lines up the data areas left and right; the heights are
	// then shared 70:30 between the panels.
	split := panels.Min.Y + 0.3*(panels.Max.Y-panels.Min.Y)
	up, low := cs[0][0], cs[1][0]
	up.Min.Y, up.Max.Y = split+padY/2, panels.Max.Y
	low.Min.Y, low.Max.Y = panels.Min.Y, split-padY/2
	top.Draw(up)
	bottom.Draw(low)
	column.Max.Y = top.DataCanvas(up).Max.Y
	block.draw(column)
}
