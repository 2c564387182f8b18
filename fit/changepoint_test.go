package fit

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// cpBrokenLine returns n points on x = 0, 1, …, following y = a1 + b1·x
// before x = k and y = a2 + b2·x from there, plus normal noise of SD sigma.
func cpBrokenLine(n, k int, a1, b1, a2, b2, sigma float64, seed uint64) (x, y []float64) {
	r := rand.New(rand.NewPCG(seed, 99))
	for i := range n {
		v := float64(i)
		m := a1 + b1*v
		if i >= k {
			m = a2 + b2*v
		}
		x = append(x, v)
		y = append(y, m+sigma*r.NormFloat64())
	}
	return x, y
}

func TestChangePoint(t *testing.T) {
	tests := []struct {
		name      string
		n, k      int
		a1, b1    float64
		a2, b2    float64
		sigma     float64
		minSeg    int
		wantK     int
		tolK      int
		wantNoise bool // a plain line: gain should be small
	}{
		// constructed: a fore-period-like slope, then a steep rise that meets it
		// at x = 40; a kink with no jump may be placed one point either side.
		{name: "kink", n: 100, k: 40, a1: 20, b1: 0.001, a2: 20 + 0.04 - 0.05*40, b2: 0.05, sigma: 0.002, minSeg: 5, wantK: 40, tolK: 1},
		// constructed: a pure jump of 1 at x = 25 with equal slopes.
		{name: "jump", n: 60, k: 25, a1: 1, b1: 0.01, a2: 2, b2: 0.01, sigma: 0.01, minSeg: 5, wantK: 25, tolK: 0},
		// constructed: no break at all.
		{name: "straight", n: 80, k: 80, a1: 3, b1: -0.2, a2: 3, b2: -0.2, sigma: 0.05, minSeg: 5, wantNoise: true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			x, y := cpBrokenLine(tc.n, tc.k, tc.a1, tc.b1, tc.a2, tc.b2, tc.sigma, uint64(tc.n))
			k, gain, err := ChangePoint(x, y, tc.minSeg)
			if err != nil {
				t.Fatal(err)
			}
			if k < tc.minSeg || k > tc.n-tc.minSeg {
				t.Fatalf("k = %d outside [%d, %d]", k, tc.minSeg, tc.n-tc.minSeg)
			}
			// The gain equals the SSR reduction computed with Line on the pieces.
			all, _ := Line(x, y)
			l, _ := Line(x[:k], y[:k])
			r, _ := Line(x[k:], y[k:])
			if want := all.SSR - l.SSR - r.SSR; !approx(gain, want, 1e-12, 1e-9) {
				t.Errorf("gain = %v, Line fits give %v", gain, want)
			}
			s2 := tc.sigma * tc.sigma
			if tc.wantNoise {
				// analytic: with no break, gain/σ² at one split is χ²(2) (two
				// nested parameters added), P(χ²₂ > 30) = e⁻¹⁵ ≈ 3·10⁻⁷; over the
				// ≤ 71 splits (Bonferroni) the bound 30 σ² fails by chance with
				// probability < 3·10⁻⁵ (and the seed is fixed).
				if gain > 30*s2 {
					t.Errorf("gain = %v = %.1f σ² on a straight line", gain, gain/s2)
				}
				return
			}
			if d := k - tc.wantK; d < -tc.tolK || d > tc.tolK {
				t.Errorf("k = %d, want %d ± %d", k, tc.wantK, tc.tolK)
			}
			// 100 σ² is a loose lower bound, far above the null level above:
			// the noise-free SSR of one line through the broken lines is
			// 3.9·10⁴ σ² (jump) and 2.8·10⁶ σ² (kink), computed with numpy
			// 1.24.2 (np.linalg.lstsq of [1, x] on the constructed y).
			if gain < 100*s2 {
				t.Errorf("gain = %v is only %.1f σ²", gain, gain/s2)
			}
		})
	}
}

func TestChangePointBruteForce(t *testing.T) {
	// The O(n) search agrees with refitting every split with Line.
	x, y := cpBrokenLine(50, 31, 0, 1, 10, -0.5, 0.3, 5)
	k, gain, err := ChangePoint(x, y, 4)
	if err != nil {
		t.Fatal(err)
	}
	all, _ := Line(x, y)
	bestK, best := -1, math.Inf(1)
	for j := 4; j <= len(x)-4; j++ {
		l, _ := Line(x[:j], y[:j])
		r, _ := Line(x[j:], y[j:])
		if s := l.SSR + r.SSR; s < best {
			best, bestK = s, j
		}
	}
	if k != bestK || !approx(gain, all.SSR-best, 1e-10, 1e-10) {
		t.Errorf("ChangePoint = %d, %v; brute force %d, %v", k, gain, bestK, all.SSR-best)
	}
}

func TestChangePointErrors(t *testing.T) {
	x := []float64{0, 1, 2, 3, 4, 5, 6, 7}
	y := []float64{0, 1, 2, 3, 5, 7, 9, 11}
	tests := []struct {
		name   string
		x, y   []float64
		minSeg int
		want   error
	}{
		{"too few", x, y, 5, ErrTooFewPoints},
		{"nan", x, []float64{0, 1, math.NaN(), 3, 5, 7, 9, 11}, 3, ErrNotFinite},
		{"length", x, y[:7], 3, ErrLength},
		{"all x equal", []float64{1, 1, 1, 1, 1, 1}, []float64{1, 2, 3, 4, 5, 6}, 3, ErrSingular},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, _, err := ChangePoint(tc.x, tc.y, tc.minSeg); !errors.Is(err, tc.want) {
				t.Errorf("err = %v, want %v", err, tc.want)
			}
		})
	}
	if _, _, err := ChangePoint(x, y, 2); err == nil {
		t.Error("minSeg 2 accepted")
	}
}
