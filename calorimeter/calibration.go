package calorimeter

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"
)

// Calibration methods (CONTRACT: calibration_method).
const (
	MethodElectrical = "electrical"
	MethodStandard   = "standard"
	MethodMixing     = "mixing"
)

// CalibrationFormat is the version of the calibration file written by
// WriteCalibration. Files of a newer version are refused.
const CalibrationFormat = 1

// Electrical describes an electrical calibration: give Power and Time, or
// Voltage, Current and Time, or Energy (a heater-power column integrated
// over time, see HeaterEnergy). Values in W, s, V, A, J with standard
// uncertainties.
type Electrical struct {
	Power, UPower     float64
	Time, UTime       float64
	Voltage, UVoltage float64
	Current, UCurrent float64
	Energy, UEnergy   float64
}

// ChemicalCalibration is a run that dissolves (or reacts) a mass of a
// calibration standard with certified enthalpy.
type ChemicalCalibration struct {
	Standard        Standard
	Mass, UMass     float64 // g (for standards that are weighed)
	Amount, UAmount float64 // mol of the limiting reagent, for standards that are not weighed (neutralisation)
	SolventMass     float64 // g, for the final molality (0 = the standard's reference molality)
}

// Mixing is a hot/cold water mixing calibration: ColdMass of water in the
// vessel, HotMass of water at HotTemperature (K) poured in at the mixing time.
type Mixing struct {
	ColdMass, UColdMass             float64 // g
	HotMass, UHotMass               float64 // g
	HotTemperature, UHotTemperature float64 // K
}

// CalibrationSetup is everything a calibration run needs besides its log.
type CalibrationSetup struct {
	RunID, File, SHA256 string
	Electrical          *Electrical
	Chemical            *ChemicalCalibration
	Mixing              *Mixing
	ContentsMass        float64 // g of liquid present (0 = unknown); mixing runs know it
	UContentsMass       float64 // g (0 = UMass)
	UMass               float64 // balance standard uncertainty of every weighing without its own, g (0 = DefaultUMass)
}

// StoredInput is an input of a calibration's measurement model as written to
// the calibration file (JSON cannot hold an infinite number of degrees of
// freedom: DoF 0 there means infinite).
type StoredInput struct {
	Name   string  `json:"name"`
	Symbol string  `json:"symbol"`
	Unit   string  `json:"unit"`
	Value  float64 `json:"value"`
	U      float64 `json:"standard_uncertainty"`
	DoF    float64 `json:"dof,omitempty"`
	Dist   string  `json:"distribution"`
}

// StoredCorrelation is a correlation coefficient between two stored inputs.
type StoredCorrelation struct {
	A string  `json:"a"`
	B string  `json:"b"`
	R float64 `json:"r"`
}

// CalibrationRun is one reduced calibration log.
type CalibrationRun struct {
	RunID            string              `json:"run_id"`
	File             string              `json:"file"`
	SHA256           string              `json:"sha256"`
	Points           int                 `json:"points"`
	Method           string              `json:"calibration_method"`
	Variant          string              `json:"variant"`
	CorrectionMethod string              `json:"method"`
	MixTime          float64             `json:"mix_time_s"`
	DeltaT           float64             `json:"delta_t_k"`
	UDeltaT          float64             `json:"u_delta_t_k"`
	MeanTemperature  float64             `json:"mean_temperature_k"`
	Heat             float64             `json:"heat_j"`
	UHeat            float64             `json:"u_heat_j"`
	HeatCapacity     float64             `json:"heat_capacity_j_per_k"`
	UHeatCapacity    float64             `json:"u_heat_capacity_j_per_k"`
	Vessel           *float64            `json:"vessel_heat_capacity_j_per_k,omitempty"`
	UVessel          *float64            `json:"u_vessel_heat_capacity_j_per_k,omitempty"`
	ContentsMass     float64             `json:"contents_mass_g,omitempty"`
	StandardName     string              `json:"standard,omitempty"`
	StandardSource   string              `json:"standard_source,omitempty"`
	Inputs           []StoredInput       `json:"inputs"`
	Correlations     []StoredCorrelation `json:"correlations,omitempty"`
	Budget           *Budget             `json:"budget,omitempty"`
	Checks           []Check             `json:"checks"`
	Status           Status              `json:"status"`
	Rise             *Rise               `json:"-"`
}

// Calibration is the calorimeter's heat capacity from one or more runs, as
// written to and read from a calibration file.
type Calibration struct {
	Format          int              `json:"calred_calibration_format"`
	Kind            string           `json:"kind"`
	Method          string           `json:"calibration_method"`
	HeatCapacity    float64          `json:"heat_capacity_j_per_k"`
	UHeatCapacity   float64          `json:"u_heat_capacity_j_per_k"`
	DoF             float64          `json:"dof,omitempty"`
	Vessel          *float64         `json:"vessel_heat_capacity_j_per_k,omitempty"`
	UVessel         *float64         `json:"u_vessel_heat_capacity_j_per_k,omitempty"`
	ContentsMass    float64          `json:"contents_mass_g,omitempty"`
	DeltaT          float64          `json:"delta_t_k"`
	MeanTemperature float64          `json:"mean_temperature_k"`
	Scatter         *ScatterSummary  `json:"scatter,omitempty"`
	Runs            []CalibrationRun `json:"runs"`
	Checks          []Check          `json:"checks"`
	Status          Status           `json:"status"`
	Created         time.Time        `json:"created_utc"`
	ProgramVersion  string           `json:"program_version,omitempty"`
	SHA256          string           `json:"-"` // of the calibration file, when read from one
}

