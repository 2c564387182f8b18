package calorimeter

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// budgetClose reports whether got is within tol of want, absolutely or
// relative to |want|.
func budgetClose(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

var inf = math.Inf(1)

func TestPropagateAnalytic(t *testing.T) {
	tests := []struct {
		name   string
		inputs []Input
		f      Model
		y, u   float64   // analytic
		c      []float64 // analytic sensitivities
	}{{
		// analytic: u_c² = Σ u_i² for y = Σ x_i (GUM 5.1.2 with c_i = 1): √(0.09 + 0.16 + 1.44) = 1.3
		name: "sum",
		inputs: []Input{
			{Symbol: "a", Value: 1, U: 0.3, DoF: inf},
			{Symbol: "b", Value: 2, U: 0.4, DoF: inf},
			{Symbol: "c", Value: 3, U: 1.2, DoF: inf},
		},
		f: func(x []float64) float64 { return x[0] + x[1] + x[2] },
		y: 6, u: 1.3, c: []float64{1, 1, 1},
	}, {
		// analytic: c = (2, −3); u_c = √(4·0.01 + 9·0.04) = √0.4
		name: "weighted difference",
		inputs: []Input{
			{Symbol: "a", Value: 5, U: 0.1, DoF: inf},
			{Symbol: "b", Value: 1, U: 0.2, DoF: inf},
		},
		f: func(x []float64) float64 { return 2*x[0] - 3*x[1] },
		y: 7, u: math.Sqrt(0.4), c: []float64{2, -3},
	}, {
		// analytic, GUM 5.1.6: for y = x1·x2/x3 the relative uncertainties add
		// in quadrature: √(1² + 2² + 2²) % = 3 % of y = 2.5
		name: "product and quotient",
		inputs: []Input{
			{Symbol: "a", Value: 2, U: 0.02, DoF: inf},
			{Symbol: "b", Value: 5, U: 0.1, DoF: inf},
			{Symbol: "c", Value: 4, U: 0.08, DoF: inf},
		},
		f: func(x []float64) float64 { return x[0] * x[1] / x[2] },
		y: 2.5, u: 0.075, c: []float64{1.25, 0.5, -0.625},
	}, {
		// analytic, GUM 5.1.6: y = x1³/√x2, (u/y)² = (3·1 %)² + (½·1 %)²
		name: "powers",
		inputs: []Input{
			{Symbol: "a", Value: 2, U: 0.02, DoF: inf},
			{Symbol: "b", Value: 9, U: 0.09, DoF: inf},
		},
		f: func(x []float64) float64 { return x[0] * x[0] * x[0] / math.Sqrt(x[1]) },
		y: 8.0 / 3, u: 8.0 / 3 * math.Sqrt(9e-4+0.25e-4), c: []float64{3 * 4 / 3.0, -0.5 * 8 / 3.0 / 9},
	}, {
		// analytic: d/dx exp(x) = exp(x)
		name:   "exponential",
		inputs: []Input{{Symbol: "a", Value: 0.5, U: 0.01, DoF: inf}},
		f:      func(x []float64) float64 { return math.Exp(x[0]) },
		y:      math.Exp(0.5), u: 0.01 * math.Exp(0.5), c: []float64{math.Exp(0.5)},
	}, {
		// analytic: an exact input (u = 0) has its sensitivity but no share
		name: "exact input",
		inputs: []Input{
			{Symbol: "a", Value: 3, U: 0, DoF: inf},
			{Symbol: "b", Value: 2, U: 0.1, DoF: inf},
		},
		f: func(x []float64) float64 { return x[0] * x[1] },
		y: 6, u: 0.3, c: []float64{2, 3},
	}}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b, err := Propagate(tt.inputs, nil, tt.f, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			if !budgetClose(b.Value, tt.y, 1e-14) {
				t.Errorf("y = %.17g, want %.17g", b.Value, tt.y)
			}
			if !budgetClose(b.U, tt.u, 1e-10) {
				t.Errorf("u_c = %.17g, want %.17g", b.U, tt.u)
			}
			var share float64
			for i, term := range b.Terms {
				if !budgetClose(term.Sensitivity, tt.c[i], 1e-10) {
					t.Errorf("c_%s = %.17g, want %.17g", term.Symbol, term.Sensitivity, tt.c[i])
				}
				if want := math.Abs(tt.c[i]) * tt.inputs[i].U; !budgetClose(term.Contribution, want, 1e-10) {
					t.Errorf("contribution of %s = %g, want %g", term.Symbol, term.Contribution, want)
				}
				share += term.Percent
			}
			// analytic: without correlations the shares of u_c² add up to 100 %
			if !budgetClose(share, 100, 1e-12) || b.CorrelationShare != 0 {
				t.Errorf("shares add up to %g %% with correlation share %g %%, want 100 and 0", share, b.CorrelationShare)
			}
			// analytic: all ν = ∞ gives ν_eff = ∞ and the normal quantile
			// 1.959963984540054 (scipy 1.10.1: scipy.stats.norm.ppf(0.975))
			if !math.IsInf(b.DoF, 1) || !budgetClose(b.K, 1.959963984540054, 1e-12) {
				t.Errorf("ν_eff = %g, k = %.16g, want ∞ and 1.959963984540054", b.DoF, b.K)
			}
			if !budgetClose(b.Expanded, b.K*b.U, 1e-15) {
				t.Errorf("U = %g, want k·u_c = %g", b.Expanded, b.K*b.U)
			}
		})
	}
}

