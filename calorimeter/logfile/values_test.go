package logfile

import (
	"slices"
	"testing"
	"time"
)

func TestNumber(t *testing.T) {
	tests := []struct {
		name string
		in   string
		dec  byte
		want float64
		mark byte
		ok   bool
	}{
		{"integer", "42", 0, 42, 0, true},
		{"point", "21.503", 0, 21.503, '.', true},
		{"comma read as a decimal mark", "9,99", 0, 9.99, ',', true},
		{"comma refused when the file uses points", "9,99", '.', 0, ',', false},
		{"point refused when the file uses commas", "9.99", ',', 0, '.', false},
		{"sign and exponent", "-1.5e+3", 0, -1500, '.', true},
		{"leading mark", ".5", 0, 0.5, '.', true},
		{"trailing mark", "5.", 0, 5, '.', true},
		{"plus sign", "+3", 0, 3, 0, true},
		{"two marks", "1.234,5", 0, 0, '.', false},
		{"thousands commas", "1,234,567", 0, 0, ',', false},
		{"hexadecimal", "0x1p3", 0, 0, 0, false},
		{"underscores", "1_000", 0, 0, 0, false},
		{"infinity", "Inf", 0, 0, 0, false},
		{"nan", "NaN", 0, 0, 0, false},
		{"beyond float64", "1e400", 0, 0, 0, false},
		{"empty exponent", "1e", 0, 0, 0, false},
		{"mark alone", ".", 0, 0, '.', false},
		{"blank", "", 0, 0, 0, false},
		{"unit attached", "21.5C", 0, 0, '.', false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			v, mark, ok := number(tt.in, tt.dec)
			if ok != tt.ok || mark != tt.mark || (ok && !near(v, tt.want, 1e-15)) {
				t.Errorf("number(%q, %q) = %g, %q, %v; want %g, %q, %v", tt.in, tt.dec, v, mark, ok, tt.want, tt.mark, tt.ok)
			}
		})
	}
}

func TestParseClock(t *testing.T) {
	tests := []struct {
		name   string
		in     string
		layout string
		want   float64 // s, analytic from the parts
		ok     bool
	}{
		{"hh:mm:ss", "10:15:02", "hh:mm:ss", 36902, true},
		{"fraction", "10:15:02.25", "hh:mm:ss", 36902.25, true},
		{"fraction after a comma", "10:15:02,5", "hh:mm:ss", 36902.5, true},
		{"one-digit hour", "9:05:00", "hh:mm:ss", 32700, true},
		{"timer past a day", "26:00:00", "hh:mm:ss", 93600, true},
		{"mm:ss", "12:30", "mm:ss", 750, true},
		{"mm:ss with a fraction", "00:02.5", "mm:ss", 2.5, true},
		{"negative timer", "-01:30", "mm:ss", -90, true},
		{"hh:mm", "12:30", "hh:mm", 45000, true},
		{"minutes of 60", "10:60:00", "hh:mm:ss", 0, false},
		{"seconds of 60", "10:15:60", "hh:mm:ss", 0, false},
		{"one-digit minutes", "10:5:00", "hh:mm:ss", 0, false},
		{"four parts", "1:02:03:04", "hh:mm:ss", 0, false},
		{"no colon", "1015", "hh:mm:ss", 0, false},
		{"empty fraction", "10:15:02.", "hh:mm:ss", 0, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c, ok := parseClock(tt.in)
			if ok != tt.ok || (ok && !near(c.seconds(tt.layout), tt.want, 1e-12)) {
				t.Errorf("parseClock(%q) = %g s, %v; want %g s, %v", tt.in, c.seconds(tt.layout), ok, tt.want, tt.ok)
			}
		})
	}
}

