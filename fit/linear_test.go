package fit

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

func TestLinearNIST(t *testing.T) {
	type cert struct {
		params, sd []float64
		resSD      float64
	}
	normX, normY := strdReadDat(t, "Norris.dat")
	pontX, pontY := strdReadCSV(t, "pontius.csv")
	noX, noY := strdReadCSV(t, "noint1.csv")
	tests := []struct {
		name string
		fit  func() (*Linear, error)
		n    int
		want cert
	}{
		{
			name: "Norris line",
			fit:  func() (*Linear, error) { return Line(normX, normY) },
			n:    36,
			// NIST StRD Norris, certified values; LRE >= 9.
			want: cert{
				params: []float64{-0.262323073774029, 1.00211681802045},
				sd:     []float64{0.232818234301152, 0.429796848199937e-03},
				resSD:  0.884796396144373,
			},
		},
		{
			name: "Pontius quadratic",
			fit:  func() (*Linear, error) { return Polynomial(pontX, pontY, 2) },
			n:    40,
			// NIST StRD Pontius, certified values; LRE >= 9.
			want: cert{
				params: []float64{0.673565789473684e-03, 0.732059160401003e-06, -0.316081871345029e-14},
				sd:     []float64{0.107938612033077e-03, 0.157817399981659e-09, 0.486652849992036e-16},
				resSD:  0.205177424076185e-03,
			},
		},
		{
			name: "NoInt1 through origin",
			fit:  func() (*Linear, error) { return ThroughOrigin(noX, noY, nil) },
			n:    11,
			// NIST StRD NoInt1, certified values; LRE >= 9 (B0 = 0 by construction).
			want: cert{
				params: []float64{0, 2.07438016528926},
				sd:     []float64{0, 0.165289256198347e-01},
				resSD:  3.56753034006338,
			},
		},
		{
			name: "NoInt1 through origin, equal weights",
			fit: func() (*Linear, error) {
				w := make([]float64, len(noX))
				for i := range w {
					w[i] = 7 // relative weights: a common factor changes nothing
				}
				return ThroughOrigin(noX, noY, w)
			},
			n: 11,
			// NIST StRD NoInt1, certified values; residual SD scales by √7 with w = 7.
			want: cert{
				params: []float64{0, 2.07438016528926},
				sd:     []float64{0, 0.165289256198347e-01},
				resSD:  3.56753034006338 * math.Sqrt(7),
			},
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, err := tc.fit()
			if err != nil {
				t.Fatal(err)
			}
			if f.N != tc.n || f.DoF != tc.n-len(tc.want.params)+btoi(f.Origin) {
				t.Errorf("N = %d, DoF = %d", f.N, f.DoF)
			}
			sd := f.ParamSD()
			for j := range tc.want.params {
				if tc.want.params[j] == 0 {
					if f.Params[j] != 0 || sd[j] != 0 {
						t.Errorf("p%d = %v ± %v, want exactly 0", j, f.Params[j], sd[j])
					}
					continue
				}
				checkLRE(t, "param", f.Params[j], tc.want.params[j], 9)
				checkLRE(t, "param sd", sd[j], tc.want.sd[j], 9)
			}
			checkLRE(t, "residual sd", f.ResidualSD, tc.want.resSD, 9)
		})
	}
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}

// linearTestLine is y = 2 + 0.5·x + small deterministic noise on x = 0..9.
func linearTestLine() (x, y []float64) {
	noise := []float64{0.1, -0.2, 0.05, 0.15, -0.1, 0.0, -0.05, 0.2, -0.15, 0.1}
	for i := range 10 {
		x = append(x, float64(i))
		y = append(y, 2+0.5*float64(i)+noise[i])
	}
	return x, y
}

