package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func stdMustLookup(t *testing.T, name string) Standard {
	t.Helper()
	s, err := LookupStandard(name)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestStandardReferencePoints(t *testing.T) {
	mTRIS, uMTRIS, err := MolarMass("C4H11NO3")
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name       string
		standard   string
		m          float64
		want, tol  float64 // J/mol
		wantU, uTo float64
	}{
		// from memory: KCl SRM 1655 certificate, +17.584 ± 0.017 kJ/mol at
		// 298.15 K and m = 0.111 mol/kg (DOMAIN §3 [M-high])
		{"KCl at its reference molality", "kcl", 0.111, 17584, 1e-9, 17, 1e-9},
		{"KCl with m = 0 meaning the reference", "kcl-srm1655", 0, 17584, 1e-9, 17, 1e-9},
		// Prosen & Kilday 1973: −245.76 ± 0.26 J/g; analytic ×M(TRIS); DOMAIN
		// §3 rounds it to −29.770 kJ/mol
		{"TRIS in HCl", "tris-hcl", 0, -245.76 * mTRIS, 1e-9, math.Hypot(0.26*mTRIS, 245.76*uMTRIS), 1e-9},
		{"TRIS in HCl per mole as DOMAIN rounds it", "tris-hcl", 0, -29770, 1, math.Hypot(0.26*mTRIS, 245.76*uMTRIS), 1e-9},
		// Prosen & Kilday 1973: +141.80 ± 0.19 J/g; DOMAIN §3: +17.18 kJ/mol
		// (141.80 × 121.136 = 17177 J/mol, hence the 5 J/mol tolerance)
		{"TRIS in NaOH", "tris-naoh", 0, 141.80 * mTRIS, 1e-9, math.Hypot(0.19*mTRIS, 141.80*uMTRIS), 1e-9},
		{"TRIS in NaOH per mole as DOMAIN rounds it", "tris-naoh", 0, 17180, 5, math.Hypot(0.19*mTRIS, 141.80*uMTRIS), 1e-9},
		// Tolerances are float rounding (1e-9 J/mol) except where DOMAIN
		// rounds the value. CODATA key values (DOMAIN §3): −285.830 + 230.015
		// = −55.815 kJ/mol,
		// u = √(0.040² + 0.040²) kJ/mol
		{"neutralisation", "neutralisation", 0, -55815, 1e-6, 40 * math.Sqrt2, 1e-9},
		// a standard without a dilution table ignores the molality
		{"neutralisation ignores molality", "h+oh", 0.5, -55815, 1e-6, 40 * math.Sqrt2, 1e-9},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s := stdMustLookup(t, tt.standard)
			h, u, err := s.EnthalpyAt(298.15, tt.m)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(h-tt.want) > tt.tol {
				t.Errorf("ΔH = %.4f J/mol, want %.4f ± %g", h, tt.want, tt.tol)
			}
			if math.Abs(u-tt.wantU) > tt.uTo {
				t.Errorf("u = %.6f J/mol, want %.6f", u, tt.wantU)
			}
		})
	}
}

func TestStandardTemperatureCorrection(t *testing.T) {
	mTRIS, uMTRIS, _ := MolarMass("C4H11NO3")
	tests := []struct {
		name     string
		standard string
		t        float64 // K
		want     float64 // J/mol
		wantU    float64
	}{
		// analytic: ΔH(T) = ΔH(Tref) + ΔCp·(T − Tref); KCl value and ΔCp =
		// −150 J/(mol·K) from memory (DOMAIN §3), u(ΔCp) = 10 our allowance;
		// tolerance 1e-6 J/mol on ΔH and 1e-9 on u (the same sums)
		{"KCl at 303.15 K", "kcl", 303.15, 17584 - 150*5, math.Hypot(17, 10*5)},
		{"KCl at 293.15 K", "kcl", 293.15, 17584 + 150*5, math.Hypot(17, 10*5)},
		// analytic, Prosen & Kilday 1973 ΔCp = 1.435 ± 0.023 J/(g·K)
		{"TRIS in HCl at 293.15 K", "tris-hcl", 293.15, (-245.76 - 1.435*5) * mTRIS,
			math.Sqrt(math.Pow(0.26*mTRIS, 2) + math.Pow(245.76*uMTRIS, 2) + math.Pow(0.023*mTRIS*5, 2))},
		// analytic, Prosen & Kilday 1973 ΔCp = 1.025 ± 0.025 J/(g·K)
		{"TRIS in NaOH at 301.65 K", "tris-naoh", 301.65, (141.80 + 1.025*3.5) * mTRIS,
			math.Sqrt(math.Pow(0.19*mTRIS, 2) + math.Pow(141.80*uMTRIS, 2) + math.Pow(0.025*mTRIS*3.5, 2))},
		// analytic, Singh et al. 1976 ΔrCp = +215 J/(K·mol), u = 10 our allowance
		{"neutralisation at 300.00 K", "neutralisation", 300, -55815 + 215*1.85,
			math.Hypot(40*math.Sqrt2, 10*1.85)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			h, u, err := stdMustLookup(t, tt.standard).EnthalpyAt(tt.t, 0)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(h-tt.want) > 1e-6 {
				t.Errorf("ΔH = %.6f J/mol, want %.6f", h, tt.want)
			}
			if math.Abs(u-tt.wantU) > 1e-9 {
				t.Errorf("u = %.9f J/mol, want %.9f", u, tt.wantU)
			}
		})
	}
}

