package units

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

func TestDimensionNames(t *testing.T) {
	tests := []struct {
		name string
		dim  Dimension
		str  string
		base string
	}{
		{"mass", Mass, "mass", "g"},
		{"temperature", Temperature, "temperature", "K"},
		{"temperature difference", TemperatureDifference, "temperature difference", "K"},
		{"time", Time, "time", "s"},
		{"energy", Energy, "energy", "J"},
		{"power", Power, "power", "W"},
		{"heat capacity", HeatCapacity, "heat capacity", "J/K"},
		{"specific heat", SpecificHeat, "specific heat capacity", "J/(g·K)"},
		{"molar enthalpy", MolarEnthalpy, "molar enthalpy", "J/mol"},
		{"molar mass", MolarMass, "molar mass", "g/mol"},
		{"voltage", Voltage, "voltage", "V"},
		{"current", Current, "current", "A"},
		{"volume", Volume, "volume", "mL"},
		{"molality", Molality, "molality", "mol/kg"},
		{"amount", Amount, "amount of substance", "mol"},
		{"dimensionless", Dimensionless, "dimensionless", ""},
		{"invalid", Dimension(42), "Dimension(42)", ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.dim.String(); got != tc.str {
				t.Errorf("String() = %q, want %q", got, tc.str)
			}
			if got := tc.dim.BaseUnit(); got != tc.base {
				t.Errorf("BaseUnit() = %q, want %q", got, tc.base)
			}
		})
	}
}

// TestUnitsLists: every dimension lists its units, the base unit among them,
// and every listed unit parses as itself.
func TestUnitsLists(t *testing.T) {
	want := map[Dimension][]string{
		Mass:                  {"mg", "g", "kg"},
		Temperature:           {"K", "°C", "°F"},
		TemperatureDifference: {"mK", "K", "°C", "°F"},
		Time:                  {"ms", "s", "min", "h"},
		Energy:                {"J", "cal", "kJ", "kcal"},
		Power:                 {"mW", "W"},
		HeatCapacity:          {"J/K", "kJ/K"},
		SpecificHeat:          {"J/(kg·K)", "J/(g·K)", "kJ/(kg·K)"},
		MolarEnthalpy:         {"J/mol", "cal/mol", "kJ/mol", "kcal/mol"},
		MolarMass:             {"g/mol", "kg/mol"},
		Voltage:               {"mV", "V"},
		Current:               {"mA", "A"},
		Volume:                {"µL", "mL", "L"},
		Molality:              {"mmol/kg", "mol/kg"},
		Amount:                {"mmol", "mol"},
		Dimensionless:         {"", "%"},
	}
	for d := Dimension(0); d < unitsDimensions; d++ {
		t.Run(d.String(), func(t *testing.T) {
			got := d.Units()
			if !slices.Equal(got, want[d]) {
				t.Errorf("Units() = %q, want %q", got, want[d])
			}
			if !slices.Contains(got, d.BaseUnit()) {
				t.Errorf("base unit %q not in %q", d.BaseUnit(), got)
			}
			for _, u := range got {
				c, err := CanonicalUnit(d, u)
				if err != nil || c != u {
					t.Errorf("CanonicalUnit(%v, %q) = %q, %v", d, u, c, err)
				}
			}
		})
	}
	if Dimension(-3).Units() != nil {
		t.Error("Units of an invalid dimension is not nil")
	}
}

