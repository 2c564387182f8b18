package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func formulaClose(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol
}

func TestMolarMassCheckValues(t *testing.T) {
	// CIAAW 2021 conventional weights, DOMAIN §6 check value; tolerance
	// 0.002 g/mol (the check values are rounded to 0.001 g/mol).
	tests := []struct {
		name    string
		formula string
		want    float64
	}{
		{"sodium chloride", "NaCl", 58.440},
		{"potassium chloride", "KCl", 74.548},
		{"potassium nitrate", "KNO3", 101.102}, // also CONTRACT molar-mass value
		{"ammonium nitrate", "NH4NO3", 80.043},
		{"ammonium chloride", "NH4Cl", 53.489},
		{"calcium chloride", "CaCl2", 110.978},
		{"calcium chloride dihydrate", "CaCl2·2H2O", 147.008},
		{"calcium chloride dihydrate, full stop", "CaCl2.2H2O", 147.008},
		{"urea", "CO(NH2)2", 60.056}, // also CONTRACT molar-mass value
		{"urea, other order", "(NH2)2CO", 60.056},
		{"TRIS", "C4H11NO3", 121.136},
		{"TRIS, structural", "(HOCH2)3CNH2", 121.136},
		{"copper sulfate pentahydrate", "CuSO4·5H2O", 249.677}, // also CONTRACT value
		{"copper sulfate pentahydrate, star", "CuSO4*5H2O", 249.677},
		{"copper sulfate pentahydrate, bullet", "CuSO4•5H2O", 249.677},
		{"copper sulfate pentahydrate, full stop", "CuSO4.5H2O", 249.677},
		{"copper sulfate pentahydrate, subscripts", "CuSO₄·5H₂O", 249.677},
		{"copper sulfate pentahydrate, spaced", "  CuSO4 · 5H2O ", 249.677},
		{"magnesium sulfate", "MgSO4", 120.361},
		{"water", "H2O", 18.015},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m, _, err := MolarMass(tt.formula)
			if err != nil {
				t.Fatalf("MolarMass(%q): %v", tt.formula, err)
			}
			if !formulaClose(m, tt.want, 0.002) {
				t.Errorf("MolarMass(%q) = %.4f g/mol, want %.3f ± 0.002", tt.formula, m, tt.want)
			}
		})
	}
}

func TestMolarMassUncertainty(t *testing.T) {
	// analytic from CIAAW 2021 intervals and values (Prohaska et al., Pure
	// Appl. Chem. 94 (2022) 573, Table 1), u = (b − a)/(2√3) for interval
	// elements and U/√3 for single-value ones (van der Veen et al. 2021);
	// tolerance 1e-12 g/mol (the same sums in another order):
	uH := (1.00811 - 1.00784) / (2 * math.Sqrt(3))
	uO := (15.99977 - 15.99903) / (2 * math.Sqrt(3))
	uN := (14.00728 - 14.00643) / (2 * math.Sqrt(3))
	uC := (12.0116 - 12.0096) / (2 * math.Sqrt(3))
	uK := 0.0001 / math.Sqrt(3)
	uCl := (35.457 - 35.446) / (2 * math.Sqrt(3))
	uCu := 0.003 / math.Sqrt(3)
	uS := (32.076 - 32.059) / (2 * math.Sqrt(3))
	tests := []struct {
		name    string
		formula string
		want    float64
	}{
		// atoms of one element add linearly, elements in quadrature
		{"water", "H2O", math.Hypot(2*uH, uO)},
		{"potassium chloride", "KCl", math.Hypot(uK, uCl)},
		{"urea", "CO(NH2)2", math.Sqrt(uC*uC + uO*uO + (2*uN)*(2*uN) + (4*uH)*(4*uH))},
		{"copper sulfate pentahydrate", "CuSO4·5H2O",
			math.Sqrt(uCu*uCu + uS*uS + (9*uO)*(9*uO) + (10*uH)*(10*uH))},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, u, err := MolarMass(tt.formula)
			if err != nil {
				t.Fatal(err)
			}
			if !formulaClose(u, tt.want, 1e-12) {
				t.Errorf("u(M(%s)) = %.6g g/mol, want %.6g", tt.formula, u, tt.want)
			}
		})
	}
}

