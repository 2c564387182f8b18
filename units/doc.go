// Package units reads and writes the quantities a calorimetrist types on the
// command line or finds in a CSV cell: a number, its unit, and optionally a
// standard uncertainty. It knows the few dimensions solution calorimetry
// needs (Mass, Temperature, TemperatureDifference, Time, Energy, Power,
// HeatCapacity, SpecificHeat, MolarEnthalpy, MolarMass, Voltage, Current,
// Volume, Molality, Amount, Dimensionless), stores every value in the base
// unit of its dimension (g, K, s, J, W, J/K, J/(g·K), J/mol, g/mol, V, A, mL,
// mol/kg, mol) and converts to and from the units of the trade.
//
// # Notation
//
// Parse accepts the unit attached or after a space, and a standard
// uncertainty in the forms of JCGM 100:2008 (GUM) 7.2.2. The number after ±
// is a standard uncertainty, as in the GUM's form (4) of 7.2.2, not the
// expanded uncertainty that 7.2.4 writes with ± in reports:
//
//	2.503g   2503 mg   2,503 g   25.0C   25.0 °C   298.15K   300s   5min
//	452±0.8 J/K   452+-0.8J/K   452 +/- 0.8 J/K   (452 ± 0.8) J/K
//	452 J/K ± 0.8 J/K         the uncertainty may carry its own unit
//	17.584(17) kJ/mol         concise: u = 0.017 kJ/mol, in units of the last digit
//	17.584(0.017) kJ/mol      the uncertainty itself in parentheses
//	1.2345(12)e-07 mol        an exponent after the parentheses applies to both
//
// Units are case-sensitive (K is kelvin, k is not a unit); an error lists
// the units expected. Compound units may be written with "/", "·", "⋅",
// "*", "." or a space for the product, and with exponents -1, ^-1 or ⁻¹:
// J/(g·K), J/(g K), J/g/K, J g-1 K-1 and J·g⁻¹·K⁻¹ are one unit. Degrees
// Celsius are °C, ºC, degC or C; Fahrenheit °F, degF or F; micro is µ, μ or
// u (µL, uL). A decimal comma is read where it is unambiguous: one comma and
// no point ("2,503 g" is 2.503 g). A number with both a point and a comma,
// or several commas, is an error, since "1,234.5" may be either; no digit
// separator is ever dropped.
//
// # Temperatures
//
// Temperature is absolute and TemperatureDifference an interval; they share
// the units K, °C and °F but convert differently:
//
//	T/K = t/°C + 273.15                      (SI Brochure, 9th ed. 2019, 2.3.1)
//	T/K = (t/°F + 459.67)/1.8                (NIST SP 811, 2008 ed., B.9)
//	ΔT/K = Δt/°C = (5/9)·Δt/°F
//
// A standard uncertainty is always a difference: 25.0±0.1 °C is 298.15 K
// with u = 0.1 K. A temperature below 0 K is an error.
//
// # Energy
//
// The calorie is the thermochemical calorie, 1 cal = 4.184 J exactly (NIST
// SP 811, 2008 ed., B.8 and B.9), the one thermochemical tables use.
//
// # Rounding
//
// Round, Format and FormatConcise follow JCGM 100:2008, 7.2.6: the
// uncertainty is given to at most two significant digits and the value is
// rounded to the same decimal place, so that with u = 27 mΩ the estimate
// 10.05762 Ω is written 10.058 Ω. Rounding is to the nearest (the GUM
// allows rounding u up; this package does not). Very small or large
// numbers are written in e-notation: 3.457e-05 ± 1.2e-07.
//
// References:
//   - JCGM 100:2008, Evaluation of measurement data — Guide to the
//     expression of uncertainty in measurement (GUM), 7.2.2, 7.2.4 and 7.2.6.
//   - A. Thompson and B. N. Taylor, Guide for the Use of the International
//     System of Units (SI), NIST Special Publication 811, 2008 edition,
//     appendix B (calorie, degree Fahrenheit).
//   - BIPM, The International System of Units (SI Brochure), 9th edition,
//     2019 (degree Celsius, prefixes, the decimal marker).
package units