func TestParseTimestamp(t *testing.T) {
	plus1 := time.FixedZone("", 3600)
	tests := []struct {
		name string
		in   string
		want time.Time
		zone bool
		ok   bool
	}{
		{"no offset", "2026-03-04T10:15:02", time.Date(2026, 3, 4, 10, 15, 2, 0, time.UTC), false, true},
		{"space for T", "2026-03-04 10:15:02", time.Date(2026, 3, 4, 10, 15, 2, 0, time.UTC), false, true},
		{"Z", "2026-03-04T10:15:02Z", time.Date(2026, 3, 4, 10, 15, 2, 0, time.UTC), true, true},
		{"offset with colon", "2026-03-04T10:15:02+01:00", time.Date(2026, 3, 4, 10, 15, 2, 0, plus1), true, true},
		{"offset without colon", "2026-03-04T10:15:02+0100", time.Date(2026, 3, 4, 10, 15, 2, 0, plus1), true, true},
		{"offset in hours", "2026-03-04T10:15:02-05", time.Date(2026, 3, 4, 15, 15, 2, 0, time.UTC), true, true},
		{"milliseconds", "2026-03-04T10:15:02.125Z", time.Date(2026, 3, 4, 10, 15, 2, 125e6, time.UTC), true, true},
		{"comma fraction", "2026-03-04T10:15:02,5", time.Date(2026, 3, 4, 10, 15, 2, 5e8, time.UTC), false, true},
		{"nanoseconds", "2026-03-04T10:15:02.000000001", time.Date(2026, 3, 4, 10, 15, 2, 1, time.UTC), false, true},
		{"no seconds", "2026-03-04T10:15", time.Date(2026, 3, 4, 10, 15, 0, 0, time.UTC), false, true},
		{"leap day", "2028-02-29T00:00:00", time.Date(2028, 2, 29, 0, 0, 0, 0, time.UTC), false, true},
		{"no leap day", "2026-02-29T00:00:00", time.Time{}, false, false},
		{"month 13", "2026-13-04T10:15:02", time.Time{}, false, false},
		{"hour 24", "2026-03-04T24:00:00", time.Time{}, false, false},
		{"date only", "2026-03-04", time.Time{}, false, false},
		{"text after", "2026-03-04T10:15:02 CET", time.Time{}, false, false},
		{"offset 24 h", "2026-03-04T10:15:02+24:00", time.Time{}, false, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, zone, ok := parseTimestamp(tt.in)
			if ok != tt.ok || zone != tt.zone || (ok && !got.Equal(tt.want)) {
				t.Errorf("parseTimestamp(%q) = %v, zone %v, %v; want %v, zone %v, %v", tt.in, got, zone, ok, tt.want, tt.zone, tt.ok)
			}
		})
	}
}

func TestSplitNameUnit(t *testing.T) {
	tests := []struct {
		in, name, unit string
	}{
		{"Temperature (°C)", "Temperature", "°C"},
		{"T/K", "T", "K"},
		{"time [min]", "time", "min"},
		{"Temp[degC]", "Temp", "degC"},
		{"t (s)", "t", "s"},
		{"Temperatur in °C", "Temperatur", "°C"},
		{"Temp_C", "Temp", "C"},
		{"time s", "time", "s"},
		{"Heater power / W", "Heater power", "W"},
		{"T vessel (°C)", "T vessel", "°C"},
		{"Date/Time", "Date/Time", ""}, // "Time" is not a unit
		{"Sample K", "Sample K", ""},   // K after a name that is no temperature
		{"Probe_1", "Probe_1", ""},     // a number is not a unit
		{"(s)", "", "s"},               // a unit alone
		{"  Elapsed  ", "Elapsed", ""}, // blanks trimmed
		{"T (vessel) (K)", "T (vessel)", "K"},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			name, unit := splitNameUnit(tt.in)
			if name != tt.name || unit != tt.unit {
				t.Errorf("splitNameUnit(%q) = %q, %q; want %q, %q", tt.in, name, unit, tt.name, tt.unit)
			}
		})
	}
}

func TestUnits(t *testing.T) {
	temps := []struct{ in, want string }{
		{"°C", "C"}, {"ºC", "C"}, {"˚C", "C"}, {"℃", "C"}, {"degC", "C"}, {"deg C", "C"}, {"DEG. C", "C"},
		{"Celsius", "C"}, {"Â°C", "C"}, {"C", "C"}, {"K", "K"}, {"kelvin", "K"}, {"°K", "K"},
		{"°F", "F"}, {"F", "F"}, {"Fahrenheit", "F"}, {"℉", "F"},
		{"mV", ""}, {"°", ""}, {"deg", ""}, {"R", ""},
	}
	for _, tt := range temps {
		t.Run("temperature "+tt.in, func(t *testing.T) {
			if got := temperatureUnit(tt.in); got != tt.want {
				t.Errorf("temperatureUnit(%q) = %q, want %q", tt.in, got, tt.want)
			}
		})
	}
	times := []struct{ in, want string }{
		{"s", "s"}, {"sec.", "s"}, {"Seconds", "s"}, {"min", "min"}, {"MIN", "min"}, {"h", "h"},
		{"hrs", "h"}, {"ms", "ms"}, {"mm:ss", "mm:ss"}, {"hh:mm:ss", "hh:mm:ss"},
		{"hh:mm:ss.s", "hh:mm:ss"}, {"hh:mm", "hh:mm"}, {"ISO 8601", "iso8601"},
		{"UTC", ""}, {"fortnight", ""}, {"K", ""},
	}
	for _, tt := range times {
		t.Run("time "+tt.in, func(t *testing.T) {
			if got := timeUnit(tt.in); got != tt.want {
				t.Errorf("timeUnit(%q) = %q, want %q", tt.in, got, tt.want)
			}
		})
	}
}

