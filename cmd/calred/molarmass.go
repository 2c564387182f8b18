package main

import (
	"fmt"
	"text/tabwriter"

	"calred/calorimeter"
	"calred/units"
)

func runMolarMass(a *app, args []string) error {
	fs := newFlags(a, "molar-mass", "FORMULA... [--json]",
		"Molar mass from a chemical formula over the IUPAC/CIAAW 2021 standard atomic weights\n"+
			"(conventional values for interval elements). Hydrates with '.', '·' or '*', parentheses\n"+
			"and brackets: CuSO4·5H2O, CaCl2.2H2O, (NH4)2SO4, CO(NH2)2. Units: g/mol.")
	asJSON := fs.Bool("json", false, "print a JSON array of {formula, molar_mass_g_per_mol, u_molar_mass_g_per_mol}")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() == 0 {
		return withHint(usagef("molar-mass: no formula given"), "try `calred molar-mass KNO3`")
	}
	type row struct {
		Formula   string  `json:"formula"`
		MolarMass float64 `json:"molar_mass_g_per_mol"`
		U         float64 `json:"u_molar_mass_g_per_mol"`
	}
	rows := make([]row, 0, fs.NArg())
	for _, f := range fs.Args() {
		m, u, err := calorimeter.MolarMass(f)
		if err != nil {
			return withHint(usagef("%w", err), formulaHint(f))
		}
		rows = append(rows, row{f, m, u})
	}
	if *asJSON {
		return writeJSON(a.stdout, rows)
	}
	tw := tabwriter.NewWriter(a.stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "formula\tM / (g/mol)\tu(M) / (g/mol)")
	for _, r := range rows {
		fmt.Fprintf(tw, "%s\t%.3f\t%s\n", r.Formula, r.MolarMass, uText(r.U))
	}
	return tw.Flush()
}

// uText prints a standard uncertainty with two significant digits (GUM 7.2.6).
func uText(u float64) string {
	_, s := units.Round(u, u)
	if s == "" {
		return "0"
	}
	return s
}