// ScatterSummary compares the spread between calibration runs with their
// own uncertainties: the Birge ratio R_B = √(χ²/(n−1)), χ² = Σ(ε_i − ε̄)²/u_i².
// When R_B > 1 the weighted mean's uncertainty is inflated by R_B (through an
// additive between-run input of zero value) — common practice, see
// Birge, Phys. Rev. 40 (1932) 207.
type ScatterSummary struct {
	Runs       int     `json:"runs"`
	BirgeRatio float64 `json:"birge_ratio"`
	SDJPerK    float64 `json:"sd_j_per_k"`
	UExtra     float64 `json:"u_between_runs_j_per_k"`
}

// Model of a calibration run, rebuilt from its stored inputs by symbol.
//
//	electrical:  ε = P·t_h/ΔT, ε = V·I·t_h/ΔT or ε = Q_el/ΔT
//	standard:    ε = −(m/M)·ΔH(T, m)/ΔT          (heat given to the vessel q = −n·ΔH = ε·ΔT)
//	mixing:      C_v = k_cp·{m_h[h(T_h) − h(T_f)] − m_c[h(T_f) − h(T_c)]}/(T_f − T_c)   (DOMAIN §3)
//	             ε = C_v + k_cp·(m_c + m_h)·c_p(T_f)
//	vessel part: C_v = ε − k_cp·m_w,cal·c_p(T_cal)   when the contents mass m_w,cal is known
//
// with h the specific enthalpy of water and c_p its specific heat at 0.1 MPa
// (IAPWS-95 fit, DOMAIN §4) and k_cp = 1 ± u a common scale on that fit.
// The heat put in is q = P·t_h (V·I·t_h, Q_el), q = −n·ΔH, and for mixing
// the heat the hot water gives up, q = k_cp·m_h[h(T_h) − h(T_f)].
type calRunModel struct {
	eps, vessel, heat Model
}

// build adds the run's inputs to c and returns its model; the closures
// index into the full input vector of the chain, and kcp is the index of
// the chain's shared k_cp. A non-empty tag (the run's place in a combined
// calibration) is appended to the symbols and the run ID to the names, so
// that the inputs of several runs stay apart in a budget.
func (r *CalibrationRun) build(c *chain, kcp int, tag string) (calRunModel, error) {
	idx := map[string]int{"k_cp": kcp}
	for _, s := range r.Inputs {
		if s.Symbol == "k_cp" {
			continue
		}
		if _, dup := idx[s.Symbol]; dup {
			return calRunModel{}, fmt.Errorf("%s: model input %q given twice", calWho(r.RunID), s.Symbol)
		}
		dist, err := distFromName(s.Dist)
		if err != nil {
			return calRunModel{}, fmt.Errorf("%s: input %q: %w", calWho(r.RunID), s.Symbol, err)
		}
		in := Input{Name: s.Name, Symbol: s.Symbol, Unit: s.Unit, Value: s.Value, U: s.U, DoF: s.DoF, Dist: dist}
		if in.DoF <= 0 {
			in.DoF = math.Inf(1)
		}
		if tag != "" {
			in.Symbol += "[" + tag + "]"
			in.Name += " (run " + r.RunID + ")"
		}
		idx[s.Symbol] = c.add(in)
	}
	for _, p := range r.Correlations {
		i, ok1 := idx[p.A]
		j, ok2 := idx[p.B]
		if !ok1 || !ok2 {
			return calRunModel{}, fmt.Errorf("%s: correlation between %q and %q names an input the run does not have", calWho(r.RunID), p.A, p.B)
		}
		c.correlate(i, j, p.R)
	}
	used := map[string]bool{"k_cp": true}
	need := func(syms ...string) error {
		for _, s := range syms {
			if _, ok := idx[s]; !ok {
				return fmt.Errorf("%s: model input %q missing", calWho(r.RunID), s)
			}
			used[s] = true
		}
		return nil
	}
	// unused refuses stored inputs the model does not read: a file from
	// another version, or an edit, must not be half-used in silence.
	unused := func() error {
		for _, s := range r.Inputs {
			if !used[s.Symbol] {
				return fmt.Errorf("%s: input %q (%s) is not part of the %s model", calWho(r.RunID), s.Symbol, s.Name, r.Method)
			}
		}
		return nil
	}
	var m calRunModel
	switch r.Method {
	case MethodElectrical:
		switch r.Variant {
		case "power-time":
			if err := need("P", "t_h", "ΔT_cal"); err != nil {
				return m, err
			}
			p, t := idx["P"], idx["t_h"]
			m.heat = func(x []float64) float64 { return x[p] * x[t] }
		case "voltage-current":
			if err := need("V", "I", "t_h", "ΔT_cal"); err != nil {
				return m, err
			}
			v, i, t := idx["V"], idx["I"], idx["t_h"]
			m.heat = func(x []float64) float64 { return x[v] * x[i] * x[t] }
		case "power-column":
			if err := need("Q_el", "ΔT_cal"); err != nil {
				return m, err
			}
			qi := idx["Q_el"]
			m.heat = func(x []float64) float64 { return x[qi] }
		default:
			return m, fmt.Errorf("%s: unknown electrical variant %q", calWho(r.RunID), r.Variant)
		}
	case MethodStandard:
		if r.Variant == "amount" {
			if err := need("n_std", "ΔH_std", "ΔT_cal"); err != nil {
				return m, err
			}
			n, dh := idx["n_std"], idx["ΔH_std"]
			m.heat = func(x []float64) float64 { return -x[n] * x[dh] }
			break
		}
		if err := need("m_std", "M_std", "ΔH_std", "ΔT_cal"); err != nil {
			return m, err
		}
		ms, mm, dh := idx["m_std"], idx["M_std"], idx["ΔH_std"]
		m.heat = func(x []float64) float64 { return -(x[ms] / x[mm]) * x[dh] }
	case MethodMixing:
		if err := need("m_c", "m_h", "T_h", "T_c", "T_f"); err != nil {
			return m, err
		}
		mc, mh, th, tc, tf, k := idx["m_c"], idx["m_h"], idx["T_h"], idx["T_c"], idx["T_f"], kcp
		vessel := func(x []float64) float64 {
			return x[k] * (x[mh]*WaterEnthalpyChange(x[tf], x[th]) - x[mc]*WaterEnthalpyChange(x[tc], x[tf])) / (x[tf] - x[tc])
		}
		m.vessel = vessel
		m.eps = func(x []float64) float64 { return vessel(x) + x[k]*(x[mc]+x[mh])*WaterCp(x[tf]) }
		m.heat = func(x []float64) float64 { return x[k] * x[mh] * WaterEnthalpyChange(x[tf], x[th]) }
		return m, unused()
	default:
		return m, fmt.Errorf("%s: unknown calibration method %q", calWho(r.RunID), r.Method)
	}
	heat, dt := m.heat, idx["ΔT_cal"]
	m.eps = func(x []float64) float64 { return heat(x) / x[dt] }
	if w, ok := idx["m_w,cal"]; ok {
		used["m_w,cal"] = true
		eps, cp := m.eps, WaterCp(r.MeanTemperature)
		m.vessel = func(x []float64) float64 { return eps(x) - x[kcp]*x[w]*cp }
	}
	return m, unused()
}

