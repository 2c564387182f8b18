package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/interp"
)

// Chemical calibration standards: processes of known enthalpy that give a
// calorimeter's energy equivalent from its corrected temperature change
// (DOMAIN §3):
//
//	ε = n·ΔH_ref(T, m)/(−ΔT_corr)
//
// with ΔH_ref taken at the run's temperature and final molality.

// ErrUnknownStandard is wrapped by LookupStandard's error for a name it
// does not know.
var ErrUnknownStandard = errors.New("unknown calibration standard")

// ErrStandardRange is wrapped by EnthalpyAt's error for a temperature or
// molality outside the range the standard's data support.
var ErrStandardRange = errors.New("outside the range of the standard's data")

// DilutionPoint is one point of a relative apparent molar enthalpy table:
// φL in J/mol at molality Molality in mol/kg.
type DilutionPoint struct {
	Molality float64 // mol/kg
	PhiL     float64 // J/mol
}

// Standard is a chemical calibration standard with its published value,
// the conditions it holds for and the data for correcting it to the
// conditions of a run. Enthalpies follow the sign of the process (ΔH > 0
// when it takes up heat, i.e. is endothermic).
type Standard struct {
	Name       string   // canonical name, as LookupStandard accepts it
	Aliases    []string // other names LookupStandard accepts (lower case)
	Title      string   // what it is, for reports
	Formula    string   // substance weighed (or formed, see Weighed)
	Reaction   string   // the process the enthalpy belongs to
	Source     string   // publication of the value and its corrections
	Conditions string   // where the value holds, and how to use it
	FromMemory bool     // the value was taken from memory of the source, not checked against it

	MolarMass float64 // g/mol from Formula (CIAAW 2021)
	// Weighed is true when the amount is the weighed sample mass over
	// MolarMass; false for the neutralisation, whose amount is that of
	// the limiting reagent (acid or base), known from its volume and
	// concentration.
	Weighed bool

	// Enthalpy is ΔH in J/mol at RefTemperature and RefMolality.
	// UEnthalpy is the published ± taken as a standard uncertainty; the
	// sources' coverage of that ± was not checked, and where it is wider
	// than one standard deviation u is overstated, the safe side.
	Enthalpy, UEnthalpy float64
	RefTemperature      float64 // K
	DCpDT, UDCpDT       float64 // ΔCp = dΔH/dT and its standard uncertainty, J/(mol·K)
	TMin, TMax          float64 // K, range of the ΔCp correction

	RefMolality float64 // mol/kg of the certified value; 0 if not molality-corrected
	// Dilution is the φL(m) table for the molality correction, in
	// increasing molality; nil when the standard has none.
	Dilution []DilutionPoint
	// UDilutionRel is the relative standard uncertainty assigned to a
	// difference φL(m) − φL(RefMolality) read from Dilution.
	UDilutionRel float64

	dilution *interp.FritschButland // φL against √m, built from Dilution
}

// stdTRISFormula is tris(hydroxymethyl)aminomethane, (HOCH2)3CNH2.
const stdTRISFormula = "C4H11NO3"

// stdKClPhiL is the relative apparent molar enthalpy of aqueous KCl at
// 298.15 K (J/mol), from the Pitzer model as tabulated in DOMAIN §3 [C].
// The point at m = 0 (φL = 0 by definition) anchors the curve at infinite
// dilution.
var stdKClPhiL = []DilutionPoint{
	{0, 0},
	{0.005, 122}, {0.01, 164}, {0.02, 214}, {0.05, 289}, {0.1, 338},
	{0.111, 344}, {0.2, 358}, {0.3, 340}, {0.5, 264}, {1.0, 7},
}

// stdStandards is built once at package initialisation from stdDefine.
var stdStandards = stdDefine()

