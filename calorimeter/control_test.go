package calorimeter

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"
)

// controlClose reports whether got is within an absolute-or-relative
// tolerance tol of want.
func controlClose(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

// TestIndividualsChartLimits checks centre, σ and limits against a hand
// calculation with the e-Handbook formula (NIST/SEMATECH e-Handbook of
// Statistical Methods §6.3.2, σ = MR̄/1.128):
//
//	x       = 10, 12, 11, 13, 12            n = 5
//	x̄       = 58/5 = 11.6
//	MR      = 2, 1, 2, 1                    MR̄ = 6/4 = 1.5
//	σ       = 1.5/1.128 = 1.329787234…
//	x̄ ± 2σ  = 11.6 ± 2.659574468 = 14.259574468, 8.940425532
//	x̄ ± 3σ  = 11.6 ± 3.989361702 = 15.589361702, 7.610638298
func TestIndividualsChartLimits(t *testing.T) {
	c, err := IndividualsChart([]float64{10, 12, 11, 13, 12})
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-9 // hand arithmetic carried to 10 digits
	for _, q := range []struct {
		name      string
		got, want float64
	}{
		{"centre", c.Centre, 11.6},
		{"moving range mean", c.MovingRangeMean, 1.5},
		{"sigma", c.Sigma, 1.329787234},
		{"upper 2σ", c.Upper2, 14.259574468},
		{"lower 2σ", c.Lower2, 8.940425532},
		{"upper 3σ", c.Upper3, 15.589361702},
		{"lower 3σ", c.Lower3, 7.610638298},
	} {
		if !controlClose(q.got, q.want, tol) {
			t.Errorf("%s = %.12g, want %.12g (hand calculation)", q.name, q.got, q.want)
		}
	}
	if len(c.Violations) != 0 {
		t.Errorf("violations = %v, want none (all values within 2σ, runs shorter than 6)", c.Violations)
	}
}

// controlAlternate returns n values alternating 0, 1, 0, 1, …: no trend
// longer than two points and no one-side run longer than one point.
func controlAlternate(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = float64(i % 2)
	}
	return x
}

func controlJoin(parts ...[]float64) []float64 {
	var x []float64
	for _, p := range parts {
		x = append(x, p...)
	}
	return x
}