func TestPropagateCorrelated(t *testing.T) {
	a := Input{Symbol: "a", Value: 2, U: 0.3, DoF: inf}
	b := Input{Symbol: "b", Value: 5, U: 0.4, DoF: inf}
	sum := func(x []float64) float64 { return x[0] + x[1] }
	diff := func(x []float64) float64 { return x[0] - x[1] }
	prod := func(x []float64) float64 { return x[0] * x[1] }
	tests := []struct {
		name  string
		f     Model
		r     float64
		u     float64 // GUM 5.2.2 eq. (16): u_c² = c1²u1² + c2²u2² + 2 c1 c2 u1 u2 r
		share float64 // 100·2 c1 c2 u1 u2 r / u_c²
	}{
		// 0.09 + 0.16 + 2·0.5·0.12 = 0.37
		{name: "sum r=0.5", f: sum, r: 0.5, u: math.Sqrt(0.37), share: 100 * 0.12 / 0.37},
		// 0.09 + 0.16 − 2·0.5·0.12 = 0.13
		{name: "difference r=0.5", f: diff, r: 0.5, u: math.Sqrt(0.13), share: -100 * 0.12 / 0.13},
		// GUM 5.2.2 note 1: r = 1 and c_i = 1 make u_c the linear sum 0.3 + 0.4
		{name: "sum r=1", f: sum, r: 1, u: 0.7, share: 100 * 0.24 / 0.49},
		// c = (x2, x1) = (5, 2): 25·0.09 + 4·0.16 + 2·10·0.12·(−0.4) = 1.93
		{name: "product r=-0.4", f: prod, r: -0.4, u: math.Sqrt(1.93), share: -100 * 0.96 / 1.93},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			corr := [][]float64{{1, tt.r}, {tt.r, 1}}
			bud, err := Propagate([]Input{a, b}, corr, tt.f, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			if !budgetClose(bud.U, tt.u, 1e-10) {
				t.Errorf("u_c = %.17g, want %.17g", bud.U, tt.u)
			}
			if !budgetClose(bud.CorrelationShare, tt.share, 1e-8) {
				t.Errorf("correlation share = %g %%, want %g %%", bud.CorrelationShare, tt.share)
			}
			total := bud.CorrelationShare
			for _, term := range bud.Terms {
				total += term.Percent
			}
			if !budgetClose(total, 100, 1e-10) { // analytic: the parts of u_c² add up
				t.Errorf("shares add up to %g %%, want 100 %%", total)
			}
		})
	}
}

func TestPropagateWelchSatterthwaite(t *testing.T) {
	tests := []struct {
		name   string
		inputs []Input
		f      Model
		dof, k float64
	}{{
		// hand calculation, GUM G.2b: u_c² = 0.09 + 0.16 + 0.04 = 0.29,
		// Σ u_i⁴/ν_i = 0.0081/4 + 0.0256/9 = 0.004869444…, ν_eff = 0.0841/0.004869444… = 17.27096…
		// k = t_0.975(17) = 2.1098155778331806 (scipy 1.10.1: scipy.stats.t.ppf(0.975, 17))
		name: "sum",
		inputs: []Input{
			{Symbol: "a", Value: 1, U: 0.3, DoF: 4},
			{Symbol: "b", Value: 1, U: 0.4, DoF: 9},
			{Symbol: "c", Value: 1, U: 0.2, DoF: inf},
		},
		f:   func(x []float64) float64 { return x[0] + x[1] + x[2] },
		dof: 0.0841 / (0.0081/4 + 0.0256/9), k: 2.1098155778331806,
	}, {
		// hand calculation, GUM G.2b: c_1u_1 = 5·0.02 = 0.1, c_2u_2 = 2·0.1 = 0.2, u_c² = 0.05,
		// ν_eff = 0.0025/(0.0001/5 + 0.0016/10) = 13.888…; k = t_0.975(13) = 2.1603686564610127
		// (scipy 1.10.1: scipy.stats.t.ppf(0.975, 13))
		name: "product",
		inputs: []Input{
			{Symbol: "a", Value: 2, U: 0.02, DoF: 5},
			{Symbol: "b", Value: 5, U: 0.1, DoF: 10},
		},
		f:   func(x []float64) float64 { return x[0] * x[1] },
		dof: 0.0025 / (0.0001/5 + 0.0016/10), k: 2.1603686564610127,
	}}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b, err := Propagate(tt.inputs, nil, tt.f, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			if !budgetClose(b.DoF, tt.dof, 1e-9) {
				t.Errorf("ν_eff = %.12g, want %.12g", b.DoF, tt.dof)
			}
			if !budgetClose(b.K, tt.k, 1e-8) { // see TestCoverageFactor for the tolerance
				t.Errorf("k = %.16g, want %.16g", b.K, tt.k)
			}
		})
	}
}

