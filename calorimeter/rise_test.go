package calorimeter

import (
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// The two regimes of DOMAIN §1, as simulated runs (the figures are the
// issue's: precision isoperibol — rise 0.4 K, noise 0.15 mK, G ≈ 5e-4 1/s;
// coffee cup — rise 3 K, noise 0.015 K, 0.01 K steps, 6 s lag, G ≈ 2e-4 1/s).
func precisionRun(seed uint64) Simulation {
	return Simulation{Duration: 1500, Interval: 2, MixTime: 300, StartTemperature: 298.0,
		ConvergenceTemperature: 298.3, CoolingConstant: 5e-4, HeatCapacity: 400, Heat: 160,
		ReleaseRate: 1.0 / 30, ProbeLag: 1.5, Noise: 0.15e-3, Seed: seed}
}

func cupRun(seed uint64) Simulation {
	return Simulation{Duration: 1200, Interval: 5, MixTime: 300, StartTemperature: 295.0,
		ConvergenceTemperature: 295.5, CoolingConstant: 2e-4, HeatCapacity: 450, Heat: 1350,
		ReleaseRate: 1.0 / 20, ProbeLag: 6, Noise: 0.015, Quantum: 0.01, Seed: seed}
}

// TestRecovery checks every method in both regimes with automatic
// periods: Regnault–Pfaundler and the model within 0.1 % (precision) and
// 1 % (coffee cup) of Q/ε, as the issue asks; Dickinson and extrapolation,
// whose constructions are biased (DOMAIN §2 bias table), within three of
// their own standard uncertainties, which include those biases.
func TestRecovery(t *testing.T) {
	tests := []struct {
		name  string
		sim   func(uint64) Simulation
		exact float64 // relative tolerance for regnault-pfaundler and model
	}{
		{"precision", precisionRun, 1e-3},
		{"coffee cup", cupRun, 1e-2},
	}
	for _, tc := range tests {
		for seed := uint64(1); seed <= 5; seed++ {
			t.Run(fmt.Sprintf("%s/%d", tc.name, seed), func(t *testing.T) {
				tt, th, truth := tc.sim(seed).Run()
				r, err := AnalyseRise(tt, th, RiseOptions{})
				if err != nil {
					t.Fatal(err)
				}
				for _, m := range methodNames {
					v, ok := r.Methods[m]
					if !ok {
						t.Fatalf("method %s missing (checks %v)", m, r.Checks)
					}
					rel := (v - truth) / truth
					switch m {
					case MethodRegnaultPfaundler, MethodModel:
						if math.Abs(rel) > tc.exact {
							t.Errorf("%s %.6f K, truth %.6f K: %.3g %% off", m, v, truth, 100*rel)
						}
					default:
						if math.Abs(v-truth) > 3*r.MethodU[m] {
							t.Errorf("%s %.6f K, truth %.6f K: off by %.3g K, more than 3u = %.3g K", m, v, truth, v-truth, 3*r.MethodU[m])
						}
					}
				}
				if r.Method != MethodRegnaultPfaundler {
					t.Errorf("auto chose %s (%s), want regnault-pfaundler for a long linear after period", r.Method, r.MethodReason)
				}
				if w := Worst(r.Checks); w == Fail {
					t.Errorf("a clean run fails a check: %v", r.Checks)
				}
			})
		}
	}
}

// TestUnseenRuns draws runs the code was not tuned on — seeds, mixing
// times, cooling constants, release rates, probe lags and sampling from a
// seeded generator, exothermic and endothermic, first-order and heater —
// and checks the automatic reduction: mixing time within 10 s, ΔT within
// 0.4 % (precision) or 3 % (coffee cup) of Q/ε and within 3u, and the three
// named methods side by side. The 10 s, 0.4 % and 3 % are our acceptance
// limits (wider than TestRecovery's because the draws reach slower
// releases and longer lags); the 3u bound asks u to be honest (a normal
// error exceeds 3u with probability 0.27 %, analytic); the truth Q/ε is
// known exactly from the simulation.
func TestUnseenRuns(t *testing.T) {
	rng := rand.New(rand.NewPCG(20260101, 77))
	uni := func(a, b float64) float64 { return a + (b-a)*rng.Float64() }
	type run struct {
		sim Simulation
		tol float64
	}
	var runs []run
	for i := 0; i < 16; i++ {
		sign := 1.0
		if i%3 == 2 {
			sign = -1
		}
		mix := uni(180, 420)
		if i%2 == 0 { // precision
			s := Simulation{Interval: uni(1, 3), MixTime: mix, StartTemperature: 298 + uni(-0.3, 0.1),
				ConvergenceTemperature: 298.2, CoolingConstant: uni(2e-4, 1e-3), HeatCapacity: 400,
				Heat: sign * uni(80, 240), ReleaseRate: 1 / uni(10, 50), ProbeLag: uni(0.5, 3),
				Noise: uni(0.1e-3, 0.3e-3), Seed: rng.Uint64()}
			if i%4 == 0 {
				s.HeaterTime, s.ReleaseRate = uni(100, 300), 0
			}
			s.Duration = mix + 1300
			runs = append(runs, run{s, 0.004})
		} else { // coffee cup
			s := Simulation{Interval: uni(2, 6), MixTime: mix, StartTemperature: 295 + uni(-0.5, 0.5),
				ConvergenceTemperature: 295.3, CoolingConstant: uni(1e-4, 3e-4), HeatCapacity: 450,
				Heat: sign * uni(900, 2700), ReleaseRate: 1 / uni(10, 40), ProbeLag: uni(2, 8),
				Noise: uni(0.01, 0.02), Quantum: 0.01, Seed: rng.Uint64()}
			s.Duration = mix + 900
			runs = append(runs, run{s, 0.03})
		}
	}
	for i, rn := range runs {
		s := rn.sim
		t.Run(fmt.Sprintf("%d", i), func(t *testing.T) {
			tt, th, truth := s.Run()
			r, err := AnalyseRise(tt, th, RiseOptions{})
			if err != nil {
				t.Fatalf("%+v: %v", s, err)
			}
			if math.Abs(r.MixTime-s.MixTime) > 10 {
				t.Errorf("mixing time %.1f s, true %.1f s", r.MixTime, s.MixTime)
			}
			rel := (r.DeltaT - truth) / truth
			if math.Abs(rel) > rn.tol {
				t.Errorf("%s ΔT %.5f K, truth %.5f K: %.3g %% off (limit %.3g %%)", r.Method, r.DeltaT, truth, 100*rel, 100*rn.tol)
			}
			if math.Abs(r.DeltaT-truth) > 3*r.UDeltaT {
				t.Errorf("%s ΔT %.6f K is %.3g u from the truth %.6f K (u %.3g K)", r.Method, r.DeltaT, (r.DeltaT-truth)/r.UDeltaT, truth, r.UDeltaT)
			}
			for _, m := range []string{MethodRegnaultPfaundler, MethodDickinson, MethodExtrapolation} {
				if _, ok := r.Methods[m]; !ok {
					t.Errorf("method %s missing", m)
				}
			}
		})
	}
}

// TestHonesty is the issue's test of the uncertainty: over 200 noise
// realisations of one run, z = (ΔT − Q/ε)/u(ΔT) must have a standard
// deviation in [0.8, 1.25] and |mean| < 0.25. For 200 normal values the
// sample SD has a standard error 1/√(2·199) = 0.050 and the mean 1/√200 =
// 0.071 (plus a t-factor √(ν/(ν − 2)) < 1.01 for the ν > 100 here), so the
// bounds sit 4–5 and 3.5 standard errors out: a correct u passes with
// certainty, while a u wrong by 25 % fails. The seeds are fixed, so the
// test is repeatable.
func TestHonesty(t *testing.T) {
	tests := []struct {
		name string
		sim  func(uint64) Simulation
	}{
		{"precision", precisionRun},
		{"coffee cup", cupRun},
		{"AR(1) noise", func(seed uint64) Simulation {
			s := precisionRun(seed)
			s.NoiseAR = 0.6
			return s
		}},
		{"heater", func(seed uint64) Simulation {
			s := precisionRun(seed)
			s.HeaterTime, s.ReleaseRate, s.Heat, s.Duration = 200, 0, 200, 1800
			return s
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			z := map[string][]float64{}
			for seed := uint64(0); seed < 200; seed++ {
				tt, th, truth := tc.sim(10000 + seed).Run()
				r, err := AnalyseRise(tt, th, RiseOptions{})
				if err != nil {
					t.Fatal(err)
				}
				z["reported"] = append(z["reported"], (r.DeltaT-truth)/r.UDeltaT)
				for _, m := range []string{MethodRegnaultPfaundler, MethodModel} {
					if v, ok := r.Methods[m]; ok {
						z[m] = append(z[m], (v-truth)/r.MethodU[m])
					}
				}
			}
			for _, name := range []string{"reported", MethodRegnaultPfaundler, MethodModel} {
				v := z[name]
				if len(v) < 190 {
					t.Errorf("%s: only %d of 200 runs", name, len(v))
					continue
				}
				var m, q float64
				for _, x := range v {
					m += x
				}
				m /= float64(len(v))
				for _, x := range v {
					q += (x - m) * (x - m)
				}
				sd := math.Sqrt(q / float64(len(v)-1))
				t.Logf("%s: z mean %.3f, SD %.3f over %d runs", name, m, sd, len(v))
				if sd < 0.8 || sd > 1.25 || math.Abs(m) > 0.25 {
					t.Errorf("%s: z mean %.3f, SD %.3f; want |mean| < 0.25 and SD in [0.8, 1.25]", name, m, sd)
				}
			}
		})
	}
}

// TestDegreesOfFreedom checks the Welch–Satterthwaite formula (JCGM
// 100:2008 G.4.1, eq. (G.2b)) on our own hand example: u1 = 3 (ν 10),
// u2 = 4 (ν 20), u3 = 12 (type B, ν = ∞): u = √(9 + 16 + 144) = 13,
// ν_eff = 13⁴/(3⁴/10 + 4⁴/20) = 28561/20.9 = 1366.6 (analytic).
func TestDegreesOfFreedom(t *testing.T) {
	u, nu := riseCombine([]RiseUncertainty{{"a", 3, 10}, {"b", 4, 20}, {"c", 12, math.Inf(1)}})
	if math.Abs(u-13) > 1e-12 || math.Abs(nu-28561/(8.1+12.8)) > 1e-9 {
		t.Errorf("u = %g, ν = %g; want 13 and %g", u, nu, 28561/(8.1+12.8))
	}
	if _, nu := riseCombine([]RiseUncertainty{{"b", 1, math.Inf(1)}}); !math.IsInf(nu, 1) {
		t.Errorf("type B only: ν = %g, want +Inf", nu)
	}
}

// TestPeriodOverrides checks that given periods and mixing time are used
// and recorded, and that the probe terms enter only with UTemperature.
func TestPeriodOverrides(t *testing.T) {
	tt, th, truth := cupRun(3).Run()
	pre, post := Period{30, 290}, Period{700, 1150}
	r, err := AnalyseRise(tt, th, RiseOptions{MixTime: 301, Pre: &pre, Post: &post, UTemperature: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if r.MixDetected || r.MixTime != 301 || r.MixTimeU != 0 {
		t.Errorf("mixing time %g ± %g s (detected %v), want 301 s as given", r.MixTime, r.MixTimeU, r.MixDetected)
	}
	if r.Periods.Pre != pre || r.Periods.Post != post || r.Periods.Main != (Period{290, 700}) {
		t.Errorf("periods %+v, want pre %v, main [290, 700], post %v", r.Periods, pre, post)
	}
	if r.PreDrift.Start < 30 || r.PreDrift.End > 290 || r.PostDrift.Start < 700 || r.PostDrift.End > 1150 {
		t.Errorf("drift fits outside the given periods: %+v %+v", r.PreDrift, r.PostDrift)
	}
	var probe float64
	for _, p := range r.UParts {
		if p.Name == "probe-calibration" {
			probe = p.U
		}
	}
	// ProbeCorrelation 0: ΔT = T_f − T_i with independent u_T on each,
	// so √2·u_T (analytic, GUM eq. (10)).
	if math.Abs(probe-0.05*math.Sqrt2) > 1e-12 {
		t.Errorf("probe-calibration component %g K, want √2·0.05 K", probe)
	}
	if math.Abs(r.DeltaT-truth)/truth > 0.01 {
		t.Errorf("ΔT %g K, truth %g K", r.DeltaT, truth)
	}
	// The absolute temperatures carry u_T in full, and cov(T_i, T_f) the
	// correlated part r·u_T² (r = 0 here) plus the noise part.
	if r.UInitial < 0.05 || r.UFinal < 0.05 {
		t.Errorf("u(T_i) = %g K, u(T_f) = %g K: each must include u_T = 0.05 K", r.UInitial, r.UFinal)
	}
	if got := r.FinalTemperature - r.InitialTemperature; math.Abs(got-r.DeltaT) > 1e-12 {
		t.Errorf("T_f − T_i = %g K, ΔT = %g K", got, r.DeltaT)
	}
	// var(T_f − T_i) = u²(T_i) + u²(T_f) − 2cov must give back u(ΔT).
	vd := r.UInitial*r.UInitial + r.UFinal*r.UFinal - 2*r.CovInitialFinal
	if math.Abs(math.Sqrt(vd)-r.UDeltaT) > 1e-9 {
		t.Errorf("√(u²_i + u²_f − 2cov) = %g K, u(ΔT) = %g K", math.Sqrt(vd), r.UDeltaT)
	}
	r0, err := AnalyseRise(tt, th, RiseOptions{MixTime: 301, Pre: &pre, Post: &post})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range r0.UParts {
		if p.Name == "probe-calibration" {
			t.Errorf("probe term present without UTemperature")
		}
	}
	if r0.UDeltaT >= r.UDeltaT {
		t.Errorf("u(ΔT) %g K without the probe, %g K with it", r0.UDeltaT, r.UDeltaT)
	}
	// ProbeCorrelation 1 is a pure offset: it cancels in ΔT.
	r1, err := AnalyseRise(tt, th, RiseOptions{MixTime: 301, Pre: &pre, Post: &post, UTemperature: 0.05, ProbeCorrelation: 1})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r1.UDeltaT-r0.UDeltaT) > 1e-12 {
		t.Errorf("pure offset: u(ΔT) %g K, without probe %g K", r1.UDeltaT, r0.UDeltaT)
	}
}

// TestMethodChoice checks the auto rule: a short after period goes to the
// model, a forced method is reported as asked.
func TestMethodChoice(t *testing.T) {
	s := precisionRun(4)
	s.Duration = 560 // about 100 s of after period
	tt, th, truth := s.Run()
	r, err := AnalyseRise(tt, th, RiseOptions{MixTime: 300, Post: &Period{460, 560}})
	if err != nil {
		t.Fatal(err)
	}
	if r.Method != MethodModel {
		t.Errorf("short after period: auto chose %s (%s)", r.Method, r.MethodReason)
	}
	if !strings.Contains(r.MethodReason, "too short") {
		t.Errorf("reason %q does not say the after period is too short", r.MethodReason)
	}
	if math.Abs(r.DeltaT-truth) > 3*r.UDeltaT {
		t.Errorf("model ΔT %g K, truth %g K, u %g K", r.DeltaT, truth, r.UDeltaT)
	}
	tt, th, _ = precisionRun(4).Run()
	for _, m := range methodNames {
		r, err := AnalyseRise(tt, th, RiseOptions{Method: m})
		if err != nil {
			t.Fatal(err)
		}
		if r.Method != m || r.DeltaT != r.Methods[m] || r.UDeltaT != r.MethodU[m] {
			t.Errorf("forced %s: reported %s %g ± %g", m, r.Method, r.DeltaT, r.UDeltaT)
		}
	}
}

func TestAnalyseRiseErrors(t *testing.T) {
	good, goodY, _ := cupRun(1).Run()
	flatT := make([]float64, 200)
	flatY := make([]float64, 200)
	rng := rand.New(rand.NewPCG(1, 1))
	for k := range flatT {
		flatT[k] = 5 * float64(k)
		flatY[k] = 295 + 0.01*rng.NormFloat64()
	}
	// with returns a copy of v with v[k] = x.
	with := func(v []float64, k int, x float64) []float64 {
		c := append([]float64(nil), v...)
		c[k] = x
		return c
	}
	tests := []struct {
		name   string
		t, y   []float64
		opt    RiseOptions
		is     error
		substr string
	}{
		{"too few", good[:8], goodY[:8], RiseOptions{}, ErrRiseInput, "8 readings, need at least 10"},
		{"lengths", good, goodY[:100], RiseOptions{}, ErrRiseInput, "times but"},
		{"time goes back", with(good, 50, good[49]), goodY, RiseOptions{}, ErrRiseInput, "time does not increase at reading 50"},
		{"NaN temperature", good, with(goodY, 7, math.NaN()), RiseOptions{}, ErrRiseInput, "temperature of reading 7 is NaN"},
		{"Celsius", good, with(goodY, 3, -5), RiseOptions{}, ErrRiseInput, "give kelvin"},
		{"no process", flatT, flatY, RiseOptions{}, ErrNoProcess, "hint: give the mixing time"},
		{"mixing time outside", good, goodY, RiseOptions{MixTime: 5000}, ErrRiseInput, "outside the log"},
		{"unknown method", good, goodY, RiseOptions{Method: "bomb"}, ErrRiseInput, "unknown method"},
		{"reversed period", good, goodY, RiseOptions{Pre: &Period{200, 100}}, ErrRiseInput, "start < end"},
		{"fore after post", good, goodY, RiseOptions{Pre: &Period{0, 800}, Post: &Period{700, 1200}}, ErrRiseInput, "not before"},
		{"negative u_T", good, goodY, RiseOptions{UTemperature: -1}, ErrRiseInput, "probe calibration"},
		{"fore too short", good, goodY, RiseOptions{MixTime: 8}, ErrTooFewReadings, "fore period"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := AnalyseRise(tc.t, tc.y, tc.opt)
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, tc.is) {
				t.Errorf("error %q is not %v", err, tc.is)
			}
			if !strings.Contains(err.Error(), tc.substr) {
				t.Errorf("error %q does not contain %q", err, tc.substr)
			}
		})
	}
}

