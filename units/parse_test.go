package units

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// near reports whether got equals want within 1e-12, absolute or relative:
// the conversions are a multiplication and a division, exact to a few ulp.
func near(got, want float64) bool {
	return math.Abs(got-want) <= 1e-12*math.Max(1, math.Abs(want))
}

// TestParseUnits reads one value in every unit of every dimension. The
// factors are definitions: the SI prefixes; min = 60 s and h = 3600 s; L =
// 1000 mL; T/K = t/°C + 273.15 (SI Brochure, 9th ed., 2.3.1); T/K = (t/°F +
// 459.67)/1.8 and 1 °F = 5/9 K (NIST SP 811, 2008, B.9); 1 cal = 4.184 J
// (NIST SP 811, 2008, B.8).
func TestParseUnits(t *testing.T) {
	tests := []struct {
		name     string
		dim      Dimension
		text     string
		want     float64 // in the base unit
		wantUnit string
	}{
		{"mg", Mass, "2503 mg", 2.503, "mg"},
		{"g", Mass, "2.503 g", 2.503, "g"},
		{"g attached", Mass, "2.503g", 2.503, "g"},
		{"kg", Mass, "0.002503 kg", 2.503, "kg"},

		{"K", Temperature, "298.15 K", 298.15, "K"},
		{"K attached", Temperature, "298.15K", 298.15, "K"},
		{"zero kelvin", Temperature, "0 K", 0, "K"},
		{"°C", Temperature, "25 °C", 298.15, "°C"},
		{"ºC ordinal sign", Temperature, "25 ºC", 298.15, "ºC"},
		{"˚C ring above", Temperature, "25˚C", 298.15, "˚C"},
		{"℃ one sign", Temperature, "25℃", 298.15, "℃"},
		{"degC", Temperature, "25 degC", 298.15, "degC"},
		{"C", Temperature, "25.0C", 298.15, "C"},
		{"C spaced", Temperature, "25.0 C", 298.15, "C"},
		{"minus sign U+2212", Temperature, "−5 °C", 268.15, "°C"},
		{"°C below zero", Temperature, "-40 °C", 233.15, "°C"},
		{"°F", Temperature, "77 °F", 298.15, "°F"},
		{"F", Temperature, "77F", 298.15, "F"},
		{"degF", Temperature, "77 degF", 298.15, "degF"},
		{"-40 °F is -40 °C", Temperature, "-40 °F", 233.15, "°F"},
		{"absolute zero in °F", Temperature, "-459.67 °F", 0, "°F"},

		{"difference K", TemperatureDifference, "1.5 K", 1.5, "K"},
		{"difference mK", TemperatureDifference, "250 mK", 0.25, "mK"},
		{"difference °C", TemperatureDifference, "1.5 °C", 1.5, "°C"},
		{"difference C", TemperatureDifference, "1.5C", 1.5, "C"},
		{"difference °F", TemperatureDifference, "1.8 °F", 1, "°F"},
		{"negative difference", TemperatureDifference, "-0.5 K", -0.5, "K"},

		{"ms", Time, "1500 ms", 1.5, "ms"},
		{"s", Time, "300s", 300, "s"},
		{"min", Time, "5min", 300, "min"},
		{"h", Time, "0.5 h", 1800, "h"},

		{"J", Energy, "12.5 J", 12.5, "J"},
		{"kJ", Energy, "1.25 kJ", 1250, "kJ"},
		{"cal", Energy, "1 cal", 4.184, "cal"},
		{"kcal", Energy, "1 kcal", 4184, "kcal"},

		{"mW", Power, "500 mW", 0.5, "mW"},
		{"W", Power, "1.000W", 1, "W"},

		{"J/K", HeatCapacity, "452J/K", 452, "J/K"},
		{"J K-1", HeatCapacity, "452 J K-1", 452, "J K-1"},
		{"J·K⁻¹", HeatCapacity, "452 J·K⁻¹", 452, "J·K⁻¹"},
		{"J K^-1", HeatCapacity, "452 J K^-1", 452, "J K^-1"},
		{"J⋅K−1", HeatCapacity, "452 J⋅K−1", 452, "J⋅K−1"},
		{"J / K spaced", HeatCapacity, "452 J / K", 452, "J / K"},
		{"kJ/K", HeatCapacity, "0.452 kJ/K", 452, "kJ/K"},
		{"kJ K-1", HeatCapacity, "0.452 kJ K-1", 452, "kJ K-1"},

		{"J/(g·K)", SpecificHeat, "4.184 J/(g·K)", 4.184, "J/(g·K)"},
		{"J/(g K)", SpecificHeat, "4.184 J/(g K)", 4.184, "J/(g K)"},
		{"J/g/K", SpecificHeat, "4.184 J/g/K", 4.184, "J/g/K"},
		{"J g-1 K-1", SpecificHeat, "4.184 J g-1 K-1", 4.184, "J g-1 K-1"},
		{"J·g⁻¹·K⁻¹", SpecificHeat, "4.184 J·g⁻¹·K⁻¹", 4.184, "J·g⁻¹·K⁻¹"},
		{"J/(kg·K)", SpecificHeat, "4184 J/(kg·K)", 4.184, "J/(kg·K)"},
		{"J/(kg K)", SpecificHeat, "4184 J/(kg K)", 4.184, "J/(kg K)"},
		{"kJ/(kg·K)", SpecificHeat, "4.184 kJ/(kg·K)", 4.184, "kJ/(kg·K)"},
		{"kJ kg-1 K-1", SpecificHeat, "4.184 kJ kg-1 K-1", 4.184, "kJ kg-1 K-1"},

		{"J/mol", MolarEnthalpy, "17584 J/mol", 17584, "J/mol"},
		{"kJ/mol", MolarEnthalpy, "17.584kJ/mol", 17584, "kJ/mol"},
		{"kJ mol-1", MolarEnthalpy, "17.584 kJ mol-1", 17584, "kJ mol-1"},
		{"cal/mol", MolarEnthalpy, "1000 cal/mol", 4184, "cal/mol"},
		{"kcal/mol", MolarEnthalpy, "1 kcal/mol", 4184, "kcal/mol"},

		{"g/mol", MolarMass, "74.551 g/mol", 74.551, "g/mol"},
		{"g mol-1", MolarMass, "74.551 g mol-1", 74.551, "g mol-1"},
		{"kg/mol", MolarMass, "0.074551 kg/mol", 74.551, "kg/mol"},

		{"mV", Voltage, "500 mV", 0.5, "mV"},
		{"V", Voltage, "12 V", 12, "V"},
		{"mA", Current, "250 mA", 0.25, "mA"},
		{"A", Current, "1.5A", 1.5, "A"},

		{"µL micro sign", Volume, "250 µL", 0.25, "µL"},
		{"μL Greek mu", Volume, "250 μL", 0.25, "μL"},
		{"uL", Volume, "250 uL", 0.25, "uL"},
		{"mL", Volume, "100 mL", 100, "mL"},
		{"L", Volume, "0.1 L", 100, "L"},

		{"mol/kg", Molality, "0.1 mol/kg", 0.1, "mol/kg"},
		{"mol kg-1", Molality, "0.1 mol kg-1", 0.1, "mol kg-1"},
		{"mmol/kg", Molality, "100 mmol/kg", 0.1, "mmol/kg"},
		{"mmol", Amount, "25 mmol", 0.025, "mmol"},
		{"mol", Amount, "0.025 mol", 0.025, "mol"},

		{"plain number", Dimensionless, "0.5", 0.5, ""},
		{"percent", Dimensionless, "50 %", 0.5, "%"},
		{"percent attached", Dimensionless, "50%", 0.5, "%"},

		{"decimal comma", Mass, "2,503 g", 2.503, "g"},
		{"decimal comma attached", Mass, "2,503g", 2.503, "g"},
		{"leading decimal mark", Mass, ".5 g", 0.5, "g"},
		{"exponent", Mass, "2.503e3 mg", 2.503, "mg"},
		{"exponent with minus sign", Mass, "2.503e−3 kg", 2.503, "kg"},
		{"plus sign", Mass, "+2.503 g", 2.503, "g"},
		{"surrounding space", Mass, "  2.503 g\t", 2.503, "g"},
		{"no-break space", Mass, "2.503\u00a0g", 2.503, "g"},
		{"unit in parentheses", Temperature, "25 (°C)", 298.15, "(°C)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			q, err := Parse(tc.text, tc.dim, tc.dim.BaseUnit())
			if err != nil {
				t.Fatalf("Parse(%q, %v): %v", tc.text, tc.dim, err)
			}
			if !near(q.Value, tc.want) {
				t.Errorf("Parse(%q, %v).Value = %.17g %s, want %.17g", tc.text, tc.dim, q.Value, tc.dim.BaseUnit(), tc.want)
			}
			if q.HasU || q.U != 0 {
				t.Errorf("Parse(%q): HasU = %v, U = %g, want no uncertainty", tc.text, q.HasU, q.U)
			}
			if q.Dim != tc.dim || q.Unit != tc.wantUnit {
				t.Errorf("Parse(%q): Dim %v, Unit %q; want %v, %q", tc.text, q.Dim, q.Unit, tc.dim, tc.wantUnit)
			}
		})
	}
}

