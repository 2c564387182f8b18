package logfile

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// logsDir holds the shared sample logs. Every expected value below is
// read off the named line of the file; conversions to kelvin use
// T/K = t/°C + 273.15 and T/K = (t/°F − 32)·5/9 + 273.15 (analytic, ITS-90
// and the definition of the Fahrenheit scale).
const logsDir = "../../testdata/logs"

// Tolerances: a reading is parsed from its text, so the only error is the
// float64 rounding of the unit conversion (≈ 1e-13 K).
const (
	tolK = 1e-9 // K
	tolS = 1e-9 // s
)

func near(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol || math.Abs(a-b) <= tol*math.Abs(b)
}

type reading struct {
	line int
	t    float64 // s since the first reading
	k    float64 // K
}

func readFile(t *testing.T, name string, opt Options) (*Log, error) {
	t.Helper()
	f, err := os.Open(filepath.Join(logsDir, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	opt.Name = name
	return Read(f, opt)
}

func TestReadFiles(t *testing.T) {
	tests := []struct {
		name        string
		opt         Options
		dialect     Dialect // compared field by field
		n           int
		first, last reading
		timeZero    float64 // s
		warnings    []string
		meta        map[string]string
		columns     []Column
	}{
		{
			name:    "harbour_comma.csv",
			dialect: Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 7, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", Encoding: "utf-8"},
			n:       40,
			first:   reading{8, 0, 294.95},    // line 8: 0,21.80
			last:    reading{47, 585, 291.34}, // line 47: 585,18.19
			meta: map[string]string{
				"lab": "Harbour Street Teaching Lab", "operator": "R. Okafor", "sample-mass": "2.503 g",
				"formula": "NH4NO3", "solvent-mass": "100.0 g",
				"probe": "Tallis DT-3 digital thermometer, 0.01 K resolution",
			},
			columns: []Column{{1, "time", "s", "time"}, {2, "temperature", "°C", "temperature"}},
		},
		{
			name:     "kestrel_semicolon.csv",
			dialect:  Dialect{Delimiter: ';', Decimal: ',', HeaderLine: 5, Preamble: 3, TimeBase: "clock", TimeUnit: "hh:mm:ss", TemperatureUnit: "C", Encoding: "utf-8"},
			n:        45,
			first:    reading{6, 0, 298.062},    // line 6: 10:15:00;24,912
			last:     reading{50, 440, 297.574}, // line 50: 10:22:20;24,424
			timeZero: 36900,                     // 10:15:00 after midnight
			columns:  []Column{{1, "Uhrzeit", "", "time"}, {2, "Temperatur", "°C", "temperature"}},
		},
		{
			name:    "tab_minutes.tsv",
			dialect: Dialect{Delimiter: '\t', Decimal: '.', HeaderLine: 1, TimeBase: "elapsed", TimeUnit: "min", TemperatureUnit: "K", Encoding: "utf-8"},
			n:       40,
			first:   reading{2, 0, 298.1812},    // line 2: 0 298.1812
			last:    reading{41, 585, 298.5892}, // line 41: 9.75 min = 585 s
			columns: []Column{{1, "time", "min", "time"}, {2, "T", "K", "temperature"}},
		},
		{
			name:    "spaces_fahrenheit.txt",
			dialect: Dialect{Delimiter: ' ', Decimal: '.', HeaderLine: 3, Preamble: 1, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "F", Encoding: "utf-8"},
			n:       30,
			first:   reading{4, 0, 294.65},                     // line 4: 70.70 °F = 21.5 °C
			last:    reading{33, 580, (81.04-32)*5/9 + 273.15}, // line 33: 81.04 °F
			columns: []Column{{1, "Time", "s", "time"}, {2, "Temp", "°F", "temperature"}},
		},
		{
			name:    "bom_crlf.csv",
			dialect: Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 1, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", BOM: true, CRLF: true, Encoding: "utf-8"},
			n:       20,
			first:   reading{2, 0, 293.10},   // line 2: 0,19.95
			last:    reading{21, 95, 295.25}, // line 21: 95,22.10
			columns: []Column{{1, "t", "s", "time"}, {2, "θ", "°C", "temperature"}},
		},
		{
			name:     "midnight.csv",
			dialect:  Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 2, TimeBase: "clock", TimeUnit: "hh:mm:ss", TemperatureUnit: "C", Encoding: "utf-8"},
			n:        17,
			first:    reading{3, 0, 294.55},    // line 3: 23:58:00,21.40
			last:     reading{19, 480, 294.56}, // line 19: 00:06:00 is 8 min after 23:58:00
			timeZero: 86280,                    // 23:58:00
			meta:     map[string]string{"night-run": "Harbour Street Teaching Lab, thermostat check"},
		},
		{
			name:    "iso_offset.csv",
			dialect: Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 1, TimeBase: "timestamp", TimeUnit: "iso8601", TemperatureUnit: "C", Encoding: "utf-8", Offset: true},
			n:       20,
			first:   reading{2, 0, 295.46},    // line 2: 10:15:02.250+01:00, 22.310
			last:    reading{21, 95, 296.941}, // line 21: 10:16:37.250, 23.791
		},
		{
			name:    "iso_space.txt",
			dialect: Dialect{Delimiter: ' ', Decimal: '.', HeaderLine: 1, TimeBase: "timestamp", TimeUnit: "iso8601", TemperatureUnit: "C", Encoding: "utf-8"},
			n:       15,
			first:   reading{2, 0, 293.2},      // line 2: 2026-03-04 23:59:30, 20.050
			last:    reading{16, 140, 293.228}, // line 16: 2026-03-05 00:01:50, 20.078
			columns: []Column{{1, "Timestamp", "", "time"}, {2, "Temp", "degC", "temperature"}},
		},
		{
			name:    "mmss_timer.csv",
			dialect: Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 2, TimeBase: "elapsed", TimeUnit: "mm:ss", TemperatureUnit: "C", Encoding: "utf-8"},
			n:       31,
			first:   reading{3, 0, 293.75},    // line 3: 00:00,20.6
			last:    reading{33, 600, 298.05}, // line 33: 10:00,24.9
		},
		{
			name:    "electrical_heater.csv",
			dialect: Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 5, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", Encoding: "utf-8"},
			n:       45,
			first:   reading{6, 0, 297.65},      // line 6: 0,24.5000
			last:    reading{50, 440, 297.9301}, // line 50: 440,24.7801
			meta:    map[string]string{"lab": "Kestrel Analytical QC", "operator": "M. Haddad", "heater-power": "1.000 W", "heater-time": "120 s"},
			columns: []Column{{1, "Elapsed", "s", "time"}, {2, "Vessel temperature", "°C", "temperature"}, {3, "Heater power", "W", "extra"}, {4, "Event", "", "extra"}},
		},
		{
			name:    "blank_cells.csv",
			dialect: Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 1, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", Encoding: "utf-8"},
			n:       22,                        // 25 rows, 3 with a blank cell, and one empty row
			first:   reading{2, 0, 295.25},     // line 2: 0,22.100
			last:    reading{27, 288, 295.322}, // line 27: 288,22.172
			warnings: []string{
				"blank_cells.csv:6: blank temperature cell: reading skipped",
				"blank_cells.csv:14: blank temperature cell: reading skipped",
				"blank_cells.csv:20: blank time cell: reading skipped",
			},
		},
		{
			name:    "latin1_degree.csv",
			dialect: Dialect{Delimiter: ';', Decimal: ',', HeaderLine: 2, Preamble: 1, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", CRLF: true, Encoding: "latin-1"},
			n:       15,
			first:   reading{3, 0, 296.30},   // line 3: 0;23,15
			last:    reading{17, 70, 296.44}, // line 17: 70;23,29
			columns: []Column{{1, "Zeit", "s", "time"}, {2, "Temp", "°C", "temperature"}},
		},
		{
			name:    "utf16_spreadsheet.txt",
			dialect: Dialect{Delimiter: '\t', Decimal: '.', HeaderLine: 1, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", BOM: true, CRLF: true, Encoding: "utf-16le"},
			n:       12,
			first:   reading{2, 0, 292.95},    // line 2: 0 19.80
			last:    reading{13, 330, 293.17}, // line 13: 330 20.02
			columns: []Column{{1, "Time", "s", "time"}, {2, "Temperature", "°C", "temperature"}},
		},
		{
			name:     "headerless.dat",
			dialect:  Dialect{Delimiter: ' ', Decimal: '.', TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", Encoding: "utf-8"},
			n:        20,
			first:    reading{1, 0, 294.18},     // line 1: 0 21.030
			last:     reading{20, 114, 294.256}, // line 20: 114 21.106
			warnings: []string{"headerless.dat:1: no header line: taking column 1 as time in seconds and column 2 as temperature in °C"},
			columns:  []Column{{1, "column 1", "", "time"}, {2, "column 2", "", "temperature"}},
		},
		{
			name:    "comment_header.dat",
			dialect: Dialect{Delimiter: ' ', Decimal: '.', HeaderLine: 3, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "K", Encoding: "utf-8"},
			n:       25,
			first:   reading{4, 0, 298.1503},    // line 4: 0 298.15030
			last:    reading{28, 48, 298.15534}, // line 28: 48 298.15534
			meta:    map[string]string{"sample-id": "KQ-2291"},
			columns: []Column{{1, "t", "s", "time"}, {2, "T", "K", "temperature"}},
		},
		{
			name:     "two_probes.csv",
			dialect:  Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 1, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", Encoding: "utf-8"},
			n:        20,
			first:    reading{2, 0, 295.55},     // line 2: 0,22.400
			last:     reading{21, 190, 295.588}, // line 21: 190,22.438
			warnings: []string{`two_probes.csv:1: columns 2 "T vessel" and 3 "T jacket" each name temperature: using column 2`},
			columns:  []Column{{1, "time", "s", "time"}, {2, "T vessel", "°C", "temperature"}, {3, "T jacket", "°C", "extra"}},
		},
		{
			name:    "two_probes.csv",
			opt:     Options{TemperatureColumn: "T jacket"},
			dialect: Dialect{Delimiter: ',', Decimal: '.', HeaderLine: 1, TimeBase: "elapsed", TimeUnit: "s", TemperatureUnit: "C", Encoding: "utf-8"},
			n:       20,
			first:   reading{2, 0, 298.15},    // line 2: jacket 25.000
			last:    reading{21, 190, 298.15}, // line 21: jacket 25.000
			columns: []Column{{1, "time", "s", "time"}, {2, "T vessel", "°C", "extra"}, {3, "T jacket", "°C", "temperature"}},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name+tt.opt.TemperatureColumn, func(t *testing.T) {
			l, err := readFile(t, tt.name, tt.opt)
			if err != nil {
				t.Fatal(err)
			}
			if l.Dialect != tt.dialect {
				t.Errorf("dialect\n got %+v\nwant %+v", l.Dialect, tt.dialect)
			}
			checkReadings(t, l, tt.n, tt.first, tt.last)
			if !near(l.TimeZero, tt.timeZero, tolS) {
				t.Errorf("TimeZero = %g s, want %g s", l.TimeZero, tt.timeZero)
			}
			var got []string
			for _, w := range l.Warnings {
				got = append(got, w.String())
			}
			if !slices.Equal(got, tt.warnings) {
				t.Errorf("warnings\n got %q\nwant %q", got, tt.warnings)
			}
			if len(l.Meta) != len(tt.meta) {
				t.Errorf("meta = %q, want %q", l.Meta, tt.meta)
			}
			for k, v := range tt.meta {
				if l.Meta[k] != v {
					t.Errorf("meta %q = %q, want %q", k, l.Meta[k], v)
				}
			}
			if tt.columns != nil && !slices.Equal(l.Columns, tt.columns) {
				t.Errorf("columns\n got %+v\nwant %+v", l.Columns, tt.columns)
			}
		})
	}
}

func checkReadings(t *testing.T, l *Log, n int, first, last reading) {
	t.Helper()
	if len(l.Time) != n || len(l.Temperature) != n || len(l.Line) != n {
		t.Fatalf("got %d times, %d temperatures, %d lines; want %d readings", len(l.Time), len(l.Temperature), len(l.Line), n)
	}
	for _, c := range []struct {
		i    int
		want reading
	}{{0, first}, {n - 1, last}} {
		got := reading{l.Line[c.i], l.Time[c.i], l.Temperature[c.i]}
		if got.line != c.want.line || !near(got.t, c.want.t, tolS) || !near(got.k, c.want.k, tolK) {
			t.Errorf("reading %d = line %d, %g s, %.9g K; want line %d, %g s, %.9g K",
				c.i, got.line, got.t, got.k, c.want.line, c.want.t, c.want.k)
		}
	}
}

func TestReadExtraColumns(t *testing.T) {
	l, err := readFile(t, "electrical_heater.csv", Options{})
	if err != nil {
		t.Fatal(err)
	}
	power, event := l.Extra["Heater power"], l.Extra["Event"]
	if len(power) != len(l.Time) || len(event) != len(l.Time) || len(l.Extra) != 2 {
		t.Fatalf("extra columns %d and %d long, %d in all; want %d long, 2 in all", len(power), len(event), len(l.Extra), len(l.Time))
	}
	tests := []struct {
		name         string
		i            int     // reading index
		power, event float64 // NaN: blank
	}{
		{"before the heater, blank power", 0, math.NaN(), 0}, // line 6: 0,24.5000,,0
		{"heater on", 12, 1.000, 1},                          // line 18: 120,…,1.000,1
		{"heating", 13, 1.000, 0},                            // line 19
		{"heater off", 24, math.NaN(), 1},                    // line 30: 240,…,,1
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p, e := power[tt.i], event[tt.i]
			if math.IsNaN(tt.power) != math.IsNaN(p) || (!math.IsNaN(p) && !near(p, tt.power, 1e-12)) || !near(e, tt.event, 1e-12) {
				t.Errorf("line %d: power %g W, event %g; want %g W, %g", l.Line[tt.i], p, e, tt.power, tt.event)
			}
		})
	}
}

