package calorimeter

import (
	"bytes"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// chainClose compares floats with an absolute-or-relative tolerance.
func chainClose(got, want, abs, rel float64) bool {
	return math.Abs(got-want) <= math.Max(abs, rel*math.Abs(want))
}

// The precision isoperibol cell of the invented Kestrel Analytical bench
// (DOMAIN §1 typical figures: rises 0.1–1 K, thermistor resolution, G
// 10⁻⁴–10⁻³ s⁻¹): ε ≈ 512 J/K with 100 g of water, 0.15 mK noise on a
// 0.1 mK resolution, G = 6·10⁻⁴ s⁻¹, 3 s probe lag, 5 s sampling.
const (
	chainEps      = 512.0  // J/K, total heat capacity with chainFill of water
	chainFill     = 100.0  // g of water in the cell during the calibration
	chainPower    = 0.5    // W
	chainHeatTime = 300.0  // s
	chainTheta0   = 298.05 // K, start of the calibration log
	chainInf      = 298.40 // K, convergence temperature
)

// chainElectricalSim is an electrical calibration run of the cell: the
// heater on at 502.5 s (between two readings, so that a power column read
// at the 5 s readings integrates exactly) for chainHeatTime.
func chainElectricalSim(eps float64, seed uint64) Simulation {
	return Simulation{
		Duration: 1500, Interval: 5, MixTime: 502.5,
		StartTemperature: chainTheta0, ConvergenceTemperature: chainInf, CoolingConstant: 6e-4,
		HeatCapacity: eps, Heat: chainPower * chainHeatTime, HeaterTime: chainHeatTime, ProbeLag: 3,
		Noise: 0.00015, Quantum: 0.0001, Seed: seed,
	}
}

// chainAnalyse runs a simulation and its temperature analysis.
func chainAnalyse(t *testing.T, s Simulation) (*Rise, []float64, []float64) {
	t.Helper()
	tt, theta, _ := s.Run()
	if tt == nil {
		t.Fatalf("simulation: %v", s.Validate())
	}
	r, err := AnalyseRise(tt, theta, DefaultRiseOptions())
	if err != nil {
		t.Fatalf("AnalyseRise: %v", err)
	}
	return r, tt, theta
}

// chainPowerColumn is the heater-power column of a simulation as a logger
// reads it at the times t: power P while the heater is on, 0 otherwise.
func chainPowerColumn(t []float64, on, off, p float64) []float64 {
	col := make([]float64, len(t))
	for k, tk := range t {
		if tk >= on && tk < off {
			col[k] = p
		}
	}
	return col
}

// chainTwoPulses is a log with two heater pulses of the same power:
// because the simulated calorimeter is linear, the log is the sum of one
// simulation with the first pulse and the fore drift and a second with
// only the second pulse (start at θ∞, so no drift of its own), less θ∞;
// then noise and rounding as Simulation.Run applies them (seeded PCG). It
// returns the times, the readings and the power column.
func chainTwoPulses(eps, power1, power2 float64, seed uint64) (t, theta, col []float64) {
	a := chainElectricalSim(eps, 0)
	a.Duration, a.Heat = 3000, power1*chainHeatTime
	a.Noise, a.Quantum = 0, 0
	b := a
	b.StartTemperature, b.MixTime, b.Heat = b.ConvergenceTemperature, 1802.5, power2*chainHeatTime
	t, ta, _ := a.Run()
	_, tb, _ := b.Run()
	rng := rand.New(rand.NewPCG(seed, seed^0x5eed))
	theta = make([]float64, len(t))
	for k := range t {
		v := ta[k] + tb[k] - a.ConvergenceTemperature + 0.00015*rng.NormFloat64()
		theta[k] = 0.0001 * math.Round(v/0.0001)
	}
	col = chainPowerColumn(t, a.MixTime, a.MixTime+chainHeatTime, power1)
	for k, v := range chainPowerColumn(t, b.MixTime, b.MixTime+chainHeatTime, power2) {
		col[k] += v
	}
	return t, theta, col
}

func TestChainCorrelation(t *testing.T) {
	var c chain
	a := c.add(Input{Symbol: "a", Value: 1, U: 0.1})
	b := c.add(Input{Symbol: "b", Value: 2, U: 0.2, DoF: 5})
	if c.correlation() != nil {
		t.Fatal("independent inputs must give a nil correlation matrix")
	}
	if !math.IsInf(c.inputs[a].DoF, 1) || c.inputs[b].DoF != 5 {
		t.Errorf("DoF 0 must read as infinite and others be kept: got %g, %g", c.inputs[a].DoF, c.inputs[b].DoF)
	}
	c.correlate(a, a, 0.5) // with itself: ignored
	c.correlate(a, b, 1.5) // clamped to 1
	m := c.correlation()
	if m == nil || m[0][1] != 1 || m[1][0] != 1 || m[0][0] != 1 {
		t.Errorf("correlation matrix = %v, want [[1 1] [1 1]]", m)
	}
	// chainCorr: cov/(u_a·u_b); definition.
	if r := chainCorr(0.1, 0.2, 0.01); !chainClose(r, 0.5, 1e-15, 0) {
		t.Errorf("chainCorr = %g, want 0.5", r)
	}
	if r := chainCorr(0, 0.2, 0.01); r != 0 {
		t.Errorf("chainCorr with u = 0 is %g, want 0", r)
	}
}

func TestRiseInputDistribution(t *testing.T) {
	for _, tc := range []struct {
		name string
		dof  float64
		want Distribution
		nu   float64
	}{
		{"type A with many degrees of freedom", 40, StudentT, 40},
		{"too few for a t-distribution with finite variance", 2, Normal, 2},
		{"below one is taken as one", 0.4, Normal, 1},
		{"unknown", math.NaN(), Normal, math.Inf(1)},
		{"type B", math.Inf(1), Normal, math.Inf(1)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			in := riseInput("ΔT", "ΔT", &Rise{DeltaT: 0.3, UDeltaT: 0.001, DoF: tc.dof})
			if in.Dist != tc.want || in.DoF != tc.nu {
				t.Errorf("got %v with ν = %g, want %v with ν = %g", in.Dist, in.DoF, tc.want, tc.nu)
			}
		})
	}
}

