package plot

import (
	"bytes"
	"errors"
	"image/png"
	"math"
	"strings"
	"testing"
)

func approx(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

func svgOf(t *testing.T, th Thermogram, opt Options) svgDoc {
	t.Helper()
	var b bytes.Buffer
	if err := WriteThermogram(&b, "svg", th, opt); err != nil {
		t.Fatal(err)
	}
	return parseSVG(t, b.Bytes())
}

// longest returns the segment with the largest horizontal extent.
func longest(segs [][2][2]float64) ([2][2]float64, bool) {
	var best [2][2]float64
	found := false
	for _, s := range segs {
		if !found || math.Abs(s[1][0]-s[0][0]) > math.Abs(best[1][0]-best[0][0]) {
			best, found = s, true
		}
	}
	return best, found
}

func TestThermogramSVG(t *testing.T) {
	short := defaultRun(451).thermogram() // 2 s sampling, 900 s, 2 spikes
	long := defaultRun(1201)
	long.step = 2 // 2400 s: more than 20 min, so minutes
	rp := short
	rp.Tx = math.NaN()
	rp.Method = "regnault-pfaundler"
	curved := short
	curved.Curve = make([]float64, len(short.Time))
	for i, T := range short.Temperature {
		curved.Curve[i] = T // stands in for a model curve
	}
	tests := []struct {
		name     string
		th       Thermogram
		opt      Options
		timeAxis string
		dots     [2]int // bounds on reading markers, legend sample excluded
		areas    bool
		curve    bool
	}{
		// One marker per reading not excluded: 451 − 2 = 449.
		{"small run", short, Options{}, "Time / s", [2]int{449, 449}, true, false},
		// 1201 − 2 = 1199 readings, under the 4000 limit.
		{"long run in minutes", long.thermogram(), Options{}, "Time / min", [2]int{1199, 1199}, true, false},
		{"forced seconds", long.thermogram(), Options{TimeUnit: "s"}, "Time / s", [2]int{1199, 1199}, true, false},
		// 200 points allowed: 100 buckets of 4–5 readings, 1 or 2 markers each.
		{"thinned", short, Options{MaxPoints: 200}, "Time / s", [2]int{100, 200}, true, false},
		{"no equal-area time", rp, Options{}, "Time / s", [2]int{449, 449}, false, false},
		{"model curve", curved, Options{}, "Time / s", [2]int{449, 449}, true, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			doc := svgOf(t, tt.th, tt.opt)
			for _, label := range []string{tt.timeAxis, "Temperature / °C", "Residual / mK",
				"fore drift line", "after drift line", "readings", "excluded spikes (2)", "ΔT = "} {
				if !doc.hasText(label) {
					t.Errorf("no text %q in the SVG", label)
				}
			}
			// Reading markers: black filled circles, plus one in the legend.
			dots := doc.count(func(p svgPath) bool { return p.isDot("#000000") }) - 1
			if dots < tt.dots[0] || dots > tt.dots[1] {
				t.Errorf("%d reading markers, want %d to %d", dots, tt.dots[0], tt.dots[1])
			}
			// Spikes: one reddish-purple × each, plus the legend's.
			if n := doc.count(func(p svgPath) bool { return p.prop("stroke") == "#CC79A7" }); n != 3 {
				t.Errorf("%d spike markers, want 2 and one in the legend", n)
			}
			fills := func(c string) int {
				return doc.count(func(p svgPath) bool { return near(p.prop("fill"), c) && !strings.Contains(p.d, "A") })
			}
			if got := fills("#56B4E9") > 0 && fills("#E69F00") > 0; got != tt.areas {
				t.Errorf("equal areas drawn: %v, want %v", got, tt.areas)
			}
			if got := doc.count(func(p svgPath) bool {
				return p.prop("stroke") == "#009E73" && strings.Count(p.d, "L") > 100
			}) > 0; got != tt.curve {
				t.Errorf("model curve drawn: %v, want %v", got, tt.curve)
			}
		})
	}
}