// calWho names a calibration run in an error.
func calWho(id string) string {
	if id == "" {
		return "calibration"
	}
	return "calibration " + id
}

// distFromName reads a stored distribution name (Distribution.String).
func distFromName(s string) (Distribution, error) {
	for _, d := range []Distribution{Normal, Rectangular, Triangular, StudentT} {
		if d.String() == s {
			return d, nil
		}
	}
	return Normal, fmt.Errorf("unknown distribution %q", s)
}

func storeInput(in Input) StoredInput {
	s := StoredInput{Name: in.Name, Symbol: in.Symbol, Unit: in.Unit, Value: in.Value, U: in.U, Dist: in.Dist.String()}
	if !math.IsInf(in.DoF, 1) && in.DoF > 0 {
		s.DoF = in.DoF
	}
	return s
}

// CalibrateRun reduces one calibration run whose corrected temperature
// change has been found (rise) to the calorimeter's heat capacity.
func CalibrateRun(rise *Rise, s CalibrationSetup) (*CalibrationRun, error) {
	if rise == nil {
		return nil, errors.New("calibration: no temperature analysis")
	}
	who := calWho(s.RunID)
	if s.UMass == 0 {
		s.UMass = DefaultUMass
	}
	r := &CalibrationRun{RunID: s.RunID, File: s.File, SHA256: s.SHA256, Points: rise.Points,
		CorrectionMethod: rise.Method, MixTime: rise.MixTime, DeltaT: rise.DeltaT, UDeltaT: rise.UDeltaT,
		MeanTemperature: rise.MeanTemperature, Rise: rise}
	r.Checks = append(r.Checks, rise.Checks...)
	var ins []Input
	dT := riseInput("corrected temperature change (calibration)", "ΔT_cal", rise)
	kinds := 0
	if s.Electrical != nil {
		kinds++
	}
	if s.Chemical != nil {
		kinds++
	}
	if s.Mixing != nil {
		kinds++
	}
	if kinds != 1 {
		return nil, fmt.Errorf("%s: give exactly one kind of calibration (electrical, standard or mixing), got %d", who, kinds)
	}
	switch {
	case s.Electrical != nil:
		e := s.Electrical
		r.Method = MethodElectrical
		switch {
		case e.Energy > 0:
			r.Variant = "power-column"
			ins = append(ins, Input{Name: "electrical energy (heater column)", Symbol: "Q_el", Unit: "J", Value: e.Energy, U: e.UEnergy, Dist: Normal})
		case e.Power > 0 && e.Time > 0:
			r.Variant = "power-time"
			ins = append(ins,
				Input{Name: "heater power", Symbol: "P", Unit: "W", Value: e.Power, U: e.UPower, Dist: Normal},
				Input{Name: "heating time", Symbol: "t_h", Unit: "s", Value: e.Time, U: e.UTime, Dist: Normal})
		case e.Voltage > 0 && e.Current > 0 && e.Time > 0:
			r.Variant = "voltage-current"
			ins = append(ins,
				Input{Name: "heater voltage", Symbol: "V", Unit: "V", Value: e.Voltage, U: e.UVoltage, Dist: Normal},
				Input{Name: "heater current", Symbol: "I", Unit: "A", Value: e.Current, U: e.UCurrent, Dist: Normal},
				Input{Name: "heating time", Symbol: "t_h", Unit: "s", Value: e.Time, U: e.UTime, Dist: Normal})
		default:
			return nil, fmt.Errorf("%s: electrical: give heater power and time, voltage, current and time, or a heater-power column", who)
		}
		ins = append(ins, dT)
		if rise.DeltaT <= 0 {
			r.Checks = append(r.Checks, Check{Name: "calibration-sign", Status: Fail,
				Detail: fmt.Sprintf("a heater must warm the vessel, but ΔT = %.4g K", rise.DeltaT)})
		}
	case s.Chemical != nil:
		ch := s.Chemical
		r.Method = MethodStandard
		r.StandardName, r.StandardSource = ch.Standard.Name, ch.Standard.Source
		M := ch.Standard.MolarMass
		weighed := ch.Standard.Weighed
		if weighed {
			if err := chainNeedPositive("standard mass", ch.Mass, "g"); err != nil {
				return nil, fmt.Errorf("%s: %w", who, err)
			}
		} else if err := chainNeedPositive("amount of the limiting reagent", ch.Amount, "mol"); err != nil {
			return nil, fmt.Errorf("%s: standard %s is not weighed: %w", who, ch.Standard.Name, err)
		}
		molality := 0.0
		if ch.SolventMass > 0 && weighed {
			molality = (ch.Mass / M) / (ch.SolventMass / 1000)
		}
		h, uh, err := ch.Standard.EnthalpyAt(rise.MeanTemperature, molality)
		if err != nil {
			return nil, fmt.Errorf("%s: standard %s: %w", who, ch.Standard.Name, err)
		}
		uM := 0.0
		if ch.Standard.Formula != "" {
			if _, u, err := MolarMass(ch.Standard.Formula); err == nil {
				uM = u
			}
		}
		um := ch.UMass
		if um == 0 {
			um = s.UMass
		}
		if weighed {
			r.Variant = "weighed"
			ins = append(ins,
				massInput("standard mass", "m_std", ch.Mass, um),
				Input{Name: "molar mass of the standard", Symbol: "M_std", Unit: "g/mol", Value: M, U: uM, Dist: Rectangular})
		} else {
			r.Variant = "amount"
			ins = append(ins, Input{Name: "amount of the limiting reagent", Symbol: "n_std", Unit: "mol", Value: ch.Amount, U: ch.UAmount, Dist: Normal})
		}
		ins = append(ins,
			Input{Name: "certified enthalpy of the standard at the run's T and m", Symbol: "ΔH_std", Unit: "J/mol", Value: h, U: uh, Dist: Normal},
			dT)
		if h*rise.DeltaT > 0 {
			r.Checks = append(r.Checks, Check{Name: "calibration-sign", Status: Fail,
				Detail: fmt.Sprintf("standard %s has ΔH = %.4g kJ/mol, so ΔT should have the opposite sign, but ΔT = %.4g K", ch.Standard.Name, h/1000, rise.DeltaT)})
		}
	case s.Mixing != nil:
		mx := s.Mixing
		r.Method = MethodMixing
		if err := chainNeedPositive("cold water mass", mx.ColdMass, "g"); err != nil {
			return nil, fmt.Errorf("%s: %w", who, err)
		}
		if err := chainNeedPositive("hot water mass", mx.HotMass, "g"); err != nil {
			return nil, fmt.Errorf("%s: %w", who, err)
		}
		if mx.HotTemperature <= rise.FinalTemperature {
			return nil, fmt.Errorf("%s: hot water at %.2f °C is not warmer than the final temperature %.2f °C",
				who, mx.HotTemperature-273.15, rise.FinalTemperature-273.15)
		}
		for _, t := range []float64{mx.HotTemperature, rise.InitialTemperature, rise.FinalTemperature} {
			if !WaterValid(t) {
				return nil, fmt.Errorf("%s: water at %.2f °C is outside the 0–60 °C range of the water properties", who, t-273.15)
			}
		}
		uc, uh := mx.UColdMass, mx.UHotMass
		if uc == 0 {
			uc = s.UMass
		}
		if uh == 0 {
			uh = s.UMass
		}
		ins = append(ins,
			massInput("cold water mass", "m_c", mx.ColdMass, uc),
			massInput("hot water mass", "m_h", mx.HotMass, uh),
			Input{Name: "hot water temperature", Symbol: "T_h", Unit: "K", Value: mx.HotTemperature, U: mx.UHotTemperature, Dist: Normal},
			// T_c and T_f carry the ν_eff of the run's analysis (an
			// approximation: each has its own mixture of fore, after and
			// probe terms); they stay normal because they are correlated.
			Input{Name: "cold temperature at mixing (fore line)", Symbol: "T_c", Unit: "K", Value: rise.InitialTemperature, U: rise.UInitial, DoF: riseDoF(rise), Dist: Normal},
			Input{Name: "final temperature at mixing (after line)", Symbol: "T_f", Unit: "K", Value: rise.FinalTemperature, U: rise.UFinal, DoF: riseDoF(rise), Dist: Normal},
			cpScaleInput(rise.FinalTemperature))
		r.ContentsMass = mx.ColdMass + mx.HotMass
		if !(rise.DeltaT > 0) {
			r.Checks = append(r.Checks, Check{Name: "calibration-sign", Status: Fail,
				Detail: fmt.Sprintf("adding hot water must warm the vessel, but ΔT = %.4g K", rise.DeltaT)})
		}
		if rise.CovInitialFinal != 0 {
			r.Correlations = append(r.Correlations, StoredCorrelation{A: "T_c", B: "T_f", R: chainCorr(rise.UInitial, rise.UFinal, rise.CovInitialFinal)})
		}
	}
	if s.ContentsMass > 0 && r.Method != MethodMixing {
		r.ContentsMass = s.ContentsMass
		uw := s.UContentsMass
		if uw == 0 {
			uw = s.UMass
		}
		ins = append(ins, massInput("liquid mass during calibration", "m_w,cal", s.ContentsMass, uw), cpScaleInput(rise.MeanTemperature))
	}
	for _, in := range ins {
		r.Inputs = append(r.Inputs, storeInput(in))
	}
	if err := r.evaluate(); err != nil {
		return nil, err
	}
	r.Checks = append(r.Checks, calHeatCapacityChecks(r)...)
	r.Status = Worst(r.Checks)
	return r, nil
}

