package calorimeter

import (
	"math"
	"math/rand/v2"
	"testing"

	"calred/fit"
)

// newtonPeriod returns readings of the noise-free Newtonian curve
// θ = θ∞ + (θ_0 − θ∞)e^{−Gt} at n times over [0, dur], evenly spaced or
// (uneven) moved by up to 0.4 of a step.
func newtonPeriod(g, dur float64, n int, uneven bool) (t, y []float64) {
	const thInf, th0 = 300.0, 295.0
	t = make([]float64, n)
	y = make([]float64, n)
	step := dur / float64(n-1)
	for k := range t {
		t[k] = float64(k) * step
		if uneven && k > 0 && k < n-1 {
			t[k] += 0.4 * step * math.Sin(1.7*float64(k))
		}
		y[k] = thInf + (th0-thInf)*math.Exp(-g*t[k])
	}
	return t, y
}

// TestDriftPairExact checks the claim of the Drift comment: on a noise-free
// Newtonian period the least-squares slope equals G(θ∞ − T) with T the
// drift temperature (exact up to the trapezoid, O((GΔt)²) ≈ 1e-6 here),
// however curved the period, evenly or unevenly sampled; paired with the
// plain mean it is off by (G·D)²/60 (analytic, leading order).
func TestDriftPairExact(t *testing.T) {
	const g, dur = 1e-3, 600.0 // G·D = 0.6
	for _, uneven := range []bool{false, true} {
		name := "even"
		if uneven {
			name = "uneven"
		}
		t.Run(name, func(t *testing.T) {
			tt, y := newtonPeriod(g, dur, 301, uneven)
			f, err := newDriftFit(tt, y)
			if err != nil {
				t.Fatal(err)
			}
			honest := g * (300 - f.pairT)
			// tolerance 5e-6, above the O((GΔt)²) trapezoid error (GΔt = 2e-3)
			if rel := (f.slope - honest) / honest; math.Abs(rel) > 5e-6 {
				t.Errorf("slope %.9g K/s vs G(θ∞ − T) %.9g K/s: relative %.2g", f.slope, honest, rel)
			}
			if uneven {
				return
			}
			plain := g * (300 - f.mean)
			rel := (f.slope - plain) / plain
			want := -(g * dur) * (g * dur) / 60
			// Next order is O((GD)⁴); numpy 1.24.2 gives rel/want − 1 =
			// −0.0019 on these points: /usr/bin/python3 -c 'import numpy as np;
			// g,D=1e-3,600.; t=np.linspace(0,D,301); y=300-5*np.exp(-g*t);
			// b=np.polyfit(t,y,1)[0]; m=y.mean(); print((b-g*(300-m))/(g*(300-m)))'
			// → −0.0059885 against −0.006. Tolerance 2 %.
			if math.Abs(rel/want-1) > 0.02 {
				t.Errorf("slope against the plain mean: relative %.4g, want %.4g", rel, want)
			}
		})
	}
}

// TestDriftCurve checks that the Newtonian curve built from a period's mean,
// slope and drift temperature reproduces the exponential inside and far
// outside the period, with the moment series (G·h ≤ 5) and with the direct
// sum (G·h > 5).
func TestDriftCurve(t *testing.T) {
	for _, tc := range []struct {
		name string
		g    float64
	}{{"series", 1e-3}, {"direct", 2e-2}} {
		t.Run(tc.name, func(t *testing.T) {
			tt, y := newtonPeriod(tc.g, 600, 601, false)
			f, err := newDriftFit(tt, y)
			if err != nil {
				t.Fatal(err)
			}
			c := f.curve(tc.g, f.mean, f.slope, f.pairT)
			for _, tau := range []float64{0, 300, 600, 900, -300} {
				want := 300 - 5*math.Exp(-tc.g*tau)
				// The trapezoid in T errs by about (GΔt)²/12 of the
				// period's 5 K span (Δt = 1 s); allow three times that.
				tol := (tc.g * tc.g / 4) * math.Max(5, math.Abs(want-300))
				if got := c.at(tau); math.Abs(got-want) > tol {
					t.Errorf("N(%g s) = %.9f K, want %.9f K", tau, got, want)
				}
			}
			// ∫ N over [0, 600] against the closed form.
			want := 300*600 - 5*(1-math.Exp(-tc.g*600))/tc.g
			if got := c.integral(0, 600); math.Abs(got-want) > (tc.g*tc.g/4)*5*600 {
				t.Errorf("∫N = %.9f K·s, want %.9f K·s", got, want)
			}
		})
	}
}

