package calorimeter

import (
	"math"
	"slices"
	"strings"
	"testing"
)

// checkByName returns the named check of r.
func checkByName(t *testing.T, r *Rise, name string) Check {
	t.Helper()
	for _, c := range r.Checks {
		if c.Name == name {
			return c
		}
	}
	t.Fatalf("no check %q in %v", name, r.Checks)
	return Check{}
}

// allChecks are the check names in the order AnalyseRise reports them.
var allChecks = []string{"mix-time", "fore-period", "after-period", "fore-drift-fit", "after-drift-fit",
	"fore-drift-linear", "after-drift-linear", "spikes", "resolution", "sampling-lag",
	"rise-resolution", "model-fit", "method-agreement"}

// TestChecksClean: on clean runs of both regimes every check passes.
func TestChecksClean(t *testing.T) {
	for _, tc := range []struct {
		name string
		sim  Simulation
	}{{"precision", precisionRun(21)}, {"coffee cup", cupRun(21)}} {
		t.Run(tc.name, func(t *testing.T) {
			tt, th, _ := tc.sim.Run()
			r, err := AnalyseRise(tt, th, RiseOptions{})
			if err != nil {
				t.Fatal(err)
			}
			var names []string
			for _, c := range r.Checks {
				names = append(names, c.Name)
				if c.Status != Pass {
					t.Errorf("%s: %s: %s", c.Name, c.Status, c.Detail)
				}
				if c.Detail == "" {
					t.Errorf("%s has no detail", c.Name)
				}
			}
			if !slices.Equal(names, allChecks) {
				t.Errorf("checks %v, want %v", names, allChecks)
			}
		})
	}
}

// slowTail adds to a run a second, slow release (rate 1/3000 s, 0.02 K) that
// is still heating the vessel in the after period (DOMAIN §2: R–P "not
// valid if heat keeps entering after the main period"). The simulator is
// linear, so the two releases superpose.
func slowTail(s Simulation) (t, theta []float64) {
	t, theta, _ = s.Run()
	slow := s
	slow.Noise, slow.Quantum = 0, 0
	slow.Heat = 0.02 * s.HeatCapacity
	slow.ReleaseRate = 1.0 / 3000
	base := slow
	base.Heat = 0
	_, a, _ := slow.Run()
	_, b, _ := base.Run()
	for k := range theta {
		theta[k] += a[k] - b[k]
	}
	return t, theta
}

// TestChecksFire builds faulty runs and checks that the right check fires
// with numbers and units in its detail. The limits in the details are the
// documented defaults of CheckLimits (120 s fore period and τ/2 sampling
// from DOMAIN §2; robust z 6, a normal reading passing 6σ once in 5·10⁸,
// scipy 1.10.1: 1/(2*norm.sf(6)) = 5.07e8; 40 resolution steps, where
// the two end readings' δ/√6 is 1 % of the rise, analytic). Each fault is
// set far beyond its limit (a spike of 33 noise SDs, 30 steps against 40,
// a 20 s interval against a 15 s release seen through a 6 s probe lag).
func TestChecksFire(t *testing.T) {
	tests := []struct {
		name   string
		log    func() ([]float64, []float64)
		opt    RiseOptions
		check  string
		status Status
		detail string
	}{
		{"short fore period", func() ([]float64, []float64) {
			s := cupRun(31)
			s.MixTime = 70
			t, y, _ := s.Run()
			return t, y
		}, RiseOptions{}, "fore-period", Warn, "s is shorter than the 120 s needed for a drift fit"},
		{"spike", func() ([]float64, []float64) {
			s := precisionRun(32)
			s.Spikes = []float64{150, 900}
			s.SpikeAdd = 0.005 // 33 noise SDs
			t, y, _ := s.Run()
			return t, y
		}, RiseOptions{}, "spikes", Warn, "2 readings excluded as spikes beyond robust z 6 (at 150 s, 900 s)"}, // spikes put at 150 s and 900 s
		{"spike in the rise", func() ([]float64, []float64) {
			s := precisionRun(33)
			s.Spikes = []float64{330}
			s.SpikeAdd = 0.05
			t, y, _ := s.Run()
			return t, y
		}, RiseOptions{}, "spikes", Warn, "1 reading excluded as a spike beyond robust z 6 (at 330 s)"},
		{"stuck on a coarse resolution", func() ([]float64, []float64) {
			s := cupRun(34)
			s.Quantum, s.Noise = 0.05, 0.003
			t, y, _ := s.Run()
			return t, y
		}, RiseOptions{}, "resolution", Warn, "readings on 0.05 K steps"},
		{"rise small against resolution", func() ([]float64, []float64) {
			s := cupRun(35)
			s.Quantum, s.Noise, s.Heat = 0.05, 0.02, 675 // 1.5 K = 30 steps
			t, y, _ := s.Run()
			return t, y
		}, RiseOptions{}, "rise-resolution", Warn, "resolution steps of 0.05 K, fewer than the 40 needed"},
		{"slow sampling against the lag", func() ([]float64, []float64) {
			s := cupRun(36)
			s.Interval, s.ReleaseRate, s.Duration = 20, 1.0/15, 1800
			t, y, _ := s.Run()
			return t, y
		}, RiseOptions{}, "sampling-lag", Warn, "sampling interval 20 s is longer than 0.5 of the 63 % response time"},
		{"heat still entering", func() ([]float64, []float64) {
			return slowTail(precisionRun(37))
		}, RiseOptions{}, "after-drift-linear", Warn, "not linear in θ"},
		{"given mixing time", func() ([]float64, []float64) {
			t, y, _ := cupRun(38).Run()
			return t, y
		}, RiseOptions{MixTime: 300}, "mix-time", Pass, "mixing time 300 s as given"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tt, y := tc.log()
			r, err := AnalyseRise(tt, y, tc.opt)
			if err != nil {
				t.Fatal(err)
			}
			c := checkByName(t, r, tc.check)
			if c.Status != tc.status || !strings.Contains(c.Detail, tc.detail) {
				t.Errorf("%s: %s %q, want %s containing %q", c.Name, c.Status, c.Detail, tc.status, tc.detail)
			}
		})
	}
}

