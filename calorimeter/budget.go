package calorimeter

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"text/tabwriter"

	"gonum.org/v1/gonum/stat/distuv"

	"calred/units"
)

// Distribution is the shape of the probability distribution assigned to an
// input quantity. It matters only to MonteCarlo; Propagate uses the standard
// uncertainty alone. Whatever the shape, Input.U is the standard deviation of
// the distribution (JCGM 101:2008 Table 1 gives the widths below):
//
//	Normal       N(x, u²)
//	Rectangular  R(x − a, x + a),  a = √3·u
//	Triangular   T(x − a, x + a),  a = √6·u   (symmetric)
//	StudentT     x + s·t_ν,        s = u·√((ν − 2)/ν), ν = Input.DoF > 2
//
// StudentT differs from JCGM 101:2008 6.4.9, whose scale is the type A
// uncertainty s/√n itself so that its standard deviation exceeds s/√n; a
// caller that wants that convention passes U = (s/√n)·√(ν/(ν − 2)).
type Distribution int

// The distributions MonteCarlo can sample.
const (
	Normal Distribution = iota
	Rectangular
	Triangular
	StudentT
)

// String returns the distribution's name in lower case ("normal",
// "rectangular", "triangular", "student-t").
func (d Distribution) String() string {
	switch d {
	case Normal:
		return "normal"
	case Rectangular:
		return "rectangular"
	case Triangular:
		return "triangular"
	case StudentT:
		return "student-t"
	}
	return "Distribution(" + strconv.Itoa(int(d)) + ")"
}

// Input is one input quantity X_i of a measurement model: its estimate x_i,
// its standard uncertainty u(x_i) in the same unit, and the degrees of
// freedom of u(x_i) (n − 1 for a mean of n readings, n − p for a fit,
// math.Inf(1) for a type B evaluation).
type Input struct {
	Name   string // e.g. "sample mass"
	Symbol string // e.g. "m_s"
	Unit   string // unit of Value and U, e.g. "g"
	Value  float64
	U      float64 // standard uncertainty, ≥ 0
	DoF    float64 // degrees of freedom ≥ 1, or math.Inf(1)
	Dist   Distribution
}

// Model is a measurement function y = f(x). The slice holds the input
// estimates in the order of the inputs. A Model must not keep x, and it
// must be safe to call from several goroutines at once: MonteCarlo calls it
// concurrently with a separate x for each goroutine.
type Model func(x []float64) float64

// BudgetTerm is one line of an uncertainty budget: an input quantity and the
// part of the combined uncertainty it brings.
//
// In JSON an infinite DoF (a type B evaluation) is written as null, since
// JSON has no infinity; null reads back as math.Inf(1).
type BudgetTerm struct {
	Quantity            string  `json:"quantity"`
	Symbol              string  `json:"symbol,omitempty"`
	Value               float64 `json:"value"`
	Unit                string  `json:"unit"`
	StandardUncertainty float64 `json:"standard_uncertainty"`
	Sensitivity         float64 `json:"sensitivity"`  // c_i = ∂f/∂x_i, output unit per input unit
	Contribution        float64 `json:"contribution"` // |c_i|·u(x_i) in the output's unit
	Percent             float64 `json:"percent"`      // 100·c_i²u²(x_i)/u_c²
	DoF                 float64 `json:"dof"`          // ν_i; +Inf is null in JSON
}

// Budget is the result of Propagate: the output estimate y, its combined
// standard uncertainty, effective degrees of freedom, coverage factor and
// expanded uncertainty, and the terms that make it up.
//
// CorrelationShare is in percent, like BudgetTerm.Percent: the Percent of the
// terms and CorrelationShare add up to 100 (to rounding) when u_c > 0.
// CorrelationShare is negative when correlations reduce u_c.
// In JSON an infinite DoF is written as null.
type Budget struct {
	Value            float64      `json:"value"`                // y = f(x)
	U                float64      `json:"standard_uncertainty"` // u_c(y)
	DoF              float64      `json:"dof"`                  // ν_eff; +Inf is null in JSON
	K                float64      `json:"coverage_factor"`      // k = t_p(⌊ν_eff⌋)
	Expanded         float64      `json:"expanded_uncertainty"` // U = k·u_c(y)
	Coverage         float64      `json:"coverage"`             // p, e.g. 0.95
	Terms            []BudgetTerm `json:"terms"`                // one per input, in input order
	CorrelationShare float64      `json:"correlation_percent"`  // 100·(off-diagonal part of u_c²)/u_c², in percent
}