func TestParseFormulaComposition(t *testing.T) {
	// analytic: atom counts read off the formula by hand
	tests := []struct {
		name    string
		formula string
		want    Composition
	}{
		{"ammonium sulfate", "(NH4)2SO4", Composition{"N": 2, "H": 8, "S": 1, "O": 4}},
		{"urea", "CO(NH2)2", Composition{"C": 1, "O": 1, "N": 2, "H": 4}},
		{"washing soda", "Na2CO3·10H2O", Composition{"Na": 2, "C": 1, "O": 13, "H": 20}},
		{"potassium ferrocyanide trihydrate", "K4[Fe(CN)6]·3H2O",
			Composition{"K": 4, "Fe": 1, "C": 6, "N": 6, "H": 6, "O": 3}},
		{"nested brackets", "[Co(NH3)6]Cl3", Composition{"Co": 1, "N": 6, "H": 18, "Cl": 3}},
		{"hemihydrate", "CaSO4·0.5H2O", Composition{"Ca": 1, "S": 1, "O": 4.5, "H": 1}},
		{"hemihydrate with full stops", "CaSO4.0.5H2O", Composition{"Ca": 1, "S": 1, "O": 4.5, "H": 1}},
		{"wüstite", "Fe0.95O", Composition{"Fe": 0.95, "O": 1}},
		{"decimal count in a group", "(Fe1.5)O", Composition{"Fe": 1.5, "O": 1}},
		{"decimal count at the end", "OH2.5", Composition{"O": 1, "H": 2.5}},
		{"dot after digits is a hydrate", "CaCl2.2H2O", Composition{"Ca": 1, "Cl": 2, "H": 4, "O": 2}},
		{"two adducts", "CuSO4·H2O·4H2O", Composition{"Cu": 1, "S": 1, "O": 9, "H": 10}},
		{"leading count", "2H2O", Composition{"H": 4, "O": 2}},
		{"case matters: cobalt", "Co", Composition{"Co": 1}},
		{"case matters: carbon monoxide", "CO", Composition{"C": 1, "O": 1}},
		{"repeated element", "CH3COOH", Composition{"C": 2, "H": 4, "O": 2}},
		{"multi-digit count", "C12H22O11", Composition{"C": 12, "H": 22, "O": 11}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := ParseFormula(tt.formula)
			if err != nil {
				t.Fatalf("ParseFormula(%q): %v", tt.formula, err)
			}
			if len(got) != len(tt.want) {
				t.Fatalf("ParseFormula(%q) = %v, want %v", tt.formula, got, tt.want)
			}
			for s, n := range tt.want {
				if !formulaClose(got[s], n, 1e-12) {
					t.Errorf("ParseFormula(%q)[%s] = %g, want %g", tt.formula, s, got[s], n)
				}
			}
		})
	}
}

func TestParseFormulaErrors(t *testing.T) {
	tests := []struct {
		name    string
		formula string
		pos     int
		msg     string // part of the message
	}{
		{"empty", "", -1, "is empty"},
		{"blank", "   ", -1, "is empty"},
		{"unknown element", "CuSO4·5HX2O", 8, `unknown element "X"`},
		{"unknown two-letter element", "Xx", 0, `unknown element "Xx"`},
		{"no standard atomic weight", "TcO2", 0, `element "Tc" has no standard atomic weight`},
		{"unclosed parenthesis", "(NH4", 0, "never closed"},
		{"unclosed, nothing inside", "Ca(", 2, "never closed"},
		{"unopened parenthesis", "NH4)2", 3, "without a matching opening bracket"},
		{"mismatched brackets", "[Fe(CN]6", 6, `does not close`},
		{"empty group", "Ca()2", 2, "empty group"},
		{"zero count", "H0", 1, "zero"},
		{"zero decimal count", "H0.0", 1, "zero"},
		{"zero group count", "(OH)0", 4, "zero"},
		{"zero leading count", "CuSO4·0H2O", 6, "zero"},
		{"leading zero", "H02O", 1, "leading zero"},
		{"charge plus", "Na+", 2, "charges are not supported"},
		{"charge caret", "SO4^2-", 3, "charges are not supported"},
		{"charge minus", "OH-", 2, "charges are not supported"},
		{"lower case", "nacl", 0, "capital letter"},
		{"trailing separator", "CuSO4·", 5, "nothing follows"},
		{"leading separator", "·H2O", 0, "nothing before"},
		{"double separator", "CuSO4··H2O", 6, "nothing before"},
		{"count without formula", "CuSO4·5", 6, "not followed by a formula"},
		{"inner space", "Na Cl", 2, "unexpected space"},
		{"separator in brackets", "(H2O·H2O)", 4, "inside brackets"},
		{"count too large", "H2000000000", 1, "larger than"},
		{"nested too deep", strings.Repeat("(", 40) + "H" + strings.Repeat(")", 40), 32, "nested deeper"},
		{"total too large", "(((H1000)1000)1000)2", -1, "outside"},
		{"total too small", "(H0.001)0.0001", -1, "outside"},
		{"other character", "H2O!", 3, `unexpected "!"`},
		{"ambiguous dot", "H2.5.O", 3, "count 5 is not followed by a formula"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := ParseFormula(tt.formula)
			if err == nil {
				t.Fatalf("ParseFormula(%q) succeeded, want an error", tt.formula)
			}
			var fe *FormulaError
			if !errors.As(err, &fe) {
				t.Fatalf("error %v is %T, want *FormulaError", err, err)
			}
			if fe.Pos != tt.pos {
				t.Errorf("Pos = %d, want %d (%v)", fe.Pos, tt.pos, err)
			}
			if !strings.Contains(fe.Msg, tt.msg) {
				t.Errorf("Msg = %q, want it to contain %q", fe.Msg, tt.msg)
			}
			if _, _, mErr := MolarMass(tt.formula); mErr == nil || !errors.As(mErr, &fe) {
				t.Errorf("MolarMass(%q) error = %v, want a *FormulaError", tt.formula, mErr)
			}
		})
	}
}

