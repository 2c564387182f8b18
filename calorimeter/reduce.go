package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// DefaultUMass is the standard uncertainty of a weighing when none is
// given: 0.5 mg, a 0.1 mg-readability analytical balance used by difference
// with its repeatability — common practice; stated in every report.
const DefaultUMass = 0.0005 // g

// Sample describes what was dissolved in a sample run.
type Sample struct {
	Mass, UMass           float64 // g of solute
	Formula               string
	MolarMass, UMolarMass float64 // g/mol (from Formula when zero)
	SolventMass           float64 // g of water, 0 = unknown
	USolventMass          float64
	SolutionCp            float64 // J/(g·K) of the final solution, 0 = use water at the run's temperature
	USolutionCp           float64
}

// HeatCapacity says where the calorimeter's heat capacity comes from: a
// calibration (whose inputs then join the sample's model), or a value given
// by the user with its standard uncertainty.
type HeatCapacity struct {
	Calibration *Calibration
	Value, U    float64 // J/K, when Calibration is nil
	DoF         float64 // 0 = infinite
	Source      string  // the calibration file's hash or run id, or "given"
}

// ReduceOptions are the choices of a sample reduction.
type ReduceOptions struct {
	Coverage float64 // 0.95 by default
}

// Reduction is the result of a sample run: from the corrected temperature
// change to the molar enthalpy of solution.
type Reduction struct {
	Rise              *Rise
	Sample            Sample
	HeatCapacity      float64 // J/K, total, as used for this run
	UHeatCapacity     float64
	HeatCapacityBasis string  // how ε was obtained for this run, one line
	HeatReleased      float64 // J, q = ε·ΔT (negative when endothermic)
	UHeatReleased     float64
	Amount            float64 // mol
	Molality          float64 // mol/kg (NaN when the solvent mass is unknown)
	WaterRatio        float64 // mol water per mol solute (NaN when unknown)
	MolarEnthalpy     float64 // kJ/mol, ΔsolH = −q/n
	UMolarEnthalpy    float64
	Expanded          float64 // kJ/mol, U = k·u
	CoverageFactor    float64
	DoF               float64 // ν_eff (+Inf when all inputs are type B)
	Budget            *Budget
	Checks            []Check
	Status            Status
	Convention        string
	chainInputs       []Input
	chainCorr         [][]float64
	model             Model
}

// The sign convention printed with every result.
const SignConvention = "q = ε·ΔT is the heat given to the calorimeter (positive when it warms); ΔsolH = −q/n (positive: endothermic, the solution cools)"