// TestIndividualsChartRules builds one series per rule (the rules as
// IndividualsChart's doc states them: Western Electric rules of the
// NIST/SEMATECH e-Handbook §6.3.2 and Nelson's trend test, from memory).
// The centres and σ in the comments are hand arithmetic, cross-checked with
// numpy 1.24.2, the formulas written out directly:
//
//	/usr/bin/python3 -c 'import numpy as np
//	alt=lambda n:[i%2 for i in range(n)]
//	for v in [alt(20), alt(20)+[6,1,0,1,0], alt(20)+[3,0,3,1,0,1,0],
//	          alt(12)+[0.8,1.2]*4+[0.8]+alt(8), alt(12)+[0.1,0.3,0.5,0.7,0.9,1.1,1.3]+alt(8)]:
//	  x=np.array(v,float); m=x.mean(); s=np.abs(np.diff(x)).mean()/1.128
//	  print(round(m,4), round(s,4), round(m+2*s,4), round(m+3*s,4))'
//
// The flagged indices follow from those limits by counting (analytic).
func TestIndividualsChartRules(t *testing.T) {
	type flag struct {
		index int
		rule  string
	}
	tests := []struct {
		name   string
		values []float64
		want   []flag
	}{
		{
			// x̄ = 10/20 = 0.5, MR̄ = 19/19 = 1, σ = 0.8865; every point is
			// 0.56σ from the centre, sides and directions alternate.
			name:   "none",
			values: controlAlternate(20),
		},
		{
			// 0,1 ×10 then 6, 1, 0, 1, 0: x̄ = 18/25 = 0.72,
			// MR̄ = (19 + 5 + 5 + 3)/24 = 1.3333, σ = 1.1820,
			// x̄ + 3σ = 4.2661 < 6; no other point is beyond 2σ (3.0841).
			name:   "beyond 3 sigma",
			values: controlJoin(controlAlternate(20), []float64{6, 1, 0, 1, 0}),
			want:   []flag{{20, RuleBeyond3Sigma}},
		},
		{
			// 0,1 ×10 then 3, 0, 3, 1, 0, 1, 0: x̄ = 18/27 = 0.6667,
			// MR̄ = (19 + 2 + 3 + 3 + 2 + 1 + 1 + 1)/26 = 32/26 = 1.2308,
			// σ = 1.0911, x̄ + 2σ = 2.8489 < 3 < x̄ + 3σ = 3.9400.
			// Indices 20 and 22 are beyond 2σ: the pattern completes at 22.
			name:   "two of three beyond 2 sigma",
			values: controlJoin(controlAlternate(20), []float64{3, 0, 3, 1, 0, 1, 0}),
			want:   []flag{{22, RuleTwoOfThree2Sigma}},
		},
		{
			// 0,1 ×6, then 0.8, 1.2 alternating ×9 values, then 0,1 ×4:
			// x̄ = 18.8/29 = 0.6483, MR̄ = 22.2/28 = 0.7929, σ = 0.7029.
			// Indices 11 (the last 1 of the base) to 20 lie above the centre:
			// a run of 10, so its 8th, 9th and 10th points (18, 19, 20) are flagged.
			name: "eight on one side",
			values: controlJoin(controlAlternate(12),
				[]float64{0.8, 1.2, 0.8, 1.2, 0.8, 1.2, 0.8, 1.2, 0.8}, controlAlternate(8)),
			want: []flag{{18, RuleEightOneSide}, {19, RuleEightOneSide}, {20, RuleEightOneSide}},
		},
		{
			// 0,1 ×6, then 0.1, 0.3, …, 1.3 (7 values), then 0,1 ×4:
			// x̄ = 14.9/27 = 0.5519, σ = 0.7297. The rise runs over indices
			// 12–18 (7 points): its 6th and 7th points (17, 18) are flagged.
			name: "six in a row trend",
			values: controlJoin(controlAlternate(12),
				[]float64{0.1, 0.3, 0.5, 0.7, 0.9, 1.1, 1.3}, controlAlternate(8)),
			want: []flag{{17, RuleSixTrend}, {18, RuleSixTrend}},
		},
		{
			// Falling case: index 11 is 1, then 1.2 (a rise), then a fall
			// 1.2, 1.0, …, 0.0 over indices 12–18 (7 points); index 19 is
			// 0 again, equal to index 18, which ends the fall.
			name: "six in a row falling",
			values: controlJoin(controlAlternate(12),
				[]float64{1.2, 1.0, 0.8, 0.6, 0.4, 0.2, 0.0}, controlAlternate(8)),
			want: []flag{{17, RuleSixTrend}, {18, RuleSixTrend}},
		},
		{
			// All values equal: every moving range is 0, σ = 0, nothing to flag.
			name:   "constant",
			values: []float64{0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1},
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c, err := IndividualsChart(tt.values)
			if err != nil {
				t.Fatal(err)
			}
			var got []flag
			for _, v := range c.Violations {
				got = append(got, flag{v.Index, v.Rule})
				if v.Detail == "" {
					t.Errorf("violation %+v has no detail", v)
				}
			}
			if fmt.Sprint(got) != fmt.Sprint(tt.want) {
				t.Errorf("violations = %v, want %v", got, tt.want)
			}
		})
	}
}

func TestIndividualsChartConstant(t *testing.T) {
	c, err := IndividualsChart([]float64{0.1, 0.1, 0.1})
	if err != nil {
		t.Fatal(err)
	}
	// analytic: equal values have zero moving range and the value as mean
	if c.Sigma != 0 || !controlClose(c.Centre, 0.1, 1e-15) {
		t.Errorf("centre, sigma = %v, %v; want 0.1, 0", c.Centre, c.Sigma)
	}
}