func TestCoverageFactor(t *testing.T) {
	tests := []struct {
		name          string
		dof, p        float64
		want, tol     float64
		wantUndefined bool
	}{
		// GUM Table G.2, 95 % column (two decimals)
		{name: "table nu=10", dof: 10, p: 0.95, want: 2.23, tol: 0.005},
		{name: "table nu=20", dof: 20, p: 0.95, want: 2.09, tol: 0.005},
		{name: "table nu=inf", dof: inf, p: 0.95, want: 1.96, tol: 0.005},
		// scipy 1.10.1: scipy.stats.t.ppf(0.975, 10), (0.975, 20), (0.975, 1), (0.975, 5);
		// gonum's incomplete-beta inverse agrees to about 2·10⁻⁹ relative, hence 10⁻⁸

		{name: "nu=10", dof: 10, p: 0.95, want: 2.2281388519649385, tol: 1e-8},
		{name: "nu=20", dof: 20, p: 0.95, want: 2.0859634472658364, tol: 1e-8},
		{name: "nu=1", dof: 1, p: 0.95, want: 12.706204736432095, tol: 1e-8},
		{name: "nu=5", dof: 5, p: 0.95, want: 2.5705818366147395, tol: 1e-8},
		// GUM G.4.1: a fractional ν is truncated, so 10.7 gives t_0.975(10)
		{name: "fractional nu", dof: 10.7, p: 0.95, want: 2.2281388519649385, tol: 1e-8},
		// scipy 1.10.1: scipy.stats.t.ppf(0.995, 10) and scipy.stats.t.ppf(0.975, 0.5)
		{name: "99 percent", dof: 10, p: 0.99, want: 3.169272667175838, tol: 1e-8},
		{name: "nu below 1 not truncated", dof: 0.5, p: 0.95, want: 164.55767352096103, tol: 1e-8},
		// scipy 1.10.1: scipy.stats.norm.ppf(0.975), used above 10⁷ degrees of freedom
		{name: "nu=1e9", dof: 1e9, p: 0.95, want: 1.959963984540054, tol: 1e-12},
		{name: "coverage 1", dof: 10, p: 1, wantUndefined: true},
		{name: "coverage 0", dof: 10, p: 0, wantUndefined: true},
		{name: "nu 0", dof: 0, p: 0.95, wantUndefined: true},
		{name: "nu NaN", dof: math.NaN(), p: 0.95, wantUndefined: true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := CoverageFactor(tt.dof, tt.p)
			if tt.wantUndefined {
				if !math.IsNaN(got) {
					t.Errorf("CoverageFactor(%g, %g) = %g, want NaN", tt.dof, tt.p, got)
				}
				return
			}
			if !budgetClose(got, tt.want, tt.tol) {
				t.Errorf("CoverageFactor(%g, %g) = %.16g, want %.16g", tt.dof, tt.p, got, tt.want)
			}
		})
	}
}

