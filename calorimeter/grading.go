package calorimeter

import (
	"errors"
	"fmt"
	"math"

	"calred/fit"
)

// Grade compares a result x (standard uncertainty u, expanded U) with an
// accepted value x_pt (standard uncertainty u_pt) as proficiency testing
// does (ISO 13528:2015 §9; DOMAIN §8):
//
//	error  = 100·(x − x_pt)/|x_pt|            %
//	z      = (x − x_pt)/σ_pt                  σ_pt: standard deviation for proficiency assessment
//	ζ      = (x − x_pt)/√(u²(x) + u²(x_pt))
//	En     = (x − x_pt)/√(U²(x) + U²(x_pt))   U(x_pt) = 2·u(x_pt)
//
// |z|, |ζ| ≤ 2 satisfactory, 2 < |·| < 3 questionable, ≥ 3 unsatisfactory;
// |En| ≤ 1 satisfactory. Scores that cannot be formed are NaN.
type Grade struct {
	Accepted, UAccepted float64
	ErrorPercent        float64
	Z, Zeta, En         float64
	Verdict             string // satisfactory | questionable | unsatisfactory | not graded
	Basis               string // which score the verdict rests on
	Feedback            []string
}

// GradeResult grades x ± u (U expanded) against accepted ± uAccepted;
// sigmaPT ≤ 0 leaves z out.
func GradeResult(x, u, U, accepted, uAccepted, sigmaPT float64) Grade {
	g := Grade{Accepted: accepted, UAccepted: uAccepted, ErrorPercent: math.NaN(), Z: math.NaN(), Zeta: math.NaN(), En: math.NaN()}
	if math.IsNaN(x) || math.IsNaN(accepted) {
		g.Verdict, g.Basis = "not graded", "no result"
		return g
	}
	d := x - accepted
	if accepted != 0 {
		g.ErrorPercent = 100 * d / math.Abs(accepted)
	}
	if sigmaPT > 0 {
		g.Z = d / sigmaPT
	}
	if s := math.Hypot(u, uAccepted); s > 0 {
		g.Zeta = d / s
	}
	if s := math.Hypot(U, 2*uAccepted); s > 0 {
		g.En = d / s
	}
	score, basis := g.Zeta, "ζ"
	if !math.IsNaN(g.Z) {
		score, basis = g.Z, "z"
	}
	switch a := math.Abs(score); {
	case math.IsNaN(a):
		g.Verdict, g.Basis = "not graded", "no uncertainty to form a score"
	case a <= 2:
		g.Verdict, g.Basis = "satisfactory", basis
	case a < 3:
		g.Verdict, g.Basis = "questionable", basis
	default:
		g.Verdict, g.Basis = "unsatisfactory", basis
	}
	return g
}

// Diagnose names the classic mistakes a result's pattern suggests, in plain
// words for a student: the sign reversed, J confused with kJ, per gram
// instead of per mole, the wrong salt, the calorimeter's own heat capacity
// left out, and the
// failed or warned checks of the run. It looks at the ratio x/x_pt; the
// rules for the sign, the factor 1000 and the molar mass allow ±15 %
// (common practice for teaching-lab runs, whose own uncertainty is several
// per cent, DOMAIN §10); the wrong salt is named as gradeOtherSubstance
// says; a result 3–50 % low or 3–100 % high is reported as such.
func Diagnose(x, accepted, molarMass float64, checks []Check) []string {
	var out []string
	near := func(r, target float64) bool { return math.Abs(r/target-1) < 0.15 }
	if accepted != 0 && !math.IsNaN(x) {
		r := x / accepted
		switch {
		case near(r, -1):
			out = append(out, "the result has the right size but the wrong sign: ΔsolH = −q/n, and a solution that cools has ΔsolH > 0")
		case near(r, 1000) || near(r, 0.001):
			out = append(out, "the result is off by a factor of 1000: check J against kJ")
		case molarMass > 0 && (near(r, 1/molarMass) || near(r, molarMass)):
			out = append(out, fmt.Sprintf("the result is off by the molar mass (%.1f g/mol): divide the heat by moles, not grams", molarMass))
		case gradeOtherSubstance(x, accepted, molarMass) != "":
			out = append(out, gradeOtherSubstance(x, accepted, molarMass))
		case r > 0 && r < 0.97 && r > 0.5:
			out = append(out, fmt.Sprintf("the result is %.0f %% low: heat lost to the cup and lid (the calorimeter's own heat capacity) or a late mixing time are the usual causes", 100*(1-r)))
		case r > 1.03 && r < 2:
			out = append(out, fmt.Sprintf("the result is %.0f %% high: check the sample mass, the solvent mass and the heat capacity used", 100*(r-1)))
		}
	}
	for _, c := range checks {
		if c.Status != Pass {
			out = append(out, fmt.Sprintf("%s (%s): %s", c.Name, c.Status, c.Detail))
		}
	}
	return out
}