// evaluate computes the run's heat capacity, vessel part and heat from its
// stored inputs alone, with their budgets.
func (r *CalibrationRun) evaluate() error {
	var c chain
	kcp := c.add(cpScaleInput(r.MeanTemperature))
	m, err := r.build(&c, kcp, "")
	if err != nil {
		return err
	}
	corr := c.correlation()
	b, err := Propagate(c.inputs, corr, m.eps, 0.95)
	if err != nil {
		return fmt.Errorf("%s: %w", calWho(r.RunID), err)
	}
	r.Budget = b
	r.HeatCapacity, r.UHeatCapacity = b.Value, b.U
	// The heat is propagated through its own model: ε and ΔT are
	// correlated (ε = q/ΔT), so u(q) is not u(ε) and u(ΔT) combined.
	qb, err := Propagate(c.inputs, corr, m.heat, 0.95)
	if err != nil {
		return fmt.Errorf("%s: heat: %w", calWho(r.RunID), err)
	}
	r.Heat, r.UHeat = qb.Value, qb.U
	r.Vessel, r.UVessel = nil, nil
	if m.vessel != nil {
		vb, err := Propagate(c.inputs, corr, m.vessel, 0.95)
		if err != nil {
			return fmt.Errorf("%s: vessel part: %w", calWho(r.RunID), err)
		}
		v, uv := vb.Value, vb.U
		r.Vessel, r.UVessel = &v, &uv
	}
	return nil
}