// TestParseDefaultUnit: a bare number takes the default unit, and Unit stays
// "" to say so.
func TestParseDefaultUnit(t *testing.T) {
	tests := []struct {
		name        string
		text        string
		dim         Dimension
		defaultUnit string
		want        float64
	}{
		{"grams", "2.503", Mass, "g", 2.503},
		{"milligrams", "2503", Mass, "mg", 2.503},
		{"celsius", "25", Temperature, "°C", 298.15},     // SI Brochure 2.3.1
		{"celsius as C", "25", Temperature, "C", 298.15}, // SI Brochure 2.3.1
		{"minutes", "5", Time, "min", 300},
		{"kJ/mol", "17.584", MolarEnthalpy, "kJ/mol", 17584},
		{"percent", "50", Dimensionless, "%", 0.5},
		{"plain", "0.5", Dimensionless, "", 0.5},
		{"written unit wins", "2503 mg", Mass, "kg", 2.503},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			q, err := Parse(tc.text, tc.dim, tc.defaultUnit)
			if err != nil {
				t.Fatal(err)
			}
			if !near(q.Value, tc.want) {
				t.Errorf("Parse(%q, %v, %q) = %.17g, want %.17g", tc.text, tc.dim, tc.defaultUnit, q.Value, tc.want)
			}
			if wantUnit := strings.TrimLeft(tc.text, "0123456789. "); q.Unit != wantUnit {
				t.Errorf("Unit = %q, want %q", q.Unit, wantUnit)
			}
		})
	}
}