// ReduceSample turns a sample run's corrected temperature change into the
// molar enthalpy of solution with one measurement model for the whole chain
// (DOMAIN §7):
//
//	ΔsolH = −ε·ΔT_s·M/m_s
//	ε = ε_cal(x_cal)                              (total, same fill as the calibration)
//	ε = C_v(x_cal) + k_cp·m_w·c_p,w(T_s)          (vessel part plus this run's water)
//	ε = C_v(x_cal) + (m_w + m_s)·c_p,solution     (when the solution's c_p is given)
//
// where x_cal are the calibration's own inputs (heater power and time, the
// standard's certified enthalpy, the calibration's ΔT …). The law of
// propagation (JCGM 100:2008 eq. 13) gives u, Welch–Satterthwaite ν_eff
// and k = t_0.975(ν_eff).
func ReduceSample(rise *Rise, s Sample, hc HeatCapacity, opt ReduceOptions) (*Reduction, error) {
	if rise == nil {
		return nil, errors.New("reduction: no temperature analysis")
	}
	if opt.Coverage == 0 {
		opt.Coverage = 0.95
	}
	if err := chainNeedPositive("sample mass", s.Mass, "g"); err != nil {
		return nil, err
	}
	if s.MolarMass == 0 && s.Formula != "" {
		m, u, err := MolarMass(s.Formula)
		if err != nil {
			return nil, err
		}
		s.MolarMass, s.UMolarMass = m, u
	}
	if err := chainNeedPositive("molar mass", s.MolarMass, "g/mol"); err != nil {
		return nil, fmt.Errorf("%w (give --formula or --molar-mass)", err)
	}
	if s.UMass == 0 {
		s.UMass = DefaultUMass
	}
	red := &Reduction{Rise: rise, Sample: s, Convention: SignConvention, Molality: math.NaN(), WaterRatio: math.NaN()}
	red.Checks = append(red.Checks, rise.Checks...)

	var c chain
	iDT := c.add(riseInput("corrected temperature change", "ΔT_s", rise))
	iM := c.add(Input{Name: "molar mass", Symbol: "M", Unit: "g/mol", Value: s.MolarMass, U: s.UMolarMass, Dist: Rectangular})
	iMs := c.add(massInput("sample mass", "m_s", s.Mass, s.UMass))
	var eps func(x []float64) float64
	switch {
	case hc.Calibration != nil:
		cm, err := hc.Calibration.model(&c)
		if err != nil {
			return nil, err
		}
		calVessel := cm.vessel
		switch {
		case s.SolventMass > 0 && calVessel != nil:
			uw := s.USolventMass
			if uw == 0 {
				uw = s.UMass
			}
			iW := c.add(massInput("solvent mass", "m_w", s.SolventMass, uw))
			if s.SolutionCp > 0 {
				iCp := c.add(Input{Name: "specific heat of the solution", Symbol: "c_p,sol", Unit: "J/(g·K)", Value: s.SolutionCp, U: s.USolutionCp, Dist: Normal})
				eps = func(x []float64) float64 { return calVessel(x) + (x[iW]+x[iMs])*x[iCp] }
				red.HeatCapacityBasis = fmt.Sprintf("vessel part of the calibration plus (%.4g g solvent + %.4g g solute) × c_p %.5g J/(g·K) given", s.SolventMass, s.Mass, s.SolutionCp)
			} else {
				// The calibration's k_cp: the same scale on water's c_p
				// in the calibration and here, so that it cancels.
				kcp := cm.kcp
				cp := WaterCp(rise.MeanTemperature)
				eps = func(x []float64) float64 { return calVessel(x) + x[kcp]*x[iW]*cp }
				red.HeatCapacityBasis = fmt.Sprintf("vessel part of the calibration plus %.4g g water × c_p(water, %.2f °C) = %.5g J/(g·K); the solute's own heat capacity is neglected", s.SolventMass, rise.MeanTemperature-273.15, cp)
			}
		default:
			eps = cm.eps
			red.HeatCapacityBasis = "total heat capacity of the calibration (same fill assumed)"
			if s.SolventMass > 0 && hc.Calibration.ContentsMass > 0 &&
				math.Abs(s.SolventMass-hc.Calibration.ContentsMass) > 0.02*hc.Calibration.ContentsMass {
				red.Checks = append(red.Checks, Check{Name: "fill-matches-calibration", Status: Warn,
					Detail: fmt.Sprintf("this run holds %.1f g of solvent, the calibration %.1f g, and the calibration has no vessel part to rescale (give --contents-mass when calibrating)", s.SolventMass, hc.Calibration.ContentsMass)})
			}
		}
	default:
		if err := chainNeedPositive("heat capacity", hc.Value, "J/K"); err != nil {
			return nil, fmt.Errorf("%w (give --heat-capacity or --cal)", err)
		}
		dof := hc.DoF
		if dof == 0 {
			dof = math.Inf(1)
		}
		iE := c.add(Input{Name: "heat capacity of the calorimeter", Symbol: "ε", Unit: "J/K", Value: hc.Value, U: hc.U, DoF: dof, Dist: Normal})
		eps = func(x []float64) float64 { return x[iE] }
		red.HeatCapacityBasis = "given"
	}
	model := func(x []float64) float64 {
		return -eps(x) * x[iDT] * x[iM] / x[iMs] / 1000
	}
	corr := c.correlation()
	b, err := Propagate(c.inputs, corr, model, opt.Coverage)
	if err != nil {
		return nil, fmt.Errorf("uncertainty budget: %w", err)
	}
	epsB, err := Propagate(c.inputs, corr, eps, opt.Coverage)
	if err != nil {
		return nil, fmt.Errorf("heat capacity: %w", err)
	}
	qB, err := Propagate(c.inputs, corr, func(x []float64) float64 { return eps(x) * x[iDT] }, opt.Coverage)
	if err != nil {
		return nil, fmt.Errorf("heat: %w", err)
	}
	red.Budget = b
	red.chainInputs, red.chainCorr, red.model = c.inputs, corr, model
	red.HeatCapacity, red.UHeatCapacity = epsB.Value, epsB.U
	red.HeatReleased, red.UHeatReleased = qB.Value, qB.U
	red.Amount = s.Mass / s.MolarMass
	if s.SolventMass > 0 {
		red.Molality = red.Amount / (s.SolventMass / 1000)
		red.WaterRatio = (s.SolventMass / 18.015) / red.Amount // M(H2O) = 18.015 g/mol, DOMAIN §6
	}
	red.MolarEnthalpy, red.UMolarEnthalpy = b.Value, b.U
	red.Expanded, red.CoverageFactor, red.DoF = b.Expanded, b.K, b.DoF
	if s.SolutionCp > 0 && !strings.HasPrefix(red.HeatCapacityBasis, "vessel part") {
		red.Checks = append(red.Checks, Check{Name: "solution-cp-unused", Status: Warn,
			Detail: fmt.Sprintf("the solution's c_p %.5g J/(g·K) was given but not used: the heat capacity is %s; it enters only with a calibration's vessel part and the solvent mass", s.SolutionCp, red.HeatCapacityBasis)})
	}
	red.Checks = append(red.Checks, reduceChecks(red)...)
	red.Status = Worst(red.Checks)
	return red, nil
}

