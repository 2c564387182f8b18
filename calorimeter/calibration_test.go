package calorimeter

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"
)

func TestCalibrateElectrical(t *testing.T) {
	r, tt, _ := chainAnalyse(t, chainElectricalSim(chainEps, 7))
	col := chainPowerColumn(tt, 502.5, 502.5+chainHeatTime, chainPower)
	hp, err := HeaterEnergy(tt, col)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name         string
		el           Electrical
		variant      string
		heat, uHeat  float64 // analytic: q = P·t_h, u² = (t·u_P)² + (P·u_t)² (and V·I·t)
		wantSymbols  []string
		contentsMass float64
	}{
		{
			name: "power and time", variant: "power-time",
			el:   Electrical{Power: 0.5, UPower: 0.0005, Time: 300, UTime: 0.1},
			heat: 150, uHeat: math.Hypot(300*0.0005, 0.5*0.1), wantSymbols: []string{"P", "t_h", "ΔT_cal"},
		},
		{
			name: "voltage, current and time", variant: "voltage-current",
			el:   Electrical{Voltage: 5, UVoltage: 0.002, Current: 0.1, UCurrent: 0.0001, Time: 300, UTime: 0.1},
			heat: 150, uHeat: 150 * math.Sqrt(0.002/5*0.002/5+0.0001/0.1*0.0001/0.1+0.1/300*0.1/300),
			wantSymbols: []string{"V", "I", "t_h", "ΔT_cal"},
		},
		{
			name: "heater-power column, with the vessel split off", variant: "power-column",
			el:   Electrical{Energy: hp.Energy, UEnergy: hp.UEnergy},
			heat: 150, uHeat: hp.UEnergy, wantSymbols: []string{"Q_el", "ΔT_cal", "m_w,cal", "k_cp"},
			contentsMass: chainFill,
		},
	} {
		t.Run(tc.name, func(t *testing.T) {
			el := tc.el
			run, err := CalibrateRun(r, CalibrationSetup{RunID: "elcal", Electrical: &el, ContentsMass: tc.contentsMass, UMass: 0.01})
			if err != nil {
				t.Fatal(err)
			}
			if run.Method != MethodElectrical || run.Variant != tc.variant {
				t.Errorf("method %s/%s, want electrical/%s", run.Method, run.Variant, tc.variant)
			}
			var syms []string
			for _, in := range run.Inputs {
				syms = append(syms, in.Symbol)
			}
			if strings.Join(syms, " ") != strings.Join(tc.wantSymbols, " ") {
				t.Errorf("inputs %v, want %v", syms, tc.wantSymbols)
			}
			// Simulated ε = 512 J/K; analytic: ε = P·t/ΔT_truth. 0.3 % is the
			// brief's tolerance for a precision run.
			if !chainClose(run.HeatCapacity, chainEps, 0, 0.003) {
				t.Errorf("ε = %.4f J/K, simulated %.1f J/K (tolerance 0.3 %%)", run.HeatCapacity, chainEps)
			}
			// analytic: q = ε·ΔT is the heat put in, with u(q) that of P·t
			// alone: ε and ΔT are correlated through ε = q/ΔT.
			if !chainClose(run.Heat, tc.heat, 0, 1e-9) || !chainClose(run.UHeat, tc.uHeat, 0, 1e-6) {
				t.Errorf("heat %.6g ± %.6g J, want %.6g ± %.6g J", run.Heat, run.UHeat, tc.heat, tc.uHeat)
			}
			if !chainClose(run.HeatCapacity*run.DeltaT, run.Heat, 0, 1e-9) {
				t.Errorf("ε·ΔT = %.6g J is not the heat %.6g J", run.HeatCapacity*run.DeltaT, run.Heat)
			}
			// analytic: u²(ε)/ε² = u²(q)/q² + u²(ΔT)/ΔT² (first order).
			wantU := run.HeatCapacity * math.Hypot(tc.uHeat/tc.heat, r.UDeltaT/r.DeltaT)
			if !chainClose(run.UHeatCapacity, wantU, 0, 1e-4) {
				t.Errorf("u(ε) = %.6g J/K, want %.6g J/K", run.UHeatCapacity, wantU)
			}
			// The ΔT input carries the degrees of freedom of its analysis.
			if got := chainTerm(t, run.Budget, "ΔT_cal").DoF; !chainClose(got, r.DoF, 0, 1e-12) {
				t.Errorf("ν(ΔT_cal) = %g, the analysis found %g", got, r.DoF)
			}
			if tc.contentsMass == 0 {
				if run.Vessel != nil {
					t.Errorf("vessel part %g J/K without a contents mass", *run.Vessel)
				}
				return
			}
			// analytic: C_v = ε − k_cp·m_w·c_p(T), k_cp = 1, and, ε not
			// depending on m_w or k_cp, u²(C_v) = u²(ε) + (c_p·u_m)² + (m_w·c_p·u_k)².
			cp := WaterCp(r.MeanTemperature)
			uk := WaterCpU(r.MeanTemperature) / cp
			wantV := run.HeatCapacity - chainFill*cp
			wantUV := math.Sqrt(run.UHeatCapacity*run.UHeatCapacity + (cp*0.01)*(cp*0.01) + (chainFill*cp*uk)*(chainFill*cp*uk))
			if run.Vessel == nil || !chainClose(*run.Vessel, wantV, 1e-9, 0) || !chainClose(*run.UVessel, wantUV, 0, 1e-6) {
				t.Errorf("vessel part %v ± %v J/K, want %.6g ± %.6g J/K", run.Vessel, run.UVessel, wantV, wantUV)
			}
		})
	}
}