// TestParseUncertainty covers every notation of an uncertainty. The GUM
// cases are the four ways JCGM 100:2008, 7.2.2 writes m_S = 100.02147 g
// with u_c = 0.35 mg; the others follow from the definitions of the units.
func TestParseUncertainty(t *testing.T) {
	tests := []struct {
		name     string
		text     string
		dim      Dimension
		def      string
		value, u float64 // in the base unit
		unit     string
	}{
		{"±", "452±0.8 J/K", HeatCapacity, "J/K", 452, 0.8, "J/K"},
		{"+-", "452+-0.8J/K", HeatCapacity, "J/K", 452, 0.8, "J/K"},
		{"+/-", "452 +/- 0.8 J/K", HeatCapacity, "J/K", 452, 0.8, "J/K"},
		{"± spaced", "452 ± 0.8 J/K", HeatCapacity, "J/K", 452, 0.8, "J/K"},
		{"parentheses", "(452 ± 0.8) J/K", HeatCapacity, "J/K", 452, 0.8, "J/K"},
		{"parentheses tight", "(452±0.8)J/K", HeatCapacity, "J/K", 452, 0.8, "J/K"},
		{"both with unit", "452 J/K ± 0.8 J/K", HeatCapacity, "J/K", 452, 0.8, "J/K"},
		{"unit on the value only", "452 J/K ± 0.8", HeatCapacity, "J/K", 452, 0.8, "J/K"},
		{"different units converted", "0.452 kJ/K ± 0.8 J/K", HeatCapacity, "J/K", 452, 0.8, "kJ/K"},
		{"bare numbers take the default", "452±0.8", HeatCapacity, "kJ/K", 452000, 800, ""},
		{"zero uncertainty", "5 ± 0 g", Mass, "g", 5, 0, "g"},

		{"concise", "17.584(17) kJ/mol", MolarEnthalpy, "kJ/mol", 17584, 17, "kJ/mol"},
		{"concise absolute", "17.584(0.017) kJ/mol", MolarEnthalpy, "kJ/mol", 17584, 17, "kJ/mol"},
		{"concise attached", "17.584(17)kJ/mol", MolarEnthalpy, "kJ/mol", 17584, 17, "kJ/mol"},
		{"concise spaced", "17.584 (17) kJ/mol", MolarEnthalpy, "kJ/mol", 17584, 17, "kJ/mol"},
		{"concise decimal comma", "17,584(17) kJ/mol", MolarEnthalpy, "kJ/mol", 17584, 17, "kJ/mol"},
		{"concise absolute decimal comma", "17,584(0,017) kJ/mol", MolarEnthalpy, "kJ/mol", 17584, 17, "kJ/mol"},
		{"concise bare", "17.584(17)", MolarEnthalpy, "kJ/mol", 17584, 17, ""},
		{"concise integer", "452(8) J/K", HeatCapacity, "J/K", 452, 8, "J/K"},
		{"concise more digits than decimals", "1.5(12) g", Mass, "g", 1.5, 1.2, "g"},
		{"concise exponent after", "1.2345(12)e-07 mol", Amount, "mol", 1.2345e-7, 1.2e-10, "mol"},
		{"concise exponent before", "1.2345e-07(12) mol", Amount, "mol", 1.2345e-7, 1.2e-10, "mol"},
		{"concise exponent in the parentheses", "1.2345e-07(1.2e-10) mol", Amount, "mol", 1.2345e-7, 1.2e-10, "mol"},

		{"GUM 7.2.2 (2)", "100.02147(35) g", Mass, "g", 100.02147, 0.00035, "g"},
		{"GUM 7.2.2 (3)", "100.02147(0.00035) g", Mass, "g", 100.02147, 0.00035, "g"},
		{"GUM 7.2.2 (4)", "(100.02147 ± 0.00035) g", Mass, "g", 100.02147, 0.00035, "g"},
		{"GUM 7.2.2 (2) decimal comma", "100,02147(35) g", Mass, "g", 100.02147, 0.00035, "g"},
		{"GUM 7.2.2 (1) in mg", "100.02147 g ± 0.35 mg", Mass, "g", 100.02147, 0.00035, "g"},

		{"decimal comma both", "2,503 ± 0,001 g", Mass, "g", 2.503, 0.001, "g"},
		{"percent", "50 ± 1 %", Dimensionless, "", 0.5, 0.01, "%"},

		// The uncertainty of a temperature is a difference: no offset.
		{"celsius", "25.0±0.1 °C", Temperature, "K", 298.15, 0.1, "°C"},
		{"celsius value, fahrenheit u", "25.0 °C ± 0.18 °F", Temperature, "K", 298.15, 0.1, "°C"},
		{"fahrenheit", "77 ± 0.18 °F", Temperature, "K", 298.15, 0.1, "°F"},
		{"kelvin concise", "298.15(10) K", Temperature, "K", 298.15, 0.1, "K"},
		{"celsius default", "25.0±0.1", Temperature, "°C", 298.15, 0.1, ""},
		{"difference mK", "1.2345 K ± 3 mK", TemperatureDifference, "K", 1.2345, 0.003, "K"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			q, err := Parse(tc.text, tc.dim, tc.def)
			if err != nil {
				t.Fatalf("Parse(%q): %v", tc.text, err)
			}
			if !near(q.Value, tc.value) || !near(q.U, tc.u) || !q.HasU {
				t.Errorf("Parse(%q) = %.17g ± %.17g (HasU %v), want %.17g ± %.17g", tc.text, q.Value, q.U, q.HasU, tc.value, tc.u)
			}
			if q.Unit != tc.unit {
				t.Errorf("Parse(%q).Unit = %q, want %q", tc.text, q.Unit, tc.unit)
			}
		})
	}
}