// budgetDefaultCoverage is the coverage probability used when a caller passes
// zero: 95 %, the level GUM 6.3.3 and common practice report.
const budgetDefaultCoverage = 0.95

// budgetStepFraction sets the central-difference step h_i = u(x_i)/10. The
// derivative is taken with steps h and h/2 and Richardson-extrapolated, so
// its truncation error is O(h⁴) (Press et al., Numerical Recipes, 3rd ed.,
// §5.7). budgetStepFloor keeps h_i ≥ 10⁻⁶·|x_i| so that an input with a tiny
// relative uncertainty does not lose the derivative to rounding.
const (
	budgetStepFraction = 0.1
	budgetStepFloor    = 1e-6
)

// budgetNormalDoF is the number of degrees of freedom above which
// CoverageFactor uses the normal quantile: t_0.975(10⁷) − z_0.975 ≈ 2.4·10⁻⁷,
// and gonum's inverse incomplete beta loses digits beyond about 10¹⁰.
const budgetNormalDoF = 1e7

// Propagate applies the GUM law of propagation of uncertainty to the model f
// at the input estimates (JCGM 100:2008 eq. 13, 5.2.2):
//
//	y      = f(x_1, …, x_N)
//	u_c²   = Σ_i Σ_j c_i c_j r_ij u(x_i) u(x_j) = cᵀ V c,   c_i = ∂f/∂x_i
//
// with r_ij from corr (nil means independent inputs; otherwise a symmetric,
// positive semi-definite matrix of correlation coefficients with a unit
// diagonal). The sensitivities are central differences with steps h_i and
// h_i/2, h_i = max(u(x_i)/10, 10⁻⁶·|x_i|), combined by Richardson
// extrapolation:
//
//	D(h) = [f(x + h e_i) − f(x − h e_i)]/(2h),   c_i = [4 D(h/2) − D(h)]/3
//
// The effective degrees of freedom follow Welch–Satterthwaite (JCGM 100:2008
// eq. G.2b):
//
//	ν_eff = u_c⁴ / Σ_i (c_i u(x_i))⁴/ν_i
//
// With correlated inputs u_c⁴ in the numerator includes the correlation
// terms and the sum runs over the inputs as listed. The formula is derived
// for independent inputs; it holds for correlated ones with ν = ∞, which is
// how correlations arise in calorimetry (one thermometer, one balance for
// several inputs). When correlated inputs have finite ν, ν_eff is an
// approximation (see R. Willink, Metrologia 44 (2007) 340 for a
// generalisation). The coverage factor is k = CoverageFactor(ν_eff, p) and
// U = k·u_c. A coverage of 0 means p = 0.95.
func Propagate(inputs []Input, corr [][]float64, f Model, coverage float64) (*Budget, error) {
	if coverage == 0 {
		coverage = budgetDefaultCoverage
	}
	if !(coverage > 0 && coverage < 1) {
		return nil, fmt.Errorf("propagate: coverage probability %g is not between 0 and 1", coverage)
	}
	_, err := budgetCheck(inputs, corr, f)
	if err != nil {
		return nil, fmt.Errorf("propagate: %w", err)
	}
	n := len(inputs)
	x0 := make([]float64, n)
	for i, in := range inputs {
		x0[i] = in.Value
	}
	scratch := make([]float64, n)
	y := budgetEval(f, scratch, x0, -1, 0)
	if math.IsNaN(y) || math.IsInf(y, 0) {
		return nil, fmt.Errorf("propagate: model value %g at the input estimates is not finite", y)
	}
	c := make([]float64, n)
	for i, in := range inputs {
		c[i], err = budgetDerivative(f, scratch, x0, i, budgetStep(in))
		if err != nil {
			return nil, fmt.Errorf("propagate: sensitivity to %s: %w", budgetName(i, in), err)
		}
	}

	// cᵀVc split into its diagonal and off-diagonal parts.
	var diag, off float64
	for i, in := range inputs {
		ci := c[i] * in.U
		diag += ci * ci
		if corr == nil {
			continue
		}
		for j := i + 1; j < n; j++ {
			off += 2 * ci * c[j] * inputs[j].U * corr[i][j]
		}
	}
	uc2 := diag + off
	if uc2 < 0 {
		// Only rounding can make a positive semi-definite form negative.
		uc2 = 0
	}
	uc := math.Sqrt(uc2)

	b := &Budget{
		Value:    y,
		U:        uc,
		Coverage: coverage,
		Terms:    make([]BudgetTerm, n),
	}
	var ws float64 // Σ (c_i u_i)⁴/ν_i
	for i, in := range inputs {
		ci := c[i] * in.U
		t := BudgetTerm{
			Quantity:            in.Name,
			Symbol:              in.Symbol,
			Value:               in.Value,
			Unit:                in.Unit,
			StandardUncertainty: in.U,
			Sensitivity:         c[i],
			Contribution:        math.Abs(ci),
			DoF:                 in.DoF,
		}
		if uc2 > 0 {
			t.Percent = 100 * ci * ci / uc2
		}
		if !math.IsInf(in.DoF, 1) {
			ws += ci * ci * ci * ci / in.DoF
		}
		b.Terms[i] = t
	}
	if uc2 > 0 {
		b.CorrelationShare = 100 * off / uc2
	}
	b.DoF = math.Inf(1)
	if ws > 0 {
		b.DoF = uc2 * uc2 / ws
	}
	b.K = CoverageFactor(b.DoF, coverage)
	b.Expanded = b.K * uc
	return b, nil
}