func TestPropagateErrors(t *testing.T) {
	good := []Input{{Symbol: "a", Value: 1, U: 0.1, DoF: inf}, {Name: "sample mass", Symbol: "m_s", Unit: "g", Value: 2, U: 0.1, DoF: inf}}
	sum := func(x []float64) float64 { return x[0] + x[1] }
	with := func(change func(in []Input)) []Input {
		in := append([]Input(nil), good...)
		change(in)
		return in
	}
	tests := []struct {
		name     string
		inputs   []Input
		corr     [][]float64
		f        Model
		coverage float64
		want     string
	}{
		{name: "no inputs", f: sum, want: "no inputs"},
		{name: "no model", inputs: good, want: "no model"},
		{name: "coverage", inputs: good, f: sum, coverage: 1.5, want: "coverage probability 1.5"},
		{name: "negative u", inputs: with(func(in []Input) { in[1].U = -0.001 }), f: sum, want: `input "sample mass" (m_s): standard uncertainty -0.001 g`},
		{name: "NaN value", inputs: with(func(in []Input) { in[0].Value = math.NaN() }), f: sum, want: "input a: value NaN"},
		{name: "zero dof", inputs: with(func(in []Input) { in[0].DoF = 0 }), f: sum, want: "degrees of freedom 0 are below 1"},
		{name: "unknown distribution", inputs: with(func(in []Input) { in[0].Dist = 9 }), f: sum, want: "unknown distribution Distribution(9)"},
		{name: "rows", inputs: good, corr: [][]float64{{1}}, f: sum, want: "1 rows for 2 inputs"},
		{name: "columns", inputs: good, corr: [][]float64{{1, 0}, {0}}, f: sum, want: "row 2 has 1 columns"},
		{name: "diagonal", inputs: good, corr: [][]float64{{1, 0}, {0, 0.9}}, f: sum, want: "with itself is 0.9"},
		{name: "beyond one", inputs: good, corr: [][]float64{{1, 1.2}, {1.2, 1}}, f: sum, want: "outside [−1, 1]"},
		{name: "asymmetric", inputs: good, corr: [][]float64{{1, 0.2}, {0.3, 1}}, f: sum, want: "not symmetric"},
		{
			// analytic: r12 = r13 = 0.9, r23 = −0.9 has determinant 1 − 3·0.81 − 2·0.729 < 0
			name:   "not semi-definite",
			inputs: append(good, Input{Symbol: "c", Value: 1, U: 0.1, DoF: inf}),
			corr:   [][]float64{{1, 0.9, 0.9}, {0.9, 1, -0.9}, {0.9, -0.9, 1}},
			f:      func(x []float64) float64 { return x[0] + x[1] + x[2] },
			want:   "not positive semi-definite",
		},
		{name: "model NaN", inputs: good, f: func(x []float64) float64 { return math.Log(-x[0]) }, want: "model value NaN"},
		{name: "edge of domain", inputs: good, f: func(x []float64) float64 { return math.Sqrt(x[0] - 1) }, want: "sensitivity to input a: model is not finite within"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := Propagate(tt.inputs, tt.corr, tt.f, tt.coverage)
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Errorf("error %v, want one containing %q", err, tt.want)
			}
		})
	}
}

func TestBudgetCholesky(t *testing.T) {
	tests := []struct {
		name string
		a    [][]float64
	}{
		{name: "identity", a: [][]float64{{1, 0}, {0, 1}}},
		{name: "definite", a: [][]float64{{1, 0.5, 0.2}, {0.5, 1, -0.3}, {0.2, -0.3, 1}}},
		{name: "fully correlated", a: [][]float64{{1, 1, 0}, {1, 1, 0}, {0, 0, 1}}},
		{name: "anti-correlated", a: [][]float64{{1, -1}, {-1, 1}}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			l, err := budgetCholesky(tt.a)
			if err != nil {
				t.Fatal(err)
			}
			// analytic: L·Lᵀ reproduces the matrix
			for i := range tt.a {
				for j := range i + 1 {
					var s float64
					for k := range j + 1 {
						s += l[i][k] * l[j][k]
					}
					if math.Abs(s-tt.a[i][j]) > 1e-12 {
						t.Errorf("(L·Lᵀ)[%d][%d] = %g, want %g", i, j, s, tt.a[i][j])
					}
				}
			}
		})
	}
}