// chainTerm returns the budget line of the input with the given symbol.
func chainTerm(t *testing.T, b *Budget, symbol string) BudgetTerm {
	t.Helper()
	for _, term := range b.Terms {
		if term.Symbol == symbol {
			return term
		}
	}
	t.Fatalf("budget has no input %s", symbol)
	return BudgetTerm{}
}

// chainStandardRun simulates a run with a chemical standard: the heat
// −n·ΔH(T, m) from the Standard table at the run's mean temperature (found
// by re-simulating once with the mean the first analysis gives).
func chainStandardRun(t *testing.T, std Standard, mass, solvent, eps float64, seed uint64) *Rise {
	t.Helper()
	n := mass / std.MolarMass
	m := 0.0
	if solvent > 0 {
		m = n / (solvent / 1000)
	}
	tMean := 298.15
	var r *Rise
	for range 2 {
		h, _, err := std.EnthalpyAt(tMean, m)
		if err != nil {
			t.Fatal(err)
		}
		q := -n * h
		s := Simulation{
			Duration: 1500, Interval: 5, MixTime: 500,
			// θ∞ at the start, and the start put so that the mean
			// temperature of the run is near 298.15 K.
			StartTemperature: 298.15 - q/eps/2, ConvergenceTemperature: 298.15 - q/eps/2, CoolingConstant: 6e-4,
			HeatCapacity: eps, Heat: q, ReleaseRate: 0.03, ProbeLag: 3,
			Noise: 0.00015, Quantum: 0.0001, Seed: seed,
		}
		r, _, _ = chainAnalyse(t, s)
		tMean = r.MeanTemperature
	}
	return r
}

func TestCalibrateStandard(t *testing.T) {
	for _, tc := range []struct {
		name, std     string
		mass, solvent float64 // g
	}{
		// Prosen & Kilday, J. Res. NBS 77A (1973) 581: TRIS in 0.1 N HCl,
		// −245.76 J/g; 0.5 g in about 100 mL (common practice).
		{"TRIS in HCl (Prosen & Kilday 1973)", "tris-hcl", 0.5003, 0},
		// SRM 1655 KCl at 0.111 mol/kg in 100 g of water (value from memory
		// of the certificate, DOMAIN §3).
		{"KCl, SRM 1655", "kcl", 0.8275, 100.0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			std, err := LookupStandard(tc.std)
			if err != nil {
				t.Fatal(err)
			}
			r := chainStandardRun(t, std, tc.mass, tc.solvent, chainEps, 31)
			run, err := CalibrateRun(r, CalibrationSetup{RunID: tc.std, UMass: 0.0001,
				Chemical: &ChemicalCalibration{Standard: std, Mass: tc.mass, SolventMass: tc.solvent}})
			if err != nil {
				t.Fatal(err)
			}
			// Simulated ε = 512 J/K; brief's tolerance 0.3 %.
			if !chainClose(run.HeatCapacity, chainEps, 0, 0.003) {
				t.Errorf("ε = %.4f J/K, simulated %.1f J/K (tolerance 0.3 %%)", run.HeatCapacity, chainEps)
			}
			if run.Status == Fail {
				t.Errorf("status fail: %v", run.Checks)
			}
			for _, c := range run.Checks {
				if c.Name == "calibration-sign" {
					t.Errorf("sign check fired on a consistent run: %s", c.Detail)
				}
			}
			// analytic: q = −(m/M)·ΔH(T, m).
			m := 0.0
			if tc.solvent > 0 {
				m = tc.mass / std.MolarMass / (tc.solvent / 1000)
			}
			h, _, _ := std.EnthalpyAt(r.MeanTemperature, m)
			if q := -tc.mass / std.MolarMass * h; !chainClose(run.Heat, q, 0, 1e-9) {
				t.Errorf("heat %.6g J, want −n·ΔH = %.6g J", run.Heat, q)
			}
		})
	}
}

func TestCalibrateStandardSign(t *testing.T) {
	// A KCl run that warmed: the standard dissolves endothermically
	// (DOMAIN §3, ΔsolH > 0), so the run is inconsistent.
	std, _ := LookupStandard("kcl")
	r := &Rise{DeltaT: 0.38, UDeltaT: 0.0003, DoF: 60, MeanTemperature: 298.15, InitialTemperature: 297.96, FinalTemperature: 298.34}
	run, err := CalibrateRun(r, CalibrationSetup{RunID: "k", Chemical: &ChemicalCalibration{Standard: std, Mass: 0.8275}})
	if err != nil {
		t.Fatal(err)
	}
	if run.Status != Fail {
		t.Errorf("status %s, want fail: %v", run.Status, run.Checks)
	}
	names := ""
	for _, c := range run.Checks {
		names += c.Name + "=" + string(c.Status) + " "
	}
	if !strings.Contains(names, "calibration-sign=fail") || !strings.Contains(names, "heat-capacity-positive=fail") {
		t.Errorf("checks %s, want calibration-sign and heat-capacity-positive failed", names)
	}
}

func TestCalibrateMixingSign(t *testing.T) {
	// Hot water poured in, yet the vessel ended colder than it began: the
	// run cannot be a mixing calibration (energy balance, DOMAIN §3).
	r := &Rise{DeltaT: -1, UDeltaT: 0.01, DoF: 40, InitialTemperature: 300.15, FinalTemperature: 299.15, MeanTemperature: 299.65}
	run, err := CalibrateRun(r, CalibrationSetup{RunID: "m", Mixing: &Mixing{ColdMass: 50, HotMass: 50, HotTemperature: 320.15}})
	if err != nil {
		t.Fatal(err)
	}
	if run.Status != Fail || !strings.Contains(fmt.Sprint(run.Checks), "calibration-sign fail") {
		t.Errorf("status %s, checks %v: want calibration-sign failed", run.Status, run.Checks)
	}
}

