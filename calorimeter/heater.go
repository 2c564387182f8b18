package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// ErrHeaterColumn is wrapped by the errors of HeaterPulses and HeaterEnergy
// about the heater-power column itself.
var ErrHeaterColumn = errors.New("heater power column")

// HeaterPulse is the electrical energy read from a heater-power column for
// one period with the heater on.
type HeaterPulse struct {
	Energy, UEnergy float64 // J
	On, Off         float64 // s, times the heater was switched on and off
	MeanPower       float64 // W while on
	Readings        int     // power readings taken while on
}

// heaterOnFraction is the part of the way from the off-level to the
// on-level that a reading must pass to count as on.
const heaterOnFraction = 0.2

// heaterMedian returns the median of v (not empty); v is reordered.
func heaterMedian(v []float64) float64 {
	sort.Float64s(v)
	n := len(v)
	if n%2 == 1 {
		return v[n/2]
	}
	return (v[n/2-1] + v[n/2]) / 2
}

// heaterMinReadings is the fewest on-readings a pulse must have: fewer is a
// glitch of the column rather than a heating period. heaterMaxGap is the
// longest run of blank readings bridged inside a heating period.
const (
	heaterMinReadings = 3
	heaterMaxGap      = 2
)

// HeaterPulses finds the periods a heater-power column p (W), read at the
// times t (s, increasing), shows the heater on, and integrates each.
//
// A reading is "on" when it exceeds the off-level by a fifth of the
// on-level: the on-level is the median of the readings above half the
// third largest, the off-level the median of the others. So a small
// offset or noise while the heater is off, or a glitch of one or two
// readings, does not move the edges, and a log may hold heating periods
// of different powers down to a fifth of the strongest (calibrations at
// several energies, DOMAIN §3).
//
// Blank readings (NaN; infinite ones are taken as blank) are what many
// loggers write while the heater is off: next to a heating period they
// count as 0 W; inside one, a run of up to heaterMaxGap of them is bridged
// (the integral runs over the readings on either side), and a longer run
// ends the period. Each edge is put halfway between the last reading on
// one side and the first on the
// other. The energy of a period is the trapezoid-rule integral of the
// column from the reading before its first on-reading to the one after its
// last,
//
//	Q = Σ_k (p_{k−1} + p_k)/2·(t_k − t_{k−1})
//
// which for a constant power P and even sampling is P·(Off − On). Its
// standard uncertainty combines the scatter of the n on-readings, a type A
// uncertainty of their mean s_P/√n over the heating time, with the timing
// of the two switching edges, each known only within one sampling interval
// Δt (rectangular, u = P̄·Δt/√12 per edge) — common practice:
//
//	u²(Q) = ((Off − On)·s_P/√n)² + 2·(P̄·Δt/√12)²
func HeaterPulses(t, p []float64) ([]HeaterPulse, error) {
	if len(t) != len(p) || len(t) < 3 {
		return nil, fmt.Errorf("%w: need at least 3 readings aligned with the times, got %d times and %d readings", ErrHeaterColumn, len(t), len(p))
	}
	// Readings that are not finite are taken as blank.
	p = append([]float64(nil), p...)
	var finite []float64
	for k, v := range p {
		if math.IsInf(v, 0) {
			p[k] = math.NaN()
		} else if !math.IsNaN(v) {
			finite = append(finite, v)
		}
	}
	sort.Float64s(finite)
	if len(finite) == 0 || !(finite[len(finite)-1] > 0) {
		return nil, fmt.Errorf("%w: the heater is never on (no positive, finite power readings)", ErrHeaterColumn)
	}
	// The top of the scale is the heaterMinReadings-th largest reading, so
	// that a glitch of fewer readings cannot set it.
	top := finite[max(len(finite)-heaterMinReadings, 0)]
	var high, low []float64
	for _, v := range finite {
		switch {
		case v > top/2:
			high = append(high, v)
		default:
			low = append(low, v)
		}
	}
	level, off := heaterMedian(high), 0.0
	if len(low) > 0 {
		off = heaterMedian(low)
	}
	threshold := off + heaterOnFraction*(level-off)

	on := func(k int) bool { return !math.IsNaN(p[k]) && p[k] > threshold }
	var out []HeaterPulse
	for k := 0; k < len(p); {
		if !on(k) {
			k++
			continue
		}
		first, last := k, k
		for k = last + 1; k < len(p); {
			j := k
			for j < len(p) && math.IsNaN(p[j]) && j-k < heaterMaxGap+1 {
				j++
			}
			if j < len(p) && j-k <= heaterMaxGap && on(j) {
				last, k = j, j+1
				continue
			}
			break
		}
		hp, err := heaterIntegrate(t, p, first, last, threshold)
		if err != nil {
			return nil, err
		}
		out = append(out, hp)
		k = last + 1
	}
	return out, nil
}