func calHeatCapacityChecks(r *CalibrationRun) []Check {
	var out []Check
	switch {
	case !(r.HeatCapacity > 0):
		out = append(out, Check{Name: "heat-capacity-positive", Status: Fail,
			Detail: fmt.Sprintf("the heat capacity came out as %.4g J/K; a calorimeter's heat capacity is positive (check masses, temperatures and the sign of ΔT)", r.HeatCapacity)})
	default:
		out = append(out, Check{Name: "heat-capacity-positive", Status: Pass,
			Detail: fmt.Sprintf("ε = %.5g J/K", r.HeatCapacity)})
	}
	if r.Vessel != nil && *r.Vessel < 0 {
		out = append(out, Check{Name: "vessel-heat-capacity", Status: Warn,
			Detail: fmt.Sprintf("the vessel's own heat capacity came out negative (%.3g J/K): heat lost while pouring, or wrong masses (DOMAIN: student values are sometimes negative)", *r.Vessel)})
	}
	return out
}

// Combine merges calibration runs into one calibration: the weighted mean
// of the runs' heat capacities with weights 1/u_i²,
//
//	ε̄ = Σ w_i ε_i / Σ w_i,   w_i = 1/u²(ε_i)
//
// with its uncertainty propagated through the whole chain of the runs'
// inputs (so that an input they share, the scale k_cp on water's c_p, is
// counted once), and the between-run scatter compared with the runs' own
// uncertainties (ScatterSummary). The vessel part is combined the same way
// when every run has one.
func Combine(runs []*CalibrationRun, created time.Time, version string) (*Calibration, error) {
	if len(runs) == 0 {
		return nil, errors.New("calibration: no runs")
	}
	cal := &Calibration{Format: CalibrationFormat, Kind: "calibration", Created: created.UTC(), ProgramVersion: version}
	methods := map[string]bool{}
	for _, r := range runs {
		methods[r.Method] = true
		cal.Runs = append(cal.Runs, *r)
	}
	if len(methods) == 1 {
		cal.Method = runs[0].Method
	} else {
		ms := make([]string, 0, len(methods))
		for m := range methods {
			ms = append(ms, m)
		}
		sort.Strings(ms)
		cal.Method = strings.Join(ms, "+")
	}
	if err := cal.evaluate(); err != nil {
		return nil, err
	}
	return cal, nil
}

// evaluate computes the combined heat capacity from the stored runs (also
// used after reading a file, so that a file's numbers are re-derived from
// its inputs and checked).
func (cal *Calibration) evaluate() error {
	var c chain
	m, err := cal.model(&c)
	if err != nil {
		return err
	}
	corr := c.correlation()
	b, err := Propagate(c.inputs, corr, m.eps, 0.95)
	if err != nil {
		return fmt.Errorf("calibration: %w", err)
	}
	cal.HeatCapacity, cal.UHeatCapacity, cal.DoF = b.Value, b.U, finiteDoF(b.DoF)
	cal.Vessel, cal.UVessel = nil, nil
	if m.vessel != nil {
		vb, err := Propagate(c.inputs, corr, m.vessel, 0.95)
		if err != nil {
			return fmt.Errorf("calibration: vessel part: %w", err)
		}
		v, uv := vb.Value, vb.U
		cal.Vessel, cal.UVessel = &v, &uv
	}
	cal.Scatter = m.scatter
	var sumT, sumTemp, sumM float64
	cal.Checks = nil
	for i := range cal.Runs {
		r := &cal.Runs[i]
		sumT += r.DeltaT
		sumTemp += r.MeanTemperature
		sumM += r.ContentsMass
		for _, ch := range r.Checks {
			if ch.Status != Pass {
				ch.Name = r.RunID + ": " + ch.Name
				cal.Checks = append(cal.Checks, ch)
			}
		}
	}
	n := float64(len(cal.Runs))
	cal.DeltaT, cal.MeanTemperature = sumT/n, sumTemp/n
	cal.ContentsMass = sumM / n
	if cal.Scatter != nil {
		st := Pass
		detail := fmt.Sprintf("%d runs: Birge ratio %.2f (scatter between runs consistent with their uncertainties)", cal.Scatter.Runs, cal.Scatter.BirgeRatio)
		if cal.Scatter.BirgeRatio > 1 {
			detail = fmt.Sprintf("%d runs: Birge ratio %.2f; u(ε) inflated by it to cover the scatter between runs", cal.Scatter.Runs, cal.Scatter.BirgeRatio)
		}
		if cal.Scatter.BirgeRatio > 2 {
			st = Warn
			detail = fmt.Sprintf("%d runs scatter by %.3g J/K, %.1f times more than their uncertainties explain; u(ε) inflated", cal.Scatter.Runs, cal.Scatter.SDJPerK, cal.Scatter.BirgeRatio)
		}
		cal.Checks = append(cal.Checks, Check{Name: "calibration-scatter", Status: st, Detail: detail})
	}
	if len(cal.Runs) > 1 && cal.ContentsMass > 0 {
		for _, r := range cal.Runs {
			if math.Abs(r.ContentsMass-cal.ContentsMass) > 0.02*cal.ContentsMass {
				cal.Checks = append(cal.Checks, Check{Name: "calibration-fills", Status: Warn,
					Detail: fmt.Sprintf("run %s held %.1f g of liquid, the runs average %.1f g: their total heat capacities differ by the fill", r.RunID, r.ContentsMass, cal.ContentsMass)})
				break
			}
		}
	}
	if !(cal.HeatCapacity > 0) {
		cal.Checks = append(cal.Checks, Check{Name: "heat-capacity-positive", Status: Fail,
			Detail: fmt.Sprintf("the combined heat capacity is %.4g J/K; it must be positive", cal.HeatCapacity)})
	}
	if len(cal.Checks) == 0 {
		cal.Checks = append(cal.Checks, Check{Name: "calibration-runs", Status: Pass, Detail: fmt.Sprintf("%d run(s), all checks passed", len(cal.Runs))})
	}
	cal.Status = Worst(cal.Checks)
	return nil
}

