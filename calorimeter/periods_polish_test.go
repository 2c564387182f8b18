package calorimeter

import (
	"errors"
	"strings"
	"testing"
)

// TestAnalyseRiseFlatLog: a log whose readings never change is refused as
// holding no process, and the message says the temperature does not change
// rather than that it is already changing at the start.
func TestAnalyseRiseFlatLog(t *testing.T) {
	tests := []struct {
		name  string
		n     int
		step  float64 // s
		value float64 // K
		want  string
	}{
		// 300 readings of 21.000 °C every 2 s: 21 + 273.15 = 294.15 K.
		{"300 readings of 21 °C every 2 s", 300, 2, 294.15,
			"the temperature does not change at all (300 readings of 294.15 K from 0 s to 598 s)"},
		{"minimum length", 10, 5, 300, "(10 readings of 300 K from 0 s to 45 s)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tt := make([]float64, tc.n)
			y := make([]float64, tc.n)
			for k := range tt {
				tt[k] = float64(k) * tc.step
				y[k] = tc.value
			}
			_, err := AnalyseRise(tt, y, RiseOptions{})
			if !errors.Is(err, ErrNoProcess) || !errors.Is(err, ErrNoChange) {
				t.Fatalf("err = %v, want ErrNoChange (an ErrNoProcess)", err)
			}
			if !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "already changing") {
				t.Errorf("err = %q, want it to contain %q", err, tc.want)
			}
		})
	}
}