// TestThermogramLines checks the geometry of the drift lines and the ΔT
// arrow in SVG coordinates, which are linear in time and temperature.
func TestThermogramLines(t *testing.T) {
	th := defaultRun(451).thermogram()
	doc := svgOf(t, th, Options{})
	type pair struct {
		name          string
		colour        string
		solid, dashed float64 // s, lengths of the fitted and extrapolated parts
		joinAtEnd     bool    // the dashed part continues the solid one (fore) or leads into it (after)
	}
	// Fore: fitted over 0–300 s, extrapolated over the 150 s main period.
	// After: fitted over 450–900 s, extrapolated back over 300–450 s.
	lines := map[string][2][2]float64{}
	for _, p := range []pair{
		{"fore", "#0072B2", 300, 150, true},
		{"after", "#D55E00", 450, 150, false},
	} {
		s, ok1 := longest(doc.segments(p.colour, false))
		d, ok2 := longest(doc.segments(p.colour, true))
		if !ok1 || !ok2 {
			t.Fatalf("%s line: solid found %v, dashed found %v", p.name, ok1, ok2)
		}
		ws, wd := s[1][0]-s[0][0], d[1][0]-d[0][0]
		if !approx(ws/wd, p.solid/p.dashed, 1e-3) { // SVG coordinates carry 5 digits
			t.Errorf("%s line: solid/dashed widths %.5g/%.5g, want ratio %.4g", p.name, ws, wd, p.solid/p.dashed)
		}
		slopeS, slopeD := (s[1][1]-s[0][1])/ws, (d[1][1]-d[0][1])/wd
		// one line, so equal slopes (analytic); 2 % allows the 5-digit SVG
		// coordinates over the shorter dashed part and the line's own slope
		if !approx(slopeS, slopeD, 0.02) {
			t.Errorf("%s line: extrapolation slope %.5g differs from the fitted %.5g", p.name, slopeD, slopeS)
		}
		a, b := s[1], d[0] // fore: solid end meets dashed start
		if !p.joinAtEnd {
			a, b = d[1], s[0]
		}
		if math.Abs(a[0]-b[0]) > 0.01 || math.Abs(a[1]-b[1]) > 0.01 {
			t.Errorf("%s line: parts do not meet: %v and %v", p.name, a, b)
		}
		lines[p.name] = d
	}

	// The arrow shaft stands at tₓ (the dash-dotted black line) and spans
	// the gap between the extrapolated lines less the two arrowheads.
	var txX float64
	found := false
	for _, p := range doc.paths {
		if p.prop("stroke") == "#000000" && strings.HasPrefix(p.prop("stroke-dasharray"), "7,") {
			if v := p.vertices(); len(v) == 2 && v[0][0] == v[1][0] && math.Abs(v[1][1]-v[0][1]) > 100 {
				txX, found = v[0][0], true
			}
		}
	}
	if !found {
		t.Fatal("no equal-area time line")
	}
	at := func(s [2][2]float64, x float64) float64 {
		return s[0][1] + (x-s[0][0])*(s[1][1]-s[0][1])/(s[1][0]-s[0][0])
	}
	gap := math.Abs(at(lines["fore"], txX) - at(lines["after"], txX))
	shaft := false
	for _, s := range doc.segments("#000000", false) {
		if math.Abs(s[0][0]-txX) < 0.01 && math.Abs(s[1][0]-txX) < 0.01 {
			got := math.Abs(s[1][1]-s[0][1]) + 2*0.8*float64(arrowHead)
			if math.Abs(got-gap) < 0.1 { // pt
				shaft = true
			}
		}
	}
	if !shaft {
		t.Errorf("no arrow shaft at tₓ (x = %.5g pt) spanning the %.5g pt gap between the lines", txX, gap)
	}
}

func TestThermogramLabel(t *testing.T) {
	th := defaultRun(451).thermogram()
	th.DeltaT, th.UDeltaT = 5.50314, 0.01234
	doc := svgOf(t, th, Options{})
	// u to two significant digits, ΔT to the same place (GUM 7.2.6)
	if !doc.hasText("ΔT = 5.503 ± 0.012 K") {
		t.Errorf("no label ΔT = 5.503 ± 0.012 K; texts: %q", doc.texts)
	}
}