func TestEvalUAnalytic(t *testing.T) {
	x, y := linearTestLine()
	f, err := Line(x, y)
	if err != nil {
		t.Fatal(err)
	}
	n := float64(len(x))
	var xbar, sxx float64
	for _, v := range x {
		xbar += v / n
	}
	for _, v := range x {
		sxx += (v - xbar) * (v - xbar)
	}
	s := f.ResidualSD
	for _, x0 := range []float64{-20, 0, 4.5, 9, 1e3} {
		// analytic (DOMAIN.md §2; Draper & Smith §3.1): u² = s²[1/n + (x0 − x̄)²/Σ(x−x̄)²].
		want := s * math.Sqrt(1/n+(x0-xbar)*(x0-xbar)/sxx)
		if got := f.EvalU(x0); !approx(got, want, 1e-12, 1e-12) {
			t.Errorf("EvalU(%v) = %.15g, want %.15g", x0, got, want)
		}
		// analytic: the slope of a line has u = s/√Sxx everywhere and
		// cov(ŷ(x0), b) = s²(x0 − x̄)/Sxx.
		if got, want := f.SlopeU(x0), s/math.Sqrt(sxx); !approx(got, want, 1e-12, 1e-12) {
			t.Errorf("SlopeU(%v) = %v, want %v", x0, got, want)
		}
		if got, want := f.CovEvalSlope(x0), s*s*(x0-xbar)/sxx; !approx(got, want, 1e-14, 1e-12) {
			t.Errorf("CovEvalSlope(%v) = %v, want %v", x0, got, want)
		}
		// Eval(x0) agrees with the original-x parameters.
		if got, want := f.Eval(x0), f.Params[0]+f.Params[1]*x0; !approx(got, want, 1e-12, 1e-12) {
			t.Errorf("Eval(%v) = %v, Params give %v", x0, got, want)
		}
		// EvalU agrees with the original-x covariance: u² = Var p0 + 2x0 Cov + x0² Var p1.
		c := f.Cov
		u2 := c.At(0, 0) + 2*x0*c.At(0, 1) + x0*x0*c.At(1, 1)
		if got := f.EvalU(x0); !approx(got*got, u2, 1e-12, 1e-9) {
			t.Errorf("EvalU(%v)² = %v, Cov gives %v", x0, got*got, u2)
		}
	}
}

func TestPolynomialSlope(t *testing.T) {
	// analytic: an exact cubic y = 1 − 2x + 0.5x² + 0.25x³ plus alternating
	// ±1e-3 noise is recovered; slope −2 + x + 0.75x². Tolerances: 3e-3 on
	// each coefficient and 5e-3 on the slope, a few times the ±1e-3
	// perturbation over x in [−2, 2].
	var x, y []float64
	for i := range 21 {
		v := -2 + 0.2*float64(i)
		x = append(x, v)
		y = append(y, 1-2*v+0.5*v*v+0.25*v*v*v+1e-3*float64(1-2*(i%2)))
	}
	f, err := Polynomial(x, y, 3)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{1, -2, 0.5, 0.25}
	for j, p := range f.Params {
		if !approx(p, want[j], 3e-3, 0) {
			t.Errorf("p%d = %v, want %v", j, p, want[j])
		}
	}
	for _, x0 := range []float64{-1, 0, 1.5} {
		if got, w := f.Slope(x0), -2+x0+0.75*x0*x0; !approx(got, w, 5e-3, 0) {
			t.Errorf("Slope(%v) = %v, want %v", x0, got, w)
		}
		// Slope equals the derivative of the original-x polynomial.
		d := f.Params[1] + 2*f.Params[2]*x0 + 3*f.Params[3]*x0*x0
		if got := f.Slope(x0); !approx(got, d, 1e-12, 1e-12) {
			t.Errorf("Slope(%v) = %v, Params give %v", x0, got, d)
		}
	}
}