// Rows of testdata/water-iapws95-0.1MPa.csv (IAPWS-95 at 0.1 MPa, Debian
// python3-iapws 1.5.3): t/°C, c_p/(J g⁻¹ K⁻¹), h/(kJ/kg = J/g).
//
//	20.0  4.18406   84.0061
//	32.0  4.17950  134.1806
//	45.0  4.18015  188.5138
//
// Hand calculation, 50 g cold water at 20 °C, 50 g hot water at 45 °C,
// final 32 °C (DOMAIN §3):
//
//	C_cal = {50·(188.5138 − 134.1806) − 50·(134.1806 − 84.0061)}/(32 − 20)
//	      = (2716.660 − 2508.725)/12 = 17.3279 J/K
const (
	chainIAPWSVessel                = 17.3279
	chainCp20, chainCp32, chainCp45 = 4.18406, 4.17950, 4.18015
)

func TestCalibrateMixingIAPWS(t *testing.T) {
	tc, tf, th := 293.15, 305.15, 318.15
	uc, uf, cov := 0.010, 0.012, 0.6*0.010*0.012 // K, K, K²: a correlated pair, as the fore and after lines give
	r := &Rise{DeltaT: tf - tc, UDeltaT: 0.01, DoF: math.Inf(1), InitialTemperature: tc, FinalTemperature: tf,
		UInitial: uc, UFinal: uf, CovInitialFinal: cov, MeanTemperature: (tc + tf) / 2, Method: MethodExtrapolation}
	mx := &Mixing{ColdMass: 50, UColdMass: 0.01, HotMass: 50, UHotMass: 0.01, HotTemperature: th, UHotTemperature: 0.01}
	run, err := CalibrateRun(r, CalibrationSetup{RunID: "mix", Mixing: mx})
	if err != nil {
		t.Fatal(err)
	}
	// The table's h has 4 decimals in kJ/kg and the model's c_p fit is
	// within 4·10⁻⁴ J/g of IAPWS-95 enthalpy differences (water.go, tested
	// in TestWaterAgainstIAPWS95): 2·50 g·4·10⁻⁴ J/g/12 K = 0.0033 J/K at
	// most, tolerance 0.005 J/K.
	if run.Vessel == nil || !chainClose(*run.Vessel, chainIAPWSVessel, 0.005, 0) {
		t.Fatalf("vessel part %v J/K, hand calculation from IAPWS-95 rows %.4f J/K", run.Vessel, chainIAPWSVessel)
	}
	// analytic: ε = C_v + (m_c + m_h)·c_p(T_f), c_p from the 32 °C row.
	if want := chainIAPWSVessel + 100*chainCp32; !chainClose(run.HeatCapacity, want, 0.01, 0) {
		t.Errorf("ε = %.4f J/K, want %.4f J/K", run.HeatCapacity, want)
	}
	// analytic: the heat the hot water gives up, m_h[h(T_h) − h(T_f)].
	if !chainClose(run.Heat, 2716.660, 0.02, 0) {
		t.Errorf("heat %.4f J, want 2716.660 J from the table", run.Heat)
	}
	// analytic sensitivities of C = N/D, D = T_f − T_c (cf. DOMAIN §3):
	//	∂C/∂T_h = m_h c_p(T_h)/D, ∂C/∂T_c = (m_c c_p(T_c) + C)/D,
	//	∂C/∂T_f = −((m_c + m_h) c_p(T_f) + C)/D, ∂C/∂m_h = Δh_h/D, ∂C/∂m_c = −Δh_c/D,
	//	∂C/∂k_cp = C,
	// and u²(C) = Σ(c_i u_i)² + 2 c_Tc c_Tf cov(T_c, T_f).
	D, C := tf-tc, chainIAPWSVessel
	cTh, cTc, cTf := 50*chainCp45/D, (50*chainCp20+C)/D, -(100*chainCp32+C)/D
	cMh, cMc := (188.5138-134.1806)/D, -(134.1806-84.0061)/D
	uk := WaterCpU(tf) / WaterCp(tf)
	u2 := (cTh*0.01)*(cTh*0.01) + (cTc*uc)*(cTc*uc) + (cTf*uf)*(cTf*uf) + 2*cTc*cTf*cov +
		(cMh*0.01)*(cMh*0.01) + (cMc*0.01)*(cMc*0.01) + (C*uk)*(C*uk)
	if !chainClose(*run.UVessel, math.Sqrt(u2), 0, 2e-3) {
		t.Errorf("u(C_v) = %.5f J/K, analytic %.5f J/K", *run.UVessel, math.Sqrt(u2))
	}
	// The correlation is stored with the run and is what makes the difference.
	if len(run.Correlations) != 1 || !chainClose(run.Correlations[0].R, 0.6, 1e-12, 0) {
		t.Errorf("correlations %v, want T_c–T_f 0.6", run.Correlations)
	}
	indep := math.Sqrt(u2 - 2*cTc*cTf*cov)
	if math.Abs(*run.UVessel-indep) < 0.05*indep {
		t.Errorf("u(C_v) = %.5f J/K hardly differs from the uncorrelated %.5f J/K: the correlation is not used", *run.UVessel, indep)
	}
}

// chainCup is the invented Harbour Street teaching lab's coffee cup: two
// nested polystyrene cups, lid and probe (DOMAIN §1: 10–40 J/K).
const chainCup = 24.0 // J/K

// chainMixFinal solves the energy balance of a mixing run for the final
// temperature (as examples/internal/demo does):
// m_h[h(T_h) − h(T_f)] = m_c[h(T_f) − h(T_c)] + C_cup(T_f − T_c).
func chainMixFinal(mc, mh, tc, th float64) float64 {
	lo, hi := tc, th
	for range 100 {
		tf := (lo + hi) / 2
		if mh*WaterEnthalpyChange(tf, th)-mc*WaterEnthalpyChange(tc, tf)-chainCup*(tf-tc) > 0 {
			lo = tf
		} else {
			hi = tf
		}
	}
	return (lo + hi) / 2
}