// TestRiseJSON checks the contract's keys (CONTRACT.md, reduce --json) and
// that non-finite numbers become null.
func TestRiseJSON(t *testing.T) {
	tt, th, _ := cupRun(2).Run()
	r, err := AnalyseRise(tt, th, RiseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(*r) // the value marshals as the pointer does
	if err != nil {
		t.Fatal(err)
	}
	if bp, err := json.Marshal(r); err != nil || string(bp) != string(b) {
		t.Errorf("pointer and value JSON differ (%v)", err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"mix_time_s", "periods", "drift", "method", "delta_t_k", "u_delta_t_k", "methods", "checks", "status"} {
		if _, ok := m[k]; !ok {
			t.Errorf("key %q missing", k)
		}
	}
	per := m["periods"].(map[string]any)
	if p, ok := per["pre"].([]any); !ok || len(p) != 2 {
		t.Errorf("periods.pre = %v, want [start, end]", per["pre"])
	}
	pre := m["drift"].(map[string]any)["pre"].(map[string]any)
	for _, k := range []string{"slope_k_per_s", "intercept_k", "mean_temperature_k", "residual_sd_k", "n"} {
		if _, ok := pre[k]; !ok {
			t.Errorf("drift.pre.%s missing", k)
		}
	}
	var p Period
	if err := json.Unmarshal([]byte("[1.5, 300]"), &p); err != nil || p != (Period{1.5, 300}) {
		t.Errorf("Period from [1.5, 300]: %v, %v", p, err)
	}
	if err := json.Unmarshal([]byte("[1]"), &p); err == nil {
		t.Error("Period from [1]: no error")
	}
	u, err := json.Marshal(RiseUncertainty{"resolution", 0.001, math.Inf(1)})
	if err != nil || !strings.Contains(string(u), `"dof":null`) {
		t.Errorf("infinite dof: %s, %v", u, err)
	}
}

// ExampleAnalyseRise reduces a simulated coffee-cup run: 1350 J into a cup
// of 450 J/K, so Q/ε = 3 K (analytic). That is the independent basis of the
// output: every method lies within 2u of it (Dickinson's equal-area
// construction runs low on a first-order release, DOMAIN §2), and the
// detected mixing time within 10 s of the simulated 300 s.
func ExampleAnalyseRise() {
	sim := Simulation{Duration: 1200, Interval: 5, MixTime: 300, StartTemperature: 295.0,
		ConvergenceTemperature: 295.5, CoolingConstant: 2e-4, HeatCapacity: 450, Heat: 1350,
		ReleaseRate: 1.0 / 20, ProbeLag: 6, Noise: 0.015, Quantum: 0.01, Seed: 42}
	t, theta, truth := sim.Run()
	r, err := AnalyseRise(t, theta, RiseOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("truth %.3f K\n", truth)
	fmt.Printf("mixing time %.0f s, main period %.0f–%.0f s\n", r.MixTime, r.Periods.Main.Start, r.Periods.Main.End)
	fmt.Printf("%s: ΔT = %.3f K, u = %.3f K\n", r.Method, r.DeltaT, r.UDeltaT)
	for _, m := range []string{MethodRegnaultPfaundler, MethodDickinson, MethodExtrapolation, MethodModel} {
		fmt.Printf("  %-18s %.2f K\n", m, r.Methods[m])
	}
	fmt.Println("status:", Worst(r.Checks))
	// Output:
	// truth 3.000 K
	// mixing time 303 s, main period 300–550 s
	// regnault-pfaundler: ΔT = 2.999 K, u = 0.006 K
	//   regnault-pfaundler 3.00 K
	//   dickinson          2.99 K
	//   extrapolation      3.00 K
	//   model              3.00 K
	// status: pass
}

// BenchmarkAnalyseRise reduces a log of 10⁶ readings (a precision run read
// every 1.5 ms). Target: under 1 s per run on one core (the issue); the
// hot paths are O(n) and the model is fitted to at most a few thousand bins.
func BenchmarkAnalyseRise(b *testing.B) {
	s := precisionRun(5)
	s.Interval = 0.0015
	s.Noise = 0.9e-3
	tt, th, _ := s.Run()
	if len(tt) != 1000001 {
		b.Fatalf("%d readings", len(tt))
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := AnalyseRise(tt, th, RiseOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestPartialOverrides gives one of mixing time, fore or after period and
// lets the rest be detected.
func TestPartialOverrides(t *testing.T) {
	tt, th, truth := cupRun(12).Run()
	tests := []struct {
		name  string
		opt   RiseOptions
		check func(t *testing.T, r *Rise)
	}{
		{"mixing time", RiseOptions{MixTime: 298}, func(t *testing.T, r *Rise) {
			if r.MixTime != 298 || r.MixDetected || r.Periods.Main.Start > 298 {
				t.Errorf("mixing time %g (detected %v), main %v", r.MixTime, r.MixDetected, r.Periods.Main)
			}
		}},
		{"fore period", RiseOptions{Pre: &Period{50, 280}}, func(t *testing.T, r *Rise) {
			if r.Periods.Pre != (Period{50, 280}) || !r.MixDetected || math.Abs(r.MixTime-300) > 10 {
				t.Errorf("pre %v, mixing time %g (detected %v)", r.Periods.Pre, r.MixTime, r.MixDetected)
			}
		}},
		{"after period", RiseOptions{Post: &Period{650, 1100}}, func(t *testing.T, r *Rise) {
			if r.Periods.Post != (Period{650, 1100}) || r.Periods.Main.End != 650 || math.Abs(r.MixTime-300) > 10 {
				t.Errorf("post %v, main %v, mixing time %g", r.Periods.Post, r.Periods.Main, r.MixTime)
			}
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := AnalyseRise(tt, th, tc.opt)
			if err != nil {
				t.Fatal(err)
			}
			tc.check(t, r)
			if math.Abs(r.DeltaT-truth) > 3*r.UDeltaT {
				t.Errorf("ΔT %g K, truth %g K, u %g K", r.DeltaT, truth, r.UDeltaT)
			}
		})
	}
}

// TestTimeOffset: clock times far from zero give the same result (the fits
// centre time, STYLE.md).
func TestTimeOffset(t *testing.T) {
	tt, th, _ := precisionRun(13).Run()
	r0, err := AnalyseRise(tt, th, RiseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	shifted := make([]float64, len(tt))
	for k := range tt {
		shifted[k] = tt[k] + 1.7e9 // seconds since 1970
	}
	r1, err := AnalyseRise(shifted, th, RiseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// 1.7e9 s carries about 2e-7 s of rounding per time (ulp(1.7e9) =
	// 2.4e-7 s, analytic), so the methods agree to 1e-3 u and the mixing
	// time to 1e-3 s.
	for _, m := range methodNames {
		if d := r1.Methods[m] - r0.Methods[m]; math.Abs(d) > 1e-3*r0.MethodU[m] {
			t.Errorf("%s: %.9f K shifted, %.9f K at zero", m, r1.Methods[m], r0.Methods[m])
		}
	}
	if math.Abs(r1.MixTime-1.7e9-r0.MixTime) > 1e-3 || math.Abs(r1.UDeltaT-r0.UDeltaT) > 1e-3*r0.UDeltaT {
		t.Errorf("mixing time %f vs %f, u %g vs %g", r1.MixTime-1.7e9, r0.MixTime, r1.UDeltaT, r0.UDeltaT)
	}
}

// FuzzAnalyseRise feeds arbitrary logs to AnalyseRise: it may refuse them,
// but it must not panic, and what it returns must be finite where it
// reports a value.
func FuzzAnalyseRise(f *testing.F) {
	f.Add([]byte{}, 0.0)
	f.Add(make([]byte, 8*12), 0.0)
	_, th, _ := cupRun(1).Run()
	seed := make([]byte, 0, 8*len(th))
	for _, v := range th[:120] {
		seed = binary.LittleEndian.AppendUint64(seed, math.Float64bits(v))
	}
	f.Add(seed, 0.0)
	f.Add(seed, 300.0)
	f.Fuzz(func(t *testing.T, data []byte, mix float64) {
		n := len(data) / 8
		y := make([]float64, n)
		for k := range y {
			v := math.Float64frombits(binary.LittleEndian.Uint64(data[8*k:]))
			if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > 1e6 {
				v = 1
			}
			y[k] = 295 + math.Mod(v, 10)
		}
		times := make([]float64, n)
		for k := range times {
			times[k] = 5 * float64(k)
		}
		r, err := AnalyseRise(times, y, RiseOptions{MixTime: mix})
		if err != nil {
			return
		}
		if math.IsNaN(r.DeltaT) || math.IsNaN(r.UDeltaT) {
			t.Errorf("ΔT %v ± %v from %d readings", r.DeltaT, r.UDeltaT, n)
		}
	})
}