// TestParseErrors: every bad input gives a *ParseError that says what was
// wrong and what was expected.
func TestParseErrors(t *testing.T) {
	tests := []struct {
		name string
		text string
		dim  Dimension
		def  string
		want string // the whole Error() when it starts with the quoted text, else a part of it
	}{
		{"unknown unit", "5 parsecs", Mass, "g", `"5 parsecs": unknown mass unit "parsecs" (use mg, g or kg)`},
		{"unknown unit attached", "5parsecs", Mass, "g", `"5parsecs": unknown mass unit "parsecs" (use mg, g or kg)`},
		{"not a number", "2x.1 g", Mass, "g", `"2x.1 g": "2x.1" is not a number`},
		{"not a number alone", "2x.1", Mass, "g", `"2x.1" is not a number`},
		{"words", "abc", Mass, "g", `"abc" is not a number`},
		{"unit alone", "g", Mass, "g", `"g" is not a number`},
		{"two points", "2.5.3 g", Mass, "g", `"2.5.3 g": "2.5.3" is not a number`},
		{"point and comma", "1,234.5 g", Mass, "g", `"1,234.5 g": ambiguous number "1,234.5": both a point and a comma (write one decimal mark and no digit grouping)`},
		{"comma and point", "1.234,5 g", Mass, "g", "both a point and a comma"},
		{"several commas", "1,2,3", Mass, "g", `"1,2,3": ambiguous number "1,2,3": several commas (write one decimal mark and no digit grouping)`},
		{"point and comma in the uncertainty", "5 ± 0,001.5 g", Mass, "g", "ambiguous"},
		{"dangling exponent", "2.5e g", Mass, "g", `"2.5e g": "2.5e" is not a number`},
		{"hexadecimal", "0x1p-2 g", Mass, "g", `"0x1p-2" is not a number`},
		{"NaN", "NaN", Mass, "g", `"NaN" is not a number (NaN and infinity are not accepted)`},
		{"Inf with unit", "Inf g", Mass, "g", `"Inf g": "Inf" is not a number (NaN and infinity are not accepted)`},
		{"minus infinity", "-Inf", Mass, "g", "NaN and infinity are not accepted"},
		{"NaN uncertainty", "5 ± NaN g", Mass, "g", "is not a number"},
		{"too large", "1e400 g", Mass, "g", `"1e400 g": "1e400" is out of range`},
		{"too large after conversion", "1e308 kg", Mass, "g", `"1e308 kg": 1e308 kg is out of range`},
		{"uncertainty too large", "5 ± 1e308 kg", Mass, "g", "uncertainty 1e308 is out of range"},
		{"empty", "", Mass, "g", "empty value"},
		{"blank", "  \t ", Mass, "g", "empty value"},

		{"negative uncertainty", "452 ± -0.8 J/K", HeatCapacity, "J/K", `"452 ± -0.8 J/K": negative uncertainty -0.8 (a standard uncertainty is ≥ 0)`},
		{"negative uncertainty minus sign", "452 ± −0.8 J/K", HeatCapacity, "J/K", "negative uncertainty"},
		{"negative concise", "17.584(-17) kJ/mol", MolarEnthalpy, "kJ/mol", "negative uncertainty (-17)"},

		{"below absolute zero °C", "-300 °C", Temperature, "°C", `"-300 °C": below absolute zero (0 K = -273.15 °C = -459.67 °F)`},
		{"below absolute zero K", "-1 K", Temperature, "K", "below absolute zero"},
		{"below absolute zero °F", "-500 °F", Temperature, "K", "below absolute zero"},
		{"below absolute zero default", "-274", Temperature, "°C", "below absolute zero"},

		{"wrong dimension", "5 kJ", Mass, "g", `"5 kJ": "kJ" is an energy unit, not a mass unit (use mg, g or kg)`},
		{"difference unit for a temperature", "5 mK", Temperature, "K", `"mK" is a temperature difference unit, not a temperature unit (use K, °C or °F)`},
		{"uncertainty of another dimension", "452 J/K ± 0.8 g", HeatCapacity, "J/K", `"g" is a mass unit, not a heat capacity unit (use J/K or kJ/K)`},
		{"case kelvin", "298 k", Temperature, "K", `unknown temperature unit "k" (did you mean K? units are case-sensitive)`},
		{"case kJ/mol", "17.584 kj/mol", MolarEnthalpy, "kJ/mol", `unknown molar enthalpy unit "kj/mol" (did you mean kJ/mol? units are case-sensitive)`},
		{"ambiguous J/g K", "4.184 J/g K", SpecificHeat, "J/(g·K)", `unknown specific heat capacity unit "J/g K" (use J/(kg·K), J/(g·K) or kJ/(kg·K))`},
		{"malformed unit", "452 J/K/", HeatCapacity, "J/K", `unknown heat capacity unit "J/K/"`},
		{"unit with trailing words", "5 g extra", Mass, "g", `unknown mass unit "g extra"`},
		{"percent for a mass", "5 %", Mass, "g", `"%" is a dimensionless unit, not a mass unit`},
		{"no unit and no default", "5", Mass, "", `"5": missing mass unit (use mg, g or kg)`},
		{"no unit for a temperature", "25 ± 0.1", Temperature, "", "missing temperature unit (use K, °C or °F)"},

		{"± alone", "±", Mass, "g", "missing value"},
		{"no value", "± 0.8 g", Mass, "g", "missing value"},
		{"no uncertainty", "452 ±", HeatCapacity, "J/K", "missing uncertainty"},
		{"two ±", "452 ± 0.8 ± 0.1 J/K", HeatCapacity, "J/K", "more than one ±"},
		{"two ± in parentheses", "(452 ± 0.8 ± 0.1) J/K", HeatCapacity, "J/K", "more than one ±"},
		{"unclosed parenthesis", "(452 ± 0.8 J/K", HeatCapacity, "J/K", `missing ")"`},
		{"parentheses without ±", "(452) J/K", HeatCapacity, "J/K", `want "(value ± uncertainty) unit"`},
		{"unit twice", "(452 ± 0.8 J/K) J/K", HeatCapacity, "J/K", "unit given twice"},
		{"unknown unit after parentheses", "(452 ± 0.8) J/g", HeatCapacity, "J/K", `unknown heat capacity unit "J/g"`},
		{"concise unclosed", "17.584(17 kJ/mol", MolarEnthalpy, "kJ/mol", `missing ")" after the uncertainty`},
		{"concise twice", "17.584(17)(3) kJ/mol", MolarEnthalpy, "kJ/mol", "more than one uncertainty"},
		{"concise and ±", "17.584(17) ± 0.1 kJ/mol", MolarEnthalpy, "kJ/mol", "more than one uncertainty"},
		{"concise garbage", "17.584(1x7) kJ/mol", MolarEnthalpy, "kJ/mol", `"1x7" is not an uncertainty`},
		{"exponent twice", "1.2e-7(12)e-7 mol", Amount, "mol", "exponent given twice"},
		{"exponent after the parentheses too large", "1.5(3)e999 g", Mass, "g", `"1.5e999" is out of range`},
		{"concise ambiguous", "17.584(0,01.7) kJ/mol", MolarEnthalpy, "kJ/mol", `ambiguous number "0,01.7"`},
		{"concise not a number", "17.584(1.5x) kJ/mol", MolarEnthalpy, "kJ/mol", `"1.5x" is not an uncertainty`},
		{"parenthesis inside the value", "((1 ± 2) g", Mass, "g", `"((1 ± 2) g": "(1" is not a number`},
		{"malformed number and more", "1.2.3x.4 g", Mass, "g", `"1.2.3x.4 g": "1.2.3x.4" is not a number`},
		{"comma then letters and digits", "1,2x.5 g", Mass, "g", `"1,2x.5 g": "1,2x.5" is not a number`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			q, err := Parse(tc.text, tc.dim, tc.def)
			if err == nil {
				t.Fatalf("Parse(%q, %v) = %+v, want an error", tc.text, tc.dim, q)
			}
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("Parse(%q): error %v is %T, want *ParseError", tc.text, err, err)
			}
			if pe.Dim != tc.dim || pe.Text != strings.TrimSpace(tc.text) {
				t.Errorf("ParseError Text %q, Dim %v; want %q, %v", pe.Text, pe.Dim, strings.TrimSpace(tc.text), tc.dim)
			}
			msg := err.Error()
			if strings.HasPrefix(tc.want, strconv.Quote(strings.TrimSpace(tc.text))) || tc.want == "empty value" {
				if msg != tc.want {
					t.Errorf("Parse(%q) error\n got %s\nwant %s", tc.text, msg, tc.want)
				}
			} else if !strings.Contains(msg, tc.want) {
				t.Errorf("Parse(%q) error %q does not contain %q", tc.text, msg, tc.want)
			}
		})
	}
}

