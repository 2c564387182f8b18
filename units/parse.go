package units

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"
)

// Quantity is a value read by Parse, in the base unit of its dimension.
type Quantity struct {
	Value float64   // in the base unit of Dim
	U     float64   // standard uncertainty in the base unit; a difference, so no temperature offset; 0 when not given
	HasU  bool      // whether an uncertainty was given
	Dim   Dimension // what the value measures
	Unit  string    // the value's unit as written, "" when the default unit was used
}

// ParseError is the error Parse and ParseNumber return for bad text, and
// ToUnit, FromUnit and CanonicalUnit for an unknown unit.
type ParseError struct {
	Text string    // the text parsed, without surrounding space; "" when the error is about a unit name alone
	Dim  Dimension // the dimension expected
	Msg  string    // what is wrong and what was expected
}

// Error gives `"5 parsecs": unknown mass unit "parsecs" (use mg, g or kg)`.
// When the message already starts with the quoted text it is not repeated:
// `"2x.1" is not a number`.
func (e *ParseError) Error() string {
	q := strconv.Quote(e.Text)
	if e.Text == "" || strings.HasPrefix(e.Msg, q) {
		return e.Msg
	}
	return q + ": " + e.Msg
}

// Parse reads a quantity of dimension dim. The value may carry its unit,
// attached or after a space, and may be followed by a standard uncertainty:
//
//	2.503g   2503 mg   25.0C   298.15K   300s   5min   2,503 g
//	452±0.8 J/K   452+-0.8J/K   452 +/- 0.8 J/K   (452 ± 0.8) J/K
//	452 J/K ± 0.8 J/K   25.0 °C ± 0.18 °F
//	17.584(17) kJ/mol   17.584(0.017) kJ/mol   1.2345(12)e-07 mol
//
// A bare number takes defaultUnit, which must be a unit of dim; "" means that
// a bare number is an error, except for Dimensionless, where "" is the plain
// number. A bad defaultUnit or dim is a programmer's error and gives an
// error that is not a *ParseError. Every error about text is a *ParseError.
//
// The uncertainty takes the unit written after it, else the value's; the
// value takes its own unit, else the uncertainty's, else defaultUnit. Both
// are converted to the base unit, the uncertainty as a difference: 25.0±0.1
// °C gives Value 298.15 K and U 0.1 K.
//
// In the concise form (JCGM 100:2008, 7.2.2) the digits in parentheses are
// the uncertainty in units of the value's last digit, 17.584(17) meaning
// u = 0.017; a number with a decimal mark or an exponent in the parentheses
// is the uncertainty itself.
//
// A decimal comma is read where it is unambiguous: one comma and no point.
// A number with both a point and a comma, or with several commas, is an
// error; no separator is ever dropped. NaN, Inf and hexadecimal numbers are
// errors; so are a negative uncertainty and a temperature below 0 K.
func Parse(text string, dim Dimension, defaultUnit string) (Quantity, error) {
	if !dim.valid() {
		return Quantity{}, fmt.Errorf("units: parse %q: invalid dimension %d", text, int(dim))
	}
	def, ok := unitsLookup(dim, defaultUnit)
	if !ok && defaultUnit != "" {
		return Quantity{}, fmt.Errorf("units: parse %q: default unit: %s", text, unitsUnitMsg(dim, defaultUnit))
	}
	s := strings.TrimSpace(text)
	p := unitsParser{text: s, dim: dim}
	q, msg := p.parse(def)
	if msg != "" {
		return Quantity{}, &ParseError{Text: s, Dim: dim, Msg: msg}
	}
	return q, nil
}

// ParseNumber parses a plain number with the decimal-comma rules of Parse:
// "9,99" is 9.99 (never 999), "2.5e3" is 2500, and "1,234.5" and "1,2,3" are
// errors because they are ambiguous. Errors are *ParseError.
func ParseNumber(text string) (float64, error) {
	s := strings.TrimSpace(text)
	fail := func(msg string) error { return &ParseError{Text: s, Dim: Dimensionless, Msg: msg} }
	if s == "" {
		return 0, fail("empty value")
	}
	n := unitsNumberLen(s)
	if n != len(s) {
		return 0, fail(unitsNotNumber(s))
	}
	num, msg := unitsNumber(s)
	if msg != "" {
		return 0, fail(msg)
	}
	return num.value, nil
}

