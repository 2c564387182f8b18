package units

import (
	"errors"
	"math"
	"strconv"
	"testing"
)

// FuzzParse: no input panics; every error is a *ParseError; what parses,
// written with strconv 'g' -1 in its base unit and parsed again, gives the
// same value and uncertainty exactly (the base unit converts with factor 1);
// and what Format writes parses again.
func FuzzParse(f *testing.F) {
	seeds := []string{
		"2.503g", "2503 mg", "25.0C", "298.15K", "300s", "5min", "1.000W", "452J/K",
		"17.584kJ/mol", "452±0.8 J/K", "452+-0.8J/K", "452 ± 0.8 J/K", "(452 ± 0.8) J/K",
		"17.584(17) kJ/mol", "17.584(0.017) kJ/mol", "2,503 g", "452 J/K ± 0.8 J/K",
		"1.2345(12)e-07 mol", "25.0 °C ± 0.18 °F", "4.184 J/(g·K)", "4.184 J g-1 K-1",
		"50 %", "250 µL", "-40 °F", "1e308 kg", "5 parsecs", "2x.1 g", "1,234.5", "",
		"(", "±", "((((((((", "J/(((((K", "1e-400", "NaN", "-0 K", "0.1 mol kg⁻¹",
	}
	for i, s := range seeds {
		f.Add(s, uint8(i))
	}
	f.Fuzz(func(t *testing.T, text string, d uint8) {
		dim := Dimension(int(d) % int(unitsDimensions))
		base := dim.BaseUnit()
		q, err := Parse(text, dim, base)
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("Parse(%q, %v): error %v is %T, not *ParseError", text, dim, err, err)
			}
			return
		}
		if math.IsNaN(q.Value) || math.IsInf(q.Value, 0) || math.IsNaN(q.U) || math.IsInf(q.U, 0) || q.U < 0 {
			t.Fatalf("Parse(%q, %v) = %+v", text, dim, q)
		}
		if dim == Temperature && q.Value < 0 {
			t.Fatalf("Parse(%q) = %g K, below absolute zero", text, q.Value)
		}
		again := strconv.FormatFloat(q.Value, 'g', -1, 64)
		if q.HasU {
			again += " ± " + strconv.FormatFloat(q.U, 'g', -1, 64)
		}
		again += " " + base
		r, err := Parse(again, dim, base)
		if err != nil {
			t.Fatalf("Parse(%q) = %+v, but Parse(%q): %v", text, q, again, err)
		}
		if r.Value != q.Value || r.U != q.U || r.HasU != q.HasU {
			t.Fatalf("Parse(%q) = %+v, Parse(%q) = %+v", text, q, again, r)
		}
		// Format rounds; what it writes must parse (away from the float64
		// limit, where rounding up may overflow).
		if math.Abs(q.Value) < 1e300 && q.U < 1e300 {
			for _, s := range []string{Format(q.Value, q.U, base), FormatConcise(q.Value, q.U, base)} {
				if _, err := Parse(s, dim, base); err != nil {
					t.Fatalf("Parse(%q) = %+v; Format gives %q, which does not parse: %v", text, q, s, err)
				}
			}
		}
	})
}