func TestNames(t *testing.T) {
	tests := []struct {
		name       string
		time, temp bool
	}{
		{"time", true, false}, {"Time", true, false}, {"t", true, false}, {"Elapsed", true, false},
		{"Elapsed time", true, false}, {"clock", true, false}, {"Timestamp", true, false},
		{"DateTime", true, false}, {"Date/Time", true, false}, {"Zeit", true, false},
		{"Uhrzeit", true, false}, {"T", false, true}, {"temperature", false, true},
		{"Temp", false, true}, {"TEMPERATURE", false, true}, {"Temperatur", false, true},
		{"θ", false, true}, {"theta", false, true}, {"T vessel", false, true}, {"T1", false, true},
		{"temp2", false, true}, {"Vessel temperature", false, true}, {"Heater power", false, false},
		{"Date", false, false}, {"Event", false, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := isTimeName(tt.name); got != tt.time {
				t.Errorf("isTimeName(%q) = %v", tt.name, got)
			}
			if got := isTemperatureName(tt.name); got != tt.temp {
				t.Errorf("isTemperatureName(%q) = %v", tt.name, got)
			}
		})
	}
}

func TestSplitFields(t *testing.T) {
	tests := []struct {
		name string
		in   string
		d    byte
		want []string
		bad  int
	}{
		{"comma", "0,21.5,", ',', []string{"0", "21.5", ""}, 0},
		{"blanks trimmed", " 0 ; 21,5 ", ';', []string{"0", "21,5"}, 0},
		{"tab keeps blanks out", "0\t 21.5\t\t", '\t', []string{"0", "21.5", "", ""}, 0},
		{"quoted", `"a,b", "say ""hi""",3`, ',', []string{"a,b", `say "hi"`, "3"}, 0},
		{"empty quoted", `"",1`, ',', []string{"", "1"}, 0},
		{"unclosed quote", `1,"abc`, ',', nil, 2},
		{"text after a quote", `"abc"x,1`, ',', nil, 1},
		{"runs of blanks", "  0 \t  21.5   3 ", ' ', []string{"0", "21.5", "3"}, 0},
		{"date and time kept together", "2026-03-04 10:15:02  21.5", ' ', []string{"2026-03-04 10:15:02", "21.5"}, 0},
		{"date alone", "2026-03-04 start 21.5", ' ', []string{"2026-03-04", "start", "21.5"}, 0},
		{"quoted with blanks", `"Time (s)"  "Temp (°C)"`, ' ', []string{"Time (s)", "Temp (°C)"}, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, bad := splitFields(nil, tt.in, tt.d)
			if bad != tt.bad || (bad == 0 && !slices.Equal(got, tt.want)) {
				t.Errorf("splitFields(%q) = %q, bad %d; want %q, bad %d", tt.in, got, bad, tt.want, tt.bad)
			}
		})
	}
}

func TestHeaderFields(t *testing.T) {
	tests := []struct {
		name string
		in   string
		k    int
		want []string
	}{
		{"two blanks between names", "  Time (s)     Temp (°F)", 2, []string{"Time (s)", "Temp (°F)"}},
		{"one blank: brackets joined", "Time (s) Temp (deg F)", 2, []string{"Time (s)", "Temp (deg F)"}},
		{"slash unit joined", "t /s T /K", 2, []string{"t /s", "T /K"}},
		{"plain names", "t T P", 3, []string{"t", "T", "P"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := headerFields(tt.in, ' ', tt.k); !slices.Equal(got, tt.want) {
				t.Errorf("headerFields(%q) = %q, want %q", tt.in, got, tt.want)
			}
		})
	}
}
