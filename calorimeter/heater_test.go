package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// heaterTestColumn is a column read every dt seconds from 0 to 600 s with
// the heater on for the readings in [on, off): 0.5 W ± 0.002 W alternating
// (so s_P is known exactly), off readings given by offValue.
func heaterTestColumn(dt, on, off, offValue float64) (t, p []float64) {
	k := 0
	for tk := 0.0; tk <= 600; tk += dt {
		t = append(t, tk)
		v := offValue
		if tk >= on && tk < off {
			v = 0.5 + 0.002*float64(1-2*(k%2))
			k++
		}
		p = append(p, v)
	}
	return t, p
}

func TestHeaterPulses(t *testing.T) {
	for _, tc := range []struct {
		name     string
		dt       float64
		on, off  float64 // readings at t ≥ on and t < off are on
		offValue float64
		// analytic: n on-readings of mean 0.5 W, the edges halfway between
		// readings, Q = Σ P_k·Δt (trapezoid with zero neighbours) = n·P̄·Δt.
		n       int
		wantOn  float64
		wantOff float64
	}{
		{"even readings, heater off reads 0 W", 5, 100, 400, 0, 60, 97.5, 397.5},
		{"heater off reads blank", 10, 120, 240, math.NaN(), 12, 115, 235},
		// An offset of 1 mW while off lies far below the on-level: the
		// edges do not move, but it is in the two edge intervals' trapezoids.
		{"heater off reads a small offset", 5, 100, 400, 0.001, 60, 97.5, 397.5},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tt, p := heaterTestColumn(tc.dt, tc.on, tc.off, tc.offValue)
			ps, err := HeaterPulses(tt, p)
			if err != nil {
				t.Fatal(err)
			}
			if len(ps) != 1 {
				t.Fatalf("%d heating periods, want 1", len(ps))
			}
			h := ps[0]
			off := tc.offValue
			if math.IsNaN(off) {
				off = 0
			}
			// analytic: Σ P_k Δt over the on-readings (n even: the ±0.002 W
			// cancel) plus the off-level in the two half-intervals at the edges.
			wantQ := float64(tc.n)*0.5*tc.dt + off*tc.dt
			// analytic: s_P of n readings alternating ±0.002 about 0.5 W
			// is 0.002·√(n/(n−1)); u² = (t_h·s_P/√n)² + 2(P̄·Δt/√12)².
			sP := 0.002 * math.Sqrt(float64(tc.n)/float64(tc.n-1))
			th := tc.wantOff - tc.wantOn
			wantU := math.Sqrt(math.Pow(th*sP/math.Sqrt(float64(tc.n)), 2) + 2*math.Pow(0.5*tc.dt/math.Sqrt(12), 2))
			if !chainClose(h.Energy, wantQ, 1e-9, 0) || !chainClose(h.UEnergy, wantU, 0, 1e-9) {
				t.Errorf("Q = %.10g ± %.10g J, want %.10g ± %.10g J", h.Energy, h.UEnergy, wantQ, wantU)
			}
			if h.On != tc.wantOn || h.Off != tc.wantOff || h.Readings != tc.n || !chainClose(h.MeanPower, 0.5, 1e-12, 0) {
				t.Errorf("on %g s, off %g s, %d readings, P̄ %g W; want %g, %g, %d, 0.5", h.On, h.Off, h.Readings, h.MeanPower, tc.wantOn, tc.wantOff, tc.n)
			}
			// For a constant power the energy is P̄·(Off − On) (analytic).
			if tc.offValue == 0 && !chainClose(h.Energy, h.MeanPower*(h.Off-h.On), 1e-9, 0) {
				t.Errorf("Q = %g J is not P̄·(Off − On) = %g J", h.Energy, h.MeanPower*(h.Off-h.On))
			}
		})
	}
}

func TestHeaterPulsesTwo(t *testing.T) {
	tt, _, col := chainTwoPulses(chainEps, 0.5, 0.6, 1)
	col[150] = math.NaN() // a blank reading inside the first pulse is bridged
	ps, err := HeaterPulses(tt, col)
	if err != nil {
		t.Fatal(err)
	}
	if len(ps) != 2 {
		t.Fatalf("%d heating periods, want 2", len(ps))
	}
	// analytic: P·t_h with the edges between readings at 502.5 s and
	// 802.5 s (and 1802.5 s, 2102.5 s): 0.5·300 and 0.6·300 J. The blank
	// reading in the first is bridged by the trapezoid over its
	// neighbours, which for a constant power loses nothing.
	for i, want := range []struct{ on, off, q float64 }{{502.5, 802.5, 150}, {1802.5, 2102.5, 180}} {
		if p := ps[i]; p.On != want.on || p.Off != want.off || !chainClose(p.Energy, want.q, 1e-9, 0) {
			t.Errorf("pulse %d: %g–%g s, %g J; want %g–%g s, %g J", i+1, p.On, p.Off, p.Energy, want.on, want.off, want.q)
		}
	}
	if _, err := HeaterEnergy(tt, col); err == nil || !strings.Contains(err.Error(), "on 2 times") {
		t.Errorf("HeaterEnergy of two pulses: error %v, want one saying the heater is on 2 times", err)
	}
}

