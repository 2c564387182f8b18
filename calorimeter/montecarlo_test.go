package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"
)

// mcSeed is an arbitrary fixed seed for the tests.
const mcSeed = 20240611

func TestMonteCarloValidatesNearLinear(t *testing.T) {
	// The molar-enthalpy chain with the uncertainties of a precision
	// isoperibol run: the fixture's divided by 5, so ΔT to 0.05 %. (With the
	// fixture's coffee-cup figures, ΔT to 0.3 %, the curvature of 1/ΔT_cal
	// moves the 95 % end points by about δ itself, 0.0005 kJ/mol for
	// u_c = 0.060 kJ/mol, so validation there is a toss-up.)
	precise := func(in []Input) []Input {
		for i := range in {
			in[i].U /= 5
		}
		return in
	}
	_, chain, _ := budgetLoad(t, "enthalpy_independent.json")
	_, chainCorr, corr := budgetLoad(t, "enthalpy_correlated.json")
	chain, chainCorr = precise(chain), precise(chainCorr)
	// The correlated inputs must be normal for Monte Carlo.
	for _, i := range []int{0, 2, 4, 8} {
		chainCorr[i].Dist = Normal
	}
	tests := []struct {
		name   string
		inputs []Input
		corr   [][]float64
		f      Model
	}{{
		name:   "sum of normals",
		inputs: []Input{{Symbol: "a", Value: 1, U: 1, DoF: inf}, {Symbol: "b", Value: 2, U: 1, DoF: inf}},
		f:      func(x []float64) float64 { return x[0] + x[1] },
	}, {
		name:   "molar enthalpy chain",
		inputs: chain,
		f:      budgetEnthalpy,
	}, {
		name:   "molar enthalpy chain, correlated",
		inputs: chainCorr,
		corr:   corr,
		f:      budgetEnthalpy,
	}}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			// Normal-infinite inputs and a near-linear model: the GUM interval
			// y ± 1.96·u_c is the exact one, so JCGM 101:2008 8.2 validates it.
			// ν = ∞ is forced so that k = 1.96 describes the propagated distribution.
			inputs := slices.Clone(tt.inputs)
			for i := range inputs {
				inputs[i].DoF = inf
			}
			b, err := Propagate(inputs, tt.corr, tt.f, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			mc, err := MonteCarlo(inputs, tt.corr, tt.f, 1_000_000, mcSeed, 0)
			if err != nil {
				t.Fatal(err)
			}
			ok, dLow, dHigh, delta := ValidateGUM(b, mc)
			if !ok {
				t.Errorf("GUM not validated: d_low = %.3g, d_high = %.3g, δ = %.3g", dLow, dHigh, delta)
			}
			if mc.GUMValidated != ok || mc.DLow != dLow || mc.DHigh != dHigh || mc.Delta != delta {
				t.Errorf("ValidateGUM did not record its figures in the result: %+v", mc)
			}
			// JCGM 101:2008 8.2 compares u too: agree within δ.
			if math.Abs(mc.U-b.U) > delta || math.Abs(mc.Mean-b.Value) > delta {
				t.Errorf("Monte Carlo y = %.6g, u = %.4g; GUM y = %.6g, u_c = %.4g; δ = %.2g", mc.Mean, mc.U, b.Value, b.U, delta)
			}
		})
	}
}

