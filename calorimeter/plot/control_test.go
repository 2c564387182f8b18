package plot

import (
	"bytes"
	"errors"
	"fmt"
	"image/png"
	"math"
	"sort"
	"strings"
	"testing"
	"time"

	"calred/calorimeter"
)

// chartSeries is an invented record of 18 heat-capacity calibrations (J/K)
// of one coffee cup, with a bad run at position 8.
var chartSeries = []float64{452.3, 451.8, 452.9, 452.1, 452.6, 451.9, 452.4, 456.8, 452.2,
	452.8, 453.0, 453.1, 452.9, 453.3, 453.0, 453.2, 453.4, 452.95}

func chartPoints(values []float64) []ChartPoint {
	t0 := time.Date(2025, 3, 3, 9, 0, 0, 0, time.UTC)
	pts := make([]ChartPoint, len(values))
	for i, v := range values {
		pts[i] = ChartPoint{Time: t0.Add(time.Duration(i) * 31 * time.Hour), Value: v, Label: fmt.Sprintf("cal-%02d", i+1)}
	}
	return pts
}

func TestControlChartSVG(t *testing.T) {
	back := chartPoints(chartSeries)
	back[5].Time = back[4].Time.Add(-time.Hour)
	chart, err := calorimeter.IndividualsChart(chartSeries)
	if err != nil {
		t.Fatal(err)
	}
	if len(chart.Violations) == 0 {
		t.Fatal("the series should break a rule at cal-08")
	}
	flagged := map[int]bool{}
	for _, v := range chart.Violations {
		flagged[v.Index] = true
	}
	tests := []struct {
		name   string
		points []ChartPoint
		xlabel string
		mark   string // label written by the flagged point
	}{
		{"dated", chartPoints(chartSeries), "Date (UTC)", "cal-08"},
		{"run order", nil, "Run order", "8"},
		{"clock set back", back, "Run order", "cal-08"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := WriteControlChart(&b, "svg", chart, tt.points, "Heat capacity", "J/K", Options{}); err != nil {
				t.Fatal(err)
			}
			doc := parseSVG(t, b.Bytes())
			for _, s := range []string{tt.xlabel, "Heat capacity / (J/K)", "+3σ ", "−3σ ", "+2σ ", "−2σ ", "centre ",
				"rule violation", "±2σ warning limits", "±3σ action limits"} {
				if !doc.hasText(s) {
					t.Errorf("no text %q", s)
				}
			}
			exact := false
			for _, s := range doc.texts {
				exact = exact || s == tt.mark
			}
			if !exact {
				t.Errorf("flagged point not labelled %q", tt.mark)
			}
			// One blue dot per value and one in the legend.
			if n := doc.count(func(p svgPath) bool { return p.isDot("#0072B2") }); n != len(chartSeries)+1 {
				t.Errorf("%d value markers, want %d and one in the legend", n, len(chartSeries))
			}
			if n := doc.count(func(p svgPath) bool {
				return p.prop("fill") == "#CC79A7" && strings.Count(p.d, "L") == 3
			}); n != len(flagged)+1 {
				t.Errorf("%d violation markers, want %d and one in the legend", n, len(flagged))
			}

			// Limits in SVG coordinates (linear in the value): the 2σ lines
			// lie 2/3 of the way from the centre to the 3σ lines, and the
			// limits are symmetric about the centre.
			ys := func(colour string, dashed bool) []float64 {
				var out []float64
				for _, s := range doc.segments(colour, dashed) {
					if s[0][1] == s[1][1] && s[1][0]-s[0][0] > 200 { // long horizontal: in the panel, not the legend
						out = append(out, s[0][1])
					}
				}
				sort.Float64s(out)
				return out
			}
			c, l3, l2 := ys("#000000", false), ys("#D55E00", false), ys("#E69F00", true)
			if len(c) != 1 || len(l3) != 2 || len(l2) != 2 {
				t.Fatalf("lines found: centre %v, 3σ %v, 2σ %v", c, l3, l2)
			}
			if !approx(c[0]-l3[0], l3[1]-c[0], 1e-4) || !approx(c[0]-l2[0], l2[1]-c[0], 1e-4) {
				t.Errorf("limits not symmetric about the centre: %v %v %v", l3, l2, c)
			}
			// analytic: (x̄ + 2σ − x̄)/(x̄ + 3σ − x̄) = 2/3; 1e-4 for SVG rounding
			if r := (l2[1] - c[0]) / (l3[1] - c[0]); !approx(r, 2.0/3, 1e-4) {
				t.Errorf("2σ/3σ distance ratio %.6f, want 2/3", r)
			}
		})
	}
}