func TestReadFileErrors(t *testing.T) {
	tests := []struct {
		name       string
		line, col  int
		msg        string
		opt        Options
		optionsErr bool
	}{
		{name: "corrupt_cell.csv", line: 17, col: 3, msg: `corrupt_cell.csv:17: temperature "2l.43" is not a number`},
		{name: "backwards.csv", line: 6, col: 1, msg: `backwards.csv:6: time "25" is 5 s before the reading on line 5`},
		{name: "below_zero.csv", line: 5, col: 2, msg: `below_zero.csv:5: temperature -0.5 K is below absolute zero`},
		{name: "harbour_comma.csv", opt: Options{TimeColumn: "Zeit"}, msg: `harbour_comma.csv:7: no time column "Zeit": the columns are "time", "temperature"`, line: 7},
		{name: "harbour_comma.csv", opt: Options{TemperatureColumn: "3"}, msg: `harbour_comma.csv:7: temperature column 3: the data lines have 2 columns`, line: 7},
		{name: "harbour_comma.csv", opt: Options{TimeUnit: "fortnight"}, optionsErr: true,
			msg: `time unit "fortnight": want s, min, h, ms, mm:ss, hh:mm:ss, hh:mm or iso8601`},
	}
	for _, tt := range tests {
		t.Run(tt.name+" "+tt.msg, func(t *testing.T) {
			_, err := readFile(t, tt.name, tt.opt)
			if err == nil {
				t.Fatal("no error")
			}
			var pe *ParseError
			if errors.As(err, &pe) == tt.optionsErr {
				t.Fatalf("error %v: is *ParseError = %v, want %v", err, !tt.optionsErr, !tt.optionsErr)
			}
			if err.Error() != tt.msg {
				t.Errorf("error\n got %s\nwant %s", err, tt.msg)
			}
			if pe != nil && (pe.Line != tt.line || pe.Column != tt.col || pe.File != tt.name) {
				t.Errorf("at %s line %d column %d, want %s line %d column %d", pe.File, pe.Line, pe.Column, tt.name, tt.line, tt.col)
			}
		})
	}
}