// unitsNum is a number as written.
type unitsNum struct {
	text     string
	value    float64
	decimals int // digits after the decimal mark
	exp      int // the exponent written, 0 if none
	hasExp   bool
}

// unitsSeg is one side of a "±": a number and the unit written after it.
type unitsSeg struct {
	num     unitsNum
	unit    string    // as written, trimmed
	def     *unitsDef // nil when unit is ""
	u       float64   // concise uncertainty, in the unit of the value
	hasU    bool
	uAsText string
}

type unitsParser struct {
	text string
	dim  Dimension
}

func (p *unitsParser) parse(def *unitsDef) (Quantity, string) {
	s := p.text
	if s == "" {
		return Quantity{}, "empty value"
	}
	var (
		vSeg, uSeg string
		outer      string
		pm         bool
	)
	if strings.HasPrefix(s, "(") {
		end := strings.IndexByte(s, ')')
		if end < 0 {
			return Quantity{}, `missing ")"`
		}
		l, r, found, twice := unitsSplitPM(s[1:end])
		if twice {
			return Quantity{}, "more than one ±"
		}
		if !found {
			return Quantity{}, `want "(value ± uncertainty) unit"`
		}
		vSeg, uSeg, pm = l, r, true
		outer = strings.TrimSpace(s[end+1:])
	} else {
		l, r, found, twice := unitsSplitPM(s)
		if twice {
			return Quantity{}, "more than one ±"
		}
		vSeg, uSeg, pm = l, r, found
		if !found {
			vSeg = s
		}
	}

	v, msg := p.segment(vSeg, "value", !pm)
	if msg != "" {
		return Quantity{}, msg
	}
	var u unitsSeg
	if pm {
		if u, msg = p.segment(uSeg, "uncertainty", false); msg != "" {
			return Quantity{}, msg
		}
		u.u, u.hasU, u.uAsText = u.num.value, true, u.num.text
	}
	var outerDef *unitsDef
	if outer != "" {
		if v.unit != "" || u.unit != "" {
			return Quantity{}, fmt.Sprintf("unit given twice: inside the parentheses and %q after them", outer)
		}
		d, ok := unitsLookup(p.dim, outer)
		if !ok {
			return Quantity{}, unitsUnitMsg(p.dim, outer)
		}
		outerDef = d
	}

	q := Quantity{Dim: p.dim}
	vDef, uDef := def, def
	switch {
	case v.def != nil:
		vDef, q.Unit = v.def, v.unit
	case outerDef != nil:
		vDef, q.Unit = outerDef, outer
	case u.def != nil:
		vDef, q.Unit = u.def, u.unit
	}
	switch {
	case u.def != nil:
		uDef = u.def
	case v.def != nil:
		uDef = v.def
	case outerDef != nil:
		uDef = outerDef
	}
	if vDef == nil {
		return Quantity{}, unitsUnitMsg(p.dim, "")
	}

	q.Value = vDef.toBase(v.num.value)
	if math.IsInf(q.Value, 0) || math.IsNaN(q.Value) {
		return Quantity{}, fmt.Sprintf("%s is out of range", strings.TrimSpace(v.num.text+" "+vDef.name))
	}
	if p.dim == Temperature && q.Value < 0 {
		return Quantity{}, "below absolute zero (0 K = -273.15 °C = -459.67 °F)"
	}
	if v.hasU {
		u = v
	}
	if u.hasU {
		if u.u < 0 {
			return Quantity{}, fmt.Sprintf("negative uncertainty %s (a standard uncertainty is ≥ 0)", u.uAsText)
		}
		q.U, q.HasU = math.Abs(uDef.diffToBase(u.u)), true
		if math.IsInf(q.U, 0) || math.IsNaN(q.U) {
			return Quantity{}, fmt.Sprintf("uncertainty %s is out of range", u.uAsText)
		}
	}
	return q, ""
}

