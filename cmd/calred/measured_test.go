package main

import (
	"bufio"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"calred/calorimeter/ledger"
)

// readLedgerFile reads a ledger a test wrote and fails on any problem.
func readLedgerFile(t *testing.T, path string) []ledger.Row {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := ledger.Read(f, filepath.Base(path))
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

// firstStamp is the time field of a log's first data line: the first line
// that starts with a digit, split at tabs (the Kestrel export).
func firstStamp(t *testing.T, path string) time.Time {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if line != "" && '0' <= line[0] && line[0] <= '9' {
			stamp, _, _ := strings.Cut(line, "\t")
			ts, err := time.Parse(time.RFC3339, stamp)
			if err != nil {
				t.Fatalf("%s: first data line %q: %v", path, line, err)
			}
			return ts
		}
	}
	t.Fatalf("%s: no data line", path)
	return time.Time{}
}

// TestBatchMeasuredAt reduces the Kestrel example, eight weekly
// calibrations and a KCl check reduced in one batch, and checks that each
// ledger row carries the time of its log's first reading as measured_at,
// and that the control chart then uses those dates.
func TestBatchMeasuredAt(t *testing.T) {
	dir := t.TempDir()
	led := filepath.Join(dir, "led.csv")
	examples := mustAbs(t, "../../examples/kestrel")
	code, _, stderr := runCLI(t, "batch", filepath.Join(examples, "manifest.csv"), "--ledger", led, "-o", filepath.Join(dir, "res.csv"))
	if code != 0 {
		t.Fatalf("batch: exit %d: %s", code, stderr)
	}
	rows := readLedgerFile(t, led)
	if len(rows) != 9 {
		t.Fatalf("%d ledger rows, want 9 (8 calibrations and a KCl check)", len(rows))
	}
	// examples/internal/demo/demo.go: the calibration logs start at
	// 2026-09-07T08:30:00Z and every 84 h after, the KCl check 30 days
	// after the first.
	day0 := time.Date(2026, 9, 7, 8, 30, 0, 0, time.UTC)
	want := map[string]time.Time{"kcl-check-01": day0.Add(30 * 24 * time.Hour)}
	for i := range 8 {
		want[fmt.Sprintf("elcal-%02d", i+1)] = day0.Add(time.Duration(i) * 84 * time.Hour)
	}
	for _, r := range rows {
		t.Run(r.RunID, func(t *testing.T) {
			first := firstStamp(t, filepath.Join(examples, r.InputFile))
			if !r.MeasuredAt.Equal(first) {
				t.Errorf("measured_at %v, want the log's first timestamp %v", r.MeasuredAt, first)
			}
			if w, ok := want[r.RunID]; !ok || !r.MeasuredAt.Equal(w) {
				t.Errorf("measured_at %v, want %v from demo.go", r.MeasuredAt, w)
			}
			// Reduced in one batch: recorded within seconds, months after measuring.
			if r.RecordedAt.Sub(rows[0].RecordedAt) > time.Minute {
				t.Errorf("recorded_at %v is more than a minute after the first row's %v", r.RecordedAt, rows[0].RecordedAt)
			}
		})
	}
	code, stdout, stderr := runCLI(t, "ledger", "chart", led, "-o", filepath.Join(dir, "chart.svg"))
	if code != 0 {
		t.Fatalf("ledger chart: exit %d: %s", code, stderr)
	}
	if !strings.Contains(stdout, "8 runs of kind calibration by date measured") {
		t.Errorf("ledger chart summary does not say the date measured:\n%s", stdout)
	}
}