func TestMonteCarloNonlinear(t *testing.T) {
	x := Input{Symbol: "x", Value: 0, U: 1, DoF: inf}
	tests := []struct {
		name   string
		inputs []Input
		f      Model
		mean   float64 // analytic
		u      float64 // analytic
		low    [2]float64
		high   [2]float64 // want, tolerance
	}{{
		// y = x², x ~ N(0, 1): y ~ χ²₁, mean 1, variance 2 (analytic). The GUM
		// gives c = 0 and u_c = 0. Symmetric 95 % interval: scipy 1.10.1
		// scipy.stats.chi2.ppf(0.025, 1) = 0.0009820691171752555 and
		// chi2.ppf(0.975, 1) = 5.023886187314888. Tolerances: about 5 standard
		// errors of the order statistic, √(p(1 − p)/M)/pdf(y_p).
		name:   "square of zero-mean normal",
		inputs: []Input{x},
		f:      func(x []float64) float64 { return x[0] * x[0] },
		mean:   1, u: math.Sqrt2,
		low:  [2]float64{0.0009820691171752555, 1e-4},
		high: [2]float64{5.023886187314888, 0.06},
	}, {
		// y = x1·x2, both N(0, 1): mean 0, variance 1 (analytic); GUM u_c = 0,
		// the comparison-loss kind of model with zero estimates of JCGM 101:2008
		// clause 9 (from memory). Interval ±q with P(|x1·x2| ≤ q) = 0.95;
		// q = 2.1819489839664534 from the density K₀(|y|)/π (scipy 1.10.1: scipy.optimize.brentq(
		// lambda q: 2*scipy.integrate.quad(lambda y: scipy.special.k0(y)/numpy.pi, 0, q)[0] - 0.95, 1, 4))
		name:   "product of zero-mean normals",
		inputs: []Input{x, {Symbol: "w", Value: 0, U: 1, DoF: inf}},
		f:      func(x []float64) float64 { return x[0] * x[1] },
		mean:   0, u: 1,
		low:  [2]float64{-mcProductQ, 0.03},
		high: [2]float64{mcProductQ, 0.03},
	}}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b, err := Propagate(tt.inputs, nil, tt.f, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			mc, err := MonteCarlo(tt.inputs, nil, tt.f, 1_000_000, mcSeed, 0)
			if err != nil {
				t.Fatal(err)
			}
			if ok, dLow, dHigh, delta := ValidateGUM(b, mc); ok {
				t.Errorf("GUM validated for a strongly non-linear model: d_low = %g, d_high = %g, δ = %g (u_c = %g)", dLow, dHigh, delta, b.U)
			}
			// 5 standard errors: u/√M for the mean, and for u √((μ₄ − σ⁴)/M)/(2σ)
			// (≤ 0.003 for both models, μ₄ = 60 for χ²₁, 9 for x1·x2)
			if math.Abs(mc.Mean-tt.mean) > 0.01 || math.Abs(mc.U-tt.u) > 0.015 {
				t.Errorf("y = %.5g, u = %.5g; want %g, %.5g", mc.Mean, mc.U, tt.mean, tt.u)
			}
			if math.Abs(mc.Low-tt.low[0]) > tt.low[1] || math.Abs(mc.High-tt.high[0]) > tt.high[1] {
				t.Errorf("interval [%.5g, %.5g], want [%.5g, %.5g]", mc.Low, mc.High, tt.low[0], tt.high[0])
			}
		})
	}
}

// mcProductQ is the 97.5 % point of the product of two standard normals; see
// TestMonteCarloNonlinear for its computation with scipy.
const mcProductQ = 2.1819489839664534

func TestMonteCarloShortestInterval(t *testing.T) {
	// y = x², x ~ N(0, 1): the density of χ²₁ decreases, so the shortest 95 %
	// interval is [0, χ²₀.₉₅] = [0, 3.841458820694124] (scipy 1.10.1:
	// scipy.stats.chi2.ppf(0.95, 1)); tolerance 5 standard errors of the
	// order statistic √(0.95·0.05/M)/pdf(3.84) ≈ 0.0073.
	in := []Input{{Symbol: "x", Value: 0, U: 1, DoF: inf}}
	mc, err := MonteCarlo(in, nil, func(x []float64) float64 { return x[0] * x[0] }, 1_000_000, mcSeed, 0)
	if err != nil {
		t.Fatal(err)
	}
	if mc.ShortestLow < 0 || mc.ShortestLow > 1e-4 || math.Abs(mc.ShortestHigh-3.841458820694124) > 0.04 {
		t.Errorf("shortest interval [%.5g, %.5g], want [0, 3.8415]", mc.ShortestLow, mc.ShortestHigh)
	}
	// analytic: for a symmetric unimodal distribution the shortest interval
	// is the symmetric one, of width 2·1.959964·u (scipy 1.10.1:
	// scipy.stats.norm.ppf(0.975)). Its position is poorly determined (the
	// width is flat about the optimum), so only the widths are compared.
	in[0].Value = 5
	mc, err = MonteCarlo(in, nil, func(x []float64) float64 { return x[0] }, 1_000_000, mcSeed, 0)
	if err != nil {
		t.Fatal(err)
	}
	short, sym := mc.ShortestHigh-mc.ShortestLow, mc.High-mc.Low
	if short > sym || math.Abs(short-2*1.959963984540054) > 0.01 {
		t.Errorf("normal: shortest width %.5g, symmetric %.5g, want both 3.9199", short, sym)
	}
}