// chainMixingRun simulates a coffee-cup mixing calibration whose log agrees
// with the energy balance: the cold water drifts towards the room until
// the pour at 180 s, so T_c is its temperature then.
func chainMixingRun(t *testing.T, mc, mh, t0, th, g float64, seed uint64) *Rise {
	t.Helper()
	room := 22.4 + 273.15
	tc := room + (t0-room)*math.Exp(-g*180) // Newton's law, DOMAIN §1
	tf := chainMixFinal(mc, mh, tc, th)
	eps := chainCup + (mc+mh)*WaterCp(tf)
	s := Simulation{
		Duration: 600, Interval: 2, MixTime: 180,
		StartTemperature: t0, ConvergenceTemperature: room, CoolingConstant: g,
		HeatCapacity: eps, Heat: eps * (tf - tc), ReleaseRate: 0.25, ProbeLag: 4,
		Noise: 0.012, Quantum: 0.01, Seed: seed,
	}
	r, _, _ := chainAnalyse(t, s)
	return r
}

func TestCalibrateMixingCup(t *testing.T) {
	for _, tc := range []struct {
		name           string
		mc, mh, t0, th float64
		g              float64
		seed           uint64
	}{
		{"50 g + 50 g", 50.12, 49.87, 19.62 + 273.15, 44.8 + 273.15, 2.1e-4, 11},
		{"60 g + 40 g, hotter", 60.05, 40.31, 19.88 + 273.15, 50.1 + 273.15, 2.3e-4, 12},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := chainMixingRun(t, tc.mc, tc.mh, tc.t0, tc.th, tc.g, tc.seed)
			mx := &Mixing{ColdMass: tc.mc, HotMass: tc.mh, HotTemperature: tc.th, UHotTemperature: 0.1}
			run, err := CalibrateRun(r, CalibrationSetup{RunID: "cup", Mixing: mx, UMass: 0.01})
			if err != nil {
				t.Fatal(err)
			}
			// The simulated cup is 24 J/K (chainCup); the brief's tolerance 4 J/K
			// (DOMAIN §3: u(C_cal) ≈ 3–4 J/K for u(T) = 0.1 K).
			if run.Vessel == nil || !chainClose(*run.Vessel, chainCup, 4, 0) {
				t.Errorf("cup heat capacity %v J/K, simulated %.0f J/K (tolerance 4 J/K)", run.Vessel, chainCup)
			}
			if run.ContentsMass != tc.mc+tc.mh {
				t.Errorf("contents %g g, want %g g", run.ContentsMass, tc.mc+tc.mh)
			}
		})
	}
}