func stdDefine() []Standard {
	mTRIS := stdMolarMass(stdTRISFormula)
	uTRIS := stdMolarMassU(stdTRISFormula)
	list := []Standard{
		{
			Name:    "kcl-srm1655",
			Aliases: []string{"kcl", "srm1655", "srm-1655", "nist-1655", "potassium-chloride"},
			Title:   "potassium chloride, NIST SRM 1655",
			Formula: "KCl",
			Reaction: "KCl(cr) + 500 H2O(l) → KCl in 500 H2O (m = 0.111 mol/kg), " +
				"enthalpy of solution",
			Source: "NIST SRM 1655 certificate; Kilday, J. Res. NBS 85 (1980) 467: " +
				"+17.584 ± 0.017 kJ/mol at 298.15 K, m = 0.111 mol/kg (value from memory " +
				"of the certificate, DOMAIN §3 [M-high]: verify against the certificate " +
				"before treating it as certified); dΔsolH/dT ≈ −0.15 kJ/(mol·K) from " +
				"memory [M-med] (Berthelot's data give −0.148); φL(m) from the Pitzer " +
				"model (DOMAIN §3 table)",
			Conditions: "298.15 K, final molality 0.111 mol/kg (KCl + 500 H2O); corrected to " +
				"293.15–303.15 K with ΔCp and to 0–1 mol/kg with φL(m); dry the salt " +
				"as the certificate directs",
			FromMemory:     true,
			Weighed:        true,
			Enthalpy:       17584,
			UEnthalpy:      17,
			RefTemperature: 298.15,
			// −0.15 kJ/(mol·K) from memory; u = 10 J/(mol·K) is our allowance
			// for a from-memory coefficient and for the curvature of ΔH(T)
			// over ±5 K.
			DCpDT:        -150,
			UDCpDT:       10,
			TMin:         293.15,
			TMax:         303.15,
			RefMolality:  0.111,
			Dilution:     stdKClPhiL,
			UDilutionRel: 0.03, // our allowance for the Pitzer model and the interpolation
		},
		{
			Name:    "tris-hcl",
			Aliases: []string{"tris", "tham", "tham-hcl", "srm724", "srm724a", "srm-724a", "tris-in-hcl"},
			Title:   "TRIS (THAM) in 0.1 N HCl, NIST SRM 724a",
			Formula: stdTRISFormula,
			Reaction: "(HOCH2)3CNH2(cr) + HCl(0.1 N, excess) → (HOCH2)3CNH3Cl(aq), " +
				"enthalpy of reaction",
			Source: "Prosen & Kilday, J. Res. NBS 77A (1973) 581: −245.76 ± 0.26 J/g, " +
				"ΔCp = +1.435 ± 0.023 J/(g·K) over 293–303 K (DOMAIN §3); converted " +
				"to J/mol with M(C4H11NO3) from CIAAW 2021",
			Conditions: "298.15 K, TRIS dissolved in 0.1 mol/L HCl in excess (about 0.5 g " +
				"per 100 mL, common practice); corrected to 293.15–303.15 K with ΔCp",
			Weighed:        true,
			Enthalpy:       -245.76 * mTRIS,
			UEnthalpy:      math.Hypot(0.26*mTRIS, 245.76*uTRIS),
			RefTemperature: 298.15,
			DCpDT:          1.435 * mTRIS,
			UDCpDT:         0.023 * mTRIS,
			TMin:           293.15,
			TMax:           303.15,
		},
		{
			Name:    "tris-naoh",
			Aliases: []string{"tham-naoh", "tris-in-naoh"},
			Title:   "TRIS (THAM) in 0.05 N NaOH, NIST SRM 724a",
			Formula: stdTRISFormula,
			Reaction: "(HOCH2)3CNH2(cr) + NaOH(0.05 N) → (HOCH2)3CNH2(aq), " +
				"enthalpy of solution",
			Source: "Prosen & Kilday, J. Res. NBS 77A (1973) 581: +141.80 ± 0.19 J/g, " +
				"ΔCp = +1.025 ± 0.025 J/(g·K) (DOMAIN §3); converted to J/mol with " +
				"M(C4H11NO3) from CIAAW 2021; the 293–303 K range of the HCl " +
				"reaction is assumed for the ΔCp correction",
			Conditions: "298.15 K, TRIS dissolved in 0.0500 mol/L NaOH; corrected to " +
				"293.15–303.15 K with ΔCp",
			Weighed:        true,
			Enthalpy:       141.80 * mTRIS,
			UEnthalpy:      math.Hypot(0.19*mTRIS, 141.80*uTRIS),
			RefTemperature: 298.15,
			DCpDT:          1.025 * mTRIS,
			UDCpDT:         0.025 * mTRIS,
			TMin:           293.15,
			TMax:           303.15,
		},
		{
			Name:     "neutralisation",
			Aliases:  []string{"h+oh", "h++oh-", "neutralization", "strong-acid-base"},
			Title:    "neutralisation of a strong acid by a strong base",
			Formula:  "H2O",
			Reaction: "H⁺(aq) + OH⁻(aq) → H2O(l), infinite dilution",
			Source: "computed from CODATA key values ΔfH°(H2O, l) = −285.830 ± 0.040 " +
				"kJ/mol and ΔfH°(OH⁻, aq) = −230.015 ± 0.040 kJ/mol (ΔfH°(H⁺, aq) = 0), " +
				"uncertainties combined in quadrature (DOMAIN §3); ΔrCp ≈ +215 " +
				"J/(K·mol): Singh et al., Can. J. Chem. 54 (1976) 3315",
			Conditions: "298.15 K, infinite dilution; the amount is that of the limiting " +
				"reagent; real 0.5–1 mol/L reagents give about −57.1 to −57.6 kJ/mol " +
				"(DOMAIN §3, from memory), so correct for the dilution of acid and base",
			Weighed:        false,
			Enthalpy:       (-285.830 - (-230.015)) * 1000,
			UEnthalpy:      math.Hypot(40, 40),
			RefTemperature: 298.15,
			// u = 10 J/(K·mol) is our allowance: ΔrCp of water formation
			// changes quickly with temperature.
			DCpDT:  215,
			UDCpDT: 10,
			TMin:   293.15,
			TMax:   303.15,
		},
	}
	for i := range list {
		s := &list[i]
		s.MolarMass = stdMolarMass(s.Formula)
		if len(s.Dilution) > 0 {
			f, err := stdFitDilution(s.Dilution)
			if err != nil {
				panic("calorimeter: built-in standard " + s.Name + ": " + err.Error()) // programmer error
			}
			s.dilution = f
		}
	}
	return list
}

