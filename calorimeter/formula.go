package calorimeter

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"
)

// FormulaError reports a chemical formula that cannot be read. Pos is the
// offset, counted in characters (runes) from 0, of the offending character
// in Formula, which is the formula with surrounding white space trimmed; it
// is −1 when the error concerns the formula as a whole.
type FormulaError struct {
	Formula string
	Pos     int
	Msg     string
}

func (e *FormulaError) Error() string {
	if e.Pos < 0 {
		return fmt.Sprintf("formula %q: %s", e.Formula, e.Msg)
	}
	return fmt.Sprintf("formula %q: %s at position %d", e.Formula, e.Msg, e.Pos)
}

// Composition maps element symbols to the number of atoms of each in one
// formula unit. Counts may be fractional (non-stoichiometric compounds,
// hemihydrates).
type Composition map[string]float64

// Limits that keep every accepted formula finite and printable.
const (
	formulaMaxTotal = 1e9  // largest count, and largest number of atoms of one element
	formulaMinTotal = 1e-6 // smallest number of atoms of one element
	formulaMaxDepth = 32   // deepest nesting of parentheses and brackets
)

// ParseFormula reads a chemical formula into its composition.
//
// The grammar, in the order a chemist writes it:
//
//	formula   = part { separator part }
//	part      = [count] sequence
//	sequence  = unit { unit }
//	unit      = ( symbol | "(" sequence ")" | "[" sequence "]" ) [count]
//	separator = "." | "·" | "•" | "⋅" | "*"   (hydrates and adducts)
//	count     = digits [ "." digits ]         (ASCII or subscript digits)
//
// so CuSO4·5H2O, CaCl2.2H2O, (NH4)2SO4, CO(NH2)2, K4[Fe(CN)6]·3H2O and
// CaSO4·0.5H2O all read as expected. Symbols are case-sensitive (Co is
// cobalt, CO carbon monoxide). White space is allowed only around a
// separator. A "." between digits is a decimal point when the digits before
// it are "0" or when the digits after it end the formula, a group or a part
// (H2.5), and a hydrate separator otherwise (CaCl2.2H2O is the dihydrate);
// write a fractional count of 1 or more inside a group, (Fe1.5)O, or use "·"
// for the hydrate to remove all doubt. Charges (Na+, SO4^2-), zero counts,
// counts with leading zeros, empty groups and unbalanced brackets are
// errors, and so are elements without a CIAAW standard atomic weight. Every
// error is a *FormulaError.
func ParseFormula(formula string) (Composition, error) {
	p := formulaParser{text: strings.TrimSpace(formula)}
	p.runes = []rune(p.text)
	c, err := p.parse()
	if err != nil {
		return nil, err
	}
	return c, nil
}

// MolarMass returns the molar mass of a formula in g/mol and its standard
// uncertainty, from the atomic weights of AtomicWeight (CIAAW 2021;
// conventional values for interval elements). The uncertainties of the
// atoms of one element are fully correlated and add linearly; different
// elements are independent and add in quadrature:
//
//	M    = Σ_E n_E·A_r(E)
//	u(M) = √( Σ_E (n_E·u(A_r(E)))² )
//
// Errors are those of ParseFormula.
func MolarMass(formula string) (m, u float64, err error) {
	c, err := ParseFormula(formula)
	if err != nil {
		return 0, 0, err
	}
	m, u = c.MolarMass()
	return m, u, nil
}

// MolarMass returns the molar mass in g/mol of the composition and its
// standard uncertainty, as the function MolarMass does. A symbol without
// an atomic weight (which ParseFormula never produces) makes both NaN.
func (c Composition) MolarMass() (m, u float64) {
	var u2 float64
	for _, s := range c.formulaOrder() {
		w, uw, ok := AtomicWeight(s)
		if !ok {
			return math.NaN(), math.NaN()
		}
		n := c[s]
		m += n * w
		u2 += (n * uw) * (n * uw)
	}
	return m, math.Sqrt(u2)
}

// String renders the composition in Hill order (C first, then H, then the
// other elements alphabetically; alphabetically throughout when there is
// no carbon), a form ParseFormula reads back to the same composition.
// A fractional count of 1 or more is put in parentheses, (C1.5)H3, so that
// its decimal point cannot be read as a hydrate separator.
func (c Composition) String() string {
	var b strings.Builder
	for _, s := range c.formulaOrder() {
		n := c[s]
		switch {
		case n == 1:
			b.WriteString(s)
		case n == math.Trunc(n) || n < 1:
			b.WriteString(s)
			b.WriteString(strconv.FormatFloat(n, 'f', -1, 64))
		default:
			b.WriteString("(" + s + strconv.FormatFloat(n, 'f', -1, 64) + ")")
		}
	}
	return b.String()
}