func TestCalibrateRunErrors(t *testing.T) {
	r := &Rise{DeltaT: 0.29, UDeltaT: 0.0003, DoF: 50, MeanTemperature: 298.2, InitialTemperature: 298.05, FinalTemperature: 298.34}
	el := &Electrical{Power: 0.5, Time: 300}
	std, _ := LookupStandard("kcl")
	neut, _ := LookupStandard("neutralisation")
	for _, tc := range []struct {
		name string
		rise *Rise
		s    CalibrationSetup
		want string
	}{
		{"no analysis", nil, CalibrationSetup{Electrical: el}, "no temperature analysis"},
		{"no kind", r, CalibrationSetup{}, "exactly one kind"},
		{"two kinds", r, CalibrationSetup{Electrical: el, Chemical: &ChemicalCalibration{Standard: std, Mass: 1}}, "exactly one kind"},
		{"electrical without time", r, CalibrationSetup{Electrical: &Electrical{Power: 0.5}}, "heater power and time"},
		{"standard without mass", r, CalibrationSetup{Chemical: &ChemicalCalibration{Standard: std}}, "standard mass must be positive"},
		{"neutralisation without amount", r, CalibrationSetup{Chemical: &ChemicalCalibration{Standard: neut}}, "limiting reagent"},
		{"mixing without hot mass", r, CalibrationSetup{Mixing: &Mixing{ColdMass: 50, HotTemperature: 320}}, "hot water mass must be positive"},
		{"hot water colder than the final temperature", r, CalibrationSetup{Mixing: &Mixing{ColdMass: 50, HotMass: 50, HotTemperature: 298.0}}, "not warmer"},
		{"water out of range", r, CalibrationSetup{Mixing: &Mixing{ColdMass: 50, HotMass: 50, HotTemperature: 340}}, "outside the 0–60 °C"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := CalibrateRun(tc.rise, tc.s)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
}

// chainEnergyRun is a calibration run with energy q (J, exact) and a
// corrected rise ΔT ± u (K): ε = q/ΔT, u(ε) = ε·u/ΔT to first order.
func chainEnergyRun(t *testing.T, id string, q, dT, u float64) *CalibrationRun {
	t.Helper()
	r := &Rise{DeltaT: dT, UDeltaT: u, DoF: math.Inf(1), MeanTemperature: 298.15}
	run, err := CalibrateRun(r, CalibrationSetup{RunID: id, Electrical: &Electrical{Energy: q}})
	if err != nil {
		t.Fatal(err)
	}
	return run
}

func TestCombine(t *testing.T) {
	type in struct{ q, dT, u float64 }
	for _, tc := range []struct {
		name string
		runs []in
		// Hand calculation: ε_i = q_i/ΔT_i, u_i = ε_i·u(ΔT_i)/ΔT_i,
		// w_i = 1/u_i², ε̄ = Σw_i ε_i/Σw_i, χ² = Σ(ε_i − ε̄)²/u_i²,
		// R_B = √(χ²/(n−1)), u = max(1, R_B)/√Σw_i (Birge 1932). The
		// figures below were recomputed with numpy 1.24.2 from these
		// formulas: e=q/dT; ue=e*u/dT; w=1/ue**2; m=(w*e).sum()/w.sum();
		// rb=sqrt(((e-m)**2*w).sum()/(n-1)); max(1,rb)/sqrt(w.sum());
		// np.std(e, ddof=1). Tolerances 2e-4 J/K on ε̄, 1e-4 relative on
		// R_B and u, 1e-5 on the SD (the hand figures carry 6–7 digits).
		mean, u, birge float64
		sd             float64 // sample SD of the ε_i about their plain mean
		status         Status
	}{
		{
			// ε = 500, 501, 499.5 J/K; u = 0.5, 0.501, 0.4995 J/K;
			// w = 4, 3.984048, 4.008012; ε̄ = 500.165113; χ² = 4.65912;
			// R_B = 1.526290; u = 1.526290/√11.99206 = 0.440748 J/K.
			name: "three runs scattering a little more than their u",
			runs: []in{{150, 0.3, 0.0003}, {150.3, 0.3, 0.0003}, {149.85, 0.3, 0.0003}},
			// sd: deviations −1/6, 5/6, −2/3 J/K from 500.1667, √(7/12) = 0.763763 J/K.
			mean: 500.165113, u: 0.440748, birge: 1.526290, sd: 0.763763, status: Pass,
		},
		{
			// ε = 500, 500.2 J/K; u = 1, 1.0004 J/K; w = 1, 0.999200;
			// ε̄ = 500.099960; χ² = 0.01999; R_B = 0.141393 < 1: no
			// inflation, u = 1/√1.999200 = 0.707248 J/K.
			name: "two consistent runs",
			runs: []in{{150, 0.3, 0.0006}, {150.06, 0.3, 0.0006}},
			mean: 500.099960, u: 0.707248, birge: 0.141393, sd: 0.2 / math.Sqrt2, status: Pass,
		},
		{
			// ε = 500, 504 J/K, u = 0.5, 0.504 J/K; w = 4, 3.936760;
			// ε̄ = 501.984064; χ² = 31.74502; R_B = 5.634272 > 2: warn;
			// u = 5.634272/√7.936760 = 1.999937 J/K.
			name: "two runs far apart",
			runs: []in{{150, 0.3, 0.0003}, {151.2, 0.3, 0.0003}},
			mean: 501.984064, u: 1.999937, birge: 5.634272, sd: 4 / math.Sqrt2, status: Warn,
		},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var runs []*CalibrationRun
			for i, r := range tc.runs {
				runs = append(runs, chainEnergyRun(t, fmt.Sprintf("r%d", i+1), r.q, r.dT, r.u))
			}
			cal, err := Combine(runs, time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC), "test")
			if err != nil {
				t.Fatal(err)
			}
			if !chainClose(cal.HeatCapacity, tc.mean, 2e-4, 0) {
				t.Errorf("ε̄ = %.5f J/K, hand calculation %.5f J/K", cal.HeatCapacity, tc.mean)
			}
			if cal.Scatter == nil || !chainClose(cal.Scatter.BirgeRatio, tc.birge, 0, 1e-4) || !chainClose(cal.Scatter.SDJPerK, tc.sd, 0, 1e-5) {
				t.Errorf("scatter %+v, want Birge ratio %.5f and sd %.6f J/K", cal.Scatter, tc.birge, tc.sd)
			}
			if !chainClose(cal.UHeatCapacity, tc.u, 0, 1e-4) {
				t.Errorf("u(ε̄) = %.5f J/K, hand calculation %.5f J/K", cal.UHeatCapacity, tc.u)
			}
			if cal.Status != tc.status {
				t.Errorf("status %s, want %s: %v", cal.Status, tc.status, cal.Checks)
			}
			if cal.Format != CalibrationFormat || cal.Kind != "calibration" || cal.Method != MethodElectrical || len(cal.Runs) != len(tc.runs) {
				t.Errorf("header %d %q %q with %d runs", cal.Format, cal.Kind, cal.Method, len(cal.Runs))
			}
		})
	}
}

func TestCombineSharedWaterScale(t *testing.T) {
	// Two mixing runs share the scale k_cp on water's c_p: its part of u
	// does not average down. analytic: with C_v = k·N/D, the k_cp part of
	// u(C̄) is C̄·u_k, whatever the number of runs.
	r := &Rise{DeltaT: 12, UDeltaT: 0.01, DoF: math.Inf(1), InitialTemperature: 293.15, FinalTemperature: 305.15,
		MeanTemperature: 299.15}
	mx := &Mixing{ColdMass: 50, HotMass: 50, HotTemperature: 318.15}
	exact := 1e-12 // g: weighings taken as exact here
	a, err := CalibrateRun(r, CalibrationSetup{RunID: "a", Mixing: mx, UMass: exact})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := CalibrateRun(r, CalibrationSetup{RunID: "b", Mixing: mx, UMass: exact})
	cal, err := Combine([]*CalibrationRun{a, b}, time.Time{}, "")
	if err != nil {
		t.Fatal(err)
	}
	// Inputs with no uncertainty but k_cp (masses, temperatures exact):
	// each run's u(C_v) is C_v·u_k, and so is the mean's.
	uk := WaterCpU(299.15) / WaterCp(299.15)
	if !chainClose(*cal.UVessel, *cal.Vessel*uk, 0, 1e-3) {
		t.Errorf("u(C̄_v) = %.6f J/K, want C̄_v·u_k = %.6f J/K (k_cp shared, not averaged)", *cal.UVessel, *cal.Vessel*uk)
	}
}