// TestSpikesExcluded: spikes are listed, their readings left out, and the
// result is as good as without them.
func TestSpikesExcluded(t *testing.T) {
	s := precisionRun(40)
	tt, clean, truth := s.Run()
	s.Spikes = []float64{150, 330, 900}
	s.SpikeAdd = 0.05
	_, spiky, _ := s.Run()
	r, err := AnalyseRise(tt, spiky, RiseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(r.Excluded, []int{75, 165, 450}) {
		t.Errorf("excluded %v, want [75 165 450]", r.Excluded)
	}
	r0, err := AnalyseRise(tt, clean, RiseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// Three readings out of 751 change the result by far less than u
	// (0.3 u; common practice for "negligible"), and the result stays
	// within 3 u of the simulated truth (a coverage of 99.7 % if u is
	// honest, analytic for a normal error).
	if d := r.DeltaT - r0.DeltaT; math.Abs(d) > 0.3*r0.UDeltaT {
		t.Errorf("ΔT with spikes %g K, without %g K (u %g K)", r.DeltaT, r0.DeltaT, r0.UDeltaT)
	}
	if math.Abs(r.DeltaT-truth) > 3*r.UDeltaT {
		t.Errorf("ΔT %g K, truth %g K", r.DeltaT, truth)
	}
	if len(r.Residuals) != len(tt) {
		t.Fatalf("%d residuals for %d readings", len(r.Residuals), len(tt))
	}
	if res := r.Residuals[75]; !(res > 0.04) {
		t.Errorf("residual of the excluded reading 75 is %g K, want about 0.05 K", res)
	}
}

// TestChecksHeatStillEntering: with heat entering in the after period the
// auto rule does not use Regnault–Pfaundler and says why.
func TestChecksHeatStillEntering(t *testing.T) {
	tt, y := slowTail(precisionRun(41))
	r, err := AnalyseRise(tt, y, RiseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Method == MethodRegnaultPfaundler && !strings.Contains(r.MethodReason, "unavailable") {
		t.Errorf("auto chose %s: %s", r.Method, r.MethodReason)
	}
}

func TestWorst(t *testing.T) {
	tests := []struct {
		name   string
		checks []Check
		want   Status
	}{
		{"none", nil, Pass},
		{"all pass", []Check{{"a", Pass, ""}, {"b", Pass, ""}}, Pass},
		{"one warn", []Check{{"a", Pass, ""}, {"b", Warn, ""}}, Warn},
		{"fail beats warn", []Check{{"a", Warn, ""}, {"b", Fail, ""}, {"c", Pass, ""}}, Fail},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := Worst(tc.checks); got != tc.want {
				t.Errorf("Worst = %s, want %s", got, tc.want)
			}
		})
	}
}

func TestCheckLimitsDefaults(t *testing.T) {
	got := CheckLimits{MinForeS: 60}.withDefaults()
	want := DefaultCheckLimits()
	want.MinForeS = 60
	if got != want {
		t.Errorf("withDefaults = %+v, want %+v", got, want)
	}
	if (CheckLimits{}).withDefaults() != DefaultCheckLimits() {
		t.Error("zero limits do not take the defaults")
	}
}