// gradeOtherSubstance looks for the wrong salt on the bench: a substance of
// the reference table whose accepted ΔsolH is within 3 % of the result
// recomputed with that substance's molar mass (the heat per gram is what
// the run measured), while the run's own accepted value is more than 8 %
// away. molarMass is the molar mass the run used (g/mol).
func gradeOtherSubstance(x, accepted, molarMass float64) string {
	if math.Abs(x/accepted-1) < 0.08 || !(molarMass > 0) {
		return ""
	}
	var best ReferenceEnthalpy
	bestD, bestX := math.Inf(1), 0.0
	for _, ref := range References() {
		h := ref.Enthalpy / 1000
		m, _, err := MolarMass(ref.Formula)
		if err != nil || math.Abs(h/accepted-1) < 0.03 {
			continue
		}
		xr := x * m / molarMass
		if d := math.Abs(xr/h - 1); d < 0.03 && d < bestD {
			best, bestD, bestX = ref, d, xr
		}
	}
	if math.IsInf(bestD, 1) {
		return ""
	}
	return fmt.Sprintf("recomputed with the molar mass of %s (%s) the result is %.2f kJ/mol, within %.1f %% of that salt's accepted %.2f kJ/mol: check which salt was used and what the label says",
		best.Formula, best.Name, bestX, 100*bestD, best.Enthalpy/1000)
}

// Consensus is the robust mean and standard deviation of a set of results
// by ISO 13528:2015 Algorithm A (Annex C.3; DOMAIN §8): start from the
// median and s* = 1.483·MAD, then repeat — δ = 1.5·s*, clip each value to
// x* ± δ, x* = mean, s* = 1.134·sd — until s* is stable to 3 significant
// figures; u(x*) = 1.25·s*/√p.
type Consensus struct {
	Mean, SD, U float64
	N           int
	Iterations  int
}

// AlgorithmA computes the robust consensus of values (at least 3).
func AlgorithmA(values []float64) (Consensus, error) {
	var v []float64
	for _, x := range values {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			v = append(v, x)
		}
	}
	p := len(v)
	if p < 3 {
		return Consensus{}, errors.New("robust consensus: need at least 3 results")
	}
	x := fit.Median(v)
	s := 1.483 * fit.MAD(v)
	c := Consensus{N: p}
	clipped := make([]float64, p)
	for it := 1; it <= 100; it++ {
		c.Iterations = it
		delta := 1.5 * s
		var mean float64
		for i, y := range v {
			clipped[i] = math.Max(x-delta, math.Min(x+delta, y))
			mean += clipped[i]
		}
		mean /= float64(p)
		var ss float64
		for _, y := range clipped {
			ss += (y - mean) * (y - mean)
		}
		sNew := 1.134 * math.Sqrt(ss/float64(p-1))
		stable := gradeSig3(sNew) == gradeSig3(s)
		x, s = mean, sNew
		if stable || s == 0 {
			break
		}
	}
	c.Mean, c.SD, c.U = x, s, 1.25*s/math.Sqrt(float64(p))
	return c, nil
}

// gradeSig3 rounds to 3 significant figures.
func gradeSig3(v float64) float64 {
	if v == 0 {
		return 0
	}
	e := math.Floor(math.Log10(math.Abs(v))) - 2
	f := math.Pow(10, e)
	return math.Round(v/f) * f
}