func finiteDoF(v float64) float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0
	}
	return v
}

// calModel is the measurement model of a calibration inside a chain: the
// total heat capacity, the vessel part (nil unless every run has one), the
// index of the shared k_cp input, and the between-run scatter.
type calModel struct {
	eps, vessel Model
	kcp         int
	scatter     *ScatterSummary
}

// model adds every run's inputs to c and returns the combined heat capacity
//
//	ε(x) = Σ w_i ε_i(x) + δε_runs,   w_i = u_i⁻²/Σ u_j⁻²
//
// where δε_runs = 0 ± u_extra is the between-run term: with the Birge ratio
// R_B = √(χ²/(n − 1)), χ² = Σ (ε_i − ε̄)²/u_i², and R_B > 1,
//
//	u_extra = u(ε̄)·√(R_B² − 1),   u(ε̄) = (Σ u_i⁻²)^(−1/2)
//
// so that for independent runs u(ε) = R_B·u(ε̄) (Birge, Phys. Rev. 40 (1932)
// 207; common practice), on n − 1 degrees of freedom. model does not
// change cal.
func (cal *Calibration) model(c *chain) (calModel, error) {
	if len(cal.Runs) == 0 {
		return calModel{}, errors.New("calibration has no runs")
	}
	kcp := c.add(cpScaleInput(cal.Runs[0].MeanTemperature))
	first := len(c.inputs)
	out := calModel{kcp: kcp}
	n := len(cal.Runs)
	models := make([]calRunModel, n)
	w := make([]float64, n)
	var sw float64
	allVessel := true
	for i := range cal.Runs {
		r := &cal.Runs[i]
		tag := ""
		if n > 1 {
			tag = strconv.Itoa(i + 1)
		}
		m, err := r.build(c, kcp, tag)
		if err != nil {
			return calModel{}, err
		}
		models[i] = m
		u := r.UHeatCapacity
		if !(u > 0) || math.IsInf(u, 0) {
			return calModel{}, fmt.Errorf("%s: standard uncertainty of ε %g J/K is not positive", calWho(r.RunID), u)
		}
		w[i] = 1 / (u * u)
		sw += w[i]
		if m.vessel == nil {
			allVessel = false
		}
	}
	for i := range w {
		w[i] /= sw
	}
	if n > 1 {
		calCorrelateMeters(c, first)
	}
	extra := -1
	if n > 1 {
		var wmean, mean, chi2, ss float64
		for i, r := range cal.Runs {
			wmean += w[i] * r.HeatCapacity
			mean += r.HeatCapacity / float64(n)
		}
		for _, r := range cal.Runs {
			d := r.HeatCapacity - wmean
			chi2 += d * d / (r.UHeatCapacity * r.UHeatCapacity)
			ss += (r.HeatCapacity - mean) * (r.HeatCapacity - mean)
		}
		rb := math.Sqrt(chi2 / float64(n-1))
		s := &ScatterSummary{Runs: n, BirgeRatio: rb, SDJPerK: math.Sqrt(ss / float64(n-1))}
		if rb > 1 {
			s.UExtra = math.Sqrt((rb*rb - 1) / sw)
			extra = c.add(Input{Name: "scatter between calibration runs", Symbol: "δε_runs", Unit: "J/K", Value: 0, U: s.UExtra, DoF: float64(n - 1), Dist: Normal})
		}
		out.scatter = s
	}
	out.eps = func(x []float64) float64 {
		var e float64
		for i, m := range models {
			e += w[i] * m.eps(x)
		}
		if extra >= 0 {
			e += x[extra]
		}
		return e
	}
	if allVessel {
		out.vessel = func(x []float64) float64 {
			var v float64
			for i, m := range models {
				v += w[i] * m.vessel(x)
			}
			if extra >= 0 {
				v += x[extra]
			}
			return v
		}
	}
	return out, nil
}

