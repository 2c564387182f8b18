package logfile

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"testing"
)

// bigLog writes a log of n readings: comma-separated seconds and °C, or
// semicolon-separated clock times with decimal commas.
func bigLog(n int, clock bool) []byte {
	var b bytes.Buffer
	b.Grow(n * 24)
	if clock {
		b.WriteString("Corvane TK-20 Thermologger\nUhrzeit;Temperatur [°C];Heizleistung [W]\n")
	} else {
		b.WriteString("# operator: R. Okafor\ntime (s),temperature (°C),heater power (W)\n")
	}
	for i := range n {
		T := 21.5 + float64(i%1000)*0.001
		if clock {
			s := (36000 + i) % 86400
			fmt.Fprintf(&b, "%02d:%02d:%02d;%d,%03d;0,500\n", s/3600, s/60%60, s%60, int(T), int(T*1000)%1000)
		} else {
			fmt.Fprintf(&b, "%d,%.3f,0.500\n", i, T)
		}
	}
	return b.Bytes()
}

// BenchmarkRead reads a 10⁶-line log. Target: at least 20 MB/s on one core
// (measured on the 2-core development machine, Go 1.26: 71 MB/s comma, 76 MB/s clock).
func BenchmarkRead(b *testing.B) {
	for _, clock := range []bool{false, true} {
		data := bigLog(1_000_000, clock)
		name := "comma-seconds"
		if clock {
			name = "semicolon-clock"
		}
		b.Run(name, func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			for b.Loop() {
				l, err := Read(bytes.NewReader(data), Options{})
				if err != nil || len(l.Time) != 1_000_000 {
					b.Fatalf("%v, %d readings", err, len(l.Time))
				}
			}
		})
	}
}

// countingReader produces a log line by line as it is read, with a bad
// cell on line badLine, and counts the bytes handed out.
type countingReader struct {
	line, badLine int
	buf           []byte
	given         int
	badAt         int // bytes given before the bad line
}

func (r *countingReader) Read(p []byte) (int, error) {
	for len(r.buf) < len(p) {
		r.line++
		switch {
		case r.line == 1:
			r.buf = append(r.buf, "t (s),T (K)\n"...)
		case r.line == r.badLine:
			r.badAt = r.given + len(r.buf)
			r.buf = append(r.buf, "1e9,2x9\n"...)
		default:
			r.buf = fmt.Appendf(r.buf, "%d,293.15\n", r.line)
		}
	}
	n := copy(p, r.buf)
	r.buf = r.buf[n:]
	r.given += n
	return n, nil
}

var _ io.Reader = (*countingReader)(nil)

// TestReadStreams shows that Read works through its input as it goes: it
// stops at a bad line 200 000 lines into an endless input, having taken at
// most its buffers (64 KiB each for the reader and the line scanner) past it.
func TestReadStreams(t *testing.T) {
	r := &countingReader{badLine: 200_000}
	_, err := Read(r, Options{Name: "endless.csv"})
	var pe *ParseError
	if !errors.As(err, &pe) || pe.Line != r.badLine || pe.Column != 2 {
		t.Fatalf("error %v, want a *ParseError at line %d column 2", err, r.badLine)
	}
	if past := r.given - r.badAt; past > 3*64<<10 {
		t.Errorf("read %d bytes past the bad line, want at most %d", past, 3*64<<10)
	}
}
