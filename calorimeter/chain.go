package calorimeter

import (
	"fmt"
	"math"
)

// chain collects the inputs of one measurement model — the whole chain from
// the calibration run to the molar enthalpy of the sample (DOMAIN §7) — and
// the correlations between them. Parts of the model are closures that read
// their inputs by index, so the same model serves the GUM propagation and
// the Monte Carlo trials without allocating.
type chain struct {
	inputs []Input
	pairs  []chainPair
}

type chainPair struct {
	i, j int
	r    float64
}

// add appends an input and returns its index.
func (c *chain) add(in Input) int {
	if in.DoF == 0 {
		in.DoF = math.Inf(1)
	}
	c.inputs = append(c.inputs, in)
	return len(c.inputs) - 1
}

// correlate records the correlation coefficient r between inputs i and j.
func (c *chain) correlate(i, j int, r float64) {
	if i == j || r == 0 || math.IsNaN(r) {
		return
	}
	c.pairs = append(c.pairs, chainPair{i, j, math.Max(-1, math.Min(1, r))})
}

// correlation returns the correlation matrix, or nil when the inputs are
// independent.
func (c *chain) correlation() [][]float64 {
	if len(c.pairs) == 0 {
		return nil
	}
	n := len(c.inputs)
	m := make([][]float64, n)
	for i := range m {
		m[i] = make([]float64, n)
		m[i][i] = 1
	}
	for _, p := range c.pairs {
		m[p.i][p.j], m[p.j][p.i] = p.r, p.r
	}
	return m
}

// covariance of two inputs given as (u_a, u_b, cov) → correlation coefficient.
func chainCorr(ua, ub, cov float64) float64 {
	if ua <= 0 || ub <= 0 {
		return 0
	}
	return cov / (ua * ub)
}

// riseInput is the corrected temperature change of a run as a model input,
// with the degrees of freedom its analysis found. With finitely many (more
// than two) it is a scaled and shifted t-distribution for the Monte Carlo
// trials (JCGM 101:2008 6.4.9), so that the trials see the same ν as the
// GUM coverage factor does; ν below 1 is taken as 1.
func riseInput(name, symbol string, r *Rise) Input {
	dof := r.DoF
	if dof <= 0 || math.IsNaN(dof) {
		dof = math.Inf(1)
	}
	dof = math.Max(dof, 1)
	dist := Normal
	if dof > 2 && !math.IsInf(dof, 1) {
		dist = StudentT
	}
	return Input{Name: name, Symbol: symbol, Unit: "K", Value: r.DeltaT, U: r.UDeltaT, DoF: dof, Dist: dist}
}

// riseDoF is the effective degrees of freedom of a run's temperature
// analysis, for inputs derived from it (≥ 1, +Inf when unknown).
func riseDoF(r *Rise) float64 {
	if r.DoF <= 0 || math.IsNaN(r.DoF) {
		return math.Inf(1)
	}
	return math.Max(r.DoF, 1)
}

// massInput is a weighing with the balance's standard uncertainty.
func massInput(name, symbol string, m, u float64) Input {
	return Input{Name: name, Symbol: symbol, Unit: "g", Value: m, U: u, DoF: math.Inf(1), Dist: Normal}
}

// cpScaleInput is a common factor on every specific heat of water taken from
// the IAPWS-95 fit: one input, so that c_p cancels where it should (a
// calibration and a sample run both using water).
func cpScaleInput(t float64) Input {
	return Input{Name: "water c_p scale (IAPWS-95 fit)", Symbol: "k_cp", Unit: "1", Value: 1,
		U: WaterCpU(t) / WaterCp(t), DoF: math.Inf(1), Dist: Rectangular}
}

func chainNeedPositive(what string, v float64, unit string) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%s must be positive, got %g %s", what, v, unit)
	}
	return nil
}
