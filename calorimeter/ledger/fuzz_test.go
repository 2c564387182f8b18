package ledger

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

func FuzzRead(f *testing.F) {
	rows := sampleRows(3)
	rows[1].Note = `lid "B", stirrer 300 rpm`
	rows[1].Operator = "=SUM(A1)"
	rows[1].MeasuredAt = testT0.Add(-20 * time.Hour)
	rows[2].Kind, rows[2].Supersedes, rows[2].RunID = "calibration", rows[0].RunID, rows[0].RunID
	data := readFile(f, newLedger(f, rows...))
	f.Add(data)
	f.Add(data[:len(data)-7])
	f.Add([]byte(headerLine + "\n"))
	f.Add([]byte(headerLine))
	f.Add([]byte(""))
	f.Add([]byte(headerLine + "\n\n"))
	f.Add([]byte(headerLine + "\n1,2026-03-02T09:00:00Z,a,sample,,,,,,,,,,,,,,pass,,,,,,,,x,y\n"))
	f.Add([]byte(headerLine + "\n1,2026-03-02T09:00:00Z,2026-03-01T17:42:07.5Z,a,sample,,,,,,,,,,,,,,pass,,,,,,,,x,y\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		rows, err := Read(bytes.NewReader(data), "fuzz.csv")
		if err != nil {
			var ve *VerifyError
			if !errors.As(err, &ve) || ve.Line < 1 {
				t.Fatalf("Read error %v (%T) is not a *VerifyError with a line", err, err)
			}
		}
		if _, verr := Verify(bytes.NewReader(data), "fuzz.csv"); err != nil && verr == nil {
			t.Fatalf("Verify accepted what Read refused: %v", err)
		} else if verr != nil {
			var ve *VerifyError
			if !errors.As(verr, &ve) {
				t.Fatalf("Verify error %v (%T) is not a *VerifyError", verr, verr)
			}
		}
		if err != nil {
			return
		}
		// What parses, written again by this package, reads back the same.
		out := []byte(headerLine + "\n")
		for _, r := range rows {
			out = append(appendCSV(out, r.cells()), '\n')
		}
		again, err := Read(bytes.NewReader(out), "again.csv")
		if err != nil {
			t.Fatalf("rows read from\n%q\ndo not read back after writing:\n%q\n%v", data, out, err)
		}
		if len(again) != len(rows) {
			t.Fatalf("%d rows read back, want %d", len(again), len(rows))
		}
		for i := range rows {
			if d := rowDiff(again[i], rows[i]); d != "" {
				t.Fatalf("row %d changed in the round trip: %s", i, d)
			}
		}
	})
}

// plainNumber is isPlainNumber written independently, as a regular
// expression.
var plainNumber = regexp.MustCompile(`^-?([0-9]+(\.[0-9]*)?|\.[0-9]+)([eE][+-]?[0-9]+)?$`)

func FuzzSafeCell(f *testing.F) {
	for _, s := range []string{"", "=1+1", "+1", "-1.5", "-1.5e3", "-", "'", "''x", "@x", "\tx", "\rx",
		"-.5", "-5.", "-e5", "-1e", "1e+", "-1e+05", "x", "Zoë"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		safe := SafeCell(s)
		if back := UnsafeCell(safe); back != s {
			t.Fatalf("UnsafeCell(SafeCell(%q)) = %q", s, back)
		}
		if safe != "" && strings.IndexByte("=+-@\t\r", safe[0]) >= 0 && !plainNumber.MatchString(safe) {
			t.Fatalf("SafeCell(%q) = %q starts with %q and is not a number", s, safe, safe[:1])
		}
		if isPlainNumber(s) != plainNumber.MatchString(s) {
			t.Fatalf("isPlainNumber(%q) = %v, the regular expression says %v", s, isPlainNumber(s), !isPlainNumber(s))
		}
		if safe != s && safe != "'"+s {
			t.Fatalf("SafeCell(%q) = %q: it may only prefix one apostrophe", s, safe)
		}
	})
}

func TestSafeCell(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{"empty", "", ""},
		{"text", "M. Ibarra", "M. Ibarra"},
		{"formula", "=1+1", "'=1+1"},
		{"plus", "+1", "'+1"},
		{"minus text", "-x", "'-x"},
		{"negative number", "-1.5", "-1.5"},
		{"negative exponent", "-1.5e-3", "-1.5e-3"},
		{"at", "@A1", "'@A1"},
		{"tab", "\t1", "'\t1"},
		{"carriage return", "\r1", "'\r1"},
		{"apostrophe", "'x", "''x"},
		{"two apostrophes", "''", "'''"},
		{"minus alone", "-", "'-"},
		{"formula later in the cell", "a=1", "a=1"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := SafeCell(tt.in); got != tt.want {
				t.Errorf("SafeCell(%q) = %q, want %q", tt.in, got, tt.want)
			}
			if got := UnsafeCell(tt.want); got != tt.in {
				t.Errorf("UnsafeCell(%q) = %q, want %q", tt.want, got, tt.in)
			}
		})
	}
}

func TestPlainNumberCoversFormatFloat(t *testing.T) {
	// The claim of isPlainNumber's comment: every finite number FormatFloat
	// writes is plain, so a negative result is never neutralised.
	xs := []float64{0, math.Copysign(0, -1), 1, -1, math.MaxFloat64, -math.MaxFloat64,
		math.SmallestNonzeroFloat64, -math.SmallestNonzeroFloat64, 1e21, -1e-7}
	rng := rand.New(rand.NewPCG(20260302, 1))
	for range 100000 {
		x := rng.NormFloat64() * math.Pow(10, float64(rng.IntN(600)-300))
		xs = append(xs, x)
	}
	for _, x := range xs {
		if math.IsInf(x, 0) {
			continue
		}
		s := strconv.FormatFloat(x, 'g', -1, 64)
		if !isPlainNumber(s) || SafeCell(s) != s {
			t.Fatalf("FormatFloat wrote %q, which is not a plain number", s)
		}
	}
}
