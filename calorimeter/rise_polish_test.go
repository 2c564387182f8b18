package calorimeter

import (
	"strings"
	"testing"
)

// TestRiseReadingsPlural: counts of readings in messages agree in number.
func TestRiseReadingsPlural(t *testing.T) {
	tests := []struct {
		name string
		n    int
		want string
	}{
		{"none", 0, "0 readings"},
		{"one", 1, "1 reading"},
		{"two", 2, "2 readings"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := riseReadings(tc.n); got != tc.want {
				t.Errorf("riseReadings(%d) = %q, want %q", tc.n, got, tc.want)
			}
		})
	}
}

// TestAnalyseRiseOneReadingMessages: the errors about one reading say
// "1 reading", not "1 readings".
func TestAnalyseRiseOneReadingMessages(t *testing.T) {
	cupT, cupY, _ := cupRun(71).Run() // readings every 5 s (cupRun)
	tests := []struct {
		name     string
		t, theta []float64
		opt      RiseOptions
		want     string
	}{
		{"a log of one reading", []float64{0}, []float64{295}, RiseOptions{},
			"1 reading, need at least 10"},
		// A fore period [0, 4] s holds only the reading at 0 s.
		{"a fore period of one reading", cupT, cupY, RiseOptions{MixTime: 300, Pre: &Period{0, 4}},
			"fore period: too few readings: 1 reading before the mixing time 300 s, need at least 3"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := AnalyseRise(tc.t, tc.theta, tc.opt)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("err = %v, want it to contain %q", err, tc.want)
			}
		})
	}
}