func TestMonteCarloDistributions(t *testing.T) {
	const mu, u = 3.0, 0.5
	tests := []struct {
		name string
		in   Input
		half float64 // analytic half-width of the 95 % symmetric interval over u
	}{
		// scipy 1.10.1: scipy.stats.norm.ppf(0.975)
		{name: "normal", in: Input{DoF: inf, Dist: Normal}, half: 1.959963984540054},
		// analytic: a = √3·u, the central 95 % is ±0.95a
		{name: "rectangular", in: Input{DoF: inf, Dist: Rectangular}, half: 0.95 * math.Sqrt(3)},
		// analytic: a = √6·u, F(x) = 1 − (a − x)²/(2a²) = 0.975 at x = a(1 − √0.05)
		{name: "triangular", in: Input{DoF: inf, Dist: Triangular}, half: math.Sqrt(6) * (1 - math.Sqrt(0.05))},
		// scipy 1.10.1: scipy.stats.t.ppf(0.975, 5) = 2.5705818366147395, times the
		// scale s/u = √((ν − 2)/ν) = √0.6
		{name: "student t", in: Input{DoF: 5, Dist: StudentT}, half: 2.5705818366147395 * math.Sqrt(0.6)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			in := tt.in
			in.Symbol, in.Value, in.U = "x", mu, u
			mc, err := MonteCarlo([]Input{in}, nil, func(x []float64) float64 { return x[0] }, 1_000_000, mcSeed, 0)
			if err != nil {
				t.Fatal(err)
			}
			// standard deviation u within 1 % (the t₅ has μ₄ = 9σ⁴, so s/σ has a
			// relative standard error √(8/M)/2 = 0.14 %; the others less)
			if math.Abs(mc.Mean-mu) > 0.005 || math.Abs(mc.U/u-1) > 0.01 {
				t.Errorf("y = %.5g, u = %.5g; want %g, %g", mc.Mean, mc.U, mu, u)
			}
			// interval end points within 0.015·u (≥ 5 standard errors of the order statistic)
			if math.Abs(mc.High-mu-tt.half*u) > 0.015*u || math.Abs(mu-mc.Low-tt.half*u) > 0.015*u {
				t.Errorf("interval [%.5g, %.5g], want %g ± %.5g", mc.Low, mc.High, mu, tt.half*u)
			}
		})
	}
}

func TestMonteCarloCorrelated(t *testing.T) {
	a := Input{Symbol: "a", Value: 2, U: 0.3, DoF: inf}
	b := Input{Symbol: "b", Value: 5, U: 0.4, DoF: inf}
	sum := func(x []float64) float64 { return x[0] + x[1] }
	tests := []struct {
		name   string
		inputs []Input
		r      float64
		u      float64 // GUM 5.2.2 eq. (16), exact for a linear model
		tol    float64
	}{
		{name: "r=0.5", inputs: []Input{a, b}, r: 0.5, u: math.Sqrt(0.37), tol: 0.005},
		{name: "r=-0.8", inputs: []Input{a, b}, r: -0.8, u: math.Sqrt(0.25 - 2*0.8*0.12), tol: 0.005},
		// analytic: equal u and r = −1 cancel exactly; needs the semi-definite Cholesky
		{name: "r=-1", inputs: []Input{a, {Symbol: "b", Value: 5, U: 0.3, DoF: inf}}, r: -1, u: 0, tol: 1e-12},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			corr := [][]float64{{1, tt.r}, {tt.r, 1}}
			mc, err := MonteCarlo(tt.inputs, corr, sum, 1_000_000, mcSeed, 0)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(mc.U-tt.u) > tt.tol || math.Abs(mc.Mean-7) > 0.005 {
				t.Errorf("y = %.5g, u = %.5g, want 7, %.5g", mc.Mean, mc.U, tt.u)
			}
		})
	}
	// A correlated input among independent ones keeps its own distribution
	// and the others theirs: y = a + b + c with r(a, c) = 0.5, b rectangular.
	// analytic: u² = 0.09 + 0.16 + 0.04 + 2·0.5·0.3·0.2 = 0.35
	c := Input{Symbol: "c", Value: 1, U: 0.2, DoF: inf}
	rect := b
	rect.Dist = Rectangular
	corr := [][]float64{{1, 0, 0.5}, {0, 1, 0}, {0.5, 0, 1}}
	mc, err := MonteCarlo([]Input{a, rect, c}, corr, func(x []float64) float64 { return x[0] + x[1] + x[2] }, 1_000_000, mcSeed, 0)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(mc.U-math.Sqrt(0.35)) > 0.005 {
		t.Errorf("u = %.5g, want √0.35 = %.5g", mc.U, math.Sqrt(0.35))
	}
}