// CoverageFactor returns k = t_p(ν), the two-sided quantile of Student's t
// distribution with ν degrees of freedom for coverage probability p
// (JCGM 100:2008 G.3.4, G.4.1), computed with gonum's distuv.StudentsT.
// A fractional ν is truncated to the next lower integer, as JCGM 100:2008
// G.4.1 says (and so the tabled values of Table G.2 are reproduced); a ν
// below 1 is used as it is, since truncation would give zero. For ν above
// 10⁷, and for math.Inf(1), the normal quantile is returned. It returns NaN
// when p is not in (0, 1) or ν is not positive.
func CoverageFactor(dof, coverage float64) float64 {
	if !(coverage > 0 && coverage < 1) || !(dof > 0) {
		return math.NaN()
	}
	q := 0.5 + coverage/2
	if dof > budgetNormalDoF {
		return distuv.UnitNormal.Quantile(q)
	}
	if dof >= 1 {
		dof = math.Floor(dof)
	}
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: dof}.Quantile(q)
}

// budgetCheck validates the inputs, the correlation matrix and the model,
// and returns the Cholesky factor of the correlation matrix (nil when corr
// is nil).
func budgetCheck(inputs []Input, corr [][]float64, f Model) ([][]float64, error) {
	if f == nil {
		return nil, errors.New("no model")
	}
	if len(inputs) == 0 {
		return nil, errors.New("no inputs")
	}
	for i, in := range inputs {
		name := budgetName(i, in)
		switch {
		case math.IsNaN(in.Value) || math.IsInf(in.Value, 0):
			return nil, fmt.Errorf("%s: value %g %s is not finite", name, in.Value, in.Unit)
		case !(in.U >= 0) || math.IsInf(in.U, 1):
			return nil, fmt.Errorf("%s: standard uncertainty %g %s is not a finite number ≥ 0", name, in.U, in.Unit)
		case !(in.DoF >= 1):
			return nil, fmt.Errorf("%s: degrees of freedom %g are below 1 (use math.Inf(1) for a type B evaluation)", name, in.DoF)
		case in.Dist < Normal || in.Dist > StudentT:
			return nil, fmt.Errorf("%s: unknown distribution %v", name, in.Dist)
		}
	}
	if corr == nil {
		return nil, nil
	}
	n := len(inputs)
	if len(corr) != n {
		return nil, fmt.Errorf("correlation matrix has %d rows for %d inputs", len(corr), n)
	}
	for i, row := range corr {
		if len(row) != n {
			return nil, fmt.Errorf("correlation matrix row %d has %d columns for %d inputs", i+1, len(row), n)
		}
	}
	const tol = 1e-12
	for i := range n {
		if math.Abs(corr[i][i]-1) > tol {
			return nil, fmt.Errorf("correlation of %s with itself is %g, not 1", budgetName(i, inputs[i]), corr[i][i])
		}
		for j := range i {
			r := corr[i][j]
			if !(math.Abs(r) <= 1) {
				return nil, fmt.Errorf("correlation of %s with %s is %g, outside [−1, 1]",
					budgetName(i, inputs[i]), budgetName(j, inputs[j]), r)
			}
			if math.Abs(r-corr[j][i]) > tol {
				return nil, fmt.Errorf("correlation matrix is not symmetric: r(%d,%d) = %g but r(%d,%d) = %g",
					i+1, j+1, r, j+1, i+1, corr[j][i])
			}
		}
	}
	l, err := budgetCholesky(corr)
	if err != nil {
		return nil, fmt.Errorf("correlation matrix: %w", err)
	}
	return l, nil
}

