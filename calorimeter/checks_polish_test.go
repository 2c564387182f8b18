package calorimeter

import (
	"math"
	"os"
	"strings"
	"testing"

	"calred/calorimeter/logfile"
)

// TestFlatForePeriod: testdata/logs/mmss_timer.csv opens with six readings
// of 20.6 °C (293.75 K), so the fore drift has no residual noise at all.
// The drift-linear check says the period is flat, no check prints NaN, and
// the lag-1 autocorrelation of the residuals, 0/0, is given as 0 with an
// inflation of 1 (the Drift.Lag1 doc comment).
func TestFlatForePeriod(t *testing.T) {
	f, err := os.Open("../testdata/logs/mmss_timer.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	l, err := logfile.Read(f, logfile.Options{Name: "mmss_timer.csv"})
	if err != nil {
		t.Fatal(err)
	}
	r, err := AnalyseRise(l.Time, l.Temperature, RiseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	c := checkByName(t, r, "fore-drift-linear")
	if want := "fore period is flat (6 readings, all 293.75 K): no noise to judge a curvature against"; c.Status != Pass || c.Detail != want {
		t.Errorf("fore-drift-linear: %s %q, want pass %q", c.Status, c.Detail, want)
	}
	for _, c := range r.Checks {
		if strings.Contains(c.Detail, "NaN") || strings.Contains(c.Detail, "Inf") {
			t.Errorf("%s: %q holds a number that is not finite", c.Name, c.Detail)
		}
	}
	// analytic: a constant series has Lag1 defined as 0 here and ρ = 0,
	// so the inflation √((1+ρ)/(1−ρ)) is exactly 1; tolerance 1e-12.
	if d := r.PreDrift; math.IsNaN(d.Lag1) || math.Abs(d.Lag1) > 1e-12 || math.Abs(d.Inflation-1) > 1e-12 {
		t.Errorf("fore drift Lag1 %v, Inflation %v, want 0 and 1", d.Lag1, d.Inflation)
	}
}

// TestDriftLinearNoNoise: a drift period that varies but whose residuals
// have no scatter (an exact quadratic, for which the residual variance of
// the quadratic fit rounds to 0) is judged by the curvature's effect over
// the period against the reading noise, never by a z-score of ±Inf or NaN.
func TestDriftLinearNoNoise(t *testing.T) {
	// Ten readings every 2 s on a line of 1 mK/s; residuals 1e-6·(t − 10)²
	// K: c2 = 1e-6 K/s² (analytic), and at the edge t = 18 s, 9 s from the
	// centre, the effect is c2·9² = 81 µK (analytic).
	tt := make([]float64, 10)
	y := make([]float64, 10)
	for k := range tt {
		tt[k] = 2 * float64(k)
		y[k] = 298 + 1e-3*tt[k]
	}
	tests := []struct {
		name   string
		sigma  float64 // reading noise (K)
		status Status
		detail string
	}{
		{"effect beyond the noise", 1e-5, Warn, "gives 0.081 mK over the period, more than the reading noise 0.01 mK: not linear in θ"},
		{"effect within the noise", 1e-3, Pass, "gives 0.081 mK over the period, within the reading noise 0.001 K"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, err := newDriftFit(tt, y)
			if err != nil {
				t.Fatal(err)
			}
			f.finish(0)
			for k := range f.resid {
				f.resid[k] = 1e-6 * (tt[k] - 10) * (tt[k] - 10)
			}
			if _, u := checkCurvature(f.t, f.resid); u != 0 {
				t.Skipf("u = %g: the residual variance did not round to 0 on this platform", u)
			}
			c := (&checkContext{lim: DefaultCheckLimits(), sigma: tc.sigma}).driftLinear("after-drift-linear", f, 18)
			if c.Status != tc.status || !strings.Contains(c.Detail, tc.detail) || strings.Contains(c.Detail, "NaN") || strings.Contains(c.Detail, "Inf") {
				t.Errorf("%s %q, want %s containing %q", c.Status, c.Detail, tc.status, tc.detail)
			}
		})
	}
}