func TestStandardKClDilution(t *testing.T) {
	s := stdMustLookup(t, "kcl")
	// DOMAIN §3 φL table (Pitzer model, J/mol at 298.15 K); ΔH∞ = 17.584
	// (from memory, certificate) − 0.344 = 17.240 kJ/mol
	table := []DilutionPoint{
		{0.005, 122}, {0.01, 164}, {0.02, 214}, {0.05, 289}, {0.1, 338},
		{0.111, 344}, {0.2, 358}, {0.3, 340}, {0.5, 264}, {1.0, 7},
	}
	const hInf = 17584 - 344.0
	for _, p := range table {
		t.Run(fmt.Sprintf("m = %g mol/kg", p.Molality), func(t *testing.T) {
			h, u, err := s.EnthalpyAt(298.15, p.Molality)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(h-(hInf+p.PhiL)) > 1e-9 {
				t.Errorf("ΔH = %.6f J/mol, want ΔH∞ + φL = %.6f", h, hInf+p.PhiL)
			}
			// analytic: u² = 17² + (0.03·(φL(m) − 344))², 17 J/mol from memory
			// (certificate) and 3 % our allowance on the dilution correction
			if want := math.Hypot(17, 0.03*(p.PhiL-344)); math.Abs(u-want) > 1e-9 {
				t.Errorf("u = %.6f J/mol, want %.6f", u, want)
			}
		})
	}
	// Fritsch–Butland interpolation never leaves the range of the two
	// neighbouring table points (monotone between nodes, Fritsch & Butland 1984)
	pts := append([]DilutionPoint{{0, 0}}, table...)
	for i := 1; i < len(pts); i++ {
		a, b := pts[i-1], pts[i]
		for _, f := range []float64{0.1, 0.5, 0.9} {
			m := math.Pow(math.Sqrt(a.Molality)+f*(math.Sqrt(b.Molality)-math.Sqrt(a.Molality)), 2)
			h, _, err := s.EnthalpyAt(298.15, m)
			if err != nil {
				t.Fatal(err)
			}
			phi := h - hInf
			lo, hi := min(a.PhiL, b.PhiL), max(a.PhiL, b.PhiL)
			if phi < lo-1e-9 || phi > hi+1e-9 {
				t.Errorf("φL(%.4g mol/kg) = %.3f J/mol, outside [%g, %g] of its neighbours", m, phi, lo, hi)
			}
		}
	}
	// both corrections together add: analytic, 17584 J/mol (from memory)
	// − 150·2 (ΔCp from memory) + φL(0.05) − φL(0.111) (DOMAIN §3 table)
	h, _, err := s.EnthalpyAt(300.15, 0.05)
	if want := 17584 - 150*2 + (289 - 344.0); err != nil || math.Abs(h-want) > 1e-9 {
		t.Errorf("ΔH(300.15 K, 0.05 mol/kg) = %.4f, %v; want %.4f", h, err, want)
	}
}