// segment reads "NUMBER [UNIT]", or with concise "NUMBER(DIGITS) [UNIT]".
// role ("value", "uncertainty") names the part in messages.
func (p *unitsParser) segment(seg, role string, concise bool) (unitsSeg, string) {
	seg = strings.TrimSpace(seg)
	if seg == "" {
		return unitsSeg{}, "missing " + role
	}
	wordEnd := strings.IndexFunc(seg, func(r rune) bool { return unicode.IsSpace(r) || r == '(' })
	if wordEnd < 0 {
		wordEnd = len(seg)
	}
	word := seg[:wordEnd]
	if word == "" {
		word = seg
	}
	n := unitsNumberLen(seg)
	if n == 0 {
		return unitsSeg{}, unitsNotNumber(word)
	}
	// What follows the number within the same word: a unit ("2.503g") or
	// the rest of a malformed number ("2x.1", "2.5e").
	attached := ""
	if n < wordEnd {
		attached = seg[n:wordEnd]
	}
	num, msg := unitsNumber(seg[:n])
	if msg != "" {
		if attached != "" && unitsNumberish(attached) {
			return unitsSeg{}, unitsNotNumber(word)
		}
		return unitsSeg{}, msg
	}
	out := unitsSeg{num: num}
	rest := strings.TrimSpace(seg[n:])
	if !concise && unitsConciseStart(rest) {
		return unitsSeg{}, "more than one uncertainty"
	}
	if concise && attached == "" && unitsConciseStart(rest) {
		end := strings.IndexByte(rest, ')')
		if end < 0 {
			return unitsSeg{}, `missing ")" after the uncertainty`
		}
		inner := strings.TrimSpace(rest[1:end])
		rest = rest[end+1:]
		// An exponent after the parentheses belongs to both: 1.2345(12)e-07.
		if m := unitsExpLen(rest); m > 0 {
			if num.hasExp {
				return unitsSeg{}, "exponent given twice"
			}
			withExp, msg := unitsNumber(num.text + rest[:m])
			if msg != "" {
				return unitsSeg{}, msg
			}
			num = withExp
			out.num = num
			rest = rest[m:]
		}
		out.hasU, out.uAsText = true, "("+inner+")"
		if unitsAllDigits(inner) {
			// The digits are in units of the value's last digit.
			u, err := strconv.ParseFloat(inner+"e"+strconv.Itoa(num.exp-num.decimals), 64)
			if err != nil && !errors.Is(err, strconv.ErrRange) {
				return unitsSeg{}, unitsNotNumber(inner)
			}
			out.u = u
		} else {
			if unitsNumberLen(inner) != len(inner) {
				return unitsSeg{}, fmt.Sprintf("%q is not an uncertainty (want digits, as in 17.584(17), or a number)", inner)
			}
			un, msg := unitsNumber(inner)
			if msg != "" {
				return unitsSeg{}, msg
			}
			out.u = un.value
		}
		rest = strings.TrimSpace(rest)
		if strings.HasPrefix(rest, "(") {
			return unitsSeg{}, "more than one uncertainty"
		}
	}
	if rest != "" {
		d, ok := unitsLookup(p.dim, rest)
		if !ok {
			if attached != "" && unitsNumberish(attached) {
				return unitsSeg{}, unitsNotNumber(word)
			}
			return unitsSeg{}, unitsUnitMsg(p.dim, rest)
		}
		out.unit, out.def = rest, d
	}
	return out, ""
}

// unitsSplitPM splits s at its "±" ("+-", "+/-").
func unitsSplitPM(s string) (l, r string, found, twice bool) {
	i, w := unitsFindPM(s)
	if i < 0 {
		return s, "", false, false
	}
	l, r = s[:i], s[i+w:]
	if j, _ := unitsFindPM(r); j >= 0 {
		return l, r, true, true
	}
	return l, r, true, false
}

func unitsFindPM(s string) (at, width int) {
	at = -1
	for _, pm := range []string{"±", "+/-", "+-"} {
		if i := strings.Index(s, pm); i >= 0 && (at < 0 || i < at) {
			at, width = i, len(pm)
		}
	}
	return at, width
}

