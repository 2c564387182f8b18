package units

import (
	"math"
	"strconv"
	"strings"
)

// Round rounds a value and its standard uncertainty for reporting, as JCGM
// 100:2008 (GUM) 7.2.6 recommends: u to two significant digits, rounded to
// the nearest, and the value to the same decimal place. It returns both as
// text:
//
//	Round(452, 0.8)          = "452.00", "0.80"
//	Round(17.58412, 0.01734) = "17.584", "0.017"
//	Round(56789, 1234)       = "56800", "1200"
//	Round(3.4567e-5, 1.2e-7) = "3.457e-05", "1.2e-07"
//
// The numbers are written in fixed notation while the last digit kept lies
// between 10⁻⁵ and 10⁴ (down to 10⁻⁸ when |value| ≥ 10⁻³, so that a
// temperature change of −0.381504 ± 0.000060 K stays readable) and
// |value| < 10¹⁵, else in e-notation with the value's digits ending at the
// same place as u's. Ties, rare in binary, go to
// the even digit. When u is 0, negative, NaN or infinite there is no
// uncertainty: the value is given to 10 significant digits and uText is "".
func Round(value, u float64) (v, uText string) {
	r := unitsRound(value, u)
	return r.v, r.u
}

// unitsRounded is the result of Round with what FormatConcise needs.
type unitsRounded struct {
	v, u string
	q    int  // the last digit kept is in the 10^q place
	sci  bool // e-notation
}

func unitsRound(value, u float64) unitsRounded {
	if !(u > 0) || math.IsInf(u, 0) {
		return unitsRounded{v: strconv.FormatFloat(value, 'g', 10, 64)}
	}
	// Two significant digits of u; 'e' carries 0.0996 to "1.0e-01".
	us := strconv.FormatFloat(u, 'e', 1, 64)
	q := unitsExponent(us) - 1
	if math.IsNaN(value) || math.IsInf(value, 0) {
		r := unitsRound(1, u)
		r.v = strconv.FormatFloat(value, 'g', -1, 64)
		return r
	}
	if q <= 4 && math.Abs(value) < 1e15 && (q >= -5 || (q >= -8 && math.Abs(value) >= 1e-3)) {
		return unitsRounded{v: unitsFixed(value, q), u: unitsFixed(u, q), q: q}
	}
	return unitsRounded{v: unitsSci(value, q), u: us, q: q, sci: true}
}

// unitsFixed writes x rounded to the 10^q place, -8 ≤ q ≤ 4, in fixed
// notation.
func unitsFixed(x float64, q int) string {
	var s string
	if q < 0 {
		s = strconv.FormatFloat(x, 'f', -q, 64)
	} else {
		scale := math.Pow10(q) // exact for q ≤ 22
		s = strconv.FormatFloat(math.RoundToEven(x/scale)*scale, 'f', 0, 64)
	}
	return unitsNoNegativeZero(s)
}

// unitsSci writes x rounded to the 10^q place in e-notation.
func unitsSci(x float64, q int) string {
	ev := unitsExponent(strconv.FormatFloat(x, 'e', -1, 64))
	if x == 0 || ev < q-1 {
		return unitsSciZero(q)
	}
	if ev == q-1 {
		// |x| < 10^q: it rounds to 0 or to ±1·10^q.
		half, _ := strconv.ParseFloat("5e"+strconv.Itoa(q-1), 64)
		if math.Abs(x) <= half {
			return unitsSciZero(q)
		}
		return strconv.FormatFloat(math.Copysign(1, x), 'f', 0, 64) + "e" + unitsExpText(q)
	}
	s := strconv.FormatFloat(x, 'e', ev-q, 64)
	if unitsExponent(s) != ev {
		// Rounding carried into a new leading digit, 9.9996e-07 → 1.000e-06:
		// the mantissa is exactly 1, and one more zero keeps the last digit
		// at 10^q (1.0000e-06).
		mant, exp, _ := strings.Cut(s, "e")
		if !strings.Contains(mant, ".") {
			mant += "."
		}
		s = mant + "0e" + exp
	}
	return s
}

// unitsSciZero writes zero with its last digit in the 10^q place: "0.0e-07"
// for q = -8, laid out as u is.
func unitsSciZero(q int) string { return "0.0e" + unitsExpText(q+1) }

// unitsExpText writes an exponent as strconv does: a sign and at least two
// digits.
func unitsExpText(e int) string {
	sign := "+"
	if e < 0 {
		sign, e = "-", -e
	}
	d := strconv.Itoa(e)
	if len(d) < 2 {
		d = "0" + d
	}
	return sign + d
}

// unitsExponent returns the exponent of a number strconv wrote with 'e'.
func unitsExponent(s string) int {
	i := strings.LastIndexAny(s, "eE")
	if i < 0 {
		return 0
	}
	e, _ := strconv.Atoi(s[i+1:])
	return e
}

func unitsNoNegativeZero(s string) string {
	if strings.HasPrefix(s, "-") && strings.Trim(s, "-0.") == "" {
		return s[1:]
	}
	return s
}

// Format writes a value and its standard uncertainty, both in unit and
// rounded by Round: Format(452, 0.8, "J/K") = "452.00 ± 0.80 J/K". Without an
// uncertainty (u = 0) it writes "452 J/K"; with unit "" no unit.
func Format(value, u float64, unit string) string {
	r := unitsRound(value, u)
	s := r.v
	if r.u != "" {
		s += " ± " + r.u
	}
	return unitsWithUnit(s, unit)
}

// FormatConcise writes a value with its standard uncertainty in the concise
// form of JCGM 100:2008, 7.2.2, the digits in parentheses being u in units of
// the value's last digit: FormatConcise(17.58412, 0.01734, "kJ/mol") =
// "17.584(17) kJ/mol". In e-notation the exponent follows the parentheses:
// "3.457(12)e-05". Parse reads both back.
func FormatConcise(value, u float64, unit string) string {
	r := unitsRound(value, u)
	if r.u == "" || math.IsNaN(value) || math.IsInf(value, 0) {
		return Format(value, u, unit)
	}
	var digits string
	if r.sci {
		mant, _, _ := strings.Cut(r.u, "e")
		digits = strings.Replace(mant, ".", "", 1)
	} else {
		digits = strings.TrimLeft(strings.Replace(r.u, ".", "", 1), "0")
	}
	s := r.v + "(" + digits + ")"
	if mant, exp, ok := strings.Cut(r.v, "e"); ok {
		s = mant + "(" + digits + ")e" + exp
	}
	return unitsWithUnit(s, unit)
}

func unitsWithUnit(s, unit string) string {
	if unit == "" {
		return s
	}
	return s + " " + unit
}

// FormatQuantity writes q in unit as Format does, converting from the base
// unit: the value of an absolute temperature with its offset, the
// uncertainty as a difference. The unit is written in its canonical spelling
// ("degC" → "°C"); unit "" means the base unit. An unknown unit gives a
// *ParseError.
func FormatQuantity(q Quantity, unit string) (string, error) {
	if unit == "" {
		unit = q.Dim.BaseUnit()
	}
	d, err := unitsFind(q.Dim, unit)
	if err != nil {
		return "", err
	}
	u := 0.0
	if q.HasU {
		u = math.Abs(d.diffFromBase(q.U))
	}
	return Format(d.fromBase(q.Value), u, d.name), nil
}