func TestWeightedPolynomial(t *testing.T) {
	x, y := linearTestLine()
	t.Run("equal weights match unweighted", func(t *testing.T) {
		w := make([]float64, len(x))
		for i := range w {
			w[i] = 4
		}
		fw, err := WeightedPolynomial(x, y, w, 1)
		if err != nil {
			t.Fatal(err)
		}
		f, _ := Line(x, y)
		// analytic: a common weight factor leaves parameters and covariance unchanged.
		for j := range f.Params {
			if !approx(fw.Params[j], f.Params[j], 1e-14, 1e-12) || !approx(fw.ParamSD()[j], f.ParamSD()[j], 1e-14, 1e-12) {
				t.Errorf("p%d = %v ± %v, unweighted %v ± %v", j, fw.Params[j], fw.ParamSD()[j], f.Params[j], f.ParamSD()[j])
			}
		}
	})
	t.Run("weights equal to repeated points", func(t *testing.T) {
		// analytic: weight 2 on a point gives the same estimate as that point twice.
		w := make([]float64, len(x))
		xr, yr := append([]float64(nil), x...), append([]float64(nil), y...)
		for i := range w {
			w[i] = 1
			if i%3 == 0 {
				w[i] = 2
				xr = append(xr, x[i])
				yr = append(yr, y[i])
			}
		}
		fw, err := WeightedPolynomial(x, y, w, 1)
		if err != nil {
			t.Fatal(err)
		}
		fr, _ := Line(xr, yr)
		for j := range fw.Params {
			if !approx(fw.Params[j], fr.Params[j], 1e-13, 1e-12) {
				t.Errorf("p%d = %v, repeated-points fit %v", j, fw.Params[j], fr.Params[j])
			}
		}
		if !approx(fw.SSR, fr.SSR, 1e-13, 1e-11) {
			t.Errorf("SSR = %v, repeated-points fit %v", fw.SSR, fr.SSR)
		}
	})
	t.Run("absolute weights", func(t *testing.T) {
		// analytic: with w = 1/σ², Var(b) = 1/Σw(x − x̄_w)².
		sigma := 0.1
		w := make([]float64, len(x))
		for i := range w {
			w[i] = 1 / (sigma * sigma)
		}
		f, err := WeightedPolynomialAbsolute(x, y, w, 1)
		if err != nil {
			t.Fatal(err)
		}
		var sxx float64
		for _, v := range x {
			sxx += (v - 4.5) * (v - 4.5) / (sigma * sigma)
		}
		if got, want := f.ParamSD()[1], 1/math.Sqrt(sxx); !approx(got, want, 1e-15, 1e-12) {
			t.Errorf("sd(b) = %v, want %v", got, want)
		}
	})
}

func TestLinearErrors(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name string
		fit  func() (*Linear, error)
		want error
	}{
		{"too few for line", func() (*Linear, error) { return Line([]float64{1, 2}, []float64{1, 2}) }, ErrTooFewPoints},
		{"too few for quadratic", func() (*Linear, error) { return Polynomial([]float64{1, 2, 3}, []float64{1, 2, 3}, 2) }, ErrTooFewPoints},
		{"too few through origin", func() (*Linear, error) { return ThroughOrigin([]float64{1}, []float64{1}, nil) }, ErrTooFewPoints},
		{"all x equal", func() (*Linear, error) { return Line([]float64{3, 3, 3}, []float64{1, 2, 3}) }, ErrSingular},
		{"two distinct x for quadratic", func() (*Linear, error) {
			return Polynomial([]float64{1, 1, 2, 2, 1}, []float64{1, 2, 3, 4, 5}, 2)
		}, ErrSingular},
		{"all x zero through origin", func() (*Linear, error) { return ThroughOrigin([]float64{0, 0}, []float64{1, 2}, nil) }, ErrSingular},
		{"nan y", func() (*Linear, error) { return Line([]float64{1, 2, 3}, []float64{1, nan, 3}) }, ErrNotFinite},
		{"inf x", func() (*Linear, error) { return Line([]float64{1, math.Inf(1), 3}, []float64{1, 2, 3}) }, ErrNotFinite},
		{"length", func() (*Linear, error) { return Line([]float64{1, 2, 3}, []float64{1, 2}) }, ErrLength},
		{"zero weight", func() (*Linear, error) {
			return WeightedPolynomial([]float64{1, 2, 3}, []float64{1, 2, 3}, []float64{1, 0, 1}, 1)
		}, ErrWeight},
		{"nil weights", func() (*Linear, error) { return WeightedPolynomial([]float64{1, 2, 3}, []float64{1, 2, 3}, nil, 1) }, ErrLength},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, err := tc.fit()
			if !errors.Is(err, tc.want) {
				t.Fatalf("err = %v, want %v (fit %+v)", err, tc.want, f)
			}
			if msg := err.Error(); msg[0] < 'a' || msg[0] > 'z' {
				t.Errorf("error %q does not start lower case", msg)
			}
		})
	}
}

