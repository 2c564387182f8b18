package calorimeter

import (
	"math"
	"strings"
)

// ReferenceEnthalpy is an accepted molar enthalpy of solution for grading
// a measured value and for checking the sign of a run.
type ReferenceEnthalpy struct {
	Formula    string
	Name       string
	Enthalpy   float64 // J/mol, ΔsolH, positive when dissolving takes up heat (endothermic)
	Source     string
	FromMemory bool // the value was recalled, not read from the source: grade with care
	Conditions string
}

// stdRefSource is where the unmarked reference values come from.
const stdRefSource = "NBS tables / Parker, NSRDS-NBS 2 (1965), as listed in DOMAIN §5"

// stdRefDilute is the condition of every reference value.
const stdRefDilute = "298.15 K, infinite dilution; a run at finite molality differs by the heat of dilution"

// stdReferences are the molar enthalpies of solution of DOMAIN §5, in
// J/mol at 298.15 K and infinite dilution.
var stdReferences = []ReferenceEnthalpy{
	{"NH4NO3", "ammonium nitrate", 25690, stdRefSource, false, stdRefDilute},
	{"NH4Cl", "ammonium chloride", 14780, stdRefSource, false, stdRefDilute},
	{"KNO3", "potassium nitrate", 34890, "from memory [M-high], DOMAIN §5", true, stdRefDilute},
	{"KCl", "potassium chloride", 17220, stdRefSource, false,
		stdRefDilute + "; at 0.111 mol/kg the certified SRM 1655 value is +17.584 kJ/mol (see LookupStandard)"},
	{"NaCl", "sodium chloride", 3880, stdRefSource, false, stdRefDilute},
	{"LiCl", "lithium chloride", -37030, stdRefSource, false, stdRefDilute},
	{"NaOH", "sodium hydroxide", -44510, stdRefSource, false, stdRefDilute},
	{"KOH", "potassium hydroxide", -57610, stdRefSource, false, stdRefDilute},
	{"NaNO3", "sodium nitrate", 20500, stdRefSource, false, stdRefDilute},
	{"CaCl2", "calcium chloride", -81300, "from memory [M-med], DOMAIN §5", true,
		stdRefDilute + "; anhydrous salt; 2:1 salts change by several kJ/mol with concentration"},
	{"MgSO4", "magnesium sulfate", -91200, "from memory [M-med], DOMAIN §5", true,
		stdRefDilute + "; anhydrous salt; 2:2 salts change by several kJ/mol with concentration"},
	{"CO(NH2)2", "urea", 15400, "from memory [M-med], DOMAIN §5", true, stdRefDilute},
}

// stdSameComposition reports whether two compositions have the same
// elements in the same amounts.
func stdSameComposition(a, b Composition) bool {
	if len(a) != len(b) {
		return false
	}
	for s, n := range a {
		if math.Abs(b[s]-n) > 1e-9*math.Max(1, n) {
			return false
		}
	}
	return true
}

// LookupReference returns the reference molar enthalpy of solution of a
// substance given by formula or by name. A formula matches when its
// composition equals the entry's (CO(NH2)2, CH4N2O and (NH2)2CO are all
// urea); a hydrate does not match its anhydrous salt (CaCl2·2H2O is not
// CaCl2), since the enthalpies differ. Names, and formulas typed in the
// wrong case ("kcl"), match case-insensitively. Composition cannot tell
// isomers apart: CH4N2O also stands for ammonium cyanate.
func LookupReference(formulaOrName string) (ReferenceEnthalpy, bool) {
	key := strings.TrimSpace(formulaOrName)
	if c, err := ParseFormula(key); err == nil {
		for _, r := range stdReferences {
			if rc, err := ParseFormula(r.Formula); err == nil && stdSameComposition(c, rc) {
				return r, true
			}
		}
	}
	for _, r := range stdReferences {
		if strings.EqualFold(key, r.Name) || strings.EqualFold(key, r.Formula) {
			return r, true
		}
	}
	return ReferenceEnthalpy{}, false
}

// KnownSign returns the sign of the substance's enthalpy of solution from
// the reference table: +1 endothermic (the solution cools), −1 exothermic
// (it warms). ok is false for a substance not in the table.
func KnownSign(formula string) (sign int, ok bool) {
	r, ok := LookupReference(formula)
	switch {
	case !ok:
		return 0, false
	case r.Enthalpy > 0:
		return 1, true
	case r.Enthalpy < 0:
		return -1, true
	}
	return 0, false
}

// stdCaution is a substance that needs a caution, and what to say.
type stdCaution struct {
	formula string
	text    string
}

// stdCautionTail closes every caution: the tool's text does not replace
// the lab's own safety rules (DOMAIN §10).
const stdCautionTail = " Wear eye protection and follow the safety data sheet, the lab's local rules and licensed practice."

// stdCautions are the cautions of DOMAIN §10 and the hazards of common
// practice for substances used in solution calorimetry.
var stdCautions = []stdCaution{
	{"NaOH", "sodium hydroxide releases much heat as it dissolves and the solution can boil locally and spatter; it is corrosive to eyes and skin."},
	{"KOH", "potassium hydroxide releases much heat as it dissolves and the solution can boil locally and spatter; it is corrosive to eyes and skin."},
	{"CaCl2", "anhydrous calcium chloride heats the solution fast as it dissolves and can spatter; it irritates the eyes."},
	{"LiCl", "lithium chloride releases much heat as it dissolves; it is harmful if swallowed and irritates eyes and skin."},
	{"H2SO4", "concentrated sulfuric acid heats water violently as it mixes and can spatter; add acid to water, never water to acid; it is corrosive."},
	{"HNO3", "concentrated nitric acid heats water as it mixes and can spatter; it is corrosive and a strong oxidiser."},
	{"HCl", "concentrated hydrochloric acid heats water as it mixes and gives off corrosive fumes; add acid to water, never water to acid."},
	{"H3PO4", "concentrated phosphoric acid heats water as it mixes and can spatter; it is corrosive."},
	{"CH3COOH", "glacial acetic acid heats water as it mixes; it is corrosive and flammable."},
	{"HClO4", "perchloric acid is corrosive and a strong oxidiser that can explode with organic matter; use it only under the lab's own written procedure for it."},
	{"HF", "hydrofluoric acid causes severe burns that may not hurt at first and is acutely toxic; use it only under the lab's own written procedure for it."},
	{"NH4NO3", "ammonium nitrate is an oxidiser: keep it away from heat, fuels and organic matter."},
	{"KNO3", "potassium nitrate is an oxidiser: keep it away from fuels and organic matter."},
	{"NaNO3", "sodium nitrate is an oxidiser: keep it away from fuels and organic matter."},
}

// Caution returns a one-line caution for a substance that is hazardous to
// dissolve or handle in a calorimeter (NaOH, KOH, anhydrous CaCl2, LiCl,
// concentrated acids, nitrates), or "" when the table has none. Matching is
// by composition, as in LookupReference. The text defers to the lab's
// local rules, the safety data sheet and licensed practice; its absence
// does not mean a substance is safe.
func Caution(formula string) string {
	c, err := ParseFormula(formula)
	if err != nil {
		return ""
	}
	for _, k := range stdCautions {
		if kc, err := ParseFormula(k.formula); err == nil && stdSameComposition(c, kc) {
			return k.text + stdCautionTail
		}
	}
	return ""
}

// References returns a copy of the table of reference molar enthalpies of
// solution (DOMAIN §5).
func References() []ReferenceEnthalpy {
	return append([]ReferenceEnthalpy(nil), stdReferences...)
}