// unitsNumberLen returns the length of the longest prefix of s that looks
// like a number: a sign, digits and decimal marks (at least one digit), an
// exponent. unitsNumber checks the decimal marks.
func unitsNumberLen(s string) int {
	i := unitsSignLen(s)
	digits := 0
	for ; i < len(s); i++ {
		c := s[i]
		if c >= '0' && c <= '9' {
			digits++
		} else if c != '.' && c != ',' {
			break
		}
	}
	if digits == 0 {
		return 0
	}
	return i + unitsExpLen(s[i:])
}

// unitsExpLen returns the length of an exponent ("e-3", "E+05", "e−7") at
// the start of s, or 0.
func unitsExpLen(s string) int {
	if s == "" || (s[0] != 'e' && s[0] != 'E') {
		return 0
	}
	i := 1 + unitsSignLen(s[1:])
	j := i
	for j < len(s) && s[j] >= '0' && s[j] <= '9' {
		j++
	}
	if j == i {
		return 0
	}
	return j
}

func unitsSignLen(s string) int {
	switch {
	case strings.HasPrefix(s, "+"), strings.HasPrefix(s, "-"):
		return 1
	case strings.HasPrefix(s, "−"): // U+2212 minus sign
		return len("−")
	}
	return 0
}

// unitsNumber converts text accepted by unitsNumberLen, enforcing the
// decimal-mark rules. msg is non-empty when text is not a number.
func unitsNumber(text string) (unitsNum, string) {
	t := text
	if strings.Contains(t, "−") {
		t = strings.ReplaceAll(t, "−", "-")
	}
	mant, exp := t, ""
	if i := strings.IndexAny(t, "eE"); i >= 0 {
		mant, exp = t[:i], t[i+1:]
	}
	points, commas := strings.Count(mant, "."), strings.Count(mant, ",")
	switch {
	case points > 0 && commas > 0:
		return unitsNum{}, fmt.Sprintf("ambiguous number %q: both a point and a comma (write one decimal mark and no digit grouping)", text)
	case commas > 1:
		return unitsNum{}, fmt.Sprintf("ambiguous number %q: several commas (write one decimal mark and no digit grouping)", text)
	case points > 1:
		return unitsNum{}, unitsNotNumber(text)
	}
	if commas == 1 {
		mant = strings.Replace(mant, ",", ".", 1)
	}
	num := unitsNum{text: text}
	if i := strings.IndexByte(mant, '.'); i >= 0 {
		num.decimals = len(mant) - i - 1
	}
	if exp != "" {
		e, err := strconv.Atoi(exp)
		if err != nil {
			return unitsNum{}, fmt.Sprintf("%q is out of range", text)
		}
		num.exp, num.hasExp = e, true
		mant += "e" + exp
	}
	v, err := strconv.ParseFloat(mant, 64)
	if err != nil {
		if !errors.Is(err, strconv.ErrRange) {
			return unitsNum{}, unitsNotNumber(text)
		}
		if math.IsInf(v, 0) {
			return unitsNum{}, fmt.Sprintf("%q is out of range", text)
		}
	}
	num.value = v
	return num, ""
}

// unitsNumberish tells whether the text after a number's digits looks like
// more of a malformed number ("x.1" in "2x.1", "e" in "2.5e") rather than a
// unit ("g", "kJ/mol").
func unitsNumberish(s string) bool {
	if strings.ContainsAny(s, ".,") {
		return true
	}
	switch s[0] {
	case 'e', 'E', '+', '-', '_', 'x', 'X', '0', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		return true
	}
	return false
}

func unitsNotNumber(word string) string {
	switch strings.ToLower(strings.TrimLeft(word, "+-")) {
	case "nan", "inf", "infinity":
		return fmt.Sprintf("%q is not a number (NaN and infinity are not accepted)", word)
	}
	return fmt.Sprintf("%q is not a number", word)
}

func unitsAllDigits(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] < '0' || s[i] > '9' {
			return false
		}
	}
	return s != ""
}

// unitsConciseStart tells whether rest starts with the parentheses of a
// concise uncertainty, "(17)" or "(0.017)", rather than a unit in
// parentheses, "(°C)".
func unitsConciseStart(rest string) bool {
	inner, ok := strings.CutPrefix(rest, "(")
	return ok && unitsNumberLen(strings.TrimSpace(inner)) > 0
}