// budgetCholesky returns the lower triangular L with L·Lᵀ = a for a
// symmetric positive semi-definite a with entries of order 1 (a correlation
// matrix). A pivot within 10⁻¹⁰·n of zero ends its column, which is then
// zero, so fully correlated inputs (r = ±1) are accepted; this is the
// outer-product Cholesky algorithm (Golub & Van Loan, Matrix Computations,
// 4th ed., alg. 4.2.1) with that one change, as Higham, Accuracy and
// Stability of Numerical Algorithms, 2nd ed., §10.3 describes for
// semi-definite matrices.
func budgetCholesky(a [][]float64) ([][]float64, error) {
	n := len(a)
	tol := 1e-10 * float64(n)
	l := make([][]float64, n)
	for i := range l {
		l[i] = make([]float64, i+1)
	}
	for j := range n {
		d := a[j][j]
		for k := range j {
			d -= l[j][k] * l[j][k]
		}
		if d < -tol {
			return nil, fmt.Errorf("not positive semi-definite (pivot %d is %.3g)", j+1, d)
		}
		for i := j + 1; i < n; i++ {
			s := a[i][j]
			for k := range j {
				s -= l[i][k] * l[j][k]
			}
			if d <= tol {
				if math.Abs(s) > math.Sqrt(tol) {
					return nil, fmt.Errorf("not positive semi-definite (zero pivot %d with off-diagonal %.3g)", j+1, s)
				}
				continue
			}
			l[i][j] = s / math.Sqrt(d)
		}
		if d > tol {
			l[j][j] = math.Sqrt(d)
		}
	}
	return l, nil
}

// budgetName names input i in messages: its name and symbol when given.
func budgetName(i int, in Input) string {
	switch {
	case in.Name != "" && in.Symbol != "":
		return fmt.Sprintf("input %q (%s)", in.Name, in.Symbol)
	case in.Name != "":
		return fmt.Sprintf("input %q", in.Name)
	case in.Symbol != "":
		return "input " + in.Symbol
	}
	return "input " + strconv.Itoa(i+1)
}

// budgetStep returns the central-difference step for an input.
func budgetStep(in Input) float64 {
	h := math.Max(budgetStepFraction*in.U, budgetStepFloor*math.Abs(in.Value))
	if h == 0 {
		h = budgetStepFloor
	}
	return h
}