func TestStandardOutOfRange(t *testing.T) {
	tests := []struct {
		name     string
		standard string
		t, m     float64
		msg      string
	}{
		{"KCl too cold", "kcl", 290, 0, "outside 293.15–303.15 K"},
		{"KCl too warm", "kcl", 310, 0, "outside 293.15–303.15 K"},
		{"temperature not a number", "kcl", math.NaN(), 0, "outside 293.15–303.15 K"},
		{"KCl too concentrated", "kcl", 298.15, 1.5, "outside 0–1 mol/kg"},
		{"KCl infinite molality", "kcl", 298.15, math.Inf(1), "outside 0–1 mol/kg"},
		{"negative molality", "kcl", 298.15, -0.1, "negative"},
		{"molality not a number", "tris-hcl", 298.15, math.NaN(), "not a number"},
		{"TRIS outside 293–303 K", "tris-hcl", 283.15, 0, "outside 293.15–303.15 K"},
		{"neutralisation too warm", "neutralisation", 318.15, 0, "outside 293.15–303.15 K"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, _, err := stdMustLookup(t, tt.standard).EnthalpyAt(tt.t, tt.m)
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, ErrStandardRange) {
				t.Errorf("error %v does not wrap ErrStandardRange", err)
			}
			if !strings.Contains(err.Error(), tt.msg) {
				t.Errorf("error %q does not say %q", err, tt.msg)
			}
		})
	}
}

func TestLookupStandard(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{"short KCl", "kcl", "kcl-srm1655"},
		{"upper case", "KCL-SRM1655", "kcl-srm1655"},
		{"formula as typed", "KCl", "kcl-srm1655"},
		{"TRIS in HCl", "Tris-HCl", "tris-hcl"},
		{"THAM", "THAM", "tris-hcl"},
		{"TRIS in NaOH with a space", "TRIS NaOH", "tris-naoh"},
		{"underscore", "tris_naoh", "tris-naoh"},
		{"h+oh", "H+OH", "neutralisation"},
		{"American spelling", "Neutralization", "neutralisation"},
		{"padded", "  neutralisation ", "neutralisation"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if s := stdMustLookup(t, tt.in); s.Name != tt.want {
				t.Errorf("LookupStandard(%q).Name = %q, want %q", tt.in, s.Name, tt.want)
			}
		})
	}
	_, err := LookupStandard("benzoic acid")
	if !errors.Is(err, ErrUnknownStandard) {
		t.Errorf("unknown name: error %v does not wrap ErrUnknownStandard", err)
	}
	for _, s := range Standards() {
		if err == nil || !strings.Contains(err.Error(), s.Name) {
			t.Errorf("unknown-name error %v does not list %s", err, s.Name)
		}
	}
}

func TestStandardsTable(t *testing.T) {
	list := Standards()
	if len(list) != 4 {
		t.Fatalf("%d standards, want 4", len(list))
	}
	names := map[string]string{}
	for _, s := range list {
		for _, n := range append([]string{s.Name}, s.Aliases...) {
			if other, dup := names[n]; dup {
				t.Errorf("name %q used by %s and %s", n, other, s.Name)
			}
			if n != stdKey(n) {
				t.Errorf("%s: alias %q is not in lookup form", s.Name, n)
			}
			names[n] = s.Name
		}
		if s.Source == "" || s.Conditions == "" || s.Reaction == "" || s.Title == "" {
			t.Errorf("%s: source, conditions, reaction and title must all be given", s.Name)
		}
		m, _, err := MolarMass(s.Formula)
		if err != nil || math.Abs(m-s.MolarMass) > 1e-12 {
			t.Errorf("%s: MolarMass %g, formula %s gives %g (%v)", s.Name, s.MolarMass, s.Formula, m, err)
		}
		if !(s.TMin <= s.RefTemperature && s.RefTemperature <= s.TMax) || !(s.UEnthalpy > 0) || !(s.UDCpDT > 0) {
			t.Errorf("%s: reference point or uncertainties not set", s.Name)
		}
	}
	// the caller's copy does not reach the built-in table
	list[0].Aliases[0] = "changed"
	list[0].Dilution[1].PhiL = 0
	again := stdMustLookup(t, list[0].Name)
	if again.Aliases[0] == "changed" || again.Dilution[1].PhiL == 0 {
		t.Error("Standards() shares its slices with the built-in table")
	}
}