// TestPlusMinus: the strings are worked by hand from the JCGM 100:2008,
// 7.2.6 rule (analytic, as in units.TestRound); without u, four decimals
// as plusMinus's doc says.
func TestPlusMinus(t *testing.T) {
	tests := []struct {
		name string
		v, u float64
		want string
	}{
		{"coffee cup", 5.50314, 0.01234, "5.503 ± 0.012 K"},
		{"negative", -4.98618, 0.012, "-4.986 ± 0.012 K"},
		{"precision cell", 0.312345, 0.00040, "0.31234 ± 0.00040 K"},
		{"large u", 123.4, 15, "123 ± 15 K"},
		{"no uncertainty", 5.50314, 0, "5.5031 K"},
		{"NaN uncertainty", 5.50314, math.NaN(), "5.5031 K"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := plusMinus(tt.v, tt.u, "K"); got != tt.want {
				t.Errorf("plusMinus(%v, %v) = %q, want %q", tt.v, tt.u, got, tt.want)
			}
		})
	}
}

func TestThermogramPNG(t *testing.T) {
	th := defaultRun(451).thermogram()
	tests := []struct {
		name string
		opt  Options
		w, h int
	}{
		{"default", Options{}, 1200, 800},
		{"custom", Options{Width: 1600, Height: 1000}, 1600, 1000},
		{"small", Options{Width: 640, Height: 480}, 640, 480},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := WriteThermogram(&b, "png", th, tt.opt); err != nil {
				t.Fatal(err)
			}
			img, err := png.Decode(&b)
			if err != nil {
				t.Fatalf("PNG does not decode: %v", err)
			}
			if r := img.Bounds(); r.Dx() != tt.w || r.Dy() != tt.h {
				t.Fatalf("PNG is %d×%d px, want %d×%d", r.Dx(), r.Dy(), tt.w, tt.h)
			}
			// The fore drift line is drawn in Okabe–Ito blue #0072B2.
			blue := 0
			for y := 0; y < tt.h; y++ {
				for x := 0; x < tt.w; x++ {
					r, g, b, _ := img.At(x, y).RGBA()
					if r>>8 < 0x20 && g>>8 > 0x60 && g>>8 < 0x80 && b>>8 > 0xA0 && b>>8 < 0xC0 {
						blue++
					}
				}
			}
			if blue < 50 {
				t.Errorf("%d pixels of the fore line colour, want a drawn line", blue)
			}
		})
	}
}

func TestThermogramPDF(t *testing.T) {
	var b bytes.Buffer
	if err := WriteThermogram(&b, "pdf", defaultRun(101).thermogram(), Options{}); err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(b.Bytes(), []byte("%PDF-")) {
		t.Errorf("PDF starts %q", b.Bytes()[:min(8, b.Len())])
	}
}

func TestThermogramResiduals(t *testing.T) {
	th := defaultRun(451).thermogram()
	// Residuals computed from the drift lines (nil) or given: given ones
	// that are NaN outside the fore period leave only fore markers.
	given := th
	given.Residuals = make([]float64, len(th.Time))
	fore := 0
	for i, tm := range th.Time {
		given.Residuals[i] = math.NaN()
		if tm <= th.Pre[1] {
			given.Residuals[i] = 0.001
			if !excludedIn(th, i) {
				fore++
			}
		}
	}
	tests := []struct {
		name        string
		th          Thermogram
		fore, after bool
	}{
		{"computed", th, true, true},
		{"given", given, true, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			doc := svgOf(t, tt.th, Options{})
			b := doc.count(func(p svgPath) bool { return p.isDot("#0072B2") })
			v := doc.count(func(p svgPath) bool { return p.isDot("#D55E00") })
			if (b > 0) != tt.fore || (v > 0) != tt.after {
				t.Errorf("fore residual markers %d, after %d; want fore %v, after %v", b, v, tt.fore, tt.after)
			}
			if tt.name == "given" && b != fore {
				t.Errorf("%d fore residual markers, want %d (readings in the fore period, spikes left out)", b, fore)
			}
		})
	}
}

func excludedIn(th Thermogram, i int) bool {
	for _, e := range th.Excluded {
		if e == i {
			return true
		}
	}
	return false
}

