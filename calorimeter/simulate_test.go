package calorimeter

import (
	"errors"
	"math"
	"testing"
)

// simBase is a noise-free vessel 0.3 K below its convergence temperature.
func simBase() Simulation {
	return Simulation{Duration: 1200, Interval: 2, MixTime: 301, StartTemperature: 298.0,
		ConvergenceTemperature: 298.3, CoolingConstant: 5e-4, HeatCapacity: 400, Heat: 160}
}

// TestSimulationClosedForm compares the noise-free simulator with the
// closed-form solutions of dθ/dt = G(θ∞ − θ) + P(t)/ε without probe lag
// (analytic, integrating factor e^{Gt}; A = Q/ε, s = t − t_mix):
//
//	first order:    θ = θ∞ + (θ_s − θ∞)e^{−Gt} + A·λ/(λ − G)·(e^{−Gs} − e^{−λs})
//	instantaneous:  θ = θ∞ + (θ_s − θ∞)e^{−Gt} + A·e^{−Gs}
//	heater for d:   + (A/d)(1 − e^{−Gs})/G while heating, (A/d)(e^{−G(s−d)} − e^{−Gs})/G after
func TestSimulationClosedForm(t *testing.T) {
	tests := []struct {
		name   string
		change func(*Simulation)
		extra  func(s Simulation, sm float64) float64
	}{
		{"first order", func(s *Simulation) { s.ReleaseRate = 1.0 / 30 }, func(s Simulation, sm float64) float64 {
			l, g := s.ReleaseRate, s.CoolingConstant
			return s.Truth() * l / (l - g) * (math.Exp(-g*sm) - math.Exp(-l*sm))
		}},
		{"instantaneous", func(s *Simulation) {}, func(s Simulation, sm float64) float64 {
			return s.Truth() * math.Exp(-s.CoolingConstant*sm)
		}},
		{"heater", func(s *Simulation) { s.HeaterTime = 200 }, func(s Simulation, sm float64) float64 {
			g, d, p := s.CoolingConstant, s.HeaterTime, s.Truth()/s.HeaterTime
			if sm <= d {
				return p * (1 - math.Exp(-g*sm)) / g
			}
			return p * (math.Exp(-g*(sm-d)) - math.Exp(-g*sm)) / g
		}},
		{"endothermic", func(s *Simulation) { s.Heat = -120; s.ReleaseRate = 0.01 }, func(s Simulation, sm float64) float64 {
			l, g := s.ReleaseRate, s.CoolingConstant
			return s.Truth() * l / (l - g) * (math.Exp(-g*sm) - math.Exp(-l*sm))
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := simBase()
			tc.change(&s)
			tt, th, truth := s.Run()
			if want := s.Heat / s.HeatCapacity; math.Abs(truth-want) > 1e-15 {
				t.Fatalf("truth %g, want Q/ε = %g", truth, want)
			}
			if len(tt) != 601 {
				t.Fatalf("%d readings, want 601 (0 to 1200 s every 2 s)", len(tt))
			}
			for k := range tt {
				want := s.ConvergenceTemperature + (s.StartTemperature-s.ConvergenceTemperature)*math.Exp(-s.CoolingConstant*tt[k])
				if sm := tt[k] - s.MixTime; sm >= 0 {
					want += tc.extra(s, sm)
				}
				// Rounding only: the propagator is a Padé approximant to
				// machine precision; 1e-10 K allows 600 steps of growth.
				if math.Abs(th[k]-want) > 1e-10 {
					t.Fatalf("t = %g s: θ = %.12f K, closed form %.12f K", tt[k], th[k], want)
				}
			}
		})
	}
}

// TestSimulationProbeLag checks the lagging probe against an independent
// fourth-order Runge–Kutta integration of the two equations with a 0.01 s
// step (error O(h⁴) ≈ 1e-12 K here).
func TestSimulationProbeLag(t *testing.T) {
	s := simBase()
	s.ReleaseRate = 1.0 / 20
	s.ProbeLag = 6
	tt, th, _ := s.Run()
	g, l, tau, A := s.CoolingConstant, s.ReleaseRate, s.ProbeLag, s.Truth()
	// on: the step lies after the release start (which is on a step
	// boundary, so no step straddles it).
	deriv := func(tm, x, y float64, on bool) (float64, float64) {
		p := 0.0
		if on {
			p = A * l * math.Exp(-l*(tm-s.MixTime))
		}
		return g*(s.ConvergenceTemperature-x) + p, (x - y) / tau
	}
	x := s.StartTemperature
	// In step with the drift: y − θ∞ = (x − θ∞)/(1 − Gτ).
	y := s.ConvergenceTemperature + (x-s.ConvergenceTemperature)/(1-g*tau)
	const h = 0.01
	k := 0
	for i := 0; k < len(tt); i++ {
		now := float64(i) / 100 // exact at the release start (301 s = 30100 h)
		if math.Abs(now-tt[k]) < h/2 {
			if math.Abs(th[k]-y) > 1e-10 {
				t.Fatalf("t = %g s: simulator %.12f K, Runge–Kutta %.12f K", now, th[k], y)
			}
			k++
		}
		on := now >= s.MixTime
		a1, b1 := deriv(now, x, y, on)
		a2, b2 := deriv(now+h/2, x+h/2*a1, y+h/2*b1, on)
		a3, b3 := deriv(now+h/2, x+h/2*a2, y+h/2*b2, on)
		a4, b4 := deriv(now+h, x+h*a3, y+h*b3, on)
		x += h / 6 * (a1 + 2*a2 + 2*a3 + a4)
		y += h / 6 * (b1 + 2*b2 + 2*b3 + b4)
	}
}