// chainCalibration is a combined electrical calibration of the cell
// (contents mass given when split), written and read back through the
// calibration file.
func chainCalibration(t *testing.T, split bool) *Calibration {
	t.Helper()
	var runs []*CalibrationRun
	for _, seed := range []uint64{7, 8} {
		r, _, _ := chainAnalyse(t, chainElectricalSim(chainEps, seed))
		s := CalibrationSetup{RunID: fmt.Sprintf("elcal-%d", seed), UMass: 0.01,
			Electrical: &Electrical{Power: chainPower, UPower: 0.0005, Time: chainHeatTime, UTime: 0.1}}
		if split {
			s.ContentsMass = chainFill
		}
		run, err := CalibrateRun(r, s)
		if err != nil {
			t.Fatal(err)
		}
		runs = append(runs, run)
	}
	cal, err := Combine(runs, time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC), "test")
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteCalibration(&buf, cal); err != nil {
		t.Fatal(err)
	}
	back, err := ReadCalibration(&buf)
	if err != nil {
		t.Fatalf("ReadCalibration of what WriteCalibration wrote: %v", err)
	}
	return back
}

func TestCalibrationFile(t *testing.T) {
	r, _, _ := chainAnalyse(t, chainElectricalSim(chainEps, 7))
	run, err := CalibrateRun(r, CalibrationSetup{RunID: "elcal", ContentsMass: chainFill, UMass: 0.01,
		Electrical: &Electrical{Power: chainPower, UPower: 0.0005, Time: chainHeatTime, UTime: 0.1}})
	if err != nil {
		t.Fatal(err)
	}
	cal, err := Combine([]*CalibrationRun{run}, time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC), "test")
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteCalibration(&buf, cal); err != nil {
		t.Fatal(err)
	}
	good := buf.Bytes()
	edit := func(f func(m map[string]any)) []byte {
		var m map[string]any
		if err := json.Unmarshal(good, &m); err != nil {
			t.Fatal(err)
		}
		f(m)
		b, err := json.Marshal(m)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	runOf := func(m map[string]any) map[string]any { return m["runs"].([]any)[0].(map[string]any) }

	t.Run("round trip", func(t *testing.T) {
		back, err := ReadCalibration(bytes.NewReader(good))
		if err != nil {
			t.Fatal(err)
		}
		if back.HeatCapacity != cal.HeatCapacity || back.UHeatCapacity != cal.UHeatCapacity ||
			*back.Vessel != *cal.Vessel || *back.UVessel != *cal.UVessel || back.Status != cal.Status {
			t.Errorf("read back ε %g ± %g, C_v %g ± %g; wrote %g ± %g, %g ± %g", back.HeatCapacity, back.UHeatCapacity,
				*back.Vessel, *back.UVessel, cal.HeatCapacity, cal.UHeatCapacity, *cal.Vessel, *cal.UVessel)
		}
		if !back.Created.Equal(cal.Created) || back.Runs[0].Inputs[0] != cal.Runs[0].Inputs[0] {
			t.Errorf("created %v / first input %+v differ from %v / %+v", back.Created, back.Runs[0].Inputs[0], cal.Created, cal.Runs[0].Inputs[0])
		}
	})
	for _, tc := range []struct {
		name string
		file []byte
		is   error
		want string
	}{
		{"corrupt JSON", good[:len(good)/2], ErrCalibrationFile, "not valid JSON"},
		{"not a calibration", []byte(`{"kind": "sample", "molar_enthalpy_kj_per_mol": 17.2}`), ErrCalibrationFile, "kind"},
		{"newer format", edit(func(m map[string]any) { m["calred_calibration_format"] = CalibrationFormat + 1 }), ErrCalibrationFile, "format 2 is newer"},
		{"no runs", edit(func(m map[string]any) { m["runs"] = []any{} }), ErrCalibrationFile, "no runs"},
		{"edited ε", edit(func(m map[string]any) { m["heat_capacity_j_per_k"] = m["heat_capacity_j_per_k"].(float64) + 0.5 }), ErrCalibrationEdited, "states ε"},
		{"edited u(ε)", edit(func(m map[string]any) { m["u_heat_capacity_j_per_k"] = m["u_heat_capacity_j_per_k"].(float64) / 2 }), ErrCalibrationEdited, "states ε"},
		{"edited run ε", edit(func(m map[string]any) {
			runOf(m)["heat_capacity_j_per_k"] = 515.0
		}), ErrCalibrationEdited, "run elcal states"},
		{"edited input", edit(func(m map[string]any) {
			runOf(m)["inputs"].([]any)[0].(map[string]any)["value"] = 0.51
		}), ErrCalibrationEdited, "run elcal states"},
		{"unknown method", edit(func(m map[string]any) { runOf(m)["calibration_method"] = "bomb" }), ErrCalibrationEdited, "unknown calibration method"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadCalibration(bytes.NewReader(tc.file))
			if !errors.Is(err, tc.is) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want %v containing %q", err, tc.is, tc.want)
			}
		})
	}
	t.Run("syntax error reachable", func(t *testing.T) {
		_, err := ReadCalibration(strings.NewReader(`{"kind": "calibration",`))
		var se *json.SyntaxError
		var ue *json.UnmarshalTypeError
		if !errors.As(err, &se) && !errors.Is(err, ErrCalibrationFile) {
			t.Errorf("error %v: want the JSON error wrapped", err)
		}
		_, err = ReadCalibration(strings.NewReader(`{"kind": 3}`))
		if !errors.As(err, &ue) {
			t.Errorf("error %v: want *json.UnmarshalTypeError reachable", err)
		}
	})
}