func TestLineLargeOffset(t *testing.T) {
	// A time axis far from zero (Unix seconds) must not cost accuracy:
	// y = 20 + 1e-4·(x − x0) plus noise of SD 1e-6, x0 = 1.7e9 s. analytic:
	// SD(slope) = 1e-6/√Σ(x − x̄)² = 1e-6/√(4·200(200²−1)/12) ≈ 6e-10, so
	// the 1e-8 tolerance is 16 SD; SD of the value at x0 + 100 is below
	// 1e-6/√200 + 100·6e-10 ≈ 1.3e-7, tolerance 1e-6.
	x0 := 1.7e9
	var x, y []float64
	r := rand.New(rand.NewPCG(1, 2))
	for i := range 200 {
		x = append(x, x0+2*float64(i))
		y = append(y, 20+1e-4*2*float64(i)+1e-6*r.NormFloat64())
	}
	f, err := Line(x, y)
	if err != nil {
		t.Fatal(err)
	}
	if got := f.Slope(x0); !approx(got, 1e-4, 1e-8, 0) {
		t.Errorf("slope = %v, want 1e-4", got)
	}
	if got := f.Eval(x0 + 100); !approx(got, 20.01, 1e-6, 0) {
		t.Errorf("Eval = %v, want 20.01", got)
	}
}

// approx reports |a − b| ≤ abs + rel·|b|.
func approx(a, b, abs, rel float64) bool {
	return math.Abs(a-b) <= abs+rel*math.Abs(b)
}

func BenchmarkLine1e5(b *testing.B) {
	// Target: under 20 ms per fit of 10⁵ points on one core.
	r := rand.New(rand.NewPCG(3, 4))
	n := 100000
	x := make([]float64, n)
	y := make([]float64, n)
	for i := range x {
		x[i] = float64(i)
		y[i] = 1 + 1e-3*x[i] + r.NormFloat64()
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Line(x, y); err != nil {
			b.Fatal(err)
		}
	}
}

func TestPolynomialDegreeZero(t *testing.T) {
	// analytic: a degree-0 fit is the mean, with SD s/√n.
	y := []float64{2, 4, 4, 4, 5, 5, 7, 9}
	x := []float64{1, 1, 1, 1, 1, 1, 1, 1} // any x will do, even all equal
	f, err := Polynomial(x, y, 0)
	if err != nil {
		t.Fatal(err)
	}
	// mean 5, Σ(y − 5)² = 32, s = √(32/7).
	s := math.Sqrt(32.0 / 7)
	if !approx(f.Params[0], 5, 1e-14, 0) || !approx(f.ParamSD()[0], s/math.Sqrt(8), 1e-14, 1e-13) || !approx(f.ResidualSD, s, 1e-14, 1e-13) {
		t.Errorf("got %v ± %v, s = %v; want 5 ± %v, s = %v", f.Params[0], f.ParamSD()[0], f.ResidualSD, s/math.Sqrt(8), s)
	}
	if f.Slope(3) != 0 || f.SlopeU(3) != 0 {
		t.Errorf("slope of a constant = %v ± %v", f.Slope(3), f.SlopeU(3))
	}
}