// riseWeights returns ∂stat/∂y_k for every reading by perturbing each
// reading in turn (the stat is linear, so this is exact up to rounding).
func riseWeights(tt, y []float64, stat func(*driftFit) float64) []float64 {
	base, _ := newDriftFit(tt, y)
	w := make([]float64, len(y))
	for k := range y {
		yy := append([]float64(nil), y...)
		yy[k] += 1e-3
		f, _ := newDriftFit(tt, yy)
		w[k] = (stat(f) - stat(base)) / 1e-3
	}
	return w
}

// TestDriftCov checks driftCov against the brute-force double sum
// Σ_k Σ_k′ s_k s_k′ sd² ρ^|k−k′| with weights found by perturbing each
// reading, and, for white noise, against the covariance of gonum's QR line
// fit (fit.Line: u² of the line at τ is s²·[1/n + (τ − t̄)²/Σ(t − t̄)²]).
func TestDriftCov(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	n := 40
	tt := make([]float64, n)
	y := make([]float64, n)
	for k := range tt {
		tt[k] = 10*float64(k) + 3*rng.Float64()
		y[k] = 298 + 1e-4*tt[k] + 1e-3*rng.NormFloat64()
	}
	f, err := newDriftFit(tt, y)
	if err != nil {
		t.Fatal(err)
	}
	wm := riseWeights(tt, y, func(f *driftFit) float64 { return f.mean })
	wb := riseWeights(tt, y, func(f *driftFit) float64 { return f.slope })
	wT := riseWeights(tt, y, func(f *driftFit) float64 { return f.pairT })
	// Two outputs: the line at τ = 500 s and a mix of all three statistics.
	grads := [][3]float64{{1, 500 - f.c, 0}, {0.3, -20, 0.7}}
	const sd = 1e-3
	for _, rho := range []float64{0, 0.5} {
		cov := make([]float64, 4)
		f.driftCov(grads, sd, rho, cov)
		for j := 0; j < 2; j++ {
			for l := 0; l < 2; l++ {
				var want float64
				for a := 0; a < n; a++ {
					sa := grads[j][0]*wm[a] + grads[j][1]*wb[a] + grads[j][2]*wT[a]
					for b := 0; b < n; b++ {
						sb := grads[l][0]*wm[b] + grads[l][1]*wb[b] + grads[l][2]*wT[b]
						want += sa * sb * sd * sd * math.Pow(rho, math.Abs(float64(a-b)))
					}
				}
				if got := cov[j*2+l]; math.Abs(got-want) > 1e-6*math.Abs(want) {
					t.Errorf("ρ = %g: cov[%d,%d] = %.9g, brute force %.9g", rho, j, l, got, want)
				}
			}
		}
		if rho == 0 {
			lf, err := fit.Line(tt, y)
			if err != nil {
				t.Fatal(err)
			}
			u := lf.EvalU(500) / lf.ResidualSD * sd
			if got := math.Sqrt(cov[0]); math.Abs(got-u) > 1e-9*u {
				t.Errorf("u(line at 500 s) = %.12g K, fit.Line gives %.12g K", got, u)
			}
		}
	}
}

