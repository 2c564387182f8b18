package calorimeter

import (
	"math"
	"testing"
)

// TestReduceUndetermined: absurd inputs that still give numbers must not
// pass: a result whose u exceeds its size, or whose k cannot be formed, fails.
func TestReduceUndetermined(t *testing.T) {
	rise := &Rise{Points: 100, DeltaT: -1.0, UDeltaT: 0.001, DoF: 100, MeanTemperature: 298.15}
	tests := []struct {
		name string
		s    Sample
		hc   HeatCapacity
		fail bool
	}{
		{"ordinary", Sample{Mass: 5, MolarMass: 101.102}, HeatCapacity{Value: 450, U: 1}, false},
		// u(ε) 1e6 J/K against ε = 450 J/K: u(ΔsolH) ≫ |ΔsolH| (analytic).
		{"u larger than the result", Sample{Mass: 5, MolarMass: 101.102}, HeatCapacity{Value: 450, U: 1e6}, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			red, err := ReduceSample(rise, tc.s, tc.hc, ReduceOptions{})
			if err != nil {
				t.Fatal(err)
			}
			got := false
			for _, c := range red.Checks {
				if c.Name == "result-determined" && c.Status == Fail {
					got = true
				}
			}
			if got != tc.fail {
				t.Errorf("result-determined failed = %v, want %v (ΔsolH = %g ± %g, k = %g)", got, tc.fail, red.MolarEnthalpy, red.UMolarEnthalpy, red.CoverageFactor)
			}
			if tc.fail && red.Status != Fail {
				t.Errorf("status %s, want fail", red.Status)
			}
			if !tc.fail && math.Abs(red.MolarEnthalpy-(450*1.0*101.102/5/1000)) > 1e-9 {
				// analytic: ΔsolH = −ε·ΔT·M/m = 450·1·101.102/5 J/mol
				t.Errorf("ΔsolH = %g kJ/mol", red.MolarEnthalpy)
			}
		})
	}
}
