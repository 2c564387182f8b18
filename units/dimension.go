package units

import (
	"fmt"
	"sort"
	"strconv"
	"strings"
	"unicode"
)

// Dimension is the kind of a quantity. Each dimension has a base unit in
// which Quantity.Value and Quantity.U are stored.
type Dimension int

// The dimensions, with their base units and the units Parse accepts.
const (
	Mass                  Dimension = iota // base g; mg, g, kg
	Temperature                            // absolute, base K; K, °C, °F
	TemperatureDifference                  // base K; K, mK, °C (same size as K), °F (5/9 K)
	Time                                   // base s; ms, s, min, h
	Energy                                 // base J; J, kJ, cal (thermochemical, 4.184 J), kcal
	Power                                  // base W; mW, W
	HeatCapacity                           // base J/K; J/K, kJ/K
	SpecificHeat                           // base J/(g·K); J/(g·K), J/(kg·K), kJ/(kg·K)
	MolarEnthalpy                          // base J/mol; J/mol, kJ/mol, cal/mol, kcal/mol
	MolarMass                              // base g/mol; g/mol, kg/mol
	Voltage                                // base V; mV, V
	Current                                // base A; mA, A
	Volume                                 // base mL; µL, mL, L
	Molality                               // base mol/kg; mol/kg, mmol/kg
	Amount                                 // base mol; mmol, mol
	Dimensionless                          // plain number; "" or %
	unitsDimensions                        // the number of dimensions
)

var unitsDimNames = [unitsDimensions]string{
	Mass:                  "mass",
	Temperature:           "temperature",
	TemperatureDifference: "temperature difference",
	Time:                  "time",
	Energy:                "energy",
	Power:                 "power",
	HeatCapacity:          "heat capacity",
	SpecificHeat:          "specific heat capacity",
	MolarEnthalpy:         "molar enthalpy",
	MolarMass:             "molar mass",
	Voltage:               "voltage",
	Current:               "current",
	Volume:                "volume",
	Molality:              "molality",
	Amount:                "amount of substance",
	Dimensionless:         "dimensionless",
}

// String returns the name of the dimension in lower case: "mass",
// "temperature", "temperature difference", …
func (d Dimension) String() string {
	if !d.valid() {
		return "Dimension(" + strconv.Itoa(int(d)) + ")"
	}
	return unitsDimNames[d]
}

// BaseUnit returns the unit in which values of dimension d are stored:
// "g", "K", "s", "J", "W", "J/K", "J/(g·K)", "J/mol", "g/mol", "V", "A",
// "mL", "mol/kg", "mol", and "" for Dimensionless. It returns "" for an
// invalid dimension.
func (d Dimension) BaseUnit() string {
	if !d.valid() {
		return ""
	}
	for _, u := range unitsTable[d] {
		if u.mul == 1 && u.div == 1 && u.shift == 0 {
			return u.name
		}
	}
	panic("units: no base unit for " + d.String()) // the table below has one for each
}

// Units returns the canonical spellings of the units of dimension d, in the
// order error messages list them ("" stands for a plain number). Parse accepts other spellings of the
// same units too (see the package documentation).
func (d Dimension) Units() []string {
	if !d.valid() {
		return nil
	}
	names := make([]string, len(unitsTable[d]))
	for i, u := range unitsTable[d] {
		names[i] = u.name
	}
	return names
}

func (d Dimension) valid() bool { return d >= 0 && d < unitsDimensions }

// unitsDef is one unit of a dimension. A value v in this unit is, in the
// base unit,
//
//	base = (v + shift)·mul/div
//
// and a difference (an uncertainty, a temperature interval) is Δv·mul/div.
// Only absolute temperatures have a shift.
type unitsDef struct {
	name     string // canonical spelling
	mul, div float64
	shift    float64
}

func (u *unitsDef) toBase(v float64) float64   { return (v + u.shift) * u.mul / u.div }
func (u *unitsDef) fromBase(v float64) float64 { return v*u.div/u.mul - u.shift }
func (u *unitsDef) diffToBase(v float64) float64 {
	return v * u.mul / u.div
}
func (u *unitsDef) diffFromBase(v float64) float64 {
	return v * u.div / u.mul
}

