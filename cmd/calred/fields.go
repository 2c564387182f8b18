package main

import (
	"fmt"
	"sort"
	"strings"

	flag "github.com/spf13/pflag"

	"calred/calorimeter"
	"calred/units"
)

// A field is one item of a run's description. The same names serve as
// flags (`--sample-mass`), as `# sample-mass: 2.503 g` lines at the top of a
// log, and as manifest columns (`sample_mass`). Flags and manifest cells
// override the log's own lines.
type field struct {
	name string
	dim  units.Dimension // units.Dimensionless with text=true for plain text
	unit string          // default unit of a bare number
	text bool            // free text, not a quantity
	use  string          // which commands: r reduce, c calibrate
	help string
	sign byte // '+': the value must be > 0; '0': it must be ≥ 0; 0: any value
}

var fields = []field{
	// The sample.
	{name: "sample-mass", dim: units.Mass, unit: "g", use: "rc", help: "mass of the solute dissolved (or of the standard), g", sign: '+'},
	{name: "formula", text: true, use: "rc", help: "chemical formula of the solute, e.g. KNO3 or CuSO4·5H2O"},
	{name: "molar-mass", dim: units.MolarMass, unit: "g/mol", use: "rc", help: "molar mass of the solute, g/mol (instead of --formula)", sign: '+'},
	{name: "solvent-mass", dim: units.Mass, unit: "g", use: "rc", help: "mass of solvent (water) in the vessel, g", sign: '+'},
	{name: "solution-cp", dim: units.SpecificHeat, unit: "J/(g·K)", use: "rc", help: "specific heat of the solution, J/(g·K) (default: water at the run's mean temperature)", sign: '+'},
	{name: "u-mass", dim: units.Mass, unit: "g", use: "rc", help: "standard uncertainty of each weighing, g (default 0.0005 g, stated in the output)", sign: '+'},
	// The calorimeter.
	{name: "cal", text: true, use: "r", help: "calibration `FILE` written by calred calibrate -o"},
	{name: "heat-capacity", dim: units.HeatCapacity, unit: "J/K", use: "r", help: "total heat capacity of the calorimeter, J/K, e.g. 452±0.8J/K", sign: '+'},
	// Calibrations.
	{name: "heater-power", dim: units.Power, unit: "W", use: "c", help: "electrical calibration: heater power, W", sign: '+'},
	{name: "heater-time", dim: units.Time, unit: "s", use: "c", help: "electrical calibration: heating time, s", sign: '+'},
	{name: "heater-voltage", dim: units.Voltage, unit: "V", use: "c", help: "electrical calibration: heater voltage, V (with --heater-current)", sign: '+'},
	{name: "heater-current", dim: units.Current, unit: "A", use: "c", help: "electrical calibration: heater current, A (with --heater-voltage)", sign: '+'},
	{name: "standard", text: true, use: "c", help: "chemical calibration: built-in standard (kcl, tris-hcl, tris-naoh, neutralisation)"},
	{name: "amount", dim: units.Amount, unit: "mol", use: "c", help: "chemical calibration: amount of the limiting reagent, mol (for neutralisation, which is not weighed)", sign: '+'},
	{name: "reference-enthalpy", dim: units.MolarEnthalpy, unit: "kJ/mol", use: "c", help: "chemical calibration: ΔsolH of the substance given by --formula, kJ/mol with ±u"},
	{name: "cold-mass", dim: units.Mass, unit: "g", use: "c", help: "mixing calibration: mass of cold water in the vessel, g", sign: '+'},
	{name: "hot-mass", dim: units.Mass, unit: "g", use: "c", help: "mixing calibration: mass of hot water added, g", sign: '+'},
	{name: "hot-temperature", dim: units.Temperature, unit: "°C", use: "c", help: "mixing calibration: temperature of the hot water when poured, °C"},
	{name: "contents-mass", dim: units.Mass, unit: "g", use: "c", help: "liquid mass present during the calibration, g (splits off the vessel's own heat capacity)", sign: '+'},
	// Periods and method.
	{name: "mix-time", dim: units.Time, unit: "s", use: "rc", help: "time the process started, s from the first reading (default: detected)", sign: '+'},
	{name: "pre", text: true, use: "rc", help: "fore period START:END, s (default: detected)"},
	{name: "post", text: true, use: "rc", help: "after period START:END, s (default: detected)"},
	{name: "method", text: true, use: "rc", help: "correction method: auto, regnault-pfaundler, dickinson, extrapolation, model"},
	{name: "u-temperature", dim: units.TemperatureDifference, unit: "K", use: "rc", help: "standard uncertainty of the probe calibration, K (default: none)", sign: '0'},
	// Log reading.
	{name: "time-column", text: true, use: "rc", help: "name or 1-based number of the time column (default: detected)"},
	{name: "temperature-column", text: true, use: "rc", help: "name or 1-based number of the temperature column (default: detected)"},
	{name: "time-unit", text: true, use: "rc", help: "time base: s, min, h, ms, mm:ss, hh:mm:ss, hh:mm, iso8601 (default: detected)"},
	{name: "temperature-unit", text: true, use: "rc", help: "temperature unit: C, K, F (default: from the header)"},
	{name: "delimiter", text: true, use: "rc", help: "field delimiter: comma, semicolon, tab, pipe, space (default: detected)"},
	{name: "decimal", text: true, use: "rc", help: "decimal mark: point or comma (default: detected)"},
	// Records.
	{name: "run-id", text: true, use: "rc", help: "run identifier (default: the log's file name without extension)"},
	{name: "operator", text: true, use: "rc", help: "who ran the measurement"},
	{name: "sample-id", text: true, use: "rc", help: "sample or lot identifier"},
	{name: "note", text: true, use: "rc", help: "free note recorded with the result"},
	// Grading.
	{name: "accepted", dim: units.MolarEnthalpy, unit: "kJ/mol", use: "r", help: "accepted ΔsolH to grade the result against, kJ/mol with ±u (error %, ζ, En; ISO 13528)"},
}