func TestCalibratePulses(t *testing.T) {
	for _, tc := range []struct {
		name           string
		power2         float64 // W the heater really gave in the second pulse
		fromColumn     bool
		status         Status
		wantEps2Offset float64 // relative: what the second run must report
	}{
		// analytic: ε = P·t/ΔT; the same heater twice gives ε twice.
		{"same heater twice, energy from the power column", chainPower, true, Pass, 0},
		{"same heater twice, power and time given", chainPower, false, Pass, 0},
		// The second pulse really gave 3 % more than the stated 0.5 W:
		// ε₂ = P·t/ΔT₂ = ε/1.03, far beyond 3 combined u (≈ 1 J/K).
		{"second pulse not what was stated", chainPower * 1.03, false, Fail, 1/1.03 - 1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tt, theta, col := chainTwoPulses(chainEps, chainPower, tc.power2, 41)
			var pulses []Pulse
			if tc.fromColumn {
				hps, err := HeaterPulses(tt, col)
				if err != nil {
					t.Fatal(err)
				}
				if len(hps) != 2 {
					t.Fatalf("%d heating periods found, want 2", len(hps))
				}
				for _, h := range hps {
					pulses = append(pulses, PulseOf(h))
				}
			} else {
				for _, on := range []float64{502.5, 1802.5} {
					pulses = append(pulses, Pulse{On: on, Off: on + chainHeatTime,
						Electrical: Electrical{Power: chainPower, UPower: 0.0005, UTime: 0.1}})
				}
			}
			pc, err := CalibratePulses(tt, theta, pulses, CalibrationSetup{RunID: "twin", ContentsMass: chainFill, UMass: 0.01}, DefaultRiseOptions())
			if err != nil {
				t.Fatal(err)
			}
			if len(pc.Runs) != 2 || len(pc.Checks) != 1 || len(pc.Windows) != 2 {
				t.Fatalf("%d runs, %d checks, %d windows; want 2, 1, 2", len(pc.Runs), len(pc.Checks), len(pc.Windows))
			}
			if pc.Runs[0].RunID != "twin-pulse1" || pc.Runs[1].RunID != "twin-pulse2" {
				t.Errorf("run IDs %s, %s", pc.Runs[0].RunID, pc.Runs[1].RunID)
			}
			// The after period of pulse 1 is the fore period of pulse 2.
			r1, r2 := pc.Runs[0].Rise, pc.Runs[1].Rise
			if !(r2.Periods.Pre.Start >= r1.Periods.Post.Start-5 && r2.Periods.Pre.End <= 1802.5 && r1.Periods.Post.End < 1802.5) {
				t.Errorf("pulse 1 after period %v, pulse 2 fore period %v: want the second inside the first", r1.Periods.Post, r2.Periods.Pre)
			}
			// Simulated ε = 512 J/K; brief's tolerance 0.3 %.
			if !chainClose(pc.Runs[0].HeatCapacity, chainEps, 0, 0.003) {
				t.Errorf("pulse 1: ε = %.3f J/K, simulated %.0f J/K", pc.Runs[0].HeatCapacity, chainEps)
			}
			if want := chainEps * (1 + tc.wantEps2Offset); !chainClose(pc.Runs[1].HeatCapacity, want, 0, 0.003) {
				t.Errorf("pulse 2: ε = %.3f J/K, want %.3f J/K", pc.Runs[1].HeatCapacity, want)
			}
			if pc.Checks[0].Name != "pulse-agreement" || pc.Checks[0].Status != tc.status {
				t.Errorf("agreement check %+v, want status %s", pc.Checks[0], tc.status)
			}
			if Worst(pc.Runs[1].Checks) != pc.Runs[1].Status || !strings.Contains(fmt.Sprint(pc.Runs[1].Checks), "pulse-agreement") {
				t.Errorf("the agreement check must be among the second run's checks: %v", pc.Runs[1].Checks)
			}
		})
	}
}

