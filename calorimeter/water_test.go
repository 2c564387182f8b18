package calorimeter

import (
	"encoding/csv"
	"fmt"
	"math"
	"os"
	"strconv"
	"testing"
)

// waterRow is one row of testdata/water-iapws95-0.1MPa.csv: IAPWS-95 at
// 0.1 MPa computed with Debian's python3-iapws 1.5.3 (DOMAIN §4; copied
// from the project's shared reference data).
type waterRow struct {
	tC, rho, cp, h float64 // °C, kg/m³, J/(g·K), kJ/kg
}

func waterReadTable(t *testing.T) []waterRow {
	t.Helper()
	f, err := os.Open("../testdata/water-iapws95-0.1MPa.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) < 2 || fmt.Sprint(recs[0]) != "[t_C rho_kg_m3 cp_J_gK h_kJ_kg]" {
		t.Fatalf("unexpected header %v", recs[0])
	}
	var rows []waterRow
	for i, r := range recs[1:] {
		var v [4]float64
		for j := range v {
			if v[j], err = strconv.ParseFloat(r[j], 64); err != nil {
				t.Fatalf("row %d: %v", i+2, err)
			}
		}
		rows = append(rows, waterRow{v[0], v[1], v[2], v[3]})
	}
	return rows
}

func TestWaterAgainstIAPWS95(t *testing.T) {
	rows := waterReadTable(t)
	if len(rows) != 121 { // 0–60 °C in 0.5 K steps
		t.Fatalf("%d rows, want 121", len(rows))
	}
	for _, r := range rows {
		T := r.tC + 273.15
		if !WaterValid(T) {
			t.Errorf("WaterValid(%g K) = false inside the table", T)
		}
		// IAPWS-95 table, cp within 9e-5 J/(g·K), the claim of WaterCp's doc
		// (DOMAIN §4; largest deviation 8.8e-5 computed with python3 from the
		// DOMAIN §4 polynomial against the table's cp column)
		if got := WaterCp(T); math.Abs(got-r.cp) > 9e-5 {
			t.Errorf("WaterCp(%g °C) = %.6f, IAPWS-95 %.5f", r.tC, got, r.cp)
		}
		// IAPWS-95 table, Kell 1975 density within 0.004 kg/m³, the claim of
		// WaterDensity's doc (largest deviation 0.0037, computed likewise)
		if got := WaterDensity(T); math.Abs(got-r.rho) > 0.004 {
			t.Errorf("WaterDensity(%g °C) = %.4f, IAPWS-95 %.4f", r.tC, got, r.rho)
		}
	}
	// IAPWS-95 table, enthalpy differences over every span in 0–60 °C
	// within 4e-4 kJ/kg (= J/g), the claim of WaterEnthalpyChange's doc
	// (largest deviation 3.2e-4, computed with python3: the integral of the
	// DOMAIN §4 polynomial against the table's h column; h is tabulated to
	// 1e-4 kJ/kg, so a difference carries up to 1e-4 of rounding).
	n := 0
	for i, a := range rows {
		for _, b := range rows[i+1:] {
			n++
			got := WaterEnthalpyChange(a.tC+273.15, b.tC+273.15)
			if want := b.h - a.h; math.Abs(got-want) > 4e-4 {
				t.Errorf("Δh(%g → %g °C) = %.4f J/g, IAPWS-95 %.4f", a.tC, b.tC, got, want)
			}
		}
	}
	if n != 121*120/2 {
		t.Errorf("only %d enthalpy spans checked", n)
	}
}

func TestWaterPoints(t *testing.T) {
	tests := []struct {
		name string
		got  float64
		want float64
		tol  float64
	}{
		// DOMAIN §4 (IAPWS-95): cp(25 °C) = 4.18132 J/(g·K), fit within 1e-4
		{"cp at 25 °C", WaterCp(298.15), 4.18132, 1e-4},
		// DOMAIN §4 (IAPWS-95): ρ(25 °C) = 997.047 kg/m³, Kell within 0.005
		{"density at 25 °C", WaterDensity(298.15), 997.047, 0.005},
		// Jones & Harris 1992: Kell gives 999.83952 kg/m³ at 0 °C exactly
		{"density at 0 °C", WaterDensity(273.15), 999.83952, 1e-9},
		// analytic: the integral over an empty interval is zero, and the
		// change reverses sign with the interval
		{"empty interval", WaterEnthalpyChange(300, 300), 0, 1e-12},
		{"reversed interval", WaterEnthalpyChange(310, 290) + WaterEnthalpyChange(290, 310), 0, 1e-12},
		// analytic: u(cp) = √((9e-5)² + (1e-3·cp)²), the formula of the doc
		// comment (its 0.1 % term is from memory, see waterIAPWSRelU)
		{"u(cp) at 25 °C", WaterCpU(298.15), math.Hypot(9e-5, 1e-3*WaterCp(298.15)), 1e-15},
		// WaterCpU's doc: "about 0.0042 J/(g·K) near room temperature";
		// analytic: √((9e-5)² + (4.18132e-3)²) = 0.0041823, to 2 digits
		{"u(cp) about 0.0042", WaterCpU(298.15), 0.0042, 5e-5},
		// analytic: u(Δh) = u(cp at the mean)·|ΔT|
		{"u(Δh) 20→40 °C", WaterEnthalpyChangeU(313.15, 293.15), 20 * WaterCpU(303.15), 1e-12},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if math.Abs(tt.got-tt.want) > tt.tol {
				t.Errorf("got %.6f, want %.6f ± %g", tt.got, tt.want, tt.tol)
			}
		})
	}
}

func TestWaterEnthalpyIsIntegralOfCp(t *testing.T) {
	// analytic: dh/dT = cp; central difference, step 1e-3 K, error O(h²)
	for _, T := range []float64{273.15, 285, 298.15, 310, 333.15} {
		const d = 1e-3
		got := WaterEnthalpyChange(T-d, T+d) / (2 * d)
		if want := WaterCp(T); math.Abs(got-want) > 1e-8 {
			t.Errorf("dh/dT at %g K = %.10f, cp = %.10f", T, got, want)
		}
	}
}

func TestWaterValid(t *testing.T) {
	tests := []struct {
		name string
		t    float64
		want bool
	}{
		{"0 °C", 273.15, true},
		{"60 °C", 333.15, true},
		{"below range", 273.14, false},
		{"above range", 333.16, false},
		{"NaN", math.NaN(), false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := WaterValid(tt.t); got != tt.want {
				t.Errorf("WaterValid(%g) = %v, want %v", tt.t, got, tt.want)
			}
		})
	}
}

// ExampleWaterCp: IAPWS-95 (testdata/water-iapws95-0.1MPa.csv) gives
// cp(25 °C) = 4.18132 J/(g·K) and h(40 °C) − h(20 °C) = 167.6151 − 84.0061
// = 83.609 J/g; the density is Kell's, 997.0449 kg/m³ at 25 °C (computed
// with python3 from the formula on waterKellNum), 0.002 below IAPWS-95's
// 997.047.
func ExampleWaterCp() {
	fmt.Printf("cp = %.4f J/(g·K), ρ = %.2f kg/m³\n", WaterCp(298.15), WaterDensity(298.15))
	fmt.Printf("h(40 °C) − h(20 °C) = %.2f J/g\n", WaterEnthalpyChange(293.15, 313.15))
	// Output:
	// cp = 4.1813 J/(g·K), ρ = 997.04 kg/m³
	// h(40 °C) − h(20 °C) = 83.61 J/g
}