func TestMonteCarloReproducible(t *testing.T) {
	_, inputs, _ := budgetLoad(t, "enthalpy_independent.json")
	inputs[2].Dist, inputs[2].DoF = StudentT, 14 // draws a varying number of numbers per trial
	const trials = 123_457                       // not a whole number of blocks
	first, err := MonteCarlo(inputs, nil, budgetEnthalpy, trials, mcSeed, 1)
	if err != nil {
		t.Fatal(err)
	}
	// Reproducibility is bit-for-bit: the same stream of trials whatever the
	// number of goroutines, so the floats are compared exactly on purpose.
	same := func(a, b *MonteCarloResult) bool {
		return a.Trials == b.Trials && math.Float64bits(a.Mean) == math.Float64bits(b.Mean) &&
			math.Float64bits(a.U) == math.Float64bits(b.U) && math.Float64bits(a.Low) == math.Float64bits(b.Low) &&
			math.Float64bits(a.High) == math.Float64bits(b.High) && math.Float64bits(a.ShortestLow) == math.Float64bits(b.ShortestLow) &&
			math.Float64bits(a.ShortestHigh) == math.Float64bits(b.ShortestHigh)
	}
	for _, workers := range []int{1, 2, 3, 8, 0} {
		again, err := MonteCarlo(inputs, nil, budgetEnthalpy, trials, mcSeed, workers)
		if err != nil {
			t.Fatal(err)
		}
		if !same(first, again) {
			t.Errorf("%d workers: %+v, 1 worker: %+v", workers, again, first)
		}
	}
	other, err := MonteCarlo(inputs, nil, budgetEnthalpy, trials, mcSeed+1, 2)
	if err != nil {
		t.Fatal(err)
	}
	if same(first, other) || other.Seed != mcSeed+1 {
		t.Errorf("seeds %d and %d gave the same result", mcSeed, mcSeed+1)
	}
}

