package fit

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

func TestMedianMAD(t *testing.T) {
	tests := []struct {
		name        string
		v           []float64
		median, mad float64
	}{
		// hand examples: sorted 1 1 2 2 4 6 9, median 2; |v − 2| = 1 1 0 0 2 4 7 → MAD 1.
		{"odd", []float64{1, 1, 2, 2, 4, 6, 9}, 2, 1},
		// sorted 1 2 3 4, median 2.5; deviations 1.5 .5 .5 1.5 → MAD 1.
		{"even", []float64{4, 1, 3, 2}, 2.5, 1},
		// one value: median is it, MAD 0.
		{"single", []float64{7.5}, 7.5, 0},
		// an outlier moves neither: sorted 9 10 11 12 1000, median 11;
		// deviations 1 0 2 1 989 → MAD 1.
		{"outlier", []float64{10, 11, 9, 12, 1000}, 11, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := slices.Clone(tc.v)
			if got := Median(tc.v); !approx(got, tc.median, 1e-15, 0) {
				t.Errorf("Median = %v, want %v", got, tc.median)
			}
			if got := MAD(tc.v); !approx(got, tc.mad, 1e-15, 0) {
				t.Errorf("MAD = %v, want %v", got, tc.mad)
			}
			if !slices.Equal(in, tc.v) {
				t.Errorf("input modified: %v, was %v", tc.v, in)
			}
		})
	}
	if !math.IsNaN(Median(nil)) || !math.IsNaN(Median([]float64{1, math.NaN()})) {
		t.Error("Median of empty or NaN input is not NaN")
	}
}

func TestRobustZ(t *testing.T) {
	tests := []struct {
		name string
		v    []float64
		want []float64
	}{
		// hand example: median 11, MAD 1, scale 1.4826 = 1/Φ⁻¹(3/4)
		// (scipy 1.10.1: 1/norm.ppf(0.75) = 1.482602).
		{"outlier", []float64{10, 11, 9, 12, 1000}, []float64{-1 / 1.4826, 0, -2 / 1.4826, 1 / 1.4826, 989 / 1.4826}},
		// MAD = 0: median 5, mean |v − 5| = 4/5, scale 1.2533·0.8 (Iglewicz &
		// Hoaglin, from memory; analytic: 1.2533 = √(π/2), E|X − μ| = σ√(2/π)).
		{"mad zero", []float64{5, 5, 5, 5, 9}, []float64{0, 0, 0, 0, 4 / (1.2533141373155003 * 0.8)}},
		// all equal: every z is 0.
		{"constant", []float64{3, 3, 3}, []float64{0, 0, 0}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := RobustZ(tc.v)
			for i := range tc.want {
				if !approx(got[i], tc.want[i], 1e-12, 1e-12) {
					t.Errorf("z[%d] = %v, want %v", i, got[i], tc.want[i])
				}
			}
		})
	}
}

func TestRobustZNormal(t *testing.T) {
	// For normal data the robust scale estimates σ: 1.4826·MAD → σ
	// (Rousseeuw & Croux 1993; 1.4826 = 1/Φ⁻¹(3/4)). Statistical check:
	// n = 20000, σ = 2. analytic: the sample median of |X − m| has
	// asymptotic SD 1/(2f(c)√n) with f(c) = 2φ(c), c = Φ⁻¹(3/4), so the
	// scale has a relative SD 1/(4φ(c)·c·√n) = 1.166/√n ≈ 0.8 %, computed
	// with scipy 1.10.1: /usr/bin/python3 -c 'from scipy.stats import norm;
	// c=norm.ppf(0.75); print(1/(4*norm.pdf(c)*c))' → 1.16639. Tolerance
	// 4 % (5 SD).
	r := rand.New(rand.NewPCG(11, 12))
	v := make([]float64, 20000)
	for i := range v {
		v[i] = 5 + 2*r.NormFloat64()
	}
	if got := 1.4826 * MAD(v); !approx(got, 2, 0, 0.04) {
		t.Errorf("1.4826·MAD = %v, want ≈ 2", got)
	}
}

func TestLag1Autocorrelation(t *testing.T) {
	tests := []struct {
		name string
		phi  float64
		n    int
	}{
		{"white noise", 0, 4000},
		{"ar1 0.6", 0.6, 4000},
		{"ar1 -0.4", -0.4, 4000},
		{"ar1 0.95", 0.95, 4000},
	}
	for i, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			// AR(1): e_t = φ·e_{t−1} + a_t. The sample r1 is ≈ normal with SD
			// √((1 − φ²)/n) (Bartlett's formula, Box, Jenkins & Reinsel §2.1.6)
			// and mean ≈ φ − (1 + 4φ)/n (Kendall's bias, from memory).
			// Tolerance: 4 SD plus the bias bound (1 + 4|φ|)/n.
			r := rand.New(rand.NewPCG(21, uint64(i)))
			e := make([]float64, tc.n)
			prev := r.NormFloat64() / math.Sqrt(1-tc.phi*tc.phi)
			for t := range e {
				prev = tc.phi*prev + r.NormFloat64()
				e[t] = prev
			}
			n := float64(tc.n)
			sd := math.Sqrt((1 - tc.phi*tc.phi) / n)
			bias := (1 + 4*math.Abs(tc.phi)) / n
			if got := Lag1Autocorrelation(e); math.Abs(got-tc.phi) > 4*sd+bias {
				t.Errorf("r1 = %.4f, want %.2f ± %.4f", got, tc.phi, 4*sd+bias)
			}
		})
	}
	t.Run("exact", func(t *testing.T) {
		// hand example: 1 2 3 4, mean 2.5, d = −1.5 −.5 .5 1.5;
		// Σd_t d_{t+1} = .75 − .25 + .75 = 1.25, Σd² = 5 → r1 = 0.25.
		if got := Lag1Autocorrelation([]float64{1, 2, 3, 4}); !approx(got, 0.25, 1e-15, 0) {
			t.Errorf("r1 = %v, want 0.25", got)
		}
	})
	t.Run("undefined", func(t *testing.T) {
		if !math.IsNaN(Lag1Autocorrelation([]float64{1})) || !math.IsNaN(Lag1Autocorrelation([]float64{2, 2, 2})) {
			t.Error("want NaN for one value or a constant series")
		}
	})
}
