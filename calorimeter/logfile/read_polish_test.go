package logfile

import (
	"errors"
	"strings"
	"testing"
)

// TestReadOneMoreBlank: one blank cell beyond those listed is "1 more
// reading", not "1 more readings".
func TestReadOneMoreBlank(t *testing.T) {
	// listedBlanks rows are listed one by one, the one after them counted.
	in := "t (s),T (K)\n0,290\n" + repeatRows(listedBlanks+1, "%d,\n")
	l, err := Read(strings.NewReader(in), Options{Name: "x.csv"})
	if err != nil {
		t.Fatal(err)
	}
	n := len(l.Warnings)
	if want := "x.csv: 1 more reading skipped for blank cells (not listed)"; n != listedBlanks+1 || l.Warnings[n-1].String() != want {
		t.Errorf("%d warnings, last %v, want %d with the last %q", n, l.Warnings[n-1], listedBlanks+1, want)
	}
}

// TestReadAbsurdNumbers: huge numbers in messages are written as %g, not
// spelled out digit by digit, and temperatures no calorimeter reads are
// refused as a *ParseError naming line and column.
func TestReadAbsurdNumbers(t *testing.T) {
	tests := []struct {
		name      string
		in        string
		line, col int
		msg       string
	}{
		{"a time of 1e300 s then 0 s", "t (s),T (°C)\n1e300,20\n0,20\n", 3, 1,
			`x.csv:3: time "0" is 1e+300 s before the reading on line 2`},
		// 1e-5 s back is beyond the 1 ns tolerance (timeTolerance) but
		// rounds to 0 at 3 decimals.
		{"a time back by 10 µs", "t (s),T (°C)\n1,20\n0.99999,20\n", 3, 1,
			`x.csv:3: time "0.99999" is 1e-05 s before the reading on line 2`},
		{"-1e300 °C", "t (s),T (°C)\n0,20\n1,-1e300\n", 3, 2,
			`x.csv:3: temperature -1e300 °C is -1e+300 K, below absolute zero`},
		{"1e308 °C", "t (s),T (°C)\n0,20\n2,1e308\n", 3, 2,
			`x.csv:3: temperature 1e308 °C is 1e+308 K, above 10000 K, hotter than any calorimeter reads`},
		{"10001 K", "t (s),T (K)\n0,293\n2,10001\n", 3, 2,
			`x.csv:3: temperature 10001 K is above 10000 K, hotter than any calorimeter reads`},
		// analytic: (20000 − 32)·5/9 + 273.15 = 11366.483333 K
		{"20000 °F", "t (s),T (°F)\n0,68\n2,20000\n", 3, 2,
			`x.csv:3: temperature 20000 °F is 11366.483333 K, above 10000 K, hotter than any calorimeter reads`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Read(strings.NewReader(tc.in), Options{Name: "x.csv"})
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v, want a *ParseError", err)
			}
			if err.Error() != tc.msg || pe.Line != tc.line || pe.Column != tc.col {
				t.Errorf("error at line %d column %d:\n got %s\nwant %s (line %d column %d)", pe.Line, pe.Column, err, tc.msg, tc.line, tc.col)
			}
		})
	}
}

// TestReadHighestTemperature: 10000 K itself is still a reading.
func TestReadHighestTemperature(t *testing.T) {
	l, err := Read(strings.NewReader("t (s),T (K)\n0,293\n2,10000\n"), Options{Name: "x.csv"})
	if err != nil {
		t.Fatal(err)
	}
	// exact: the cell is 10000 and the unit kelvin; tolerance 1e-9 K.
	if got := l.Temperature[1]; got < 10000-1e-9 || got > 10000+1e-9 {
		t.Errorf("temperature %g K, want 10000 K", got)
	}
}

// TestFormatNumber: fixed decimals where they are short, %g from 1e15 up.
func TestFormatNumber(t *testing.T) {
	tests := []struct {
		name     string
		x        float64
		decimals int
		want     string
	}{
		{"ordinary", 3600.25, 3, "3600.25"},
		{"rounded", 2.0000001, 3, "2"},
		{"just below 1e15", 999999999999999, 0, "999999999999999"},
		{"1e15", 1e15, 3, "1e+15"},
		{"2e300 s in minutes", 2e300 / 60, 2, "3.33333e+298"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := formatNumber(tc.x, tc.decimals); got != tc.want {
				t.Errorf("formatNumber(%g, %d) = %q, want %q", tc.x, tc.decimals, got, tc.want)
			}
		})
	}
}