// Errors of ReadCalibration, for errors.Is.
var (
	// ErrCalibrationFile: the input is not a calibration file this program
	// reads (not JSON, not a calibration, a newer format, no runs).
	ErrCalibrationFile = errors.New("not a usable calibration file")
	// ErrCalibrationEdited: the numbers the file states do not follow from
	// the inputs it stores.
	ErrCalibrationEdited = errors.New("the file was edited or is corrupt")
)

// calMeters are the electrical inputs read from a meter: when several runs
// of one calibration give the same reading uncertainty for them, it is the
// meter's calibration uncertainty and does not average down between runs
// (common practice: a systematic effect shared by the runs is fully
// correlated, JCGM 100:2008 F.1.2.3 and 5.2.4).
var calMeters = map[string]bool{"P": true, "V": true, "I": true}

// calCorrelateMeters sets r = 1 between the meter inputs of different runs
// (chain inputs from index first on) that share symbol, unit and standard
// uncertainty.
func calCorrelateMeters(c *chain, first int) {
	type key struct {
		sym, unit string
		u         float64
	}
	groups := map[key][]int{}
	for i := first; i < len(c.inputs); i++ {
		in := c.inputs[i]
		base, _, _ := strings.Cut(in.Symbol, "[")
		if calMeters[base] && in.U > 0 {
			k := key{base, in.Unit, in.U}
			groups[k] = append(groups[k], i)
		}
	}
	for _, g := range groups {
		for a := 0; a < len(g); a++ {
			for b := a + 1; b < len(g); b++ {
				c.correlate(g[a], g[b], 1)
			}
		}
	}
}

// WriteCalibration writes the calibration file: versioned, indented JSON.
func WriteCalibration(w io.Writer, cal *Calibration) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	if err := enc.Encode(cal); err != nil {
		return fmt.Errorf("calibration file: %w", err)
	}
	return nil
}

// calAgree reports whether a stated value matches the one re-derived from
// the inputs: the file holds every number with all its digits, so only
// rounding in the re-derivation may differ.
func calAgree(stated, derived float64) bool {
	return math.Abs(stated-derived) <= 1e-6*math.Abs(derived)+1e-9
}

// ReadCalibration reads a calibration file written by WriteCalibration and
// re-derives every run's heat capacity, and the combined one, from the
// stored inputs. A file that is not JSON, not a calibration, or of a newer
// format gives an error wrapping ErrCalibrationFile; numbers that do not
// follow from the inputs one wrapping ErrCalibrationEdited.
func ReadCalibration(r io.Reader) (*Calibration, error) {
	dec := json.NewDecoder(r)
	var cal Calibration
	if err := dec.Decode(&cal); err != nil {
		return nil, fmt.Errorf("%w: not valid JSON: %w", ErrCalibrationFile, err)
	}
	switch {
	case cal.Format == 0 || cal.Kind != "calibration":
		return nil, fmt.Errorf("%w: no calred_calibration_format, or kind is not \"calibration\"", ErrCalibrationFile)
	case cal.Format > CalibrationFormat:
		return nil, fmt.Errorf("%w: format %d is newer than this program reads (%d): use a newer calred", ErrCalibrationFile, cal.Format, CalibrationFormat)
	case len(cal.Runs) == 0:
		return nil, fmt.Errorf("%w: it has no runs", ErrCalibrationFile)
	}
	for i := range cal.Runs {
		run := &cal.Runs[i]
		stated, statedU := run.HeatCapacity, run.UHeatCapacity
		if err := run.evaluate(); err != nil {
			return nil, fmt.Errorf("calibration file: %w: %w", err, ErrCalibrationEdited)
		}
		if !calAgree(stated, run.HeatCapacity) || !calAgree(statedU, run.UHeatCapacity) {
			return nil, fmt.Errorf("calibration file: run %s states ε = %g ± %g J/K but its inputs give %g ± %g J/K: %w",
				run.RunID, stated, statedU, run.HeatCapacity, run.UHeatCapacity, ErrCalibrationEdited)
		}
	}
	stated, statedU := cal.HeatCapacity, cal.UHeatCapacity
	if err := cal.evaluate(); err != nil {
		return nil, fmt.Errorf("calibration file: %w: %w", err, ErrCalibrationEdited)
	}
	if !calAgree(stated, cal.HeatCapacity) || !calAgree(statedU, cal.UHeatCapacity) {
		return nil, fmt.Errorf("calibration file states ε = %g ± %g J/K but its inputs give %g ± %g J/K: %w",
			stated, statedU, cal.HeatCapacity, cal.UHeatCapacity, ErrCalibrationEdited)
	}
	return &cal, nil
}

// Pulse is one heating period of a log that holds several: when the heater
// was switched on and off, and what it put in (Energy from a heater-power
// column, or Power with Time — Time defaults to Off − On — or Voltage,
// Current and Time).
type Pulse struct {
	On, Off    float64 // s
	Electrical Electrical
}

// PulseOf turns a heating period found in a heater-power column into a
// Pulse whose energy is the column's integral.
func PulseOf(h HeaterPulse) Pulse {
	return Pulse{On: h.On, Off: h.Off, Electrical: Electrical{Energy: h.Energy, UEnergy: h.UEnergy}}
}

// PulseCalibration is an electrical calibration from several heating
// periods in one log: one run per pulse, the part of the log each was
// reduced from, and the agreement of consecutive pulses.
type PulseCalibration struct {
	Runs    []*CalibrationRun
	Windows []Period // readings analysed for each pulse (s)
	Checks  []Check  // pulse-agreement, one per pair of consecutive pulses
}

