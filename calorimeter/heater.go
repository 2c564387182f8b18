package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// HeaterPulse is the electrical energy read from a heater-power column.
type HeaterPulse struct {
	Energy, UEnergy float64 // J
	On, Off         float64 // s, times the heater was switched on and off
	MeanPower       float64 // W while on
}

// HeaterEnergy integrates a heater-power column p (W) over time t (s) by the
// trapezoid rule over the readings where the heater is on (power above half
// of the median on-power). Its standard uncertainty combines the scatter of
// the on-power readings, u_P = s_P/√n over the heating time, with the timing
// of the two switching edges, each known only to within one sampling
// interval Δt (rectangular: u = P·Δt/√12 per edge) — common practice.
// Blank (NaN) readings are skipped.
func HeaterEnergy(t, p []float64) (HeaterPulse, error) {
	var hp HeaterPulse
	if len(t) != len(p) || len(t) < 3 {
		return hp, errors.New("heater power column: need at least 3 readings aligned with the times")
	}
	var pos []float64
	for _, v := range p {
		if !math.IsNaN(v) && v > 0 {
			pos = append(pos, v)
		}
	}
	if len(pos) < 2 {
		return hp, errors.New("heater power column: the heater is never on (no positive power readings)")
	}
	sort.Float64s(pos)
	threshold := pos[len(pos)/2] / 2
	first, last := -1, -1
	var sum, sum2 float64
	n := 0
	for i, v := range p {
		if !math.IsNaN(v) && v > threshold {
			if first < 0 {
				first = i
			}
			last = i
			sum += v
			sum2 += v * v
			n++
		}
	}
	var q float64
	for i := 1; i < len(t); i++ {
		a, b := p[i-1], p[i]
		if math.IsNaN(a) || math.IsNaN(b) {
			continue
		}
		q += (a + b) / 2 * (t[i] - t[i-1])
	}
	mean := sum / float64(n)
	sd := 0.0
	if n > 1 {
		sd = math.Sqrt(math.Max(0, (sum2-float64(n)*mean*mean)/float64(n-1)))
	}
	dt := (t[len(t)-1] - t[0]) / float64(len(t)-1)
	on, off := t[first], t[last]
	dur := off - on + dt
	uScatter := dur * sd / math.Sqrt(float64(n))
	uEdge := mean * dt / math.Sqrt(12)
	hp = HeaterPulse{Energy: q, UEnergy: math.Sqrt(uScatter*uScatter + 2*uEdge*uEdge), On: on, Off: off, MeanPower: mean}
	if !(q > 0) {
		return hp, fmt.Errorf("heater power column integrates to %.4g J; it must be positive", q)
	}
	return hp, nil
}