// The factors, exact by definition:
//   - t/°C = T/K − 273.15 (SI Brochure, 9th ed. 2019, 2.3.1);
//   - T/K = (t/°F + 459.67)/1.8, and an interval of 1 °F is 5/9 K
//     (NIST SP 811, 2008 ed., B.8 and B.9);
//   - 1 cal (thermochemical) = 4.184 J exactly (NIST SP 811, 2008 ed., B.8);
//   - min = 60 s, h = 3600 s, L = 1000 mL, the SI prefixes m, k, µ.
//
// The first unit of a row with mul = div = 1 and no shift is the base unit.
var unitsTable = [unitsDimensions][]unitsDef{
	Mass:                  {{"mg", 1, 1000, 0}, {"g", 1, 1, 0}, {"kg", 1000, 1, 0}},
	Temperature:           {{"K", 1, 1, 0}, {"°C", 1, 1, 273.15}, {"°F", 5, 9, 459.67}},
	TemperatureDifference: {{"mK", 1, 1000, 0}, {"K", 1, 1, 0}, {"°C", 1, 1, 0}, {"°F", 5, 9, 0}},
	Time:                  {{"ms", 1, 1000, 0}, {"s", 1, 1, 0}, {"min", 60, 1, 0}, {"h", 3600, 1, 0}},
	Energy:                {{"J", 1, 1, 0}, {"cal", 4.184, 1, 0}, {"kJ", 1000, 1, 0}, {"kcal", 4184, 1, 0}},
	Power:                 {{"mW", 1, 1000, 0}, {"W", 1, 1, 0}},
	HeatCapacity:          {{"J/K", 1, 1, 0}, {"kJ/K", 1000, 1, 0}},
	SpecificHeat:          {{"J/(kg·K)", 1, 1000, 0}, {"J/(g·K)", 1, 1, 0}, {"kJ/(kg·K)", 1000, 1000, 0}},
	MolarEnthalpy:         {{"J/mol", 1, 1, 0}, {"cal/mol", 4.184, 1, 0}, {"kJ/mol", 1000, 1, 0}, {"kcal/mol", 4184, 1, 0}},
	MolarMass:             {{"g/mol", 1, 1, 0}, {"kg/mol", 1000, 1, 0}},
	Voltage:               {{"mV", 1, 1000, 0}, {"V", 1, 1, 0}},
	Current:               {{"mA", 1, 1000, 0}, {"A", 1, 1, 0}},
	Volume:                {{"µL", 1, 1000, 0}, {"mL", 1, 1, 0}, {"L", 1000, 1, 0}},
	Molality:              {{"mmol/kg", 1, 1000, 0}, {"mol/kg", 1, 1, 0}},
	Amount:                {{"mmol", 1, 1000, 0}, {"mol", 1, 1, 0}},
	Dimensionless:         {{"", 1, 1, 0}, {"%", 1, 100, 0}},
}

// unitsSymbolAlias maps other spellings of a unit symbol to the one in
// unitsTable. "C" and "F" mean degrees Celsius and Fahrenheit here: no
// dimension of this package has coulombs or farads.
var unitsSymbolAlias = map[string]string{
	"C": "°C", "degC": "°C", "ºC": "°C", "˚C": "°C", "℃": "°C",
	"F": "°F", "degF": "°F", "ºF": "°F", "˚F": "°F", "℉": "°F",
	"uL": "µL", "μL": "µL", // u, and Greek mu U+03BC, for the micro sign U+00B5
}

// unitsIndex maps the key of each unit (see unitsKey) to its definition.
var unitsIndex = func() [unitsDimensions]map[string]*unitsDef {
	var idx [unitsDimensions]map[string]*unitsDef
	for d := range unitsTable {
		idx[d] = map[string]*unitsDef{}
		for i := range unitsTable[d] {
			u := &unitsTable[d][i]
			key, ok := unitsKey(u.name)
			if !ok {
				panic("units: bad unit in table: " + u.name)
			}
			idx[d][key] = u
		}
	}
	return idx
}()