func TestCanonicalUnit(t *testing.T) {
	tests := []struct {
		name string
		dim  Dimension
		unit string
		want string // "" for an error
	}{
		{"degC", Temperature, "degC", "°C"},
		{"C", Temperature, "C", "°C"},
		{"ºC", TemperatureDifference, "ºC", "°C"},
		{"F", Temperature, "F", "°F"},
		{"J K-1", HeatCapacity, "J K-1", "J/K"},
		{"J·K⁻¹", HeatCapacity, "J·K⁻¹", "J/K"},
		{"J g-1 K-1", SpecificHeat, "J g-1 K-1", "J/(g·K)"},
		{"J/(K·g) in another order", SpecificHeat, "J/(K·g)", "J/(g·K)"},
		{"J*g^-1*K^-1", SpecificHeat, "J*g^-1*K^-1", "J/(g·K)"},
		{"kJ.mol-1", MolarEnthalpy, "kJ.mol-1", "kJ/mol"},
		{"uL", Volume, "uL", "µL"},
		{"surrounding space", Mass, " kg ", "kg"},
		{"unknown", Mass, "lb", ""},
		{"lower-case kelvin", Temperature, "k", ""},
		{"unbalanced parenthesis", SpecificHeat, "J/(g·K", ""},
		{"exponent without digits", HeatCapacity, "J K^", ""},
		{"three-digit exponent", HeatCapacity, "J K-100", ""},
		{"nesting too deep", HeatCapacity, "J/(((((K)))))", ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := CanonicalUnit(tc.dim, tc.unit)
			if tc.want == "" {
				var pe *ParseError
				if !errors.As(err, &pe) {
					t.Fatalf("CanonicalUnit(%v, %q) = %q, %v; want a *ParseError", tc.dim, tc.unit, got, err)
				}
				return
			}
			if err != nil || got != tc.want {
				t.Errorf("CanonicalUnit(%v, %q) = %q, %v; want %q", tc.dim, tc.unit, got, err, tc.want)
			}
		})
	}
}

// TestToUnit checks conversions from the base unit against the definitions
// (SI Brochure 9th ed. 2.3.1 for °C; NIST SP 811 2008 B.8, B.9 for cal and
// °F; SI prefixes).
func TestToUnit(t *testing.T) {
	tests := []struct {
		name  string
		value float64 // base unit
		dim   Dimension
		unit  string
		want  float64
	}{
		{"kelvin to celsius", 298.15, Temperature, "°C", 25},
		{"kelvin to fahrenheit", 298.15, Temperature, "°F", 77},
		{"-40 is -40", 233.15, Temperature, "°F", -40},
		{"absolute zero in °F", 0, Temperature, "°F", -459.67},
		{"ice point in °F", 273.15, Temperature, "degF", 32},
		{"difference to celsius has no offset", 1, TemperatureDifference, "°C", 1},
		{"difference to fahrenheit", 1, TemperatureDifference, "°F", 1.8},
		{"difference to mK", 0.025, TemperatureDifference, "mK", 25},
		{"g to mg", 2.503, Mass, "mg", 2503},
		{"g to kg", 2503, Mass, "kg", 2.503},
		{"s to min", 300, Time, "min", 5},
		{"s to h", 5400, Time, "h", 1.5},
		{"s to ms", 1.5, Time, "ms", 1500},
		{"J to kcal", 4184, Energy, "kcal", 1},
		{"J to cal", 4.184, Energy, "cal", 1},
		{"W to mW", 0.5, Power, "mW", 500},
		{"J/K to kJ/K", 452, HeatCapacity, "kJ/K", 0.452},
		{"J/(g·K) to J/(kg·K)", 4.184, SpecificHeat, "J/(kg·K)", 4184},
		{"J/(g·K) to kJ/(kg·K)", 4.184, SpecificHeat, "kJ/(kg·K)", 4.184},
		{"J/mol to kJ/mol", 17584, MolarEnthalpy, "kJ/mol", 17.584},
		{"J/mol to kcal/mol", 4184, MolarEnthalpy, "kcal/mol", 1},
		{"g/mol to kg/mol", 74.551, MolarMass, "kg/mol", 0.074551},
		{"V to mV", 1.5, Voltage, "mV", 1500},
		{"A to mA", 0.25, Current, "mA", 250},
		{"mL to µL", 0.25, Volume, "µL", 250},
		{"mL to L", 250, Volume, "L", 0.25},
		{"mol/kg to mmol/kg", 0.1, Molality, "mmol/kg", 100},
		{"mol to mmol", 0.025, Amount, "mmol", 25},
		{"fraction to percent", 0.5, Dimensionless, "%", 50},
		{"fraction to plain", 0.5, Dimensionless, "", 0.5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ToUnit(tc.value, tc.dim, tc.unit)
			if err != nil {
				t.Fatal(err)
			}
			if !near(got, tc.want) {
				t.Errorf("ToUnit(%g, %v, %q) = %.17g, want %.17g", tc.value, tc.dim, tc.unit, got, tc.want)
			}
			back, err := FromUnit(tc.want, tc.dim, tc.unit)
			if err != nil {
				t.Fatal(err)
			}
			if !near(back, tc.value) {
				t.Errorf("FromUnit(%g, %v, %q) = %.17g, want %.17g", tc.want, tc.dim, tc.unit, back, tc.value)
			}
		})
	}
}