// formulaOrder returns the symbols of c in Hill order.
func (c Composition) formulaOrder() []string {
	syms := make([]string, 0, len(c))
	for s := range c {
		syms = append(syms, s)
	}
	_, hasC := c["C"]
	rank := func(s string) int {
		if hasC && s == "C" {
			return 0
		}
		if hasC && s == "H" {
			return 1
		}
		return 2
	}
	slices.SortFunc(syms, func(a, b string) int {
		if ra, rb := rank(a), rank(b); ra != rb {
			return ra - rb
		}
		return strings.Compare(a, b)
	})
	return syms
}

// formulaParser is a recursive-descent reader over the runes of a trimmed
// formula.
type formulaParser struct {
	text  string
	runes []rune
	pos   int
	depth int
}

// errorf builds a *FormulaError; rune arguments print as strings, so that
// %q quotes them as "x" rather than 'x'.
func (p *formulaParser) errorf(pos int, format string, args ...any) *FormulaError {
	for i, a := range args {
		if r, ok := a.(rune); ok {
			args[i] = string(r)
		}
	}
	return &FormulaError{Formula: p.text, Pos: pos, Msg: fmt.Sprintf(format, args...)}
}

func (p *formulaParser) peek() (rune, bool) {
	if p.pos >= len(p.runes) {
		return 0, false
	}
	return p.runes[p.pos], true
}

func formulaIsSeparator(r rune) bool {
	switch r {
	case '.', '·', '•', '⋅', '*':
		return true
	}
	return false
}

func formulaIsSpace(r rune) bool {
	return r == ' ' || r == '\t'
}

// formulaDigit returns the value of an ASCII or subscript digit and which
// of the two kinds it is.
func formulaDigit(r rune) (d int, sub, ok bool) {
	switch {
	case r >= '0' && r <= '9':
		return int(r - '0'), false, true
	case r >= '₀' && r <= '₉':
		return int(r - '₀'), true, true
	}
	return 0, false, false
}

func formulaIsCharge(r rune) bool {
	switch r {
	case '+', '-', '^', '−', '⁺', '⁻', '±':
		return true
	}
	return false
}

func (p *formulaParser) parse() (Composition, error) {
	if p.text == "" {
		return nil, p.errorf(-1, "is empty")
	}
	total := Composition{}
	for {
		part, err := p.part()
		if err != nil {
			return nil, err
		}
		for s, n := range part {
			total[s] += n
		}
		spaceAt := p.pos
		p.skipSpace()
		r, ok := p.peek()
		if !ok {
			break
		}
		if !formulaIsSeparator(r) {
			if p.pos > spaceAt {
				p.pos = spaceAt
			}
			return nil, p.unexpected()
		}
		sepAt := p.pos
		p.pos++
		p.skipSpace()
		if _, ok := p.peek(); !ok {
			return nil, p.errorf(sepAt, "nothing follows %q", r)
		}
	}
	for _, s := range total.formulaOrder() {
		if n := total[s]; n > formulaMaxTotal || n < formulaMinTotal {
			return nil, p.errorf(-1, "%s count %g is outside %g to %g",
				s, n, formulaMinTotal, formulaMaxTotal)
		}
	}
	return total, nil
}

func (p *formulaParser) skipSpace() {
	for p.pos < len(p.runes) && formulaIsSpace(p.runes[p.pos]) {
		p.pos++
	}
}

// part reads an optional leading count and a sequence.
func (p *formulaParser) part() (Composition, error) {
	start := p.pos
	mult := 1.0
	if r, ok := p.peek(); ok {
		if _, _, isDigit := formulaDigit(r); isDigit {
			n, err := p.count()
			if err != nil {
				return nil, err
			}
			mult = n
		}
	}
	r, ok := p.peek()
	if !ok || formulaIsSeparator(r) || formulaIsSpace(r) {
		if p.pos > start {
			return nil, p.errorf(start, "count %s is not followed by a formula",
				string(p.runes[start:p.pos]))
		}
		if !ok {
			return nil, p.unexpected()
		}
		return nil, p.errorf(start, "nothing before %q", r)
	}
	seq, err := p.sequence(0)
	if err != nil {
		return nil, err
	}
	if mult != 1 {
		for s := range seq {
			seq[s] *= mult
		}
	}
	return seq, nil
}

// sequence reads units until the end, a separator or white space, and
// inside a group (close is the bracket that ends it, 0 at the top level)
// until any closing bracket.
func (p *formulaParser) sequence(close rune) (Composition, error) {
	c := Composition{}
	start := p.pos
	for {
		r, ok := p.peek()
		if !ok || formulaIsSeparator(r) || formulaIsSpace(r) || (close != 0 && (r == ')' || r == ']')) {
			break
		}
		if err := p.unit(c); err != nil {
			return nil, err
		}
	}
	if p.pos == start {
		return nil, p.unexpected()
	}
	return c, nil
}