// TestCalibrateMeasuredAtPulses writes the two-pulse log of
// testdata/logs/two_pulses.csv with ISO timestamps instead of seconds: the
// first heating period's row is measured when the log starts, the second's
// when its window does.
func TestCalibrateMeasuredAtPulses(t *testing.T) {
	src, err := os.ReadFile(mustAbs(t, "../../testdata/logs/two_pulses.csv"))
	if err != nil {
		t.Fatal(err)
	}
	start := time.Date(2026, 11, 3, 7, 15, 0, 0, time.UTC) // invented
	var b strings.Builder
	for line := range strings.Lines(string(src)) {
		switch {
		case strings.HasPrefix(line, "Time (s),"):
			line = "Time," + strings.TrimPrefix(line, "Time (s),")
		case line != "" && '0' <= line[0] && line[0] <= '9':
			sec, rest, _ := strings.Cut(line, ",")
			s, err := strconv.ParseFloat(sec, 64)
			if err != nil {
				t.Fatalf("time %q: %v", sec, err)
			}
			line = start.Add(time.Duration(s*1e3)*time.Millisecond).Format(time.RFC3339Nano) + "," + rest
		}
		b.WriteString(line)
	}
	dir := t.TempDir()
	log := filepath.Join(dir, "two_pulses.csv")
	if err := os.WriteFile(log, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	led := filepath.Join(dir, "led.csv")
	code, _, stderr := runCLI(t, "calibrate", log, "--ledger", led)
	if code != 0 {
		t.Fatalf("calibrate: exit %d: %s", code, stderr)
	}
	rows := readLedgerFile(t, led)
	if len(rows) != 2 {
		t.Fatalf("%d ledger rows, want one per heating period", len(rows))
	}
	// `calred calibrate --json` on the seconds log: window_s [0, 1800] and
	// [855, 3000]; readings every 5 s, so the second window's first
	// reading is at 855 s.
	for i, offset := range []time.Duration{0, 855 * time.Second} {
		if want := start.Add(offset); !rows[i].MeasuredAt.Equal(want) {
			t.Errorf("row %d (%s): measured_at %v, want %v", i+1, rows[i].RunID, rows[i].MeasuredAt, want)
		}
	}
}

// TestMeasuredAtUnknown: logs in elapsed seconds or clock times give no
// date, and the row's measured_at stays empty.
func TestMeasuredAtUnknown(t *testing.T) {
	tests := []struct {
		name  string
		clock bool // rewrite the seconds as clock times from 14:00:00
	}{
		{"elapsed seconds", false},
		{"clock times", true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			src, err := os.ReadFile(mustAbs(t, "../../examples/harbour-street/s01-mbeki.csv"))
			if err != nil {
				t.Fatal(err)
			}
			text := string(src)
			if tt.clock {
				var b strings.Builder
				for line := range strings.Lines(text) {
					switch {
					case strings.HasPrefix(line, "Time (s),"):
						line = "Time,Temperature (°C)\n"
					case line != "" && '0' <= line[0] && line[0] <= '9':
						sec, rest, _ := strings.Cut(line, ",")
						s, err := strconv.ParseFloat(sec, 64)
						if err != nil {
							t.Fatalf("time %q: %v", sec, err)
						}
						c := 14*3600 + int(s) // from 14:00:00
						line = fmt.Sprintf("%02d:%02d:%02d,%s", c/3600, c/60%60, c%60, rest)
					}
					b.WriteString(line)
				}
				text = b.String()
			}
			dir := t.TempDir()
			log := filepath.Join(dir, "run.csv")
			if err := os.WriteFile(log, []byte(text), 0o644); err != nil {
				t.Fatal(err)
			}
			led := filepath.Join(dir, "led.csv")
			code, _, stderr := runCLI(t, "reduce", log, "--sample-mass", "5.012g", "--formula", "KNO3", "--heat-capacity", "442±2J/K", "--ledger", led)
			if code != 0 {
				t.Fatalf("reduce: exit %d: %s", code, stderr)
			}
			rows := readLedgerFile(t, led)
			if len(rows) != 1 || !rows[0].MeasuredAt.IsZero() {
				t.Errorf("rows %+v: want one with no measured_at", rows)
			}
		})
	}
}

func TestChartAxis(t *testing.T) {
	t0 := time.Date(2026, 9, 7, 8, 30, 0, 0, time.UTC) // invented
	row := func(id string, recorded, measured time.Duration, known bool) ledger.Row {
		r := ledger.NewRow()
		r.RunID, r.RecordedAt = id, t0.Add(recorded)
		if known {
			r.MeasuredAt = t0.Add(measured)
		}
		return r
	}
	const h = time.Hour
	tests := []struct {
		name  string
		rows  []ledger.Row
		axis  string
		order string // run ids after chartAxis
	}{
		{"all measured, one batch", []ledger.Row{row("a", 0, 2*h, true), row("b", 1, 0, true), row("c", 2, 84*h, true)},
			axisMeasured, "b a c"},
		{"one not measured, recorded over days", []ledger.Row{row("a", 0, 0, true), row("b", 24*h, 0, false), row("c", 48*h, 0, true)},
			axisRecorded, "a b c"},
		{"one not measured, one batch", []ledger.Row{row("a", 0, 0, true), row("b", 1, 0, false)},
			axisRunOrder, "a b"},
		{"none measured, clock set back", []ledger.Row{row("a", 48*h, 0, false), row("b", 0, 0, false)},
			axisRunOrder, "a b"},
		{"measured at one instant", []ledger.Row{row("a", 0, 5*h, true), row("b", 2*h, 5*h, true)},
			axisRecorded, "a b"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			axis := chartAxis(tt.rows)
			var ids []string
			for _, r := range tt.rows {
				ids = append(ids, r.RunID)
			}
			if axis != tt.axis || strings.Join(ids, " ") != tt.order {
				t.Errorf("chartAxis = %q, order %v; want %q, %s", axis, ids, tt.axis, tt.order)
			}
		})
	}
}