// MonteCarlo runs JCGM 101 on the reduction's own model; trials 0 = the
// adaptive procedure.
func (r *Reduction) MonteCarlo(trials int, seed uint64, workers int) (*MonteCarloResult, error) {
	var res *MonteCarloResult
	var err error
	if trials == 0 {
		res, err = MonteCarloAdaptive(r.chainInputs, r.chainCorr, r.model, seed, workers)
	} else {
		res, err = MonteCarlo(r.chainInputs, r.chainCorr, r.model, trials, seed, workers)
	}
	if err != nil {
		return nil, err
	}
	ok, dl, dh, delta := ValidateGUM(r.Budget, res)
	res.GUMValidated, res.DLow, res.DHigh, res.Delta = ok, dl, dh, delta
	return res, nil
}

// Inputs returns the inputs of the reduction's measurement model (for an
// independent recomputation of the budget).
func (r *Reduction) Inputs() ([]Input, [][]float64) { return r.chainInputs, r.chainCorr }

func reduceChecks(r *Reduction) []Check {
	var out []Check
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	if !finite(r.MolarEnthalpy) || !finite(r.UMolarEnthalpy) || !finite(r.CoverageFactor) || !finite(r.Expanded) ||
		!(r.UMolarEnthalpy < math.Abs(r.MolarEnthalpy)) {
		out = append(out, Check{Name: "result-determined", Status: Fail,
			Detail: fmt.Sprintf("the result is not determined: ΔsolH = %g ± %g kJ/mol (k = %g); check the masses and the heat capacity for absurd values", r.MolarEnthalpy, r.UMolarEnthalpy, r.CoverageFactor)})
	}
	if !(r.HeatCapacity > 0) {
		out = append(out, Check{Name: "heat-capacity-positive", Status: Fail,
			Detail: fmt.Sprintf("the heat capacity used is %.4g J/K; it must be positive", r.HeatCapacity)})
	}
	if f := strings.TrimSpace(r.Sample.Formula); f != "" {
		if sign, ok := KnownSign(f); ok {
			got := 1
			if r.MolarEnthalpy < 0 {
				got = -1
			}
			word := map[int]string{1: "endothermically (ΔsolH > 0, the water cools)", -1: "exothermically (ΔsolH < 0, the water warms)"}
			if got != sign {
				out = append(out, Check{Name: "sign-as-expected", Status: Fail,
					Detail: fmt.Sprintf("%s dissolves %s, but this run gives ΔsolH = %.3g kJ/mol: check the sign of ΔT, the mixing time and the substance", f, word[sign], r.MolarEnthalpy)})
			} else {
				out = append(out, Check{Name: "sign-as-expected", Status: Pass,
					Detail: fmt.Sprintf("%s dissolves %s, as found", f, word[sign])})
			}
		}
	}
	if !math.IsNaN(r.Molality) && r.Molality > 2 {
		out = append(out, Check{Name: "dilution", Status: Warn,
			Detail: fmt.Sprintf("final molality %.3g mol/kg is high: ΔsolH depends on concentration, compare only with values at the same molality", r.Molality)})
	}
	return out
}