// budgetEval evaluates f at x0 with x_i replaced by xi (i < 0: at x0),
// copying into scratch so that the model cannot change x0.
func budgetEval(f Model, scratch, x0 []float64, i int, xi float64) float64 {
	copy(scratch, x0)
	if i >= 0 {
		scratch[i] = xi
	}
	return f(scratch)
}

// budgetDerivative returns ∂f/∂x_i at x0 by Richardson-extrapolated central
// differences with steps h and h/2 (see Propagate).
func budgetDerivative(f Model, scratch, x0 []float64, i int, h float64) (float64, error) {
	diff := func(h float64) float64 {
		xp, xm := x0[i]+h, x0[i]-h
		fp := budgetEval(f, scratch, x0, i, xp)
		fm := budgetEval(f, scratch, x0, i, xm)
		return (fp - fm) / (xp - xm)
	}
	d1, d2 := diff(h), diff(h/2)
	c := (4*d2 - d1) / 3
	if math.IsNaN(c) || math.IsInf(c, 0) {
		return 0, fmt.Errorf("model is not finite within ±%g of the estimate %g", h, x0[i])
	}
	return c, nil
}

// budgetExponent returns l such that u = c·10^l with c rounded to two
// significant digits lying in [10, 99] (JCGM 101:2008 7.9.2), and c itself.
func budgetExponent(u float64) (l int, c float64) {
	l = int(math.Floor(math.Log10(u))) - 1
	c = math.Round(budgetScale(u, -l))
	if c >= 100 {
		l++
		c = math.Round(budgetScale(u, -l))
	} else if c < 10 { // Log10 rounded across a power of ten
		l--
		c = math.Round(budgetScale(u, -l))
	}
	return l, c
}

// budgetScale returns v·10^e, multiplying or dividing by an exact power of
// ten so that decimal values stay as close as possible.
func budgetScale(v float64, e int) float64 {
	if e >= 0 {
		return v * math.Pow10(e)
	}
	return v / math.Pow10(-e)
}

// budgetTolerance returns the numerical tolerance δ = ½·10^l of a standard
// uncertainty u = c·10^l with two significant digits (JCGM 101:2008 7.9.2).
// It is 0 for u = 0.
func budgetTolerance(u float64) float64 {
	if !(u > 0) || math.IsInf(u, 1) {
		return 0
	}
	l, _ := budgetExponent(u)
	return budgetScale(0.5, l)
}

// budgetRound formats an estimate x and its uncertainty u as GUM 7.2.6
// recommends (units.Round): u to two significant digits, x to the same
// decimal place. A zero u prints as "0".
func budgetRound(x, u float64) (xs, us string) {
	xs, us = units.Round(x, u)
	if us == "" {
		us = strconv.FormatFloat(u, 'g', -1, 64)
	}
	return xs, us
}

// budgetFormatDoF writes degrees of freedom: "∞" for a type B evaluation.
func budgetFormatDoF(v float64) string {
	if math.IsInf(v, 1) {
		return "∞"
	}
	return strconv.FormatFloat(v, 'g', 4, 64)
}