func TestFormulaErrorText(t *testing.T) {
	// the wording given in the package brief
	_, err := ParseFormula("CuSO4·5HX2O")
	want := `formula "CuSO4·5HX2O": unknown element "X" at position 8`
	if err == nil || err.Error() != want {
		t.Errorf("error = %v, want %s", err, want)
	}
	_, err = ParseFormula("")
	if want := `formula "": is empty`; err == nil || err.Error() != want {
		t.Errorf("error = %v, want %s", err, want)
	}
}

func TestCompositionString(t *testing.T) {
	// Hill order (CAS convention: C, H, then alphabetical; alphabetical
	// when there is no carbon), common practice
	tests := []struct {
		name    string
		formula string
		want    string
	}{
		{"TRIS", "(HOCH2)3CNH2", "C4H11NO3"},
		{"urea", "CO(NH2)2", "CH4N2O"},
		{"no carbon, alphabetical", "NaCl", "ClNa"},
		{"water", "H2O", "H2O"},
		{"hydrate merged", "CuSO4·5H2O", "CuH10O9S"},
		{"fraction below one", "Fe0.95O", "Fe0.95O"},
		{"dot before a symbol separates a hydrate", "Fe1.5O", "FeO5"}, // the rule documented on ParseFormula
		{"fraction above one in a group", "(C1.5)H3", "(C1.5)H3"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c, err := ParseFormula(tt.formula)
			if err != nil {
				t.Fatal(err)
			}
			if got := c.String(); got != tt.want {
				t.Errorf("String() = %q, want %q", got, tt.want)
			}
		})
	}
}