// heaterIntegrate integrates the heating period whose on-readings run from
// index first to last.
func heaterIntegrate(t, p []float64, first, last int, threshold float64) (HeaterPulse, error) {
	var hp HeaterPulse
	var sum, sum2 float64
	var ts, ps []float64
	if first > 0 {
		ts, ps = append(ts, t[first-1]), append(ps, heaterBlankOff(p[first-1]))
	}
	n := 0
	for k := first; k <= last; k++ {
		v := p[k]
		if math.IsNaN(v) {
			continue
		}
		ts, ps = append(ts, t[k]), append(ps, v)
		if v > threshold {
			sum += v
			sum2 += v * v
			n++
		}
	}
	if last < len(t)-1 {
		ts, ps = append(ts, t[last+1]), append(ps, heaterBlankOff(p[last+1]))
	}
	if n < heaterMinReadings {
		return hp, fmt.Errorf("%w: the heater is on for only %s at %g s; a heating period needs at least %d",
			ErrHeaterColumn, riseReadings(n), t[first], heaterMinReadings)
	}
	var q float64
	for k := 1; k < len(ts); k++ {
		q += (ps[k-1] + ps[k]) / 2 * (ts[k] - ts[k-1])
	}
	// Edges halfway between readings; at the ends of the log, at the reading.
	hp.On, hp.Off = t[first], t[last]
	if first > 0 {
		hp.On = (t[first-1] + t[first]) / 2
	}
	if last < len(t)-1 {
		hp.Off = (t[last] + t[last+1]) / 2
	}
	mean := sum / float64(n)
	sd := math.Sqrt(math.Max(0, (sum2-float64(n)*mean*mean)/float64(n-1)))
	dt := (ts[len(ts)-1] - ts[0]) / float64(len(ts)-1)
	uScatter := (hp.Off - hp.On) * sd / math.Sqrt(float64(n))
	uEdge := mean * dt / math.Sqrt(12)
	hp.Energy, hp.UEnergy, hp.MeanPower, hp.Readings = q, math.Sqrt(uScatter*uScatter+2*uEdge*uEdge), mean, n
	if !(q > 0) {
		return hp, fmt.Errorf("%w: the heating period at %g s integrates to %.4g J; it must be positive", ErrHeaterColumn, hp.On, q)
	}
	return hp, nil
}

// heaterBlankOff reads a blank reading next to a heating period as 0 W.
func heaterBlankOff(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

// HeaterEnergy integrates a heater-power column p (W) over time t (s) for
// a log with one heating period (HeaterPulses gives the method). A column
// with several heating periods is an error: calibrate each with
// CalibratePulses.
func HeaterEnergy(t, p []float64) (HeaterPulse, error) {
	ps, err := HeaterPulses(t, p)
	if err != nil {
		return HeaterPulse{}, err
	}
	if len(ps) != 1 {
		return HeaterPulse{}, fmt.Errorf("%w: the heater is on %d times (first at %g s, last at %g s); calibrate each heating period on its own",
			ErrHeaterColumn, len(ps), ps[0].On, ps[len(ps)-1].On)
	}
	return ps[0], nil
}