func TestCalibratePulsesErrors(t *testing.T) {
	tt, theta, _ := chainTwoPulses(chainEps, chainPower, chainPower, 41)
	el := Electrical{Power: chainPower}
	ok := []Pulse{{On: 502.5, Off: 802.5, Electrical: el}, {On: 1802.5, Off: 2102.5, Electrical: el}}
	fixed := DefaultRiseOptions()
	fixed.Pre = &Period{0, 500}
	for _, tc := range []struct {
		name   string
		pulses []Pulse
		setup  CalibrationSetup
		opt    RiseOptions
		want   string
	}{
		{"no pulses", nil, CalibrationSetup{}, DefaultRiseOptions(), "no heating periods"},
		{"overlapping", []Pulse{ok[0], {On: 700, Off: 900, Electrical: el}}, CalibrationSetup{}, DefaultRiseOptions(), "before period 1 ends"},
		{"outside the log", []Pulse{{On: 2900, Off: 3100, Electrical: el}}, CalibrationSetup{}, DefaultRiseOptions(), "inside the log"},
		{"periods fixed", ok, CalibrationSetup{}, fixed, "cannot be fixed"},
		{"kind in the setup", ok, CalibrationSetup{Electrical: &el}, DefaultRiseOptions(), "must not describe"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := CalibratePulses(tt, theta, tc.pulses, tc.setup, tc.opt)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
}

func TestCalibratePulsesMisplaced(t *testing.T) {
	// A second heating period declared at 830 s, where the log (heated at
	// 1802.5 s) shows only the tail of the first: no error, since the
	// readings are valid, but the runs must not pass.
	tt, theta, _ := chainTwoPulses(chainEps, chainPower, chainPower, 41)
	el := Electrical{Power: chainPower}
	pc, err := CalibratePulses(tt, theta, []Pulse{{On: 502.5, Off: 802.5, Electrical: el}, {On: 830, Off: 900, Electrical: el}},
		CalibrationSetup{RunID: "x"}, DefaultRiseOptions())
	if err != nil {
		t.Fatal(err)
	}
	if pc.Runs[0].Status == Pass || pc.Runs[1].Status != Fail {
		t.Errorf("statuses %s, %s; want the first flagged and the second failed", pc.Runs[0].Status, pc.Runs[1].Status)
	}
}

func TestPulseAgreement(t *testing.T) {
	// |ε₂ − ε₁|/√(u₁² + u₂²) against 2 (warn) and 3 (fail), common
	// practice; u = √(0.6² + 0.8²) = 1 J/K exactly.
	for _, tc := range []struct {
		name string
		d    float64
		want Status
	}{
		{"within 2u", 1.9, Pass},
		{"between 2u and 3u", -2.5, Warn},
		{"beyond 3u", 3.2, Fail},
	} {
		t.Run(tc.name, func(t *testing.T) {
			a := &CalibrationRun{RunID: "a", HeatCapacity: 500, UHeatCapacity: 0.6}
			b := &CalibrationRun{RunID: "b", HeatCapacity: 500 + tc.d, UHeatCapacity: 0.8}
			if c := calPulseAgreement(a, b); c.Status != tc.want {
				t.Errorf("%s: %s, want %s", c.Detail, c.Status, tc.want)
			}
		})
	}
}

func ExampleCombine() {
	// Two electrical calibrations of an invented cell: 150 J each, rises
	// of 0.3000 K and 0.2994 K known to ±0.3 mK.
	var runs []*CalibrationRun
	for i, dT := range []float64{0.3000, 0.2994} {
		r := &Rise{DeltaT: dT, UDeltaT: 0.0003, DoF: 40, MeanTemperature: 298.15}
		run, err := CalibrateRun(r, CalibrationSetup{RunID: fmt.Sprintf("cal-%d", i+1),
			Electrical: &Electrical{Power: 0.5, UPower: 0.0002, Time: 300, UTime: 0.05}})
		if err != nil {
			fmt.Println(err)
			return
		}
		runs = append(runs, run)
	}
	cal, err := Combine(runs, time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC), "example")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("ε = %.1f ± %.1f J/K from %d runs, Birge ratio %.2f (%s)\n",
		cal.HeatCapacity, cal.UHeatCapacity, len(cal.Runs), cal.Scatter.BirgeRatio, cal.Status)
	// By hand with the formulas of TestCombine, u(q) = √((300·0.0002)² +
	// (0.5·0.05)²) = 0.065 J, recomputed with numpy 1.24.2: ε̄ = 500.499,
	// R_B = 1.298, u = R_B/√Σw = 0.501 J/K.

	// Output:
	// ε = 500.5 ± 0.5 J/K from 2 runs, Birge ratio 1.30 (pass)
}

// FuzzReadCalibration: no input may panic; every error says whether the
// file is unusable or edited; what reads writes back and reads again to
// the same heat capacity. The seeds are whole files of a few kB, so
// minimising a new input takes long: run with a short -fuzzminimizetime,
//
//	go test -run XXX -fuzz FuzzReadCalibration -fuzztime 10s -fuzzminimizetime 2s ./calorimeter/
func FuzzReadCalibration(f *testing.F) {
	for _, dT := range []float64{0.3, 0.2994} {
		r := &Rise{DeltaT: dT, UDeltaT: 0.0003, DoF: 40, MeanTemperature: 298.15}
		run, err := CalibrateRun(r, CalibrationSetup{RunID: "f", ContentsMass: 100,
			Electrical: &Electrical{Power: 0.5, UPower: 0.0002, Time: 300, UTime: 0.05}})
		if err != nil {
			f.Fatal(err)
		}
		cal, _ := Combine([]*CalibrationRun{run}, time.Time{}, "")
		var buf bytes.Buffer
		if err := WriteCalibration(&buf, cal); err != nil {
			f.Fatal(err)
		}
		f.Add(buf.Bytes())
	}
	mix := &Rise{DeltaT: 12, UDeltaT: 0.01, DoF: 30, InitialTemperature: 293.15, FinalTemperature: 305.15,
		UInitial: 0.01, UFinal: 0.012, CovInitialFinal: 6e-5, MeanTemperature: 299.15}
	run, err := CalibrateRun(mix, CalibrationSetup{RunID: "m", Mixing: &Mixing{ColdMass: 50, HotMass: 50, HotTemperature: 318.15}})
	if err != nil {
		f.Fatal(err)
	}
	cal, _ := Combine([]*CalibrationRun{run}, time.Time{}, "")
	var buf bytes.Buffer
	_ = WriteCalibration(&buf, cal)
	f.Add(buf.Bytes())
	f.Add([]byte(`{"calred_calibration_format": 1, "kind": "calibration", "runs": [{}]}`))
	f.Fuzz(func(t *testing.T, b []byte) {
		cal, err := ReadCalibration(bytes.NewReader(b))
		if err != nil {
			if !errors.Is(err, ErrCalibrationFile) && !errors.Is(err, ErrCalibrationEdited) {
				t.Fatalf("error %v wraps neither ErrCalibrationFile nor ErrCalibrationEdited", err)
			}
			return
		}
		var out bytes.Buffer
		if err := WriteCalibration(&out, cal); err != nil {
			return // numbers JSON cannot hold (the reader accepted them as they were)
		}
		back, err := ReadCalibration(&out)
		if err != nil {
			t.Fatalf("what was read does not read back: %v", err)
		}
		if back.HeatCapacity != cal.HeatCapacity || back.UHeatCapacity != cal.UHeatCapacity {
			t.Fatalf("read back ε %g ± %g, was %g ± %g", back.HeatCapacity, back.UHeatCapacity, cal.HeatCapacity, cal.UHeatCapacity)
		}
	})
}