func TestThermogramErrors(t *testing.T) {
	good := defaultRun(101).thermogram()
	mod := func(f func(*Thermogram)) Thermogram {
		th := good
		th.Time = append([]float64(nil), good.Time...)
		th.Temperature = append([]float64(nil), good.Temperature...)
		f(&th)
		return th
	}
	tests := []struct {
		name   string
		th     Thermogram
		format string
		opt    Options
		want   string
	}{
		{"lengths", mod(func(th *Thermogram) { th.Time = th.Time[:50] }), "svg", Options{}, "50 times but 101 temperatures"},
		{"one reading", mod(func(th *Thermogram) { th.Time, th.Temperature = th.Time[:1], th.Temperature[:1] }), "svg", Options{}, "1 readings, at least 2"},
		{"NaN temperature", mod(func(th *Thermogram) { th.Temperature[4] = math.NaN() }), "svg", Options{}, "reading 5: temperature NaN K"},
		{"Celsius given", mod(func(th *Thermogram) { th.Temperature[0] = -3 }), "svg", Options{}, "reading 1: temperature -3 K is not above absolute zero"},
		{"time backwards", mod(func(th *Thermogram) { th.Time[10] = 0 }), "svg", Options{}, "reading 11 at 0 s is earlier than reading 10"},
		{"excluded index", mod(func(th *Thermogram) { th.Excluded = []int{101} }), "svg", Options{}, "excluded reading index 101 is outside 0…100"},
		{"residuals", mod(func(th *Thermogram) { th.Residuals = []float64{1} }), "svg", Options{}, "1 residuals for 101 readings"},
		{"curve", mod(func(th *Thermogram) { th.Curve = []float64{1, 2} }), "svg", Options{}, "2 model curve values"},
		{"drift line", mod(func(th *Thermogram) { th.PostLine.Slope = math.Inf(1) }), "svg", Options{}, "after drift line"},
		{"time unit", good, "svg", Options{TimeUnit: "h"}, `time unit "h" is not one of s, min`},
		{"size", good, "png", Options{Width: 100, Height: 80}, "figure size 100×80 px is outside"},
		{"max points", good, "svg", Options{MaxPoints: 10}, "10 drawn points is below the least of 100"},
		{"format", good, "jpeg", Options{}, `format "jpeg" is not one of svg, png, pdf`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			err := WriteThermogram(&b, tt.format, tt.th, tt.opt)
			if err == nil || !strings.Contains(err.Error(), tt.want) || !strings.HasPrefix(err.Error(), "thermogram: ") {
				t.Errorf("error = %v, want one containing %q", err, tt.want)
			}
			if b.Len() != 0 {
				t.Errorf("%d bytes written despite the error", b.Len())
			}
		})
	}
	if err := WriteThermogram(failWriter{}, "svg", good, Options{}); !errors.Is(err, errFull) {
		t.Errorf("failing writer: error = %v, want it to wrap %v", err, errFull)
	}
}

// TestThermogramSVGSize keeps the SVG of a 10⁵-reading log reasonable: at
// most 4000 reading markers, 2000 residual markers, and under 1 MB (our
// target, about what a browser opens without delay).
func TestThermogramSVGSize(t *testing.T) {
	if testing.Short() {
		t.Skip("10⁵ readings")
	}
	th := defaultRun(100_000).thermogram()
	var b bytes.Buffer
	if err := WriteThermogram(&b, "svg", th, Options{}); err != nil {
		t.Fatal(err)
	}
	if b.Len() > 1<<20 {
		t.Errorf("SVG of 10⁵ readings is %d bytes, want under 1 MiB", b.Len())
	}
	doc := parseSVG(t, b.Bytes())
	dots := doc.count(func(p svgPath) bool { return p.isDot("#000000") }) - 1
	if dots > DefaultMaxPoints || dots < DefaultMaxPoints/2 {
		t.Errorf("%d reading markers, want %d to %d", dots, DefaultMaxPoints/2, DefaultMaxPoints)
	}
	res := doc.count(func(p svgPath) bool { return p.isDot("#0072B2") || p.isDot("#D55E00") || p.isDot("#888888") })
	if res > DefaultMaxPoints/2 {
		t.Errorf("%d residual markers, want at most %d", res, DefaultMaxPoints/2)
	}
	if !doc.hasText("100000 readings, 4000 drawn") && !doc.hasText("100000 readings, ") {
		t.Error("no note of the thinning")
	}
}