// TestReadText covers dialects and rules on inputs small enough to read
// inline; the expected values are the cells as written, converted by the
// formulas named at the top of this file.
func TestReadText(t *testing.T) {
	tests := []struct {
		name     string
		in       string
		opt      Options
		times    []float64 // s
		kelvin   []float64 // K
		lines    []int
		warnings []string
		check    func(t *testing.T, l *Log)
	}{
		{
			name:   "pipe delimiter",
			in:     "t (s)|T (°C)\n0|20\n10|20.5\n",
			times:  []float64{0, 10},
			kelvin: []float64{293.15, 293.65},
			check:  wantDialect(Dialect{Delimiter: '|', Decimal: '.'}),
		},
		{
			name:   "quoted header and cells",
			in:     "\"Time (s)\",\"Temperature, probe A (°C)\"\n\"0\",\"20.5\"\n\"10\", \"20.6\"\n",
			times:  []float64{0, 10},
			kelvin: []float64{293.65, 293.75},
			check: func(t *testing.T, l *Log) {
				if l.Columns[1].Name != "Temperature, probe A" {
					t.Errorf("column 2 named %q", l.Columns[1].Name)
				}
			},
		},
		{
			name:   "decimal comma is never stripped: 9,99 is 9.99",
			in:     "t (s);T (°C)\n0;9,99\n10;10,01\n",
			times:  []float64{0, 10},
			kelvin: []float64{283.14, 283.16},
			check:  wantDialect(Dialect{Delimiter: ';', Decimal: ','}),
		},
		{
			name:   "decimal comma in a tab file",
			in:     "t (s)\tT (°C)\n0\t9,99\n10\t10,01\n",
			times:  []float64{0, 10},
			kelvin: []float64{283.14, 283.16},
			check:  wantDialect(Dialect{Delimiter: '\t', Decimal: ','}),
		},
		{
			name:   "decimal comma with runs of spaces",
			in:     "Zeit (s)   Temp (°C)\n 0   9,99\n10  10,01\n",
			times:  []float64{0, 10},
			kelvin: []float64{283.14, 283.16},
			check:  wantDialect(Dialect{Delimiter: ' ', Decimal: ','}),
		},
		{
			name: "decimal mark settles after the sniffed lines",
			in:   "t (s);T (°C)\n" + repeatRows(60, "%d;21\n") + "600;21,5\n",
			check: func(t *testing.T, l *Log) {
				if n := len(l.Temperature); n != 61 || !near(l.Temperature[n-1], 294.65, tolK) || l.Dialect.Decimal != ',' {
					t.Errorf("%d readings, last %g K, decimal %q; want 61, 294.65 K, ','", n, l.Temperature[n-1], l.Dialect.Decimal)
				}
			},
		},
		{
			name:   "timestamps with Z and a fraction",
			in:     "timestamp,T (K)\n2026-03-04T10:15:02Z,293\n2026-03-04T10:15:03.5Z,293.5\n",
			times:  []float64{0, 1.5},
			kelvin: []float64{293, 293.5},
			check: func(t *testing.T, l *Log) {
				if got := Summarise(l).Start; got != "2026-03-04T10:15:02Z" {
					t.Errorf("start %q", got)
				}
			},
		},
		{
			// Central European summer time starts 2026-03-29 at 02:00 CET: one
			// minute passes from 01:59+01:00 to 03:00+02:00 (analytic).
			name:   "timestamps across a change of UTC offset",
			in:     "datetime,T (°C)\n2026-03-29 01:59:00+01:00,20\n2026-03-29 03:00:00+0200,20\n",
			times:  []float64{0, 60},
			kelvin: []float64{293.15, 293.15},
		},
		{
			// Each time the clock goes back more than 12 h a day is added:
			// 22:00 → 08:00 is 10 h, → 21:00 13 h, → 07:00 10 h (analytic).
			name:   "clock turns over midnight twice",
			in:     "clock,T (K)\n22:00:00,300\n08:00:00,300\n21:00:00,300\n07:00:00,300\n",
			times:  []float64{0, 36000, 82800, 118800},
			kelvin: []float64{300, 300, 300, 300},
		},
		{
			name:   "clock with tenths of a second and a decimal comma",
			in:     "Uhrzeit;Temperatur (°C)\n10:15:02,5;20,5\n10:15:03,0;20,6\n10:15:03,5;20,7\n",
			times:  []float64{0, 0.5, 1},
			kelvin: []float64{293.65, 293.75, 293.85},
		},
		{
			name:   "hh:mm clock",
			in:     "time (hh:mm),T (°C)\n23:59,20\n00:01,20\n",
			times:  []float64{0, 120},
			kelvin: []float64{293.15, 293.15},
		},
		{
			name:   "mm:ss past an hour",
			in:     "time (mm:ss),T (°C)\n59:30,20\n75:30,20\n",
			times:  []float64{0, 960},
			kelvin: []float64{293.15, 293.15},
		},
		{
			name:   "milliseconds",
			in:     "t [ms],T [K]\n1000,290\n1250,290\n",
			times:  []float64{0, 0.25},
			kelvin: []float64{290, 290},
			check: func(t *testing.T, l *Log) {
				if !near(l.TimeZero, 1, tolS) {
					t.Errorf("TimeZero %g s, want 1 s", l.TimeZero)
				}
			},
		},
		{
			name:   "hours",
			in:     "time/h,T/K\n0,290\n0.5,290\n",
			times:  []float64{0, 1800},
			kelvin: []float64{290, 290},
		},
		{
			name:   "times before the mixing mark",
			in:     "time (s),T (°C)\n-300,20\n-290,20\n",
			times:  []float64{0, 10},
			kelvin: []float64{293.15, 293.15},
			check: func(t *testing.T, l *Log) {
				if !near(l.TimeZero, -300, tolS) {
					t.Errorf("TimeZero %g s, want -300 s", l.TimeZero)
				}
			},
		},
		{
			name:   "unit spellings",
			in:     "Zeit in s;Temperatur in ℃;P/W\n0;20,0;0\n10;20,5;1,5\n",
			times:  []float64{0, 10},
			kelvin: []float64{293.15, 293.65},
			check: func(t *testing.T, l *Log) {
				if !slices.Equal(l.Columns, []Column{{1, "Zeit", "s", "time"}, {2, "Temperatur", "℃", "temperature"}, {3, "P", "W", "extra"}}) {
					t.Errorf("columns %+v", l.Columns)
				}
			},
		},
		{
			name:   "all capitals",
			in:     "TIME (S),TEMP (DEG F)\n0,32\n60,212\n",
			times:  []float64{0, 60},
			kelvin: []float64{273.15, 373.15},
		},
		{
			name:   "unit after an underscore",
			in:     "time_s,Temp_C\n0,20\n1,21\n",
			times:  []float64{0, 1},
			kelvin: []float64{293.15, 294.15},
		},
		{
			name:   "text columns are ignored",
			in:     "Date;Time;Temp (°C);Remark\n2026-03-04;10:15:00;21,5;start\n2026-03-04;10:15:10;21,6;\n",
			times:  []float64{0, 10},
			kelvin: []float64{294.65, 294.75},
			check: func(t *testing.T, l *Log) {
				roles := []string{}
				for _, c := range l.Columns {
					roles = append(roles, c.Role)
				}
				if !slices.Equal(roles, []string{"ignored", "time", "temperature", "ignored"}) || len(l.Extra) != 0 {
					t.Errorf("roles %q, extra %v", roles, l.Extra)
				}
			},
		},
		{
			name:   "data lines end with a delimiter the header lacks",
			in:     "Zeit (s);Temp (°C)\n0;20,5;\n10;20,6;\n",
			times:  []float64{0, 10},
			kelvin: []float64{293.65, 293.75},
		},
		{
			name:   "every line ends with a delimiter",
			in:     "Zeit (s);Temp (°C);\n0;20,5;\n10;20,6;\n",
			times:  []float64{0, 10},
			kelvin: []float64{293.65, 293.75},
			check: func(t *testing.T, l *Log) {
				if len(l.Columns) != 3 || l.Columns[2].Role != "ignored" || len(l.Extra) != 0 {
					t.Errorf("columns %+v, extra %v", l.Columns, l.Extra)
				}
			},
		},
		{
			name:   "empty spreadsheet rows at the end",
			in:     "Zeit (s);Temp (°C)\n0;20\n10;21\n;\n;\n\n",
			times:  []float64{0, 10},
			kelvin: []float64{293.15, 294.15},
		},
		{
			name:   "lone CR line ends",
			in:     "t (s),T (K)\r0,293\r10,294\r",
			times:  []float64{0, 10},
			kelvin: []float64{293, 294},
			lines:  []int{2, 3},
			check:  wantDialect(Dialect{CRLF: false}),
		},
		{
			name:   "UTF-16BE with byte order mark",
			in:     utf16be("t (s)\tT (°C)\r\n0\t20\r\n5\t21\r\n"),
			times:  []float64{0, 5},
			kelvin: []float64{293.15, 294.15},
			check:  wantDialect(Dialect{Delimiter: '\t', Encoding: "utf-16be", BOM: true, CRLF: true}),
		},
		{
			name:   "columns and units from the options",
			in:     "a,b,c\n1,5,300\n2,6,301\n",
			opt:    Options{TimeColumn: "2", TemperatureColumn: "c", TimeUnit: "min", TemperatureUnit: "K"},
			times:  []float64{0, 60},
			kelvin: []float64{300, 301},
			check: func(t *testing.T, l *Log) {
				if a := l.Extra["a"]; len(a) != 2 || a[1] != 2 {
					t.Errorf("extra a = %v, want [1 2]", a)
				}
			},
		},
		{
			name:     "unit option overrides the header",
			in:       "t (s),T (°C)\n0,300\n",
			opt:      Options{TemperatureUnit: "K"},
			times:    []float64{0},
			kelvin:   []float64{300},
			warnings: []string{"x.csv:1: temperature unit K given overrides °C in the header"},
		},
		{
			name:     "no units",
			in:       "time,temperature\n0,20\n10,21\n",
			times:    []float64{0, 10},
			kelvin:   []float64{293.15, 294.15},
			warnings: []string{`x.csv:1: column 1 "time": no time unit given: assuming seconds`, `x.csv:1: column 2 "temperature": no temperature unit given: assuming °C`},
		},
		{
			name:     "no column named as time",
			in:       "n,probe (°C)\n0,20\n10,21\n",
			times:    []float64{0, 10},
			kelvin:   []float64{293.15, 294.15},
			warnings: []string{`x.csv:1: no column is named as time: using column 1 "n"`, `x.csv:1: column 1 "n": no time unit given: assuming seconds`},
		},
		{
			name:     "two time columns",
			in:       "clock,elapsed (s),T (°C)\n10:00:00,0,20\n10:00:10,10,21\n",
			times:    []float64{0, 10},
			kelvin:   []float64{293.15, 294.15},
			warnings: []string{`x.csv:1: columns 1 "clock" and 2 "elapsed" each name time: using column 1`},
		},
		{
			name:   "comments among the data are skipped and are not metadata",
			in:     "# operator: A. Lindqvist\nt (s),T (K)\n0,290\n# note: stirrer restarted\n10,291\n",
			times:  []float64{0, 10},
			kelvin: []float64{290, 291},
			lines:  []int{3, 5},
			check: func(t *testing.T, l *Log) {
				if len(l.Meta) != 1 || l.Meta["operator"] != "A. Lindqvist" || l.MetaLine["operator"] != 1 {
					t.Errorf("meta %v at %v", l.Meta, l.MetaLine)
				}
			},
		},
		{
			name:     "a repeated metadata key keeps the first",
			in:       "# Sample mass: 2.503 g\n# sample_mass: 2.6 g\nt (s),T (K)\n0,290\n",
			times:    []float64{0},
			kelvin:   []float64{290},
			warnings: []string{`x.csv:2: metadata "sample-mass" given again: keeping the value from line 1`},
			check: func(t *testing.T, l *Log) {
				if l.Meta["sample-mass"] != "2.503 g" {
					t.Errorf("sample-mass %q", l.Meta["sample-mass"])
				}
			},
		},
		{
			name:   "a preamble line as wide as the data",
			in:     "Kestrel Analytical QC,bench 3\nserial,KT-7-0031\nt (s),T (K)\n0,290\n1,291\n",
			times:  []float64{0, 1},
			kelvin: []float64{290, 291},
			check:  wantDialect(Dialect{HeaderLine: 3, Preamble: 2}),
		},
		{
			name: "blank cells beyond those listed",
			in:   "t (s),T (K)\n0,290\n" + repeatRows(25, "%d,\n"),
			check: func(t *testing.T, l *Log) {
				n := len(l.Warnings)
				if len(l.Time) != 1 || n != listedBlanks+1 || l.Warnings[n-1].String() != "x.csv: 5 more readings skipped for blank cells (not listed)" {
					t.Errorf("%d readings, %d warnings, last %v", len(l.Time), n, l.Warnings[n-1])
				}
			},
		},
		{
			name:     "a comment that names no quantity is not the header",
			in:       "# raw data\n 0 290\n10 291\n",
			times:    []float64{0, 10},
			kelvin:   []float64{290 + 273.15, 291 + 273.15},
			warnings: []string{"x.csv:2: no header line: taking column 1 as time in seconds and column 2 as temperature in °C"},
		},
		{
			name:     "time found by its clock times",
			in:       "Datum;Wert (K)\n10:15:00;290,5\n10:15:10;290,6\n",
			times:    []float64{0, 10},
			kelvin:   []float64{290.5, 290.6},
			warnings: []string{`x.csv:1: no column is named as time: using column 1 "Datum"`},
		},
		{
			name:   "a column chosen by its header text; extra columns stay as written",
			in:     "time (s),T vessel (°C),T jacket (°C)\n0,22.4,25.0\n",
			opt:    Options{TemperatureColumn: "t vessel (°c)"},
			times:  []float64{0},
			kelvin: []float64{295.55},
			check: func(t *testing.T, l *Log) {
				if j := l.Extra["T jacket"]; len(j) != 1 || !near(j[0], 25.0, 1e-12) {
					t.Errorf("extra T jacket = %v °C, want [25]", j)
				}
			},
		},
		{
			name:   "equal times are kept",
			in:     "t (s),T (K)\n0,290\n0,291\n5,292\n",
			times:  []float64{0, 0, 5},
			kelvin: []float64{290, 291, 292},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			opt := tt.opt
			opt.Name = "x.csv"
			l, err := Read(strings.NewReader(tt.in), opt)
			if err != nil {
				t.Fatal(err)
			}
			if tt.times != nil && !sameFloats(l.Time, tt.times, tolS) {
				t.Errorf("times %v s, want %v s", l.Time, tt.times)
			}
			if tt.kelvin != nil && !sameFloats(l.Temperature, tt.kelvin, tolK) {
				t.Errorf("temperatures %v K, want %v K", l.Temperature, tt.kelvin)
			}
			if tt.lines != nil && !slices.Equal(l.Line, tt.lines) {
				t.Errorf("lines %v, want %v", l.Line, tt.lines)
			}
			if tt.check == nil || tt.warnings != nil {
				var got []string
				for _, w := range l.Warnings {
					got = append(got, w.String())
				}
				if !slices.Equal(got, tt.warnings) {
					t.Errorf("warnings\n got %q\nwant %q", got, tt.warnings)
				}
			}
			if tt.check != nil {
				tt.check(t, l)
			}
		})
	}
}