func TestAtomicWeightTable(t *testing.T) {
	// CIAAW 2021 Table 1: of Z = 1…92, all but Tc, Pm, Po, At, Rn, Fr, Ra
	// and Ac have a standard atomic weight (84 elements).
	if len(formulaElements) != 84 {
		t.Errorf("table has %d elements, want 84", len(formulaElements))
	}
	seen := map[int]bool{}
	for i, e := range formulaElements {
		if seen[e.z] || (i > 0 && e.z <= formulaElements[i-1].z) {
			t.Errorf("%s: Z = %d out of order or repeated", e.symbol, e.z)
		}
		seen[e.z] = true
		if formulaNoWeightBy[e.symbol] {
			t.Errorf("%s is listed both with and without a weight", e.symbol)
		}
		w, u, ok := AtomicWeight(e.symbol)
		if !ok || !(u > 0) || !(w > 0) {
			t.Errorf("AtomicWeight(%s) = %g, %g, %v", e.symbol, w, u, ok)
		}
		// CIAAW rounds the conventional values, so O (15.999) and Tl
		// (204.38) lie just outside their intervals; none by more than 0.005.
		if e.hi > e.lo && (w < e.lo-0.005 || w > e.hi+0.005) {
			t.Errorf("%s: conventional value %g far from its interval [%g, %g]", e.symbol, w, e.lo, e.hi)
		}
		if (e.hi > e.lo) == (e.tabU > 0) {
			t.Errorf("%s: give either an interval or a tabulated uncertainty", e.symbol)
		}
	}
	for z := 1; z <= 92; z++ {
		if !seen[z] && z != 43 && z != 61 && (z < 84 || z > 89) {
			t.Errorf("Z = %d is missing", z)
		}
	}
	// DOMAIN §6: conventional values of the interval elements
	conventional := map[string]float64{"H": 1.008, "Li": 6.94, "B": 10.81, "C": 12.011,
		"N": 14.007, "O": 15.999, "Mg": 24.305, "Si": 28.085, "S": 32.06, "Cl": 35.45}
	for s, want := range conventional {
		if w, _, _ := AtomicWeight(s); !formulaClose(w, want, 1e-9) {
			t.Errorf("AtomicWeight(%s) = %g, want %g (DOMAIN §6)", s, w, want)
		}
	}
	if _, _, ok := AtomicWeight("Tc"); ok {
		t.Error("AtomicWeight(Tc) ok, want false: no standard atomic weight")
	}
}

func FuzzParseFormula(f *testing.F) {
	for _, s := range []string{"CuSO4·5H2O", "CaCl2.2H2O", "(NH4)2SO4", "CO(NH2)2",
		"Na2CO3·10H2O", "K4[Fe(CN)6]·3H2O", "CaSO4.0.5H2O", "Fe0.95O", "(C1.5)H3",
		"H2.5", "Na+", "((H)", "CuSO₄·5H₂O", " KCl ", "X", "H0"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c, err := ParseFormula(s)
		if err != nil {
			var fe *FormulaError
			if !errors.As(err, &fe) {
				t.Fatalf("ParseFormula(%q) error %v is %T, want *FormulaError", s, err, err)
			}
			return
		}
		m, u := c.MolarMass()
		if !(m > 0) || math.IsInf(m, 0) || !(u >= 0) {
			t.Fatalf("ParseFormula(%q): molar mass %g ± %g", s, m, u)
		}
		canon := c.String()
		c2, err := ParseFormula(canon)
		if err != nil {
			t.Fatalf("%q renders as %q, which does not parse: %v", s, canon, err)
		}
		m2, u2 := c2.MolarMass()
		if math.Abs(m2-m) > 1e-12*m || math.Abs(u2-u) > 1e-9*u+1e-15 {
			t.Fatalf("%q: %g ± %g g/mol, but its rendering %q gives %g ± %g", s, m, u, canon, m2, u2)
		}
	})
}

// ExampleMolarMass: by hand from the CIAAW 2021 values (DOMAIN §6),
// 63.546 + 32.06 + 9·15.999 + 10·1.008 = 249.677 g/mol; u from the rule of
// TestMolarMassUncertainty, computed with python3: sqrt(uCu² + uS² +
// (9uO)² + (10uH)²) = 0.00560 g/mol.
func ExampleMolarMass() {
	m, u, err := MolarMass("CuSO4·5H2O")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.3f g/mol, u = %.4f g/mol\n", m, u)
	_, _, err = MolarMass("CuSO4·5HX2O")
	fmt.Println(err)
	// Output:
	// 249.677 g/mol, u = 0.0056 g/mol
	// formula "CuSO4·5HX2O": unknown element "X" at position 8
}

func TestCompositionMolarMassUnknownSymbol(t *testing.T) {
	// a composition built by hand with a symbol that has no atomic weight
	if m, u := (Composition{"H": 2, "Tc": 1}).MolarMass(); !math.IsNaN(m) || !math.IsNaN(u) {
		t.Errorf("MolarMass = %g, %g; want NaN, NaN", m, u)
	}
}

// BenchmarkMolarMass: target ≤ 10 µs per formula, so that a batch manifest
// of 10⁴ rows spends under 0.1 s on molar masses (our target).
func BenchmarkMolarMass(b *testing.B) {
	for b.Loop() {
		if _, _, err := MolarMass("K4[Fe(CN)6]·3H2O"); err != nil {
			b.Fatal(err)
		}
	}
}