var chainUpdateLogs = flag.Bool("update-two-pulses", false, "rewrite ../testdata/logs/two_pulses.csv from its simulation")

// chainTwoPulsesCSV is the logger export of chainTwoPulses for the
// command-line tests: the invented Kestrel bench's cell calibrated by two
// 0.5 W × 300 s heater pulses, time in s, temperature in K to 0.1 mK and
// the heater-power column.
func chainTwoPulsesCSV() []byte {
	t, theta, col := chainTwoPulses(chainEps, chainPower, chainPower, 41)
	var b bytes.Buffer
	b.WriteString("# lab: Kestrel Analytical (invented), solution calorimetry bench 2\n")
	b.WriteString("# operator: D. Achterberg\n")
	b.WriteString("# contents-mass: 100.00 g\n")
	b.WriteString("# note: heater pulses before and after; synthetic, made by calorimeter.Simulation (chainTwoPulses, seed 41): ε = 512 J/K\n")
	b.WriteString("Time (s),Temperature (K),Heater power (W)\n")
	for k := range t {
		fmt.Fprintf(&b, "%.1f,%.4f,%.3f\n", t[k], theta[k], col[k])
	}
	return b.Bytes()
}

// TestTwoPulsesLog keeps ../testdata/logs/two_pulses.csv (used by the
// calibrate_two_pulses script) equal to its simulation; run with
// -update-two-pulses to rewrite it.
func TestTwoPulsesLog(t *testing.T) {
	path := filepath.Join("..", "testdata", "logs", "two_pulses.csv")
	want := chainTwoPulsesCSV()
	if *chainUpdateLogs {
		if err := os.WriteFile(path, want, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("%s differs from its simulation; rerun with -update-two-pulses", path)
	}
}
