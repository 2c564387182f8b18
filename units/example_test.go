package units_test

import (
	"errors"
	"fmt"

	"calred/units"
)

func ExampleParse() {
	for _, text := range []string{"2.503g", "2503 mg", "25.0±0.1 °C", "(452 ± 0.8) J/K", "17.584(17) kJ/mol", "2,503"} {
		dim, def := units.Mass, "g"
		switch text {
		case "25.0±0.1 °C":
			dim, def = units.Temperature, "°C"
		case "(452 ± 0.8) J/K":
			dim, def = units.HeatCapacity, "J/K"
		case "17.584(17) kJ/mol":
			dim, def = units.MolarEnthalpy, "kJ/mol"
		}
		q, err := units.Parse(text, dim, def)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%-18s %s: %g ± %g %s (unit written %q)\n", text, q.Dim, q.Value, q.U, q.Dim.BaseUnit(), q.Unit)
	}
	// Output:
	// 2.503g             mass: 2.503 ± 0 g (unit written "g")
	// 2503 mg            mass: 2.503 ± 0 g (unit written "mg")
	// 25.0±0.1 °C        temperature: 298.15 ± 0.1 K (unit written "°C")
	// (452 ± 0.8) J/K    heat capacity: 452 ± 0.8 J/K (unit written "J/K")
	// 17.584(17) kJ/mol  molar enthalpy: 17584 ± 17 J/mol (unit written "kJ/mol")
	// 2,503              mass: 2.503 ± 0 g (unit written "")
}

func ExampleParse_errors() {
	for _, text := range []string{"5 parsecs", "2x.1 g", "1,234.5 g", "5 kJ", "2 ± -0.1 g"} {
		_, err := units.Parse(text, units.Mass, "g")
		var pe *units.ParseError
		fmt.Println(errors.As(err, &pe), err)
	}
	_, err := units.Parse("-300 °C", units.Temperature, "°C")
	fmt.Println(err)
	// Output:
	// true "5 parsecs": unknown mass unit "parsecs" (use mg, g or kg)
	// true "2x.1 g": "2x.1" is not a number
	// true "1,234.5 g": ambiguous number "1,234.5": both a point and a comma (write one decimal mark and no digit grouping)
	// true "5 kJ": "kJ" is an energy unit, not a mass unit (use mg, g or kg)
	// true "2 ± -0.1 g": negative uncertainty -0.1 (a standard uncertainty is ≥ 0)
	// "-300 °C": below absolute zero (0 K = -273.15 °C = -459.67 °F)
}

func ExampleFormat() {
	fmt.Println(units.Format(452, 0.8, "J/K"))
	fmt.Println(units.Format(17.58412, 0.01734, "kJ/mol"))
	fmt.Println(units.Format(56789, 1234, "J"))
	fmt.Println(units.Format(3.4567e-5, 1.2e-7, "mol"))
	fmt.Println(units.Format(2.503, 0, "g"))
	// Output:
	// 452.00 ± 0.80 J/K
	// 17.584 ± 0.017 kJ/mol
	// 56800 ± 1200 J
	// 3.457e-05 ± 1.2e-07 mol
	// 2.503 g
}

func ExampleFormatConcise() {
	fmt.Println(units.FormatConcise(17.58412, 0.01734, "kJ/mol"))
	fmt.Println(units.FormatConcise(100.02147, 0.00035, "g")) // JCGM 100:2008, 7.2.2
	// Output:
	// 17.584(17) kJ/mol
	// 100.02147(35) g
}

func ExampleRound() {
	v, u := units.Round(10.05762, 0.027) // JCGM 100:2008, 7.2.6
	fmt.Println(v, u)
	// Output:
	// 10.058 0.027
}

// ExampleFormatQuantity: 25 °C = 298.15 K = 77 °F and u = 0.1 K = 0.18 °F
// (NIST SP 811, B.9), rounded as JCGM 100:2008, 7.2.6 says.
func ExampleFormatQuantity() {
	q, _ := units.Parse("25.0±0.1 °C", units.Temperature, "°C")
	for _, unit := range []string{"K", "°C", "°F"} {
		s, _ := units.FormatQuantity(q, unit)
		fmt.Println(s)
	}
	// Output:
	// 298.15 ± 0.10 K
	// 25.00 ± 0.10 °C
	// 77.00 ± 0.18 °F
}

// ExampleToUnit: by definition T/K = t/°C + 273.15 (SI Brochure 2.3.1),
// 1 K = 1.8 °F as a difference and 1 kcal = 4184 J (NIST SP 811, B.8, B.9).
func ExampleToUnit() {
	c, _ := units.ToUnit(298.15, units.Temperature, "°C")
	d, _ := units.ToUnit(1, units.TemperatureDifference, "°F")
	e, _ := units.ToUnit(4184, units.Energy, "kcal")
	fmt.Printf("%.2f °C, %.1f °F, %g kcal\n", c, d, e)
	// Output:
	// 25.00 °C, 1.8 °F, 1 kcal
}

func ExampleParseNumber() {
	for _, text := range []string{"9,99", "2.5e3", "1,234.5"} {
		x, err := units.ParseNumber(text)
		fmt.Println(x, err)
	}
	// Output:
	// 9.99 <nil>
	// 2500 <nil>
	// 0 "1,234.5": ambiguous number "1,234.5": both a point and a comma (write one decimal mark and no digit grouping)
}