// TestParseProgrammerErrors: a bad default unit or dimension is the caller's
// mistake: an error, no panic, and not a *ParseError.
func TestParseProgrammerErrors(t *testing.T) {
	tests := []struct {
		name string
		dim  Dimension
		def  string
		want string
	}{
		{"default of another dimension", Mass, "J/K", `default unit: "J/K" is a heat capacity unit, not a mass unit`},
		{"unknown default", Time, "fortnight", `default unit: unknown time unit "fortnight"`},
		{"invalid dimension", Dimension(99), "g", "invalid dimension 99"},
		{"negative dimension", Dimension(-1), "g", "invalid dimension -1"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse("5", tc.dim, tc.def)
			if err == nil {
				t.Fatal("no error")
			}
			var pe *ParseError
			if errors.As(err, &pe) {
				t.Errorf("error %v is a *ParseError; a programmer's error should not be", err)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not contain %q", err, tc.want)
			}
		})
	}
}

func TestParseNumber(t *testing.T) {
	tests := []struct {
		name string
		text string
		want float64
		err  string // part of the error; "" for none
	}{
		{"point", "9.99", 9.99, ""},
		{"decimal comma", "9,99", 9.99, ""}, // never 999
		{"comma with three decimals", "1,234", 1.234, ""},
		{"negative comma", "-1,5", -1.5, ""},
		{"minus sign", "−2", -2, ""},
		{"exponent", "2.5e3", 2500, ""},
		{"exponent with comma", "2,5E-3", 0.0025, ""},
		{"integer", "42", 42, ""},
		{"space around", " 7 ", 7, ""},
		{"underflow is zero", "1e-400", 0, ""},
		{"point and comma", "1,234.5", 0, `"1,234.5": ambiguous number "1,234.5": both a point and a comma`},
		{"several commas", "1,2,3", 0, "several commas"},
		{"two points", "1.2.3", 0, `"1.2.3" is not a number`},
		{"empty", "", 0, "empty value"},
		{"with unit", "1.5 g", 0, `"1.5 g" is not a number`},
		{"letters", "abc", 0, `"abc" is not a number`},
		{"NaN", "NaN", 0, "NaN and infinity are not accepted"},
		{"overflow", "1e400", 0, `"1e400" is out of range`},
		{"exponent beyond int64", "1e99999999999999999999", 0, "is out of range"},
		{"sign only", "-", 0, `"-" is not a number`},
		{"point only", ".", 0, `"." is not a number`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseNumber(tc.text)
			if tc.err == "" {
				if err != nil {
					t.Fatalf("ParseNumber(%q): %v", tc.text, err)
				}
				if !near(got, tc.want) {
					t.Errorf("ParseNumber(%q) = %.17g, want %.17g", tc.text, got, tc.want)
				}
				return
			}
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("ParseNumber(%q) = %v, %v; want a *ParseError", tc.text, got, err)
			}
			if !strings.Contains(err.Error(), tc.err) {
				t.Errorf("ParseNumber(%q) error %q does not contain %q", tc.text, err, tc.err)
			}
		})
	}
}