func TestFormatFromName(t *testing.T) {
	tests := []struct {
		name, file, want, err string
	}{
		{"svg", "run7.svg", "svg", ""},
		{"png upper case", "out/RUN7.PNG", "png", ""},
		{"pdf", "a.b/run.pdf", "pdf", ""},
		{"jpeg", "run7.jpg", "", `extension ".jpg" is not one of .svg, .png, .pdf`},
		{"none", "run7", "", "no extension; name it .svg, .png or .pdf"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := FormatFromName(tt.file)
			if tt.err != "" {
				if err == nil || !strings.Contains(err.Error(), tt.err) {
					t.Errorf("FormatFromName(%q) error = %v, want %q", tt.file, err, tt.err)
				}
				return
			}
			if err != nil || got != tt.want {
				t.Errorf("FormatFromName(%q) = %q, %v; want %q", tt.file, got, err, tt.want)
			}
		})
	}
}

func TestThin(t *testing.T) {
	// 10 000 values of a sawtooth 0…9 with one excursion of 50 at index
	// 4321 and one of −50 at 7777; 100 allowed → 50 buckets of 200.
	n := 10000
	y := make([]float64, n)
	idx := make([]int, n)
	for i := range y {
		y[i] = float64(i % 10)
		idx[i] = i
	}
	y[4321], y[7777] = 50, -50
	got, pairs := thin(idx, y, 100)
	if len(got) > 100 || len(pairs) != 50 {
		t.Fatalf("%d indices in %d buckets, want at most 100 in 50", len(got), len(pairs))
	}
	seen := map[int]bool{}
	for k, i := range got {
		if k > 0 && i <= got[k-1] {
			t.Fatalf("indices not increasing at %d: %d after %d", k, i, got[k-1])
		}
		seen[i] = true
	}
	if !seen[4321] || !seen[7777] {
		t.Error("an excursion was thinned away")
	}
	// every bucket keeps its range: lowest 0 and highest 9 (or the excursion)
	for _, p := range pairs {
		if lo, hi := y[p[0]], y[p[1]]; (lo != 0 && lo != -50) || (hi != 9 && hi != 50) {
			t.Errorf("bucket range %v…%v, want 0…9", lo, hi)
		}
	}
	if same, _ := thin(idx[:50], y, 100); len(same) != 50 {
		t.Errorf("short input thinned to %d", len(same))
	}
}

func TestNiceTicks(t *testing.T) {
	tests := []struct {
		name   string
		lo, hi float64
		n      int
		want   string // labelled ticks
	}{
		{"seconds", 0, 900, 9, "0 100 200 300 400 500 600 700 800 900"},
		{"celsius", 15.6, 21.5, 7, "16 17 18 19 20 21"},
		{"millikelvin", -14.5, 14.5, 4, "-10 0 10"},
		{"fine", 0.31, 0.33, 4, "0.310 0.315 0.320 0.325 0.330"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var labels []string
			for _, tk := range (niceTicks{n: tt.n}).Ticks(tt.lo, tt.hi) {
				if tk.Label != "" {
					labels = append(labels, tk.Label)
				}
			}
			if got := strings.Join(labels, " "); got != tt.want {
				t.Errorf("ticks %q, want %q", got, tt.want)
			}
		})
	}
}

// BenchmarkWriteThermogramSVG draws a 10⁵-reading log. Target: < 0.5 s
// per figure on one core.
func BenchmarkWriteThermogramSVG(b *testing.B) {
	th := defaultRun(100_000).thermogram()
	var buf bytes.Buffer
	for b.Loop() {
		buf.Reset()
		if err := WriteThermogram(&buf, "svg", th, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(buf.Len()), "bytes/svg")
}

// BenchmarkWriteThermogramPNG draws a 10⁵-reading log at 1200×800 px.
// Target: < 1 s per figure on one core.
func BenchmarkWriteThermogramPNG(b *testing.B) {
	th := defaultRun(100_000).thermogram()
	var buf bytes.Buffer
	for b.Loop() {
		buf.Reset()
		if err := WriteThermogram(&buf, "png", th, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