// wantDialect checks the fields of want that are not zero.
func wantDialect(want Dialect) func(*testing.T, *Log) {
	return func(t *testing.T, l *Log) {
		t.Helper()
		got := l.Dialect
		if (want.Delimiter != 0 && got.Delimiter != want.Delimiter) ||
			(want.Decimal != 0 && got.Decimal != want.Decimal) ||
			(want.HeaderLine != 0 && got.HeaderLine != want.HeaderLine) ||
			(want.Preamble != 0 && got.Preamble != want.Preamble) ||
			(want.Encoding != "" && got.Encoding != want.Encoding) ||
			got.BOM != want.BOM || got.CRLF != want.CRLF {
			t.Errorf("dialect\n got %+v\nwant %+v", got, want)
		}
	}
}

func sameFloats(got, want []float64, tol float64) bool {
	if len(got) != len(want) {
		return false
	}
	for i := range got {
		if !near(got[i], want[i], tol) {
			return false
		}
	}
	return true
}

// repeatRows writes n rows from a format with one %d, the row's time 10·i s.
func repeatRows(n int, format string) string {
	var b strings.Builder
	for i := 1; i <= n; i++ {
		b.WriteString(strings.ReplaceAll(format, "%d", strconvItoa(10*i)))
	}
	return b.String()
}