func TestStandardCallerTable(t *testing.T) {
	s := stdMustLookup(t, "kcl")
	s.dilution = nil // as if built by the caller
	h, _, err := s.EnthalpyAt(298.15, 0.2)
	// analytic from DOMAIN §3: 17584 J/mol (SRM 1655, from memory) plus the
	// φL table's 358 − 344 J/mol between 0.2 and 0.111 mol/kg
	if want := 17584 + (358 - 344.0); err != nil || math.Abs(h-want) > 1e-9 {
		t.Errorf("caller-built table: ΔH = %g, %v; want %g", h, err, want)
	}
	s.Dilution = []DilutionPoint{{0.1, 1}, {0.05, 2}}
	if _, _, err := s.EnthalpyAt(298.15, 0.07); err == nil || !strings.Contains(err.Error(), "does not increase") {
		t.Errorf("unsorted table: error %v, want one saying the molality does not increase", err)
	}
}

// ExampleStandard_EnthalpyAt: by hand from DOMAIN §3 (the KCl value and
// ΔCp from memory): 17584 + 150·0.8 + (289 − 344) = 17649 J/mol; u =
// √(17² + (10·0.8)² + (0.03·55)²) = 18.9 J/mol (u(ΔCp) = 10 J/(mol·K) and
// the 3 % on the φL correction are our allowances, see standards.go).
func ExampleStandard_EnthalpyAt() {
	s, err := LookupStandard("kcl")
	if err != nil {
		fmt.Println(err)
		return
	}
	h, u, err := s.EnthalpyAt(297.35, 0.05)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: ΔH = %.3f kJ/mol, u = %.3f kJ/mol\n", s.Name, h/1000, u/1000)
	_, _, err = s.EnthalpyAt(310, 0)
	fmt.Println(err)
	// Output:
	// kcl-srm1655: ΔH = 17.649 kJ/mol, u = 0.019 kJ/mol
	// standard kcl-srm1655: temperature 310.00 K is outside 293.15–303.15 K, the range of its ΔCp correction: outside the range of the standard's data
}

// Reference enthalpies of solution (substances.go).

func TestLookupReference(t *testing.T) {
	tests := []struct {
		name       string
		in         string
		formula    string
		want       float64 // J/mol
		fromMemory bool
	}{
		// DOMAIN §5 (NBS tables / Parker 1965), 298.15 K, infinite dilution
		{"ammonium nitrate", "NH4NO3", "NH4NO3", 25690, false},
		{"ammonium chloride", "NH4Cl", "NH4Cl", 14780, false},
		{"potassium nitrate, from memory", "KNO3", "KNO3", 34890, true}, // DOMAIN §5 [M-high]
		{"potassium chloride", "KCl", "KCl", 17220, false},
		{"sodium chloride", "NaCl", "NaCl", 3880, false},
		{"lithium chloride", "LiCl", "LiCl", -37030, false},
		{"sodium hydroxide", "NaOH", "NaOH", -44510, false},
		{"potassium hydroxide", "KOH", "KOH", -57610, false},
		{"sodium nitrate", "NaNO3", "NaNO3", 20500, false},
		{"calcium chloride, from memory", "CaCl2", "CaCl2", -81300, true},  // DOMAIN §5 [M-med]
		{"magnesium sulfate, from memory", "MgSO4", "MgSO4", -91200, true}, // DOMAIN §5 [M-med]
		{"urea, from memory", "CO(NH2)2", "CO(NH2)2", 15400, true},         // DOMAIN §5 [M-med]
		{"urea by Hill formula", "CH4N2O", "CO(NH2)2", 15400, true},
		{"urea by name", "Urea", "CO(NH2)2", 15400, true},
		{"name in any case", "Ammonium Nitrate", "NH4NO3", 25690, false},
		{"formula in lower case", "kcl", "KCl", 17220, false},
		{"formula in another order", "ClNa", "NaCl", 3880, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r, ok := LookupReference(tt.in)
			if !ok {
				t.Fatalf("LookupReference(%q) found nothing", tt.in)
			}
			if r.Formula != tt.formula || math.Abs(r.Enthalpy-tt.want) > 1e-9 || r.FromMemory != tt.fromMemory {
				t.Errorf("got %s %g J/mol (from memory %v), want %s %g J/mol (%v)",
					r.Formula, r.Enthalpy, r.FromMemory, tt.formula, tt.want, tt.fromMemory)
			}
			if r.Source == "" || !strings.Contains(r.Conditions, "298.15 K") {
				t.Errorf("%s: source %q, conditions %q", r.Formula, r.Source, r.Conditions)
			}
			if r.FromMemory != strings.Contains(r.Source, "from memory") {
				t.Errorf("%s: FromMemory %v but source %q", r.Formula, r.FromMemory, r.Source)
			}
		})
	}
	for _, in := range []string{"CaCl2·2H2O", "CuSO4·5H2O", "sugar", "", "Na+"} {
		if r, ok := LookupReference(in); ok {
			t.Errorf("LookupReference(%q) = %s, want nothing (a hydrate is not its anhydrous salt)", in, r.Formula)
		}
	}
}