func TestMonteCarloAdaptive(t *testing.T) {
	// Normal inputs, linear model y = a + 2b: u = √(0.3² + 4·0.4²) = √0.73 (analytic).
	inputs := []Input{{Symbol: "a", Value: 1, U: 0.3, DoF: inf}, {Symbol: "b", Value: 2, U: 0.4, DoF: inf}}
	f := func(x []float64) float64 { return x[0] + 2*x[1] }
	r, err := MonteCarloAdaptive(inputs, nil, f, mcSeed, 0)
	if err != nil {
		t.Fatal(err)
	}
	if !r.Adaptive || r.Batches < 2 || r.Trials != r.Batches*10_000 {
		t.Fatalf("adaptive result %+v: want h ≥ 2 batches of 10⁴ trials", r)
	}

	// Recompute the stopping rule of JCGM 101:2008 7.9.4 from the same stream
	// of trials, with plain loops: at h = Batches every 2s is within δ, and
	// at h = Batches − 1 (when ≥ 2) one of them is not.
	p, err := mcNewPlan(inputs, nil, f)
	if err != nil {
		t.Fatal(err)
	}
	y := make([]float64, r.Trials)
	if err := p.run(y, mcSeed, 0, 2); err != nil {
		t.Fatal(err)
	}
	// sum of squared deviations from the mean, in one plain loop each
	meanSS := func(v []float64) (m, ss float64) {
		for _, a := range v {
			m += a
		}
		m /= float64(len(v))
		for _, a := range v {
			ss += (a - m) * (a - m)
		}
		return m, ss
	}
	spread := func(h int) (twoS, delta float64) {
		var stats [4][]float64
		for k := range h {
			batch := slices.Clone(y[k*10_000 : (k+1)*10_000])
			m, ss := meanSS(batch)
			slices.Sort(batch)
			// JCGM 101 7.7.2: q = 9500, r = 250 (1-based)
			for i, a := range []float64{m, math.Sqrt(ss / 9999), batch[249], batch[249+9500]} {
				stats[i] = append(stats[i], a)
			}
		}
		for _, s := range stats {
			_, ss := meanSS(s)
			twoS = math.Max(twoS, 2*math.Sqrt(ss/float64(h*(h-1))))
		}
		_, ss := meanSS(y[:h*10_000])
		return twoS, budgetTolerance(math.Sqrt(ss / float64(h*10_000-1)))
	}
	twoS, delta := spread(r.Batches)
	if twoS > delta || !budgetClose(twoS, r.Spread, 1e-9) || !budgetClose(delta, r.Tolerance, 1e-12) {
		t.Errorf("at the stop 2s = %g, δ = %g; the procedure reports %g, %g", twoS, delta, r.Spread, r.Tolerance)
	}
	if r.Batches > 2 {
		if twoS, delta := spread(r.Batches - 1); twoS <= delta {
			t.Errorf("stable already at h = %d (2s = %g ≤ δ = %g) but ran %d batches", r.Batches-1, twoS, delta, r.Batches)
		}
	}
	// The tolerance is met: y and u agree with the analytic values within δ.
	if math.Abs(r.Mean-5) > r.Tolerance || math.Abs(r.U-math.Sqrt(0.73)) > r.Tolerance {
		t.Errorf("y = %.5g, u = %.5g; want 5, %.5g within δ = %g", r.Mean, r.U, math.Sqrt(0.73), r.Tolerance)
	}
	// The batches are the stream MonteCarlo draws: same seed and M, same result.
	fixed, err := MonteCarlo(inputs, nil, f, r.Trials, mcSeed, 1)
	if err != nil {
		t.Fatal(err)
	}
	if fixed.Mean != r.Mean || fixed.U != r.U || fixed.Low != r.Low || fixed.High != r.High {
		t.Errorf("adaptive %+v, fixed M %+v", r, fixed)
	}
}

func TestMonteCarloAdaptiveCap(t *testing.T) {
	// A Cauchy output (ratio of zero-mean normals) has no finite variance,
	// so u of the batches never settles (analytic); with a cap of 10⁵ trials
	// the procedure gives up after 10 batches and returns what it has.
	inputs := []Input{{Symbol: "a", Value: 0, U: 1, DoF: inf}, {Symbol: "b", Value: 0, U: 1, DoF: inf}}
	p, err := mcNewPlan(inputs, nil, func(x []float64) float64 { return x[0] / x[1] })
	if err != nil {
		t.Fatal(err)
	}
	r, err := p.adaptive(mcSeed, 0, 100_000)
	if !errors.Is(err, ErrNotStabilised) || r == nil || r.Trials != 100_000 || r.Spread <= r.Tolerance {
		t.Fatalf("err = %v, result %+v; want ErrNotStabilised after 10⁵ trials", err, r)
	}
}