// TestConversionRoundTrip: FromUnit(ToUnit(x)) = x for every unit of every
// dimension, over magnitudes from 1e-9 to 1e9 (seeded PCG), to 4 ulp
// (a multiplication and a division each way, plus the temperature offset:
// the bound is relative to max(|x|, 459.67)).
func TestConversionRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for d := Dimension(0); d < unitsDimensions; d++ {
		for _, u := range d.Units() {
			t.Run(d.String()+" "+u, func(t *testing.T) {
				for range 200 {
					x := math.Pow(10, rng.Float64()*18-9)
					if d != Temperature && rng.IntN(2) == 0 {
						x = -x
					}
					y, err := ToUnit(x, d, u)
					if err != nil {
						t.Fatal(err)
					}
					z, err := FromUnit(y, d, u)
					if err != nil {
						t.Fatal(err)
					}
					scale := math.Abs(x)
					if d == Temperature {
						scale = math.Max(scale, 459.67)
					}
					if math.Abs(z-x) > 4*scale*0x1p-52 {
						t.Fatalf("FromUnit(ToUnit(%.17g)) = %.17g", x, z)
					}
				}
			})
		}
	}
}

func TestToUnitErrors(t *testing.T) {
	tests := []struct {
		name string
		dim  Dimension
		unit string
		want string
	}{
		{"unknown", Mass, "parsecs", `unknown mass unit "parsecs" (use mg, g or kg)`},
		{"other dimension", Mass, "K", `"K" is a temperature unit, not a mass unit (use mg, g or kg)`},
		{"empty", Energy, "", "missing energy unit (use J, cal, kJ or kcal)"},
		{"case", Energy, "kj", `unknown energy unit "kj" (did you mean kJ? units are case-sensitive)`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for _, f := range []func(float64, Dimension, string) (float64, error){ToUnit, FromUnit} {
				_, err := f(1, tc.dim, tc.unit)
				var pe *ParseError
				if !errors.As(err, &pe) {
					t.Fatalf("error %v is not a *ParseError", err)
				}
				if err.Error() != tc.want {
					t.Errorf("error\n got %s\nwant %s", err, tc.want)
				}
			}
		})
	}
	_, err := ToUnit(1, Dimension(77), "g")
	var pe *ParseError
	if err == nil || errors.As(err, &pe) || !strings.Contains(err.Error(), "invalid dimension") {
		t.Errorf("ToUnit with an invalid dimension: %v", err)
	}
}

// TestUnitsKey: the spellings of a compound unit reduce to one key (ISO
// 80000-1 notation: a product by a space or a half-high dot, a quotient by
// a solidus or a negative exponent).
func TestUnitsKey(t *testing.T) {
	tests := []struct {
		name string
		text string
		want string
		ok   bool
	}{
		{"empty", "  ", "", true},
		{"simple", "kg", "kg^1", true},
		{"quotient", "J/(g·K)", "J^1 K^-1 g^-1", true},
		{"chained quotient", "J/g/K", "J^1 K^-1 g^-1", true},
		{"negative exponents", "J g-1 K-1", "J^1 K^-1 g^-1", true},
		{"superscripts", "J·g⁻¹·K⁻¹", "J^1 K^-1 g^-1", true},
		{"superscript two and three", "m² m³ s⁻⁴", "m^5 s^-4", true},
		{"superscript digits 0 and 5 to 9", "a⁰ b⁵ c⁶ d⁷ e⁸ f⁹", "b^5 c^6 d^7 e^8 f^9", true},
		{"caret and plus", "K^+2 K^-1", "K^1", true},
		{"plus superscript", "K⁺² s", "K^2 s^1", true},
		{"exponent on parentheses", "J (g K)^-1", "J^1 K^-1 g^-1", true},
		{"cancelling", "J K/K", "J^1", true},
		{"alias", "degC", "°C^1", true},
		{"percent", "%", "%^1", true},
		{"dangling operator", "J/", "", false},
		{"sign without digits", "K-", "", false},
		{"digit alone", "1", "", false},
		{"stray parenthesis", "J)", "", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, ok := unitsKey(tc.text)
			if ok != tc.ok || got != tc.want {
				t.Errorf("unitsKey(%q) = %q, %v; want %q, %v", tc.text, got, ok, tc.want, tc.ok)
			}
		})
	}
}