func TestKnownSign(t *testing.T) {
	tests := []struct {
		name    string
		formula string
		sign    int
		ok      bool
	}{
		// DOMAIN §5: NH4NO3, KCl, KNO3, NH4Cl and urea are endothermic
		{"ammonium nitrate", "NH4NO3", 1, true},
		{"potassium chloride", "KCl", 1, true},
		{"potassium nitrate", "KNO3", 1, true},
		{"ammonium chloride", "NH4Cl", 1, true},
		{"urea", "CO(NH2)2", 1, true},
		// DOMAIN §5 table: negative values
		{"sodium hydroxide", "NaOH", -1, true},
		{"calcium chloride", "CaCl2", -1, true},
		{"lithium chloride", "LiCl", -1, true},
		{"not in the table", "CuSO4", 0, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			sign, ok := KnownSign(tt.formula)
			if sign != tt.sign || ok != tt.ok {
				t.Errorf("KnownSign(%s) = %d, %v; want %d, %v", tt.formula, sign, ok, tt.sign, tt.ok)
			}
		})
	}
}

func TestCaution(t *testing.T) {
	tests := []struct {
		name    string
		formula string
		want    string // part of the caution; "" for none
	}{
		// DOMAIN §10: NaOH, KOH, CaCl2 and concentrated acids heat fast and can spatter
		{"sodium hydroxide", "NaOH", "spatter"},
		{"potassium hydroxide", "KOH", "spatter"},
		{"calcium chloride", "CaCl2", "spatter"},
		{"sulfuric acid", "H2SO4", "never water to acid"},
		{"hydrochloric acid", "HCl", "fumes"},
		{"acetic acid by composition", "C2H4O2", "glacial acetic acid"},
		{"lithium chloride", "LiCl", "heat"},
		{"ammonium nitrate", "NH4NO3", "oxidiser"},
		{"sodium chloride", "NaCl", ""},
		{"dihydrate is not the anhydrous salt", "CaCl2·2H2O", ""},
		{"not a formula", "Na+", ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := Caution(tt.formula)
			if tt.want == "" {
				if got != "" {
					t.Errorf("Caution(%s) = %q, want none", tt.formula, got)
				}
				return
			}
			if !strings.Contains(got, tt.want) {
				t.Errorf("Caution(%s) = %q, want it to mention %q", tt.formula, got, tt.want)
			}
			// DOMAIN §10: the caution defers to the safety data sheet, the
			// lab's local rules and licensed practice, on one line
			for _, must := range []string{"safety data sheet", "local rules", "licensed practice"} {
				if !strings.Contains(got, must) {
					t.Errorf("Caution(%s) does not mention %q", tt.formula, must)
				}
			}
			if strings.ContainsAny(got, "\n\r") {
				t.Errorf("Caution(%s) is not one line", tt.formula)
			}
		})
	}
}

// ExampleLookupReference: +25.69 kJ/mol for NH4NO3 at 298.15 K, infinite
// dilution, DOMAIN §5 (NBS tables / Parker 1965).
func ExampleLookupReference() {
	r, ok := LookupReference("NH4NO3")
	if !ok {
		return
	}
	sign, _ := KnownSign("NH4NO3")
	fmt.Printf("%s (%s): %+.2f kJ/mol, sign %+d\n", r.Name, r.Formula, r.Enthalpy/1000, sign)
	// Output:
	// ammonium nitrate (NH4NO3): +25.69 kJ/mol, sign +1
}