func strconvItoa(n int) string { return formatNumber(float64(n), 0) }

func utf16be(s string) string {
	b := []byte{0xFE, 0xFF}
	for _, r := range s {
		b = append(b, byte(r>>8), byte(r))
	}
	return string(b)
}

func TestReadTextErrors(t *testing.T) {
	tests := []struct {
		name      string
		in        string
		opt       Options
		line, col int
		msg       string
	}{
		{"mixed decimal marks: the more common wins", "t (s);T (°C)\n0;20.5\n10;20,6\n20;20,7\n", Options{}, 2, 2,
			`x.csv:2: temperature "20.5" has a decimal point, but this file uses decimal commas`},
		{"a decimal comma in a comma file", "t (s),T (°C)\n0,20.5\n10,\"20,6\"\n", Options{}, 3, 2,
			`x.csv:3: temperature "20,6" has a decimal comma, but this file uses decimal points`},
		{"wrong field count", "t (s),T (K)\n0,290\n1,291,5\n", Options{}, 3, 0,
			`x.csv:3: 3 fields, want 2 as in the header (line 1)`},
		{"short row", "t (s),T (K)\n0,290\n1\n", Options{}, 3, 0,
			`x.csv:3: 1 field, want 2 as in the header (line 1)`},
		{"quote not closed", "t (s),T (K)\n0,290\n1,\"291\n", Options{}, 3, 2,
			`x.csv:3: column 2: quote not closed or followed by text`},
		{"bad timestamp", "timestamp,T (K)\n2026-03-04T10:15:02,290\n2026-02-30T10:15:03,290\n", Options{}, 3, 1,
			`x.csv:3: time "2026-02-30T10:15:03" is not an ISO 8601 date and time`},
		{"mixed zones", "timestamp,T (K)\n2026-03-04T10:15:02Z,290\n2026-03-04T10:15:03,290\n", Options{}, 3, 1,
			`x.csv:3: time "2026-03-04T10:15:03" has no UTC offset, unlike the first reading`},
		{"bad clock", "clock,T (K)\n10:15:02,290\n10:61:00,290\n", Options{}, 3, 1,
			`x.csv:3: time "10:61:00" is not hh:mm:ss`},
		{"clock back by an hour", "clock,T (K)\n23:00:00,290\n22:00:00,290\n", Options{}, 3, 1,
			`x.csv:3: time "22:00:00" is 3600 s before the reading on line 2`},
		{"unknown temperature unit", "t (s),T (mV)\n0,1.5\n", Options{}, 1, 2,
			`x.csv:1: column 2 "T": temperature unit "mV" is not °C, K or °F`},
		{"unknown time unit", "t (fortnight),T (K)\n0,290\n", Options{}, 1, 1,
			`x.csv:1: column 1 "t": time unit "fortnight" is not s, min, h, ms, mm:ss, hh:mm:ss or iso8601`},
		{"time out of range", "t (min),T (K)\n0,290\n1e308,290\n", Options{}, 3, 1,
			`x.csv:3: time "1e308" is out of range`},
		{"infinity is not a number", "t (s),T (K)\n0,290\n1,inf\n", Options{}, 3, 2,
			`x.csv:3: temperature "inf" is not a number`},
		{"hexadecimal is not a number", "t (s),T (K)\n0,290\n0x10,290\n", Options{}, 3, 1,
			`x.csv:3: time "0x10" is not a number`},
		// analytic: (−500 − 32)·5/9 + 273.15 = −22.405556 K
		{"below absolute zero in Fahrenheit", "t (s),T (°F)\n0,-500\n", Options{}, 2, 2,
			`x.csv:2: temperature -500 °F is -22.405556 K, below absolute zero`},
		{"decimal marks tied in the sniffed lines: the first decides", "t (s);T (°C)\n0;20.5\n10;20,6\n", Options{}, 3, 2,
			`x.csv:3: temperature "20,6" has a decimal comma, but this file uses decimal points`},
		{"extra column turns to text", "t (s),T (K),Heater (W)\n" + repeatRows(60, "%d,290,0\n") + "610,290,on\n", Options{}, 62, 3,
			`x.csv:62: column 3 "Heater": "on" is not a number`},
		{"corrupt cell after the sniffed lines", "t (s),T (K)\n" + repeatRows(200, "%d,290\n") + "2010,2x9\n", Options{}, 202, 2,
			`x.csv:202: temperature "2x9" is not a number`},
		{"time and temperature in one column", "t (s),T (K)\n0,290\n", Options{TimeColumn: "1", TemperatureColumn: "t"}, 1, 1,
			`x.csv:1: time and temperature are both column 1`},
		{"empty input", "", Options{}, 0, 0, `x.csv: no readings`},
		{"only comments", "# operator: A. Lindqvist\n\n", Options{}, 0, 0, `x.csv: no readings`},
		{"header only", "t (s),T (K)\n", Options{}, 0, 0,
			`x.csv: no data lines: want a column of times and one of temperatures`},
		{"a delimiter option that fits no line", "t (s),T (K)\n0,290\n", Options{Delimiter: ';'}, 0, 0,
			`x.csv: no data lines: want a column of times and one of temperatures`},
		{"no data in the sniffed lines", strings.Repeat("Kestrel Analytical QC export\n", 60) + "t (s),T (K)\n0,290\n", Options{}, 0, 0,
			`x.csv: no data lines in the first 48 lines: want a column of times and one of temperatures`},
		{"every reading blank", "t (s),T (K),P (W)\n0,,1\n,290,1\n", Options{}, 0, 0, `x.csv: no readings`},
		{"line too long", "t (s),T (K)\n0,290\n" + strings.Repeat("1", maxLineBytes+1) + "\n", Options{}, 3, 0,
			`x.csv:3: line longer than 1048576 bytes`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			opt := tt.opt
			opt.Name = "x.csv"
			_, err := Read(strings.NewReader(tt.in), opt)
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v, want a *ParseError", err)
			}
			if err.Error() != tt.msg || pe.Line != tt.line || pe.Column != tt.col {
				t.Errorf("error at line %d column %d:\n got %s\nwant %s (line %d column %d)", pe.Line, pe.Column, err, tt.msg, tt.line, tt.col)
			}
		})
	}
}