// stdFitDilution fits φL against √m through the points of a dilution
// table, which must have at least two points in strictly increasing,
// non-negative molality.
func stdFitDilution(pts []DilutionPoint) (*interp.FritschButland, error) {
	if len(pts) < 2 {
		return nil, fmt.Errorf("dilution table has %d points, at least 2 needed", len(pts))
	}
	xs := make([]float64, len(pts))
	ys := make([]float64, len(pts))
	for j, p := range pts {
		if !(p.Molality >= 0) || math.IsInf(p.Molality, 0) || math.IsNaN(p.PhiL) || math.IsInf(p.PhiL, 0) {
			return nil, fmt.Errorf("dilution table point %d: molality %g mol/kg, φL %g J/mol is not usable", j+1, p.Molality, p.PhiL)
		}
		if j > 0 && p.Molality <= pts[j-1].Molality {
			return nil, fmt.Errorf("dilution table point %d: molality %g mol/kg does not increase", j+1, p.Molality)
		}
		xs[j], ys[j] = math.Sqrt(p.Molality), p.PhiL
	}
	var f interp.FritschButland
	if err := f.Fit(xs, ys); err != nil {
		return nil, fmt.Errorf("dilution table: %w", err)
	}
	return &f, nil
}

// stdCopy returns s with its slices copied, so that callers cannot change
// the built-in table.
func stdCopy(s Standard) Standard {
	s.Aliases = slices.Clone(s.Aliases)
	s.Dilution = slices.Clone(s.Dilution)
	return s
}

func stdMolarMass(formula string) float64 {
	m, _, err := MolarMass(formula)
	if err != nil {
		panic("calorimeter: built-in standard: " + err.Error()) // programmer error
	}
	return m
}

func stdMolarMassU(formula string) float64 {
	_, u, err := MolarMass(formula)
	if err != nil {
		panic("calorimeter: built-in standard: " + err.Error()) // programmer error
	}
	return u
}

// Standards returns the built-in calibration standards.
func Standards() []Standard {
	out := make([]Standard, len(stdStandards))
	for i, s := range stdStandards {
		out[i] = stdCopy(s)
	}
	return out
}

// stdKey normalises a name for lookup: lower case, spaces and underscores
// as hyphens.
func stdKey(name string) string {
	k := strings.ToLower(strings.TrimSpace(name))
	k = strings.NewReplacer("_", "-", " ", "-").Replace(k)
	return k
}