// TestDriftAt compares Drift.At with fit.Line's value and EvalU (times the
// inflation factor), and the reported slope and intercept with the fit.
func TestDriftAt(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	n := 60
	tt := make([]float64, n)
	y := make([]float64, n)
	for k := range tt {
		tt[k] = 1000 + 5*float64(k)
		y[k] = 297 + 2e-4*(tt[k]-1000) + 2e-3*rng.NormFloat64()
	}
	f, err := newDriftFit(tt, y)
	if err != nil {
		t.Fatal(err)
	}
	f.finish(0)
	d := f.drift()
	lf, err := fit.Line(tt, y)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(d.Slope-lf.Params[1]) > 1e-12 || math.Abs(d.Intercept-lf.Params[0]) > 1e-9 {
		t.Errorf("line %g + %g t, fit.Line %g + %g t", d.Intercept, d.Slope, lf.Params[0], lf.Params[1])
	}
	if math.Abs(d.ResidualSD-lf.ResidualSD) > 1e-12 {
		t.Errorf("residual SD %g, fit.Line %g", d.ResidualSD, lf.ResidualSD)
	}
	for _, at := range []float64{0, 1000, 1150, 1600} {
		th, u := d.At(at)
		if math.Abs(th-lf.Eval(at)) > 1e-9 {
			t.Errorf("At(%g) = %g K, fit.Line %g K", at, th, lf.Eval(at))
		}
		want := lf.EvalU(at) * d.Inflation
		if math.Abs(u-want) > 1e-9*want {
			t.Errorf("u(At(%g)) = %g K, fit.Line·inflation %g K", at, u, want)
		}
	}
	if !(math.Abs(d.CovSlopeIntercept-lf.Cov.At(0, 1)*d.Inflation*d.Inflation) < 1e-9*math.Abs(d.CovSlopeIntercept)) {
		t.Errorf("cov(slope, intercept) %g, fit.Line %g", d.CovSlopeIntercept, lf.Cov.At(0, 1)*d.Inflation*d.Inflation)
	}
}

func TestDriftRho(t *testing.T) {
	tests := []struct {
		name string
		r1   float64
		n    int
		want float64
	}{
		{"negative kept at 0", -0.2, 100, 0},
		// Marriott & Pope, Biometrika 41 (1954) 390, as driftRho cites it
		// (the formula from memory): + (1 + 4ρ)/n
		{"bias corrected", 0.5, 100, 0.5 + 3.0/100},
		{"capped", 0.99, 100, 0.95}, // the [0, 0.95] bound of driftRho's doc
		{"NaN", math.NaN(), 100, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := driftRho(tc.r1, tc.n); math.Abs(got-tc.want) > 1e-12 {
				t.Errorf("driftRho(%g, %d) = %g, want %g", tc.r1, tc.n, got, tc.want)
			}
		})
	}
}

// TestCheckCurvature compares the O(n) orthogonal-polynomial curvature with
// gonum's QR quadratic fit (fit.Polynomial degree 2).
func TestCheckCurvature(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	n := 200
	tt := make([]float64, n)
	r := make([]float64, n)
	for k := range tt {
		tt[k] = 500 + 2*float64(k) + rng.Float64()
		s := tt[k] - 700
		r[k] = 1e-3 + 2e-6*s + 3e-8*s*s + 1e-3*rng.NormFloat64()
	}
	c2, u := checkCurvature(tt, r)
	q, err := fit.Polynomial(tt, r, 2)
	if err != nil {
		t.Fatal(err)
	}
	if want := q.Params[2]; math.Abs(c2-want) > 1e-9*math.Abs(want) {
		t.Errorf("c2 = %.12g, fit.Polynomial %.12g", c2, want)
	}
	if want := math.Sqrt(q.Cov.At(2, 2)); math.Abs(u-want) > 1e-6*want {
		t.Errorf("u(c2) = %.9g, fit.Polynomial %.9g", u, want)
	}
}