func TestControlChartPNG(t *testing.T) {
	chart, err := calorimeter.IndividualsChart(chartSeries)
	if err != nil {
		t.Fatal(err)
	}
	for _, tt := range []struct {
		name string
		opt  Options
		w, h int
	}{
		{"default", Options{}, 1200, 800},
		{"custom", Options{Width: 900, Height: 600}, 900, 600},
	} {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := WriteControlChart(&b, "png", chart, chartPoints(chartSeries), "Heat capacity", "J/K", tt.opt); err != nil {
				t.Fatal(err)
			}
			img, err := png.Decode(&b)
			if err != nil {
				t.Fatalf("PNG does not decode: %v", err)
			}
			if r := img.Bounds(); r.Dx() != tt.w || r.Dy() != tt.h {
				t.Errorf("PNG is %d×%d px, want %d×%d", r.Dx(), r.Dy(), tt.w, tt.h)
			}
		})
	}
}

func TestControlChartConstant(t *testing.T) {
	// σ = 0: only the centre is drawn, and nothing fails.
	chart, err := calorimeter.IndividualsChart([]float64{452, 452, 452})
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := WriteControlChart(&b, "svg", chart, nil, "Heat capacity", "J/K", Options{}); err != nil {
		t.Fatal(err)
	}
	doc := parseSVG(t, b.Bytes())
	if doc.hasText("+3σ") || !doc.hasText("centre 452") {
		t.Errorf("constant series: texts %q", doc.texts)
	}
}

func TestControlChartErrors(t *testing.T) {
	chart, err := calorimeter.IndividualsChart(chartSeries)
	if err != nil {
		t.Fatal(err)
	}
	pts := chartPoints(chartSeries)
	wrong := append([]ChartPoint(nil), pts...)
	wrong[3].Value = 999
	nanChart := chart
	nanChart.Upper3 = math.NaN()
	tests := []struct {
		name   string
		chart  calorimeter.ControlChart
		points []ChartPoint
		format string
		want   string
	}{
		{"empty", calorimeter.ControlChart{}, nil, "svg", "the chart has no values"},
		{"count", chart, pts[:4], "svg", "4 points given for 18 values"},
		{"value", chart, wrong, "svg", "point 4 (cal-04) has value 999 but the chart has 452.1"},
		{"limit", nanChart, nil, "svg", "limit NaN is not a finite number"},
		{"format", chart, nil, "gif", `format "gif" is not one of svg, png, pdf`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			err := WriteControlChart(&b, tt.format, tt.chart, tt.points, "Heat capacity", "J/K", Options{})
			if err == nil || !strings.Contains(err.Error(), tt.want) || !strings.HasPrefix(err.Error(), "control chart: ") {
				t.Errorf("error = %v, want one containing %q", err, tt.want)
			}
			if b.Len() != 0 {
				t.Errorf("%d bytes written despite the error", b.Len())
			}
		})
	}
	if err := WriteControlChart(failWriter{}, "svg", chart, nil, "Heat capacity", "J/K", Options{}); !errors.Is(err, errFull) {
		t.Errorf("failing writer: error = %v, want it to wrap %v", err, errFull)
	}
}

func TestUnitLabel(t *testing.T) {
	tests := []struct{ name, q, u, want string }{
		{"simple", "Temperature", "°C", "Temperature / °C"},
		{"compound", "Heat capacity", "J/K", "Heat capacity / (J/K)"},
		{"product", "Energy", "kW·h", "Energy / (kW·h)"},
		{"none", "Ratio", "", "Ratio"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := unitLabel(tt.q, tt.u); got != tt.want {
				t.Errorf("unitLabel(%q, %q) = %q, want %q", tt.q, tt.u, got, tt.want)
			}
		})
	}
}

func TestDateTicks(t *testing.T) {
	// 18 runs 31 h apart span 22 days: weekly ticks at UTC midnight.
	lo := float64(time.Date(2025, 3, 3, 0, 0, 0, 0, time.UTC).Unix())
	hi := lo + 22*86400
	ts := dateTicks{}.Ticks(lo, hi)
	if len(ts) < 3 || len(ts) > 8 {
		t.Fatalf("%d ticks over 22 days", len(ts))
	}
	for _, tk := range ts {
		if math.Mod(tk.Value, 86400) != 0 || len(tk.Label) != len("2006-01-02") {
			t.Errorf("tick %v %q is not a date at midnight", tk.Value, tk.Label)
		}
	}
}