func TestBudgetRound(t *testing.T) {
	tests := []struct {
		name   string
		x, u   float64
		xs, us string
	}{
		// GUM 7.2.6: y = 10.057 62 Ω with u_c = 27 mΩ is rounded to 10.058 Ω
		{name: "GUM 7.2.6 estimate", x: 10.05762, u: 0.027, xs: "10.058", us: "0.027"},
		// GUM 7.2.6: u = 28.05 kHz is rounded down to 28 kHz
		{name: "GUM 7.2.6 rounded down", x: 1234.5678, u: 28.05, xs: "1235", us: "28"},
		// GUM 7.2.6 allows rounding 10.47 up to 11; this helper rounds to the nearest
		{name: "nearest not up", x: 501.3, u: 10.47, xs: "501", us: "10"},
		// GUM 7.2.2: m_s = 100.021 47 g with u_c = 0.35 mg
		{name: "GUM 7.2.2 mass", x: 100.02147, u: 0.00035, xs: "100.02147", us: "0.00035"},
		// analytic: 0.0999 rounds to 0.10, and y to the same place
		{name: "carry into next digit", x: 1.23456, u: 0.0999, xs: "1.23", us: "0.10"},
		// analytic: hundreds
		{name: "large", x: 45678, u: 1234, xs: "45700", us: "1200"},
		{name: "negative", x: -17.20236, u: 0.074, xs: "-17.202", us: "0.074"},
		{name: "no negative zero", x: -0.0004, u: 0.012, xs: "0.000", us: "0.012"},
		{name: "zero uncertainty", x: 1.5, u: 0, xs: "1.5", us: "0"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			xs, us := budgetRound(tt.x, tt.u)
			if xs != tt.xs || us != tt.us {
				t.Errorf("budgetRound(%g, %g) = %s, %s; want %s, %s", tt.x, tt.u, xs, us, tt.xs, tt.us)
			}
		})
	}
}

func TestBudgetTolerance(t *testing.T) {
	tests := []struct {
		name     string
		u, delta float64
	}{
		// from memory, JCGM 101:2008 7.9.2 example: u(y) = 0.028 (n_dig = 2) = 28·10⁻³, δ = ½·10⁻³
		{name: "JCGM 101 7.9.2", u: 0.028, delta: 0.0005},
		// analytic: 1.414 = 14·10⁻¹, δ = 0.05
		{name: "sqrt 2", u: math.Sqrt2, delta: 0.05},
		// analytic: 0.0999 rounds to 10·10⁻², δ = 0.005
		{name: "carry", u: 0.0999, delta: 0.005},
		// analytic: 1234 = 12·10², δ = 50
		{name: "large", u: 1234, delta: 50},
		{name: "exactly 10", u: 10, delta: 0.5},
		{name: "zero", u: 0, delta: 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := budgetTolerance(tt.u); !budgetClose(got, tt.delta, 1e-12) {
				t.Errorf("budgetTolerance(%g) = %g, want %g", tt.u, got, tt.delta)
			}
		})
	}
}

