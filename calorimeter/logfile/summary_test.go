package logfile

import (
	"bytes"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/summary")

func TestSummarise(t *testing.T) {
	l, err := readFile(t, "gap_repeat.csv", Options{})
	if err != nil {
		t.Fatal(err)
	}
	s := Summarise(l)
	// gap_repeat.csv: times 0 10 20 30 30 40 50 110 120 130 140 s on lines
	// 2–12. Intervals 10 10 10 0 10 10 60 10 10 10 s: median 10 s (the mean
	// of the 5th and 6th of ten sorted), min 0 s, max 60 s; 60 s > 3 × 10 s
	// is the one gap, after line 8; line 6 repeats the time of line 5.
	// Temperatures 20.00–20.10 °C. (analytic, from the file)
	checks := []struct {
		name      string
		got, want float64
	}{
		{"span", s.SpanS, 140},
		{"median interval", s.IntervalS, 10},
		{"shortest interval", s.IntervalMinS, 0},
		{"longest interval", s.IntervalMaxS, 60},
		{"lowest temperature", s.TemperatureMinK, 293.15},
		{"highest temperature", s.TemperatureMaxK, 293.25},
		{"lowest temperature in °C", s.TemperatureMinC, 20.00},
		{"highest temperature in °C", s.TemperatureMaxC, 20.10},
	}
	for _, c := range checks {
		t.Run(c.name, func(t *testing.T) {
			if !near(c.got, c.want, 1e-9) {
				t.Errorf("%s = %g, want %g", c.name, c.got, c.want)
			}
		})
	}
	if s.Points != 11 || !slices.Equal(s.Gaps, []Gap{{AfterLine: 8, FromS: 50, ToS: 110}}) ||
		!slices.Equal(s.DuplicateTimes, []int{6}) || len(s.NonMonotonic) != 0 {
		t.Errorf("points %d, gaps %v, repeated %v, going back %v; want 11, [{8 50 110}], [6], []", s.Points, s.Gaps, s.DuplicateTimes, s.NonMonotonic)
	}
	if s.Delimiter != "comma" || s.DecimalMark != "point" || s.HeaderLine != 1 || s.TimeBase != "elapsed" {
		t.Errorf("dialect %q %q header %d base %q", s.Delimiter, s.DecimalMark, s.HeaderLine, s.TimeBase)
	}
}

func TestSummariseByHand(t *testing.T) {
	tests := []struct {
		name       string
		log        Log
		back, dups []int
		median     float64 // s
	}{
		{"empty", Log{}, []int{}, []int{}, 0},
		{"one reading", Log{Time: []float64{0}, Temperature: []float64{300}, Line: []int{1}}, []int{}, []int{}, 0},
		// intervals 10, −5, 15 s: sorted −5 10 15, median 10 s (analytic)
		{"time going back", Log{Time: []float64{0, 10, 5, 20}, Temperature: []float64{1, 2, 3, 4}, Line: []int{1, 2, 3, 4}}, []int{3}, []int{}, 10},
		// intervals 0 0 0 s: median 0 s, so no gaps
		{"all at one time", Log{Time: []float64{5, 5, 5, 5}, Temperature: []float64{1, 1, 1, 1}, Line: []int{3, 4, 5, 6}}, []int{}, []int{4, 5, 6}, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s := Summarise(&tt.log)
			if !slices.Equal(s.NonMonotonic, tt.back) || !slices.Equal(s.DuplicateTimes, tt.dups) || !near(s.IntervalS, tt.median, 1e-12) || len(s.Gaps) != 0 {
				t.Errorf("going back %v, repeated %v, median %g s, gaps %v; want %v, %v, %g s, none", s.NonMonotonic, s.DuplicateTimes, s.IntervalS, s.Gaps, tt.back, tt.dups, tt.median)
			}
			if err := s.WriteText(&bytes.Buffer{}); err != nil {
				t.Error(err)
			}
		})
	}
}

func TestSummaryStart(t *testing.T) {
	tests := []struct {
		file, want string
	}{
		{"kestrel_semicolon.csv", "10:15:00"},              // line 6
		{"iso_offset.csv", "2026-03-04T10:15:02.25+01:00"}, // line 2
		{"iso_space.txt", "2026-03-04T23:59:30"},           // line 2, no offset in the file
		{"harbour_comma.csv", ""},                          // elapsed seconds carry no clock
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			l, err := readFile(t, tt.file, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if got := Summarise(l).Start; got != tt.want {
				t.Errorf("start %q, want %q", got, tt.want)
			}
		})
	}
}

func TestClockText(t *testing.T) {
	tests := []struct {
		sec  float64
		want string
	}{
		{0, "00:00:00"}, {36902.25, "10:15:02.25"}, {86399, "23:59:59"}, {90000, "25:00:00"},
	}
	for _, tt := range tests {
		t.Run(tt.want, func(t *testing.T) {
			if got := clockText(tt.sec); got != tt.want {
				t.Errorf("clockText(%g) = %q", tt.sec, got)
			}
		})
	}
}

// TestWriteTextGolden compares the text and JSON summaries of a few logs
// with testdata/summary; run with -update after a deliberate change.
func TestWriteTextGolden(t *testing.T) {
	for _, name := range []string{"kestrel_semicolon.csv", "electrical_heater.csv", "blank_cells.csv", "gap_repeat.csv", "headerless.dat"} {
		t.Run(name, func(t *testing.T) {
			l, err := readFile(t, name, Options{})
			if err != nil {
				t.Fatal(err)
			}
			s := Summarise(l)
			var text bytes.Buffer
			if err := s.WriteText(&text); err != nil {
				t.Fatal(err)
			}
			js, err := json.MarshalIndent(s, "", "  ")
			if err != nil {
				t.Fatal(err)
			}
			golden(t, strings.TrimSuffix(name, filepath.Ext(name))+".txt", text.Bytes())
			golden(t, strings.TrimSuffix(name, filepath.Ext(name))+".json", append(js, '\n'))
		})
	}
}

func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("testdata", "summary", name)
	if *update {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("%s differs from the golden file (go test -update rewrites it)\n got:\n%s\nwant:\n%s", name, got, want)
	}
}