func fieldByName(name string) (field, bool) {
	for _, f := range fields {
		if f.name == name {
			return f, true
		}
	}
	return field{}, false
}

// spec is a run's description gathered from the log's metadata, the
// manifest and the flags, each value remembering where it came from.
type spec struct {
	values map[string]string
	origin map[string]string // "flag --sample-mass", "run7.csv:3", "manifest.csv:4"
	label  map[string]string // the name as its source writes it ("sample_mass" in a manifest), when not the field name
}

func newSpec() *spec {
	return &spec{values: map[string]string{}, origin: map[string]string{}, label: map[string]string{}}
}

func (s *spec) set(name, value, origin string) {
	s.values[name] = value
	s.origin[name] = origin
	delete(s.label, name)
}

// setFrom copies field name, with its origin and label, from o.
func (s *spec) setFrom(o *spec, name string) {
	s.set(name, o.values[name], o.origin[name])
	if l, ok := o.label[name]; ok {
		s.label[name] = l
	}
}

func (s *spec) has(name string) bool {
	v, ok := s.values[name]
	return ok && strings.TrimSpace(v) != ""
}

func (s *spec) text(name string) string { return strings.TrimSpace(s.values[name]) }

// quantity parses a field; ok is false when the field is absent. A bad value
// is a usage error for a flag and a data error for a file, naming where it
// came from.
func (s *spec) quantity(name string) (q units.Quantity, ok bool, err error) {
	if !s.has(name) {
		return units.Quantity{}, false, nil
	}
	f, known := fieldByName(name)
	if !known || f.text {
		panic("calred: quantity of unknown or text field " + name)
	}
	q, err = units.Parse(s.values[name], f.dim, f.unit)
	if err != nil {
		return q, false, s.fail(name, err)
	}
	switch {
	case f.sign == '+' && !(q.Value > 0):
		return q, false, s.failf(name, "%q must be greater than 0 %s", s.text(name), f.unit)
	case f.sign == '0' && !(q.Value >= 0):
		return q, false, s.failf(name, "%q must not be negative", s.text(name))
	case f.dim == units.Mass && q.HasU && q.U == 0:
		// The analysis reads a zero as "none given" and puts the default in.
		return q, false, s.failf(name, "%q: a weighing's standard uncertainty is never 0; give your balance's, or none for the default %g g", s.text(name), calorimeter.DefaultUMass)
	}
	return q, true, nil
}

// fail wraps err with the field's origin.
func (s *spec) fail(name string, err error) error {
	o := s.origin[name]
	if strings.HasPrefix(o, "flag ") {
		return usagef("%s: %w", o, err)
	}
	label := name
	if l, ok := s.label[name]; ok {
		label = l
	}
	return dataf("%s: %s: %w", o, label, err)
}

// failf is fail with a formatted message.
func (s *spec) failf(name, format string, a ...any) error {
	return s.fail(name, fmt.Errorf(format, a...))
}

// addFieldFlags registers the flags of the fields used by command c ('r' or 'c').
func addFieldFlags(fs *flag.FlagSet, c byte) {
	for _, f := range fields {
		if strings.IndexByte(f.use, c) >= 0 {
			fs.String(f.name, "", f.help)
		}
	}
}

// fromFlags copies the field flags the user set into s.
func (s *spec) fromFlags(fs *flag.FlagSet) {
	fs.Visit(func(fl *flag.Flag) {
		if _, ok := fieldByName(fl.Name); ok {
			s.set(fl.Name, fl.Value.String(), "flag --"+fl.Name)
		}
	})
}

// fromMeta copies a log's `# key: value` lines that name a field into s,
// and returns the keys it did not know, in the order of their lines.
func (s *spec) fromMeta(file string, meta map[string]string, line map[string]int) (unknown []string) {
	for k, v := range meta {
		if _, ok := fieldByName(k); ok {
			s.set(k, v, fmt.Sprintf("%s:%d", file, line[k]))
		} else {
			unknown = append(unknown, k)
		}
	}
	sort.Slice(unknown, func(i, j int) bool { return line[unknown[i]] < line[unknown[j]] })
	return unknown
}

// nearField is the field name a `# key: value` key was probably meant to
// be: the same letters without the hyphens, or one letter added, dropped
// or changed (two for keys longer than six letters); "" when none is that
// close, as for the other things a log's header tells (instrument, lab).
func nearField(key string) string {
	bare := strings.ReplaceAll(key, "-", "")
	limit := 1
	if len(key) > 6 {
		limit = 2
	}
	best, bestD := "", limit+1
	for _, f := range fields {
		if strings.ReplaceAll(f.name, "-", "") == bare {
			return f.name
		}
		if d := editDistance(key, f.name); d < bestD && len(key) > 3 {
			best, bestD = f.name, d
		}
	}
	return best
}

// editDistance is the Levenshtein distance between a and b, in bytes.
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			sub := prev[j-1]
			if a[i-1] != b[j-1] {
				sub++
			}
			cur[j] = min(sub, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