// TestSimulationNoise checks the noise, its correlation, rounding, spikes,
// jitter and reproducibility on a flat record (G = 0, Q = 0).
func TestSimulationNoise(t *testing.T) {
	flat := Simulation{Duration: 20000, Interval: 1, MixTime: 100, StartTemperature: 300,
		ConvergenceTemperature: 300, HeatCapacity: 1, Noise: 0.01, Seed: 7}
	sd := func(v []float64) float64 {
		var m, q float64
		for _, x := range v {
			m += x
		}
		m /= float64(len(v))
		for _, x := range v {
			q += (x - m) * (x - m)
		}
		return math.Sqrt(q / float64(len(v)-1))
	}
	t.Run("white", func(t *testing.T) {
		_, th, _ := flat.Run()
		// Sample SD of 20001 normal values: relative SE 1/√(2n) = 0.5 %; 2.5 % is 5 SE.
		if got := sd(th); math.Abs(got/flat.Noise-1) > 0.025 {
			t.Errorf("noise SD %g K, want %g K", got, flat.Noise)
		}
	})
	t.Run("ar1", func(t *testing.T) {
		s := flat
		s.NoiseAR = 0.6
		_, th, _ := s.Run()
		// The marginal SD stays σ (stationary AR(1)); its SE grows by
		// √((1+φ²)/(1−φ²)) ≈ 1.46 (Bartlett's variance of the sample
		// variance of an AR(1) series, from memory), so 4 % is still 5 SE.
		if got := sd(th); math.Abs(got/s.Noise-1) > 0.04 {
			t.Errorf("AR(1) noise SD %g K, want %g K", got, s.Noise)
		}
		// Lag-1 autocorrelation: SE √((1 − φ²)/n) = 0.0057 (Bartlett's
		// formula, Box, Jenkins & Reinsel §2.1.6); 0.03 is 5 SE.
		r := make([]float64, len(th))
		for k := range th {
			r[k] = th[k] - 300
		}
		var num, den float64
		for k := range r {
			den += r[k] * r[k]
			if k > 0 {
				num += r[k] * r[k-1]
			}
		}
		if got := num / den; math.Abs(got-0.6) > 0.03 {
			t.Errorf("lag-1 autocorrelation %.3f, want 0.6", got)
		}
	})
	t.Run("quantum", func(t *testing.T) {
		s := flat
		s.Quantum = 0.01
		_, th, _ := s.Run()
		for k, v := range th {
			if r := v / 0.01; math.Abs(r-math.Round(r)) > 1e-6 {
				t.Fatalf("reading %d = %.15g K is not on the 0.01 K grid", k, v)
			}
		}
	})
	t.Run("spikes", func(t *testing.T) {
		s := flat
		s.Noise = 0
		s.Spikes = []float64{500, 777.2}
		s.SpikeAdd = 0.25
		_, th, _ := s.Run()
		for k, v := range th {
			want := 300.0
			if k == 500 || k == 777 {
				want += 0.25
			}
			if math.Abs(v-want) > 1e-12 {
				t.Fatalf("reading %d = %g K, want %g K", k, v, want)
			}
		}
	})
	t.Run("jitter", func(t *testing.T) {
		s := flat
		s.Jitter = 0.3
		tt, _, _ := s.Run()
		for k := range tt {
			if math.Abs(tt[k]-float64(k)) > 0.3+1e-12 {
				t.Fatalf("t[%d] = %g s is more than 0.3 s from %d s", k, tt[k], k)
			}
			if k > 0 && !(tt[k] > tt[k-1]) {
				t.Fatalf("times not increasing at %d", k)
			}
		}
	})
	t.Run("seed", func(t *testing.T) {
		_, a, _ := flat.Run()
		_, b, _ := flat.Run()
		s := flat
		s.Seed++
		_, c, _ := s.Run()
		same, differ := true, false
		for k := range a {
			same = same && a[k] == b[k]
			differ = differ || a[k] != c[k]
		}
		if !same || !differ {
			t.Errorf("same seed identical: %v, other seed different: %v", same, differ)
		}
	})
}

func TestSimulationValidate(t *testing.T) {
	tests := []struct {
		name   string
		change func(*Simulation)
	}{
		{"zero interval", func(s *Simulation) { s.Interval = 0 }},
		{"too short", func(s *Simulation) { s.Duration = 3 }},
		{"no heat capacity", func(s *Simulation) { s.HeatCapacity = 0 }},
		{"negative G", func(s *Simulation) { s.CoolingConstant = -1e-4 }},
		{"AR of 1", func(s *Simulation) { s.NoiseAR = 1 }},
		{"jitter 0.5", func(s *Simulation) { s.Jitter = 0.5 }},
		{"NaN", func(s *Simulation) { s.Heat = math.NaN() }},
		{"lag against 1/G", func(s *Simulation) { s.ProbeLag = 3000 }},
		{"negative noise", func(s *Simulation) { s.Noise = -1 }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := simBase()
			tc.change(&s)
			if err := s.Validate(); !errors.Is(err, errSimulation) {
				t.Errorf("Validate() = %v, want errSimulation", err)
			}
			if tt, th, truth := s.Run(); tt != nil || th != nil || !math.IsNaN(truth) {
				t.Errorf("Run() on an invalid simulation returned data")
			}
		})
	}
	if err := simBase().Validate(); err != nil {
		t.Errorf("valid simulation: %v", err)
	}
}