func TestOptionsValidate(t *testing.T) {
	tests := []struct {
		name string
		opt  Options
		msg  string // "" for valid options
	}{
		{"zero value", Options{}, ""},
		{"everything given", Options{TimeColumn: "2", TemperatureColumn: "T", TimeUnit: "hh:mm:ss.s", TemperatureUnit: "°F", Delimiter: '\t', Decimal: ','}, ""},
		{"bad delimiter", Options{Delimiter: 'x'}, `delimiter 'x': want comma, semicolon, tab, pipe or space`},
		{"bad decimal", Options{Decimal: ';'}, `decimal mark ';': want '.' or ','`},
		{"bad temperature unit", Options{TemperatureUnit: "R"}, `temperature unit "R": want C, K or F`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := tt.opt.Validate()
			got := ""
			if err != nil {
				got = err.Error()
			}
			if got != tt.msg {
				t.Errorf("Validate() = %q, want %q", got, tt.msg)
			}
		})
	}
}

func TestParseErrorText(t *testing.T) {
	tests := []struct {
		name string
		err  ParseError
		want string
	}{
		{"file and line", ParseError{File: "run7.csv", Line: 42, Column: 2, Err: errors.New(`temperature "2x.1" is not a number`)}, `run7.csv:42: temperature "2x.1" is not a number`},
		{"file only", ParseError{File: "run7.csv", Err: errors.New("no readings")}, "run7.csv: no readings"},
		{"line only", ParseError{Line: 3, Err: errors.New("bad")}, "line 3: bad"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := tt.err.Error(); got != tt.want {
				t.Errorf("got %q, want %q", got, tt.want)
			}
		})
	}
	cause := errors.New("disk on fire")
	if err := error(&ParseError{Err: cause}); !errors.Is(err, cause) {
		t.Error("Unwrap does not reach the cause")
	}
	w := Warning{File: "run7.csv", Line: 42, Msg: "blank temperature cell: reading skipped"}
	if got := w.String(); got != "run7.csv:42: blank temperature cell: reading skipped" {
		t.Errorf("warning %q", got)
	}
}

// failingReader gives its data, then an I/O error.
type failingReader struct {
	data string
	err  error
}

func (r *failingReader) Read(p []byte) (int, error) {
	if r.data == "" {
		return 0, r.err
	}
	n := copy(p, r.data)
	r.data = r.data[n:]
	return n, nil
}

func TestReadIOError(t *testing.T) {
	cause := errors.New("device not ready")
	_, err := Read(&failingReader{"t (s),T (K)\n0,290\n1,291\n", cause}, Options{Name: "usb.csv"})
	var pe *ParseError
	if !errors.As(err, &pe) || !errors.Is(err, cause) || err.Error() != "usb.csv:4: read: device not ready" {
		t.Errorf("error %v (%T), want a *ParseError at line 4 wrapping the cause", err, err)
	}
}