// unitsLookup finds the unit of dim spelled text.
func unitsLookup(dim Dimension, text string) (*unitsDef, bool) {
	if !dim.valid() {
		return nil, false
	}
	for i := range unitsTable[dim] { // the canonical spellings, without parsing
		if unitsTable[dim][i].name == text {
			return &unitsTable[dim][i], true
		}
	}
	key, ok := unitsKey(text)
	if !ok {
		return nil, false
	}
	u, ok := unitsIndex[dim][key]
	return u, ok
}

// unitsUnitMsg explains why text is not a unit of dim, and lists the units
// that are.
func unitsUnitMsg(dim Dimension, text string) string {
	use := unitsUseList(dim)
	if text == "" {
		return fmt.Sprintf("missing %s unit (%s)", dim, use)
	}
	for d := Dimension(0); d < unitsDimensions; d++ {
		if d == dim {
			continue
		}
		if _, ok := unitsLookup(d, text); ok {
			return fmt.Sprintf("%q is %s %s unit, not %s %s unit (%s)", text, unitsArticle(d), d, unitsArticle(dim), dim, use)
		}
	}
	if key, ok := unitsKey(text); ok {
		for i := range unitsTable[dim] {
			u := &unitsTable[dim][i]
			k, _ := unitsKey(u.name)
			if u.name != "" && strings.EqualFold(k, key) {
				return fmt.Sprintf("unknown %s unit %q (did you mean %s? units are case-sensitive)", dim, text, u.name)
			}
		}
	}
	return fmt.Sprintf("unknown %s unit %q (%s)", dim, text, use)
}

// unitsUseList gives "use mg, g or kg"; every dimension has two units or more.
func unitsUseList(dim Dimension) string {
	names := dim.Units()
	for i, n := range names {
		if n == "" {
			names[i] = "a plain number"
		}
	}
	return "use " + strings.Join(names[:len(names)-1], ", ") + " or " + names[len(names)-1]
}

func unitsArticle(d Dimension) string {
	if strings.ContainsRune("aeiou", rune(d.String()[0])) {
		return "an"
	}
	return "a"
}

// CanonicalUnit returns the canonical spelling of unit as a unit of dim
// ("degC" → "°C", "J K-1" → "J/K", "uL" → "µL"). The error is a
// *ParseError.
func CanonicalUnit(dim Dimension, unit string) (string, error) {
	u, err := unitsFind(dim, unit)
	if err != nil {
		return "", err
	}
	return u.name, nil
}

func unitsFind(dim Dimension, unit string) (*unitsDef, error) {
	if !dim.valid() {
		return nil, fmt.Errorf("units: invalid dimension %d", int(dim))
	}
	u, ok := unitsLookup(dim, strings.TrimSpace(unit))
	if !ok {
		return nil, &ParseError{Dim: dim, Msg: unitsUnitMsg(dim, strings.TrimSpace(unit))}
	}
	return u, nil
}

// ToUnit converts value, in the base unit of dim, to unit. Absolute
// temperatures get the offset (298.15 K → 25 °C); differences don't
// (TemperatureDifference 1 K → 1 °C, 1.8 °F). An unknown unit gives a
// *ParseError.
func ToUnit(value float64, dim Dimension, unit string) (float64, error) {
	u, err := unitsFind(dim, unit)
	if err != nil {
		return 0, err
	}
	return u.fromBase(value), nil
}

// FromUnit converts value, in unit, to the base unit of dim: the inverse of
// ToUnit.
func FromUnit(value float64, dim Dimension, unit string) (float64, error) {
	u, err := unitsFind(dim, unit)
	if err != nil {
		return 0, err
	}
	return u.toBase(value), nil
}