// unit reads an element symbol or a bracketed group, then an optional
// count, and adds the atoms to dst.
func (p *formulaParser) unit(dst Composition) error {
	r, _ := p.peek()
	var (
		group Composition // the group's atoms, or nil for a single symbol
		sym   string
	)
	switch {
	case r == '(' || r == '[':
		open := p.pos
		closer := ')'
		if r == '[' {
			closer = ']'
		}
		p.depth++
		if p.depth > formulaMaxDepth {
			return p.errorf(open, "brackets nested deeper than %d", formulaMaxDepth)
		}
		p.pos++
		q, ok := p.peek()
		if !ok {
			return p.errorf(open, "%q is never closed", r)
		}
		if q == closer {
			return p.errorf(open, "empty group %q", string(r)+string(closer))
		}
		inner, err := p.sequence(closer)
		if err != nil {
			return err
		}
		q, ok = p.peek()
		switch {
		case !ok:
			return p.errorf(open, "%q is never closed", r)
		case q == ')' || q == ']':
			if q != closer {
				return p.errorf(p.pos, "%q does not close %q opened at position %d", q, r, open)
			}
		case formulaIsSeparator(q):
			return p.errorf(p.pos, "hydrate separator %q inside brackets (write it between whole parts)", q)
		default:
			return p.unexpected()
		}
		p.pos++
		p.depth--
		group = inner
	case r >= 'A' && r <= 'Z':
		start := p.pos
		p.pos++
		for p.pos < len(p.runes) && p.runes[p.pos] >= 'a' && p.runes[p.pos] <= 'z' {
			p.pos++
		}
		sym = string(p.runes[start:p.pos])
		if _, ok := formulaBySymbol[sym]; !ok {
			if formulaNoWeightBy[sym] {
				return p.errorf(start, "element %q has no standard atomic weight", sym)
			}
			return p.errorf(start, "unknown element %q", sym)
		}
	default:
		return p.unexpected()
	}
	n := 1.0
	if q, ok := p.peek(); ok {
		if _, _, isDigit := formulaDigit(q); isDigit {
			var err error
			if n, err = p.count(); err != nil {
				return err
			}
		}
	}
	if group == nil {
		dst[sym] += n
		return nil
	}
	for s, k := range group {
		dst[s] += k * n
	}
	return nil
}

// count reads digits with an optional decimal fraction, by the rule for
// "." given in ParseFormula.
func (p *formulaParser) count() (float64, error) {
	start := p.pos
	intPart, sub := p.digits()
	end := p.pos
	if !sub && p.pos+1 < len(p.runes) && p.runes[p.pos] == '.' {
		if _, s, ok := formulaDigit(p.runes[p.pos+1]); ok && !s {
			save := p.pos
			p.pos++
			p.digits()
			decimal := intPart == "0"
			if !decimal {
				r, ok := p.peek()
				decimal = !ok || r == ')' || r == ']' || (formulaIsSeparator(r) && r != '.') || formulaIsSpace(r)
			}
			if decimal {
				end = p.pos
			} else {
				p.pos = save
			}
		}
	}
	text := string(p.runes[start:end])
	if sub {
		text = intPart // subscript counts have no decimal part
	}
	if len(intPart) > 1 && intPart[0] == '0' {
		return 0, p.errorf(start, "count %s has a leading zero", text)
	}
	n, err := strconv.ParseFloat(text, 64)
	if err != nil {
		return 0, p.errorf(start, "count %s is not a number", text)
	}
	if n == 0 {
		return 0, p.errorf(start, "count %s is zero", text)
	}
	if n > formulaMaxTotal {
		return 0, p.errorf(start, "count %s is larger than %g", text, formulaMaxTotal)
	}
	return n, nil
}

// digits consumes a run of digits of one kind (ASCII or subscript) and
// returns it in ASCII.
func (p *formulaParser) digits() (ascii string, sub bool) {
	var b strings.Builder
	first := true
	for p.pos < len(p.runes) {
		d, s, ok := formulaDigit(p.runes[p.pos])
		if !ok || (!first && s != sub) {
			break
		}
		sub = s
		first = false
		b.WriteByte(byte('0' + d))
		p.pos++
	}
	return b.String(), sub
}

// unexpected describes the character at the current position.
func (p *formulaParser) unexpected() *FormulaError {
	r, ok := p.peek()
	switch {
	case !ok:
		return p.errorf(p.pos, "formula ends too early")
	case formulaIsCharge(r):
		return p.errorf(p.pos, "charges are not supported (%q): give the neutral compound, e.g. NaCl", r)
	case r >= 'a' && r <= 'z':
		return p.errorf(p.pos, "unexpected %q (element symbols start with a capital letter)", r)
	case r == ')' || r == ']':
		return p.errorf(p.pos, "%q without a matching opening bracket", r)
	case formulaIsSpace(r):
		return p.errorf(p.pos, "unexpected space (spaces are allowed only around a hydrate separator)")
	case r == utf8.RuneError:
		return p.errorf(p.pos, "invalid UTF-8")
	}
	return p.errorf(p.pos, "unexpected %q", r)
}