// WriteBudgetTable writes b as an aligned text table: one line per input
// quantity with its estimate and standard uncertainty (rounded together as
// GUM 7.2.6 recommends), unit, degrees of freedom, sensitivity coefficient
// (4 significant digits), contribution |c_i|·u(x_i) in outUnit (2
// significant digits) and share of u_c² in percent; a line for the
// correlation terms when there are any; then the result, u_c, ν_eff, k and
// U, with y, u_c and U rounded the same way.
func WriteBudgetTable(w io.Writer, b *Budget, outUnit string) error {
	if b == nil {
		return errors.New("budget table: no budget")
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	contribution := "contribution"
	if outUnit != "" {
		contribution += " (" + outUnit + ")"
	}
	fmt.Fprintf(tw, "quantity\tsymbol\tvalue\tunit\tu\tdof\tsensitivity\t%s\tshare %%\n", contribution)
	for _, t := range b.Terms {
		v, u := budgetRound(t.Value, t.StandardUncertainty)
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%.1f\n",
			t.Quantity, t.Symbol, v, t.Unit, u, budgetFormatDoF(t.DoF),
			strconv.FormatFloat(t.Sensitivity, 'g', 4, 64),
			strconv.FormatFloat(t.Contribution, 'g', 2, 64), t.Percent)
	}
	if b.CorrelationShare != 0 {
		fmt.Fprintf(tw, "correlation terms\t\t\t\t\t\t\t\t%.1f\n", b.CorrelationShare)
	}
	if err := tw.Flush(); err != nil {
		return fmt.Errorf("budget table: %w", err)
	}
	y, uc := budgetRound(b.Value, b.U)
	_, ue := budgetRound(b.Value, b.Expanded)
	unit := ""
	if outUnit != "" {
		unit = " " + outUnit
	}
	tw = tabwriter.NewWriter(w, 0, 0, 1, ' ', 0)
	fmt.Fprintf(tw, "\nresult\ty = %s%s\n", y, unit)
	fmt.Fprintf(tw, "combined standard uncertainty\tu_c = %s%s\n", uc, unit)
	fmt.Fprintf(tw, "effective degrees of freedom\tν_eff = %s\n", budgetFormatDoF(b.DoF))
	fmt.Fprintf(tw, "coverage factor\tk = %.2f (p = %g %%)\n", b.K, 100*b.Coverage)
	fmt.Fprintf(tw, "expanded uncertainty\tU = %s%s\n", ue, unit)
	if err := tw.Flush(); err != nil {
		return fmt.Errorf("budget table: %w", err)
	}
	return nil
}

// budgetDoF is a degrees-of-freedom value in JSON: null for +Inf.
type budgetDoF float64

func (d budgetDoF) MarshalJSON() ([]byte, error) {
	if math.IsInf(float64(d), 1) {
		return []byte("null"), nil
	}
	return json.Marshal(float64(d))
}

func (d *budgetDoF) UnmarshalJSON(p []byte) error {
	if string(p) == "null" {
		*d = budgetDoF(math.Inf(1))
		return nil
	}
	return json.Unmarshal(p, (*float64)(d))
}

// MarshalJSON writes the term with an infinite DoF as null.
func (t BudgetTerm) MarshalJSON() ([]byte, error) {
	type plain BudgetTerm
	return json.Marshal(struct {
		plain
		DoF budgetDoF `json:"dof"`
	}{plain(t), budgetDoF(t.DoF)})
}

// UnmarshalJSON reads a term, taking a null DoF as +Inf.
func (t *BudgetTerm) UnmarshalJSON(p []byte) error {
	type plain BudgetTerm
	v := struct {
		*plain
		DoF *budgetDoF `json:"dof"`
	}{plain: (*plain)(t)}
	if err := json.Unmarshal(p, &v); err != nil {
		return err
	}
	t.DoF = math.Inf(1)
	if v.DoF != nil {
		t.DoF = float64(*v.DoF)
	}
	return nil
}

// MarshalJSON writes the budget with an infinite ν_eff as null.
func (b Budget) MarshalJSON() ([]byte, error) {
	type plain Budget
	return json.Marshal(struct {
		plain
		DoF budgetDoF `json:"dof"`
	}{plain(b), budgetDoF(b.DoF)})
}

// UnmarshalJSON reads a budget, taking a null ν_eff as +Inf.
func (b *Budget) UnmarshalJSON(p []byte) error {
	type plain Budget
	v := struct {
		*plain
		DoF *budgetDoF `json:"dof"`
	}{plain: (*plain)(b)}
	if err := json.Unmarshal(p, &v); err != nil {
		return err
	}
	b.DoF = math.Inf(1)
	if v.DoF != nil {
		b.DoF = float64(*v.DoF)
	}
	return nil
}