// unitsKey reduces a spelling of a unit to a key: its symbols with their
// exponents, sorted, so that "J/(g·K)", "J/(g K)", "J/g/K", "J g-1 K-1" and
// "J·g⁻¹·K⁻¹" all give "J^1 K^-1 g^-1". The empty text gives "". ok is false
// when text is not a unit expression.
//
// The grammar, with division binding one factor as ISO 80000-1 reads
// "J/g/K" = J·g⁻¹·K⁻¹:
//
//	product  = factor { [ "/" | "·" | "⋅" | "*" | "." ] factor }
//	factor   = ( symbol | "(" product ")" ) [ exponent ]
//	exponent = [ "^" ] [ "-" | "−" | "⁻" | "+" | "⁺" ] digit { digit }
func unitsKey(text string) (string, bool) {
	e := unitsExpr{r: []rune(text)}
	e.skipSpace()
	if e.i == len(e.r) {
		return "", true
	}
	pow, ok := e.product(0)
	if !ok || e.i != len(e.r) {
		return "", false
	}
	parts := make([]string, 0, len(pow))
	for sym, n := range pow {
		if n != 0 {
			parts = append(parts, sym+"^"+strconv.Itoa(n))
		}
	}
	sort.Strings(parts)
	return strings.Join(parts, " "), true
}

type unitsExpr struct {
	r []rune
	i int
}

func (e *unitsExpr) skipSpace() {
	for e.i < len(e.r) && unicode.IsSpace(e.r[e.i]) {
		e.i++
	}
}

func (e *unitsExpr) product(depth int) (map[string]int, bool) {
	pow, ok := e.factor(depth)
	if !ok {
		return nil, false
	}
	for {
		e.skipSpace()
		if e.i == len(e.r) || e.r[e.i] == ')' {
			return pow, true
		}
		sign := 1
		switch e.r[e.i] {
		case '/':
			sign = -1
			e.i++
		case '·', '⋅', '*', '.':
			e.i++
		}
		f, ok := e.factor(depth)
		if !ok {
			return nil, false
		}
		for sym, n := range f {
			pow[sym] += sign * n
		}
	}
}

func (e *unitsExpr) factor(depth int) (map[string]int, bool) {
	e.skipSpace()
	if e.i == len(e.r) {
		return nil, false
	}
	var pow map[string]int
	if e.r[e.i] == '(' {
		if depth >= 4 {
			return nil, false
		}
		e.i++
		p, ok := e.product(depth + 1)
		if !ok || e.i == len(e.r) || e.r[e.i] != ')' {
			return nil, false
		}
		e.i++
		pow = p
	} else {
		start := e.i
		for e.i < len(e.r) && unitsSymbolRune(e.r[e.i]) {
			e.i++
		}
		if e.i == start {
			return nil, false
		}
		sym := string(e.r[start:e.i])
		if a, ok := unitsSymbolAlias[sym]; ok {
			sym = a
		}
		pow = map[string]int{sym: 1}
	}
	n, ok := e.exponent()
	if !ok {
		return nil, false
	}
	for sym := range pow {
		pow[sym] *= n
	}
	return pow, true
}

// exponent reads an optional exponent after a factor; 1 when there is none.
func (e *unitsExpr) exponent() (int, bool) {
	i := e.i
	marked := false
	if i < len(e.r) && e.r[i] == '^' {
		marked = true
		i++
	}
	neg := false
	if i < len(e.r) {
		switch e.r[i] {
		case '-', '−', '⁻':
			neg, marked = true, true
			i++
		case '+', '⁺':
			marked = true
			i++
		}
	}
	n, digits := 0, 0
	for i < len(e.r) {
		d := unitsDigit(e.r[i])
		if d < 0 {
			break
		}
		n = 10*n + d
		digits++
		i++
		if digits > 2 {
			return 0, false
		}
	}
	if digits == 0 {
		if marked {
			return 0, false
		}
		return 1, true
	}
	e.i = i
	if neg {
		n = -n
	}
	return n, true
}

func unitsSymbolRune(r rune) bool {
	return unicode.IsLetter(r) || strings.ContainsRune("°˚℃℉%", r)
}

// unitsDigit returns the value of an ASCII or superscript digit, or -1.
func unitsDigit(r rune) int {
	switch {
	case r >= '0' && r <= '9':
		return int(r - '0')
	case r == '¹':
		return 1
	case r == '²':
		return 2
	case r == '³':
		return 3
	case r >= '⁰' && r <= '⁹' && r != 'ⁱ' && r != '⁲' && r != '⁳':
		return int(r - '⁰')
	}
	return -1
}