func TestBudgetJSON(t *testing.T) {
	b, err := Propagate([]Input{
		{Name: "heater power", Symbol: "P", Unit: "W", Value: 1, U: 0.001, DoF: inf},
		{Name: "heating time", Symbol: "t_h", Unit: "s", Value: 300, U: 0.2, DoF: 8},
	}, nil, func(x []float64) float64 { return x[0] * x[1] }, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	p, err := json.Marshal(b)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{`"quantity":"heater power"`, `"symbol":"P"`, `"dof":null`, `"standard_uncertainty":`, `"correlation_percent":0`} {
		if !bytes.Contains(p, []byte(want)) {
			t.Errorf("JSON %s lacks %s", p, want)
		}
	}
	var back Budget
	if err := json.Unmarshal(p, &back); err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(back.Terms[0].DoF, 1) || back.Terms[1].DoF != 8 || !budgetClose(back.DoF, b.DoF, 1e-15) ||
		!budgetClose(back.U, b.U, 1e-15) || back.Terms[1].Symbol != "t_h" {
		t.Errorf("round trip gave %+v, want %+v", back, *b)
	}
	// all type B: ν_eff = ∞ is null and reads back as +Inf
	b.DoF = inf
	p, _ = json.Marshal(b)
	if err := json.Unmarshal(p, &back); err != nil || !math.IsInf(back.DoF, 1) {
		t.Errorf("ν_eff = ∞ round trip: %v, %g", err, back.DoF)
	}
}

// budgetFixture is a model description in testdata/budget, read both here
// and by testdata/budget_check.py.
type budgetFixture struct {
	Description  string `json:"description"`
	Unit         string `json:"unit"`
	Expression   string `json:"expression"`
	Inputs       []budgetFixtureInput
	Correlations []struct {
		A, B string
		R    float64
	}
}

type budgetFixtureInput struct {
	Name, Symbol, Unit string
	Value, U           float64
	DoF                *float64 `json:"dof"` // null: type B
	Dist               string
}

// budgetEnthalpyExpr is the molar-enthalpy chain of the fixtures as Python
// reads it, and budgetEnthalpy the same model in Go (kJ/mol):
//
//	ΔsolH = −(P·t_h/(g·ΔT_cal + δ_cal))·(g·ΔT_s + δ_s)·M/(m_s + δ_m)/1000
const budgetEnthalpyExpr = "-(P*t_h/(g*dT_cal + d_cal))*(g*dT_s + d_s)*M/(m_s + d_m)/1000"

func budgetEnthalpy(x []float64) float64 {
	p, th, dtc, dc, dts, ds, g, m, ms, dm := x[0], x[1], x[2], x[3], x[4], x[5], x[6], x[7], x[8], x[9]
	return -(p * th / (g*dtc + dc)) * (g*dts + ds) * m / (ms + dm) / 1000
}

// budgetLoad reads a fixture into inputs and a correlation matrix (nil
// when it lists none).
func budgetLoad(tb testing.TB, name string) (budgetFixture, []Input, [][]float64) {
	tb.Helper()
	p, err := os.ReadFile(filepath.Join("..", "testdata", "budget", name))
	if err != nil {
		tb.Fatal(err)
	}
	var fx budgetFixture
	if err := json.Unmarshal(p, &fx); err != nil {
		tb.Fatalf("%s: %v", name, err)
	}
	dists := map[string]Distribution{"normal": Normal, "rectangular": Rectangular, "triangular": Triangular, "student-t": StudentT}
	index := map[string]int{}
	inputs := make([]Input, len(fx.Inputs))
	for i, in := range fx.Inputs {
		d, ok := dists[in.Dist]
		if !ok {
			tb.Fatalf("%s: input %s: unknown distribution %q", name, in.Symbol, in.Dist)
		}
		dof := inf
		if in.DoF != nil {
			dof = *in.DoF
		}
		inputs[i] = Input{Name: in.Name, Symbol: in.Symbol, Unit: in.Unit, Value: in.Value, U: in.U, DoF: dof, Dist: d}
		index[in.Symbol] = i
	}
	var corr [][]float64
	if len(fx.Correlations) > 0 {
		corr = make([][]float64, len(inputs))
		for i := range corr {
			corr[i] = make([]float64, len(inputs))
			corr[i][i] = 1
		}
		for _, c := range fx.Correlations {
			a, b := index[c.A], index[c.B]
			corr[a][b], corr[b][a] = c.R, c.R
		}
	}
	return fx, inputs, corr
}

// budgetPython finds the interpreter for budget_check.py: $CALRED_PYTHON,
// else /usr/bin/python3, else python3 on PATH.
func budgetPython(t *testing.T) string {
	t.Helper()
	if p := os.Getenv("CALRED_PYTHON"); p != "" {
		return p
	}
	if _, err := os.Stat("/usr/bin/python3"); err == nil {
		return "/usr/bin/python3"
	}
	p, err := exec.LookPath("python3")
	if err != nil {
		t.Skip("no python3 (set CALRED_PYTHON) for the independent recomputation")
	}
	return p
}

// TestPropagateAgainstUncertainties recomputes the molar-enthalpy chain with
// the Python package "uncertainties" (Debian python3-uncertainties 3.1.6,
// exact first-order derivatives): ../testdata/budget_check.py FIXTURE prints
// y, u_c and the sensitivities, which must agree within 10⁻⁶ relative (our
// derivatives are numerical).
func TestPropagateAgainstUncertainties(t *testing.T) {
	python := budgetPython(t)
	if out, err := exec.Command(python, "-c", "import uncertainties").CombinedOutput(); err != nil {
		t.Skipf("%s lacks the Python module uncertainties (Debian python3-uncertainties): %v: %s", python, err, bytes.TrimSpace(out))
	}
	for _, name := range []string{"enthalpy_independent.json", "enthalpy_correlated.json"} {
		t.Run(name, func(t *testing.T) {
			fx, inputs, corr := budgetLoad(t, name)
			if fx.Expression != budgetEnthalpyExpr {
				t.Fatalf("fixture model %q is not the Go model %q", fx.Expression, budgetEnthalpyExpr)
			}
			cmd := exec.Command(python, filepath.Join("..", "testdata", "budget_check.py"), filepath.Join("..", "testdata", "budget", name))
			var stderr bytes.Buffer
			cmd.Stderr = &stderr
			out, err := cmd.Output()
			if err != nil {
				t.Fatalf("budget_check.py: %v: %s", err, stderr.Bytes())
			}
			var want struct {
				Value         float64            `json:"value"`
				U             float64            `json:"u_c"`
				Sensitivities map[string]float64 `json:"sensitivities"`
			}
			if err := json.Unmarshal(out, &want); err != nil {
				t.Fatalf("budget_check.py printed %q: %v", out, err)
			}
			b, err := Propagate(inputs, corr, budgetEnthalpy, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(b.Value-want.Value) > 1e-12*math.Abs(want.Value) {
				t.Errorf("y = %.15g kJ/mol, uncertainties gives %.15g", b.Value, want.Value)
			}
			if math.Abs(b.U-want.U) > 1e-6*want.U {
				t.Errorf("u_c = %.15g kJ/mol, uncertainties gives %.15g", b.U, want.U)
			}
			for i, term := range b.Terms {
				// compared on the scale of the contribution it makes to u_c
				c := want.Sensitivities[term.Symbol]
				if math.Abs(term.Sensitivity-c)*inputs[i].U > 1e-6*want.U {
					t.Errorf("c_%s = %.15g, uncertainties gives %.15g", term.Symbol, term.Sensitivity, c)
				}
			}
		})
	}
}

func TestWriteBudgetTable(t *testing.T) {
	// analytic: y = a·b = 6, c = (2, 3), u_c² = 4·0.01 + 9·0.0004 + 2·2·3·0.1·0.02·0.5 = 0.0556
	inputs := []Input{
		{Name: "length", Symbol: "a", Unit: "m", Value: 3, U: 0.1, DoF: inf},
		{Name: "width", Symbol: "b", Unit: "m", Value: 2, U: 0.02, DoF: 12},
	}
	corr := [][]float64{{1, 0.5}, {0.5, 1}}
	b, err := Propagate(inputs, corr, func(x []float64) float64 { return x[0] * x[1] }, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	if !budgetClose(b.U, math.Sqrt(0.0556), 1e-10) {
		t.Fatalf("u_c = %g, want √0.0556", b.U)
	}
	var buf bytes.Buffer
	if err := WriteBudgetTable(&buf, b, "m²"); err != nil {
		t.Fatal(err)
	}
	got := buf.String()
	for _, want := range []string{
		"contribution (m²)",
		"length", "3.00 ", "0.10 ", "∞", // u to two digits, value to the same place (GUM 7.2.6)
		"width", "2.000", "0.020", "12 ",
		"71.9", // 100·0.04/0.0556
		"correlation terms",
		"21.6",                // 100·0.012/0.0556
		"y = 6.00 m²",         // u_c = 0.236 → 0.24
		"u_c = 0.24 m²",       //
		"ν_eff = 2862",        // G.2b: 0.0556²/(0.06⁴/12) = 0.00309136/1.08·10⁻⁶ = 2862.4
		"k = 1.96 (p = 95 %)", // t_0.975(2862) = 1.9607 (scipy 1.10.1: scipy.stats.t.ppf(0.975, 2862))
		"U = 0.46 m²",         // 1.9607·0.23580 = 0.4623
	} {
		if !strings.Contains(got, want) {
			t.Errorf("table lacks %q:\n%s", want, got)
		}
	}
}

// BenchmarkPropagate propagates the 10-input molar-enthalpy chain with
// correlations. Target: < 100 µs per op (it runs once per reduction, so a
// batch of 1000 runs spends under 0.1 s here).
func BenchmarkPropagate(b *testing.B) {
	_, inputs, corr := budgetLoad(b, "enthalpy_correlated.json")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Propagate(inputs, corr, budgetEnthalpy, 0.95); err != nil {
			b.Fatal(err)
		}
	}
}

// The molar enthalpy of solution of an invented KCl sample from one
// electrical calibration and one sample run, as one model so that the
// calibration's uncertainty enters once:
//
//	ΔsolH = −(P·t_h/ΔT_cal)·ΔT_s·M/m_s
func ExamplePropagate() {
	inputs := []Input{
		{Name: "heater power", Symbol: "P", Unit: "W", Value: 1.0002, U: 0.0008, DoF: math.Inf(1)},
		{Name: "heating time", Symbol: "t_h", Unit: "s", Value: 300.0, U: 0.05, DoF: math.Inf(1), Dist: Rectangular},
		{Name: "calibration temperature rise", Symbol: "ΔT_cal", Unit: "K", Value: 0.6655, U: 0.0018, DoF: 14},
		{Name: "sample temperature change", Symbol: "ΔT_s", Unit: "K", Value: -1.2810, U: 0.0025, DoF: 11},
		{Name: "molar mass", Symbol: "M", Unit: "g/mol", Value: 74.548, U: 0.002, DoF: math.Inf(1), Dist: Rectangular},
		{Name: "sample mass", Symbol: "m_s", Unit: "g", Value: 2.5030, U: 0.0002, DoF: math.Inf(1)},
	}
	enthalpy := func(x []float64) float64 {
		p, th, dtCal, dtS, m, ms := x[0], x[1], x[2], x[3], x[4], x[5]
		heatCapacity := p * th / dtCal             // J/K
		return -heatCapacity * dtS * m / ms / 1000 // kJ/mol
	}
	b, err := Propagate(inputs, nil, enthalpy, 0.95)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("ΔsolH = %.3f kJ/mol, u_c = %.3f kJ/mol\n", b.Value, b.U)
	fmt.Printf("ν_eff = %.1f, k = %.2f, U = %.2f kJ/mol (95 %%)\n", b.DoF, b.K, b.Expanded)
	for _, t := range b.Terms {
		fmt.Printf("%-30s c = %9.4f kJ/mol per %-5s %5.1f %%\n", t.Quantity, t.Sensitivity, t.Unit, t.Percent)
	}
	// Recomputed with python3-uncertainties 3.1.6 and scipy 1.10.1:
	//   /usr/bin/python3 -c 'from uncertainties import ufloat; import scipy.stats as st
	//   P=ufloat(1.0002,0.0008); th=ufloat(300,0.05); dc=ufloat(0.6655,0.0018)
	//   ds=ufloat(-1.2810,0.0025); M=ufloat(74.548,0.002); m=ufloat(2.5030,0.0002)
	//   H=-(P*th/dc)*ds*M/m/1000; d=H.derivatives
	//   nu=H.s**4/((d[dc]*dc.s)**4/14+(d[ds]*ds.s)**4/11)
	//   print(H, nu, st.t.ppf(0.975,int(nu)), [d[v] for v in (P,th,dc,ds,M,m)])'
	// → 17.202 ± 0.0591, ν_eff = 27.08, k = 2.052, U = 0.121; c = 17.1988,
	// 0.05734, −25.8486, −13.4287, 0.23075, −6.87264; shares 5.4, 0.24, 62.0,
	// 32.3, 0.006, 0.054 %.

	// Output:
	// ΔsolH = 17.202 kJ/mol, u_c = 0.059 kJ/mol
	// ν_eff = 27.1, k = 2.05, U = 0.12 kJ/mol (95 %)
	// heater power                   c =   17.1988 kJ/mol per W       5.4 %
	// heating time                   c =    0.0573 kJ/mol per s       0.2 %
	// calibration temperature rise   c =  -25.8486 kJ/mol per K      62.0 %
	// sample temperature change      c =  -13.4287 kJ/mol per K      32.3 %
	// molar mass                     c =    0.2308 kJ/mol per g/mol   0.0 %
	// sample mass                    c =   -6.8726 kJ/mol per g       0.1 %
}

// An electrical calibration, C = P·t_h/ΔT, written as a budget table.
func ExampleWriteBudgetTable() {
	inputs := []Input{
		{Name: "heater power", Symbol: "P", Unit: "W", Value: 1.0002, U: 0.0008, DoF: math.Inf(1)},
		{Name: "heating time", Symbol: "t_h", Unit: "s", Value: 300.0, U: 0.05, DoF: math.Inf(1), Dist: Rectangular},
		{Name: "corrected temperature rise", Symbol: "ΔT", Unit: "K", Value: 0.6655, U: 0.0018, DoF: 14},
	}
	heatCapacity := func(x []float64) float64 { return x[0] * x[1] / x[2] }
	b, err := Propagate(inputs, nil, heatCapacity, 0.95)
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := WriteBudgetTable(os.Stdout, b, "J/K"); err != nil {
		fmt.Println(err)
	}
	// Recomputed with python3-uncertainties 3.1.6 and scipy 1.10.1 (as in
	// ExamplePropagate, C = P*th/dc): C = 450.879 ± 1.2739 J/K; c = 450.789,
	// 1.50293, −677.504; contributions 0.3606, 0.0751, 1.2195 J/K; shares
	// 8.01, 0.35, 91.64 %; ν_eff = 1.2739⁴/(1.2195⁴/14) = 16.67, k =
	// t.ppf(0.975, 16) = 2.1199, U = 2.70 J/K.

	// Output:
	// quantity                    symbol  value    unit  u        dof  sensitivity  contribution (J/K)  share %
	// heater power                P       1.00020  W     0.00080  ∞    450.8        0.36                8.0
	// heating time                t_h     300.000  s     0.050    ∞    1.503        0.075               0.3
	// corrected temperature rise  ΔT      0.6655   K     0.0018   14   -677.5       1.2                 91.6
	//
	// result                        y = 450.9 J/K
	// combined standard uncertainty u_c = 1.3 J/K
	// effective degrees of freedom  ν_eff = 16.67
	// coverage factor               k = 2.12 (p = 95 %)
	// expanded uncertainty          U = 2.7 J/K
}