func TestMonteCarloErrors(t *testing.T) {
	good := []Input{{Symbol: "a", Value: 1, U: 0.1, DoF: inf}, {Symbol: "b", Value: 2, U: 0.1, DoF: inf, Dist: Rectangular}}
	sum := func(x []float64) float64 { return x[0] + x[1] }
	tests := []struct {
		name    string
		inputs  []Input
		corr    [][]float64
		f       Model
		trials  int
		workers int
		want    string
	}{
		{name: "few trials", inputs: good, f: sum, trials: 1999, want: "1999 trials are outside 2000 to 10000000"},
		{name: "many trials", inputs: good, f: sum, trials: 20_000_000, want: "outside"},
		{name: "workers", inputs: good, f: sum, trials: 10_000, workers: -1, want: "-1 workers"},
		{name: "bad input", inputs: []Input{{Symbol: "a", Value: 1, U: -1, DoF: inf}}, f: sum, trials: 10_000, want: "input a: standard uncertainty"},
		{name: "correlated rectangular", inputs: good, corr: [][]float64{{1, 0.2}, {0.2, 1}}, f: sum, trials: 10_000, want: "input b is correlated but rectangular"},
		{name: "t with 2 dof", inputs: []Input{{Symbol: "a", Value: 1, U: 0.1, DoF: 2, Dist: StudentT}}, f: sum, trials: 10_000, want: "above 2, not 2"},
		{name: "t with infinite dof", inputs: []Input{{Symbol: "a", Value: 1, U: 0.1, DoF: inf, Dist: StudentT}}, f: sum, trials: 10_000, want: "not +Inf"},
		{
			// analytic: a ~ N(1, 0.1²) falls below 0.8 in 2.3 % of the trials
			name: "model not finite", inputs: good, trials: 10_000, want: "model value is not finite at trial",
			f: func(x []float64) float64 { return math.Sqrt(x[0] - 0.8) },
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := MonteCarlo(tt.inputs, tt.corr, tt.f, tt.trials, mcSeed, tt.workers)
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Errorf("error %v, want one containing %q", err, tt.want)
			}
		})
	}
}

func TestValidateGUM(t *testing.T) {
	// hand calculation: y ± U = 10 ± 0.196 (u_c = 0.1, δ = 0.005) against
	// Monte Carlo intervals [9.806, 10.193] and [9.790, 10.196]
	b := &Budget{Value: 10, U: 0.1, K: 1.96, Expanded: 0.196, Coverage: 0.95}
	tests := []struct {
		name      string
		low, high float64
		coverage  float64
		ok        bool
		dLow      float64
		dHigh     float64
	}{
		{name: "inside", low: 9.806, high: 10.193, coverage: 0.95, ok: true, dLow: 0.002, dHigh: 0.003},
		{name: "low end off", low: 9.790, high: 10.196, coverage: 0.95, ok: false, dLow: 0.014, dHigh: 0},
		{name: "other coverage", low: 9.806, high: 10.193, coverage: 0.99, ok: false, dLow: 0.002, dHigh: 0.003},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			mc := &MonteCarloResult{Low: tt.low, High: tt.high, Coverage: tt.coverage}
			ok, dLow, dHigh, delta := ValidateGUM(b, mc)
			if ok != tt.ok || !budgetClose(dLow, tt.dLow, 1e-12) || !budgetClose(dHigh, tt.dHigh, 1e-12) || !budgetClose(delta, 0.005, 1e-15) {
				t.Errorf("ValidateGUM = %v, %g, %g, %g; want %v, %g, %g, 0.005", ok, dLow, dHigh, delta, tt.ok, tt.dLow, tt.dHigh)
			}
			if mc.GUMValidated != ok || mc.Delta != delta {
				t.Errorf("result not updated: %+v", mc)
			}
		})
	}
	if ok, _, _, _ := ValidateGUM(nil, &MonteCarloResult{}); ok {
		t.Error("nil budget validated")
	}
}

func TestMonteCarloAllocations(t *testing.T) {
	// "Allocate nothing per trial": ten times the trials, same allocations.
	_, inputs, _ := budgetLoad(t, "enthalpy_independent.json")
	count := func(trials int) float64 {
		return testing.AllocsPerRun(3, func() {
			if _, err := MonteCarlo(inputs, nil, budgetEnthalpy, trials, mcSeed, 2); err != nil {
				t.Fatal(err)
			}
		})
	}
	few, many := count(20_000), count(200_000)
	if many > few+2 { // the per-block flags are one slice either way
		t.Errorf("%g allocations for 2·10⁵ trials, %g for 2·10⁴", many, few)
	}
}