// Limits of the pulse-agreement check: the difference of two heat
// capacities against its standard uncertainty, |ε₂ − ε₁|/√(u₁² + u₂²),
// warns beyond 2 and fails beyond 3 (the usual 2σ/3σ warning and action
// limits — common practice).
const (
	calPulseWarnZ = 2
	calPulseFailZ = 3
)

// CalibratePulses reduces a log (t in s, increasing; theta in K) in which
// a heater was switched on more than once — calibrations before and after
// a sample, common in precision work (DOMAIN §3) — to one electrical
// calibration run per pulse. Pulse k is analysed on the readings from the
// start of the after period of pulse k − 1 (the log's start for the first)
// to the last reading before pulse k + 1 is switched on (the log's end for
// the last): the after period of one pulse is the fore period of the next.
// The mixing time of each window is the pulse's On time; opt must not fix
// the fore or after period, since they differ between pulses, and the log
// must hold no other process between the pulses.
//
// s describes the calibration apart from the energy (run ID, file,
// contents mass, balance uncertainty); its Electrical, Chemical and Mixing
// must be nil. Run k is named RunID-pulse<k>. Consecutive pulses are
// compared (calPulseWarnZ, calPulseFailZ) and the check is added to the
// later run. The two windows share readings — noise that raises the shared
// part raises the first ΔT and lowers the second — so the runs' ΔT are
// anticorrelated; the comparison and Combine ignore that, which makes the
// comparison a little stricter and u(ε̄) a little larger than they need be.
func CalibratePulses(t, theta []float64, pulses []Pulse, s CalibrationSetup, opt RiseOptions) (*PulseCalibration, error) {
	switch {
	case len(pulses) == 0:
		return nil, errors.New("pulse calibration: no heating periods given")
	case len(t) != len(theta) || len(t) == 0:
		return nil, fmt.Errorf("pulse calibration: %d times but %d temperatures", len(t), len(theta))
	case opt.Pre != nil || opt.Post != nil:
		return nil, errors.New("pulse calibration: the fore and after periods differ from pulse to pulse and cannot be fixed for the whole log")
	case s.Electrical != nil || s.Chemical != nil || s.Mixing != nil:
		return nil, errors.New("pulse calibration: the energy comes with each pulse; the setup must not describe a calibration kind")
	}
	for k, p := range pulses {
		if !(p.Off > p.On) || !(p.On > t[0]) || !(p.Off < t[len(t)-1]) {
			return nil, fmt.Errorf("pulse calibration: heating period %d (%g s to %g s) does not lie inside the log (%g s to %g s) with off after on",
				k+1, p.On, p.Off, t[0], t[len(t)-1])
		}
		if k > 0 && !(p.On > pulses[k-1].Off) {
			return nil, fmt.Errorf("pulse calibration: heating period %d starts at %g s, before period %d ends at %g s", k+1, p.On, k, pulses[k-1].Off)
		}
	}
	id := s.RunID
	if id == "" {
		id = "run"
	}
	out := &PulseCalibration{}
	start := 0
	for k, p := range pulses {
		end := len(t)
		if k+1 < len(pulses) {
			end = sort.SearchFloat64s(t, pulses[k+1].On)
		}
		if end-start < riseMinPoints {
			return nil, fmt.Errorf("pulse calibration: heating period %d has only %d readings between the previous after period and the next pulse", k+1, end-start)
		}
		o := opt
		o.MixTime = p.On
		rise, err := AnalyseRise(t[start:end], theta[start:end], o)
		if err != nil {
			return nil, fmt.Errorf("pulse calibration: heating period %d (on at %g s): %w", k+1, p.On, err)
		}
		e := p.Electrical
		if e.Energy == 0 && e.Time == 0 {
			e.Time = p.Off - p.On
		}
		ps := s
		ps.RunID = fmt.Sprintf("%s-pulse%d", id, k+1)
		ps.Electrical = &e
		run, err := CalibrateRun(rise, ps)
		if err != nil {
			return nil, fmt.Errorf("pulse calibration: heating period %d: %w", k+1, err)
		}
		out.Runs = append(out.Runs, run)
		out.Windows = append(out.Windows, Period{t[start], t[end-1]})
		if k > 0 {
			ch := calPulseAgreement(out.Runs[k-1], run)
			run.Checks = append(run.Checks, ch)
			run.Status = Worst(run.Checks)
			out.Checks = append(out.Checks, ch)
		}
		if k+1 < len(pulses) {
			start = sort.SearchFloat64s(t, rise.Periods.Post.Start)
			if next := sort.SearchFloat64s(t, pulses[k+1].On); next-start < riseMinPoints {
				return nil, fmt.Errorf("pulse calibration: the after period of heating period %d (from %g s) leaves only %d readings before period %d is switched on at %g s",
					k+1, rise.Periods.Post.Start, next-start, k+2, pulses[k+1].On)
			}
		}
	}
	return out, nil
}

// calPulseAgreement compares the heat capacities of two consecutive pulses.
func calPulseAgreement(a, b *CalibrationRun) Check {
	d := b.HeatCapacity - a.HeatCapacity
	u := math.Hypot(a.UHeatCapacity, b.UHeatCapacity)
	z := math.Abs(d) / u
	st := Pass
	switch {
	case !(z <= calPulseFailZ):
		st = Fail
	case z > calPulseWarnZ:
		st = Warn
	}
	return Check{Name: "pulse-agreement", Status: st,
		Detail: fmt.Sprintf("ε of %s differs from %s by %+.4g J/K, %.2f times their combined standard uncertainty %.3g J/K (warn beyond %d, fail beyond %d)",
			b.RunID, a.RunID, d, z, u, calPulseWarnZ, calPulseFailZ)}
}