func TestHeaterPulsesLevels(t *testing.T) {
	// Calibrations at two energies in one log (DOMAIN §3: several
	// energies), 0.2 W and 0.8 W for 100 s each, the off readings 2 mW
	// with ±1 mW noise, and one spurious 3 W reading inside the second
	// period. analytic: Q = P·t_h = 20 J and 80 J (+ the 2 mW offset in
	// the two edge half-intervals, and the spike's extra 2.2 W over one
	// 10 s reading).
	var tt, p []float64
	for k := 0; k <= 100; k++ {
		tk := float64(10 * k)
		v := 0.002 + 0.001*float64(1-2*(k%2))
		switch {
		case tk >= 200 && tk < 300:
			v = 0.2
		case tk >= 600 && tk < 700:
			v = 0.8
		}
		tt, p = append(tt, tk), append(p, v)
	}
	p[65] = 3
	ps, err := HeaterPulses(tt, p)
	if err != nil {
		t.Fatal(err)
	}
	if len(ps) != 2 {
		t.Fatalf("%d heating periods, want 2", len(ps))
	}
	// Neighbours of the edges: k = 19 and 59 read 0.001 W, k = 30 and 70
	// read 0.003 W: (0.001 + 0.003)/2·10 J = 0.02 J for each period.
	for i, want := range []struct{ on, off, q float64 }{{195, 295, 20 + 0.02}, {595, 695, 80 + 0.02 + 22}} {
		if h := ps[i]; h.On != want.on || h.Off != want.off || !chainClose(h.Energy, want.q, 1e-9, 0) {
			t.Errorf("period %d: %g–%g s, %.6g J; want %g–%g s, %.6g J", i+1, h.On, h.Off, h.Energy, want.on, want.off, want.q)
		}
	}
}

func TestHeaterPulsesErrors(t *testing.T) {
	nan := math.NaN()
	for _, tc := range []struct {
		name string
		t, p []float64
		want string
	}{
		{"misaligned", []float64{0, 1, 2}, []float64{0, 1}, "aligned"},
		{"never on", []float64{0, 1, 2, 3}, []float64{0, 0, nan, 0}, "never on"},
		{"all blank", []float64{0, 1, 2}, []float64{nan, nan, nan}, "never on"},
		{"infinite readings are blank", []float64{0, 1, 2}, []float64{math.Inf(1), 0, math.Inf(1)}, "never on"},
		{"a glitch, not a heating period", []float64{0, 1, 2, 3, 4}, []float64{0, 0, 1, 0, 0}, "only 1 reading"},
		{"a long blank run splits the period", []float64{0, 1, 2, 3, 4, 5, 6, 7, 8, 9}, []float64{0, 1, 1, nan, nan, nan, 1, 1, 1, 0}, "only 2 reading"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := HeaterPulses(tc.t, tc.p)
			if !errors.Is(err, ErrHeaterColumn) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want ErrHeaterColumn containing %q", err, tc.want)
			}
		})
	}
}

func ExampleHeaterPulses() {
	// A heater-power column read every 10 s: 1.000 W from 120 s to 230 s,
	// blank while off, as many loggers write it.
	var t, p []float64
	for k := 0; k <= 40; k++ {
		t = append(t, float64(10*k))
		v := math.NaN()
		if k >= 12 && k <= 23 {
			v = 1.000
		}
		p = append(p, v)
	}
	ps, err := HeaterPulses(t, p)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, h := range ps {
		fmt.Printf("on %.0f s, off %.0f s: %.1f ± %.1f J at %.3f W\n", h.On, h.Off, h.Energy, h.UEnergy, h.MeanPower)
	}
	// analytic, as in TestHeaterPulses: 12 readings × 1 W × 10 s = 120 J,
	// edges halfway between readings; s_P = 0, so u = √2·(1 W·10 s/√12) =
	// 4.08 J from the two edges.

	// Output:
	// on 115 s, off 235 s: 120.0 ± 4.1 J at 1.000 W
}