// BenchmarkMonteCarlo1e6 draws 10⁶ trials of the 10-input molar-enthalpy
// chain. Target: well under 1 s per op on 2 cores.
func BenchmarkMonteCarlo1e6(b *testing.B) {
	_, inputs, _ := budgetLoad(b, "enthalpy_independent.json")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := MonteCarlo(inputs, nil, budgetEnthalpy, 1_000_000, mcSeed, 2); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkMonteCarlo1e6Correlated is BenchmarkMonteCarlo1e6 with the
// correlated fixture (normal inputs drawn through the Cholesky factor).
// Target: well under 1 s per op on 2 cores.
func BenchmarkMonteCarlo1e6Correlated(b *testing.B) {
	_, inputs, corr := budgetLoad(b, "enthalpy_correlated.json")
	for _, i := range []int{0, 2, 4, 8} {
		inputs[i].Dist = Normal
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := MonteCarlo(inputs, corr, budgetEnthalpy, 1_000_000, mcSeed, 2); err != nil {
			b.Fatal(err)
		}
	}
}

// Monte Carlo propagation of an electrical calibration, C = P·t_h/ΔT, and
// the check of the GUM result against it (JCGM 101:2008 8.2).
func ExampleMonteCarlo() {
	inputs := []Input{
		{Name: "heater power", Symbol: "P", Unit: "W", Value: 1.0002, U: 0.0008, DoF: math.Inf(1)},
		{Name: "heating time", Symbol: "t_h", Unit: "s", Value: 300.0, U: 0.05, DoF: math.Inf(1), Dist: Rectangular},
		{Name: "corrected temperature rise", Symbol: "ΔT", Unit: "K", Value: 0.6655, U: 0.0018, DoF: math.Inf(1)},
	}
	heatCapacity := func(x []float64) float64 { return x[0] * x[1] / x[2] }
	b, err := Propagate(inputs, nil, heatCapacity, 0.95)
	if err != nil {
		fmt.Println(err)
		return
	}
	mc, err := MonteCarlo(inputs, nil, heatCapacity, 1_000_000, 42, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	ok, dLow, dHigh, delta := ValidateGUM(b, mc)
	fmt.Printf("GUM:         C = %.2f J/K, u_c = %.2f J/K, interval [%.2f, %.2f] J/K\n", b.Value, b.U, b.Value-b.Expanded, b.Value+b.Expanded)
	fmt.Printf("Monte Carlo: C = %.2f J/K, u   = %.2f J/K, interval [%.2f, %.2f] J/K\n", mc.Mean, mc.U, mc.Low, mc.High)
	fmt.Printf("d_low = %.2f J/K, d_high = %.2f J/K, δ = %.2f J/K: validated %v\n", dLow, dHigh, delta, ok)
	// The GUM line is ExampleWriteBudgetTable's chain with ν = ∞ (k =
	// 1.96). An independent Monte Carlo with numpy 1.24.2 (another
	// generator, 4·10⁶ trials):
	//   /usr/bin/python3 -c 'import numpy as np; r=np.random.default_rng(1); M=4_000_000
	//   P=r.normal(1.0002,0.0008,M); t=r.uniform(300-0.05*3**.5,300+0.05*3**.5,M)
	//   d=r.normal(0.6655,0.0018,M); C=P*t/d
	//   print(C.mean(), C.std(ddof=1), np.quantile(C,[0.025,0.975]))'
	// → 450.882, 1.2739, [448.394, 453.388] J/K: d_low, d_high ≈ 0.012 J/K
	// < δ = 0.05 J/K, validated too. The end points of a 10⁶-trial run
	// scatter by about 0.004 J/K (√(p(1−p)/M)/pdf), so those printed here
	// agree with numpy's to within 0.01 J/K.

	// Output:
	// GUM:         C = 450.88 J/K, u_c = 1.27 J/K, interval [448.38, 453.38] J/K
	// Monte Carlo: C = 450.88 J/K, u   = 1.27 J/K, interval [448.40, 453.40] J/K
	// d_low = 0.02 J/K, d_high = 0.02 J/K, δ = 0.05 J/K: validated true
}