func TestIndividualsChartErrors(t *testing.T) {
	tests := []struct {
		name   string
		values []float64
		want   string
	}{
		{"empty", nil, "0 values given, at least 2"},
		{"one", []float64{452}, "1 values given, at least 2"},
		{"nan", []float64{452, math.NaN(), 451}, "value 2 is NaN"},
		{"inf", []float64{452, math.Inf(1)}, "value 2 is +Inf"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := IndividualsChart(tt.values)
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Errorf("error = %v, want it to contain %q", err, tt.want)
			}
		})
	}
}

func TestIndividualsChartKeepsInput(t *testing.T) {
	in := []float64{1, 2, 3}
	c, err := IndividualsChart(in)
	if err != nil {
		t.Fatal(err)
	}
	c.Values[0] = 99
	if in[0] != 1 {
		t.Error("IndividualsChart shares its Values with the caller's slice")
	}
}

func TestControlChartSummary(t *testing.T) {
	values := controlJoin(controlAlternate(20), []float64{6, 1, 0, 1, 0})
	c, err := IndividualsChart(values)
	if err != nil {
		t.Fatal(err)
	}
	labels := make([]string, len(values))
	for i := range labels {
		labels[i] = fmt.Sprintf("cal-%02d", i+1)
	}
	var b bytes.Buffer
	if err := c.Summary(&b, labels); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	// centre 0.72 and σ = 1.3333/1.128 = 1.18203 from the beyond-3-sigma case above
	for _, want := range []string{"values", "25", "0.72", "1.18203", "1.33333",
		"rule violations: 1", "cal-21", RuleBeyond3Sigma, "above the centre"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}

	b.Reset()
	if err := c.Summary(&b, nil); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "#21") {
		t.Errorf("summary without labels does not name the point #21:\n%s", b.String())
	}

	if err := c.Summary(&b, labels[:3]); err == nil {
		t.Error("summary with 3 labels for 25 values: no error")
	}

	quiet, err := IndividualsChart(controlAlternate(10))
	if err != nil {
		t.Fatal(err)
	}
	b.Reset()
	if err := quiet.Summary(&b, nil); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "rule violations: none") {
		t.Errorf("summary of a quiet chart:\n%s", b.String())
	}
}

// ExampleIndividualsChart charts the heat capacity found by eight
// calibrations of one coffee-cup calorimeter (J/K; invented values). The
// figures were recomputed with numpy 1.24.2 from the e-Handbook formulas:
// /usr/bin/python3 -c 'import numpy as np; x=np.array([452.3,451.8,452.9,
// 452.1,452.6,451.9,452.4,456.8]); m=x.mean(); r=np.abs(np.diff(x)).mean();
// s=r/1.128; print(m, r, s, m-3*s, m+3*s, m-2*s, m+2*s, (x[-1]-m)/s)' →
// 452.85 1.214286 1.076494 449.6205 456.0795 450.6970 455.0030 3.669.
func ExampleIndividualsChart() {
	heatCapacity := []float64{452.3, 451.8, 452.9, 452.1, 452.6, 451.9, 452.4, 456.8}
	c, err := IndividualsChart(heatCapacity)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("centre %.2f J/K, sigma %.3f J/K\n", c.Centre, c.Sigma)
	fmt.Printf("3-sigma limits %.2f to %.2f J/K\n", c.Lower3, c.Upper3)
	labels := []string{"c01", "c02", "c03", "c04", "c05", "c06", "c07", "c08"}
	if err := c.Summary(os.Stdout, labels); err != nil {
		fmt.Println(err)
	}
	// Output:
	// centre 452.85 J/K, sigma 1.076 J/K
	// 3-sigma limits 449.62 to 456.08 J/K
	// values          8
	// centre (mean)   452.85
	// sigma           1.07649  (mean moving range 1.21429 / 1.128)
	// 3-sigma limits  449.621  456.079
	// 2-sigma limits  450.697  455.003
	// rule violations: 1
	//   c08  456.8  beyond-3-sigma  value 456.8 is 3.67σ above the centre, beyond the 3σ limit
}
