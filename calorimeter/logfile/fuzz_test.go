package logfile

import (
	"bytes"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// FuzzRead checks that no input panics, that every error is a
// *ParseError, that what parses keeps the invariants Log promises, and
// that a log written back as a plain CSV reads again to the same readings.
func FuzzRead(f *testing.F) {
	files, err := filepath.Glob(filepath.Join(logsDir, "*"))
	if err != nil {
		f.Fatal(err)
	}
	for _, p := range files {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	for _, s := range []string{
		"t;T\n0;9,99\n10;10,01\n",
		"clock,T (K)\n23:59:59,1\n00:00:01,2\n",
		"\"a\",\"b\"\n\"1\",\"2\"\n",
		"# k: v\n#  t/s T/K\n1 2\n3 4\n",
		"2026-03-04 10:00:00 5\n2026-03-04 10:00:01 6\n",
		"\xff\xfet\x00,\x00T\x00\n\x000\x00,\x001\x00\n\x00",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		l, err := Read(bytes.NewReader(data), Options{Name: "fuzz.csv"})
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is %T, not *ParseError", err, err)
			}
			return
		}
		n := len(l.Time)
		if n == 0 || len(l.Temperature) != n || len(l.Line) != n {
			t.Fatalf("%d times, %d temperatures, %d lines", n, len(l.Temperature), len(l.Line))
		}
		if l.Time[0] != 0 {
			t.Fatalf("first time %g s, want 0 s", l.Time[0])
		}
		for i := range n {
			if math.IsNaN(l.Time[i]) || math.IsInf(l.Time[i], 0) || !(l.Temperature[i] >= 0) || math.IsInf(l.Temperature[i], 0) {
				t.Fatalf("reading %d: %g s, %g K", i, l.Time[i], l.Temperature[i])
			}
			if i > 0 && (l.Time[i] < l.Time[i-1]-timeTolerance(l.Time[i-1]) || l.Line[i] <= l.Line[i-1]) {
				t.Fatalf("reading %d goes back: %g s after %g s, line %d after %d", i, l.Time[i], l.Time[i-1], l.Line[i], l.Line[i-1])
			}
		}
		for name, x := range l.Extra {
			if len(x) != n {
				t.Fatalf("extra %q has %d values for %d readings", name, len(x), n)
			}
		}
		if err := Summarise(l).WriteText(io.Discard); err != nil {
			t.Fatal(err)
		}

		var b bytes.Buffer
		b.WriteString("time (s),temperature (K)\n")
		for i := range n {
			b.WriteString(strconv.FormatFloat(l.Time[i], 'g', -1, 64) + "," + strconv.FormatFloat(l.Temperature[i], 'g', -1, 64) + "\n")
		}
		again, err := Read(&b, Options{Name: "again.csv"})
		if err != nil {
			t.Fatalf("written back, the log does not read: %v", err)
		}
		if len(again.Time) != n {
			t.Fatalf("read back %d readings, want %d", len(again.Time), n)
		}
		for i := range n {
			// 'g' with -1 digits round-trips float64 exactly (strconv docs)
			if !near(again.Time[i], l.Time[i], 1e-12) || !near(again.Temperature[i], l.Temperature[i], 1e-12) {
				t.Fatalf("reading %d: %g s %g K read back as %g s %g K", i, l.Time[i], l.Temperature[i], again.Time[i], again.Temperature[i])
			}
		}
	})
}