// LookupStandard returns the built-in standard of the given name or alias,
// compared case-insensitively with spaces and underscores read as hyphens
// ("KCl", "kcl-srm1655", "tris-hcl", "TRIS NaOH", "h+oh",
// "neutralisation"). An unknown name gives an error that wraps
// ErrUnknownStandard and lists the valid names.
func LookupStandard(name string) (Standard, error) {
	k := stdKey(name)
	for _, s := range stdStandards {
		if k == s.Name || slices.Contains(s.Aliases, k) {
			return stdCopy(s), nil
		}
	}
	var valid []string
	for _, s := range stdStandards {
		valid = append(valid, fmt.Sprintf("%s (also %s)", s.Name, strings.Join(s.Aliases, ", ")))
	}
	return Standard{}, fmt.Errorf("%w %q: valid names are %s", ErrUnknownStandard, name, strings.Join(valid, "; "))
}

// EnthalpyAt returns the standard's enthalpy ΔH in J/mol and its standard
// uncertainty at the absolute temperature t in K and the final molality m
// in mol/kg (0 means the reference molality). The temperature correction
// is linear in ΔCp:
//
//	ΔH(T) = ΔH(T_ref) + ΔCp·(T − T_ref)
//
// and, for a standard with a dilution table (KCl), the molality correction
// is the change of the relative apparent molar enthalpy φL:
//
//	ΔH(T, m) = ΔH(T_ref, m_ref) + ΔCp·(T − T_ref) + φL(m) − φL(m_ref)
//
// so that ΔH∞ + φL(m) with ΔH∞ = ΔH(T_ref, m_ref) − φL(m_ref) (for KCl,
// 17.584 − 0.344 = 17.240 kJ/mol). φL is interpolated in √m with the
// monotone piecewise cubic of Fritsch & Butland (SIAM J. Sci. Stat. Comput.
// 5 (1984) 300; gonum interp.FritschButland), which passes through every
// table point and never overshoots between them; √m makes the
// Debye–Hückel limiting behaviour φL ∝ √m near m = 0 linear. The standard
// uncertainty combines the uncertainty of the reference value, of ΔCp
// times the temperature offset and of the φL difference:
//
//	u² = u²(ΔH_ref) + (u(ΔCp)·(T − T_ref))² + (r·(φL(m) − φL(m_ref)))²
//
// with r = UDilutionRel. Standards without a dilution table ignore m
// except that it may not be negative. An error wrapping ErrStandardRange
// says the supported range when t is outside [TMin, TMax] or m outside the
// table.
func (s Standard) EnthalpyAt(t, m float64) (h, u float64, err error) {
	if !(t >= s.TMin && t <= s.TMax) {
		return 0, 0, fmt.Errorf("standard %s: temperature %.2f K is outside %.2f–%.2f K, the range of its ΔCp correction: %w",
			s.Name, t, s.TMin, s.TMax, ErrStandardRange)
	}
	if math.IsNaN(m) || m < 0 {
		return 0, 0, fmt.Errorf("standard %s: molality %g mol/kg is negative or not a number: %w", s.Name, m, ErrStandardRange)
	}
	dT := t - s.RefTemperature
	h = s.Enthalpy + s.DCpDT*dT
	u2 := s.UEnthalpy*s.UEnthalpy + (s.UDCpDT*dT)*(s.UDCpDT*dT)
	if len(s.Dilution) > 0 && m != 0 {
		f := s.dilution
		if f == nil { // a Standard built by the caller
			if f, err = stdFitDilution(s.Dilution); err != nil {
				return 0, 0, fmt.Errorf("standard %s: %w", s.Name, err)
			}
		}
		lo, hi := s.Dilution[0].Molality, s.Dilution[len(s.Dilution)-1].Molality
		if m < lo || m > hi || s.RefMolality < lo || s.RefMolality > hi {
			return 0, 0, fmt.Errorf("standard %s: molality %g mol/kg (reference %g mol/kg) is outside %g–%g mol/kg, the range of its φL table: %w",
				s.Name, m, s.RefMolality, lo, hi, ErrStandardRange)
		}
		d := f.Predict(math.Sqrt(m)) - f.Predict(math.Sqrt(s.RefMolality))
		h += d
		u2 += (s.UDilutionRel * d) * (s.UDilutionRel * d)
	}
	return h, math.Sqrt(u2), nil
}
