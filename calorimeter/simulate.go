package calorimeter

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
)

// Simulation describes a synthetic thermogram: a stirred vessel of heat
// capacity ε that exchanges heat with its surroundings by Newton's law and
// receives a heat Q from a process that starts at MixTime (DOMAIN §1),
//
//	dθ/dt = G(θ∞ − θ) + P(t)/ε
//
// where the release power P(t) is either first order,
//
//	P(t) = Q·λ·e^{−λ(t − t_mix)}          (t ≥ t_mix)
//
// (a dissolution or reaction; λ = 0 means an instantaneous release), or a
// constant-power heater, P = Q/t_h for t_mix ≤ t < t_mix + t_h. The probe
// follows the contents with a first-order lag τ,
//
//	dθ_p/dt = (θ − θ_p)/τ
//
// and each reading adds Gaussian noise of standard deviation σ, optionally
// AR(1) correlated from one reading to the next (stationary, so the marginal
// standard deviation stays σ), is rounded to the resolution δ, and may carry
// spikes. The linear system is integrated exactly: the state (vessel, probe,
// heat still to come, heater power) is carried from reading to reading by
// the matrix exponential of its generator (gonum mat.Dense.Exp, a Padé
// approximant with scaling and squaring), so the only error is rounding.
//
// The quantity a reduction must recover is the adiabatic change
//
//	ΔT_corr = Q/ε
//
// which Run returns as truth. The probe starts in step with the vessel's
// drift, so the log has no start-up transient.
type Simulation struct {
	Duration float64 // length of the log (s); readings at 0, Δt, 2Δt, … ≤ Duration
	Interval float64 // sampling interval Δt (s)
	// Jitter moves each reading time after the first by a uniform amount in
	// ±Jitter·Δt (uneven sampling); 0 for even sampling, below 0.5.
	Jitter float64

	MixTime                float64 // start of the process t_mix (s)
	StartTemperature       float64 // vessel temperature at t = 0 (K)
	ConvergenceTemperature float64 // θ∞ (K)
	CoolingConstant        float64 // G (1/s), ≥ 0
	HeatCapacity           float64 // ε (J/K), > 0
	Heat                   float64 // Q (J); negative for an endothermic process

	ReleaseRate float64 // λ of a first-order release (1/s); 0 = instantaneous
	HeaterTime  float64 // t_h (s); > 0 selects a constant-power heater instead of a first-order release
	ProbeLag    float64 // τ (s); 0 = no lag

	Noise    float64 // σ (K)
	NoiseAR  float64 // lag-1 coefficient φ of AR(1) noise, in [0, 1); 0 = white
	Quantum  float64 // resolution δ (K); 0 = none
	Spikes   []float64
	SpikeAdd float64 // added to the reading nearest each time in Spikes (K)

	Seed uint64 // seeds the PCG generator for jitter and noise
}

// errSimulation is wrapped by Simulation.Validate errors.
var errSimulation = errors.New("invalid simulation")

// Validate reports the first setting Run cannot use.
func (s Simulation) Validate() error {
	bad := func(format string, a ...any) error {
		return fmt.Errorf("simulation: %w: %s", errSimulation, fmt.Sprintf(format, a...))
	}
	all := []float64{s.Duration, s.Interval, s.Jitter, s.MixTime, s.StartTemperature,
		s.ConvergenceTemperature, s.CoolingConstant, s.HeatCapacity, s.Heat, s.ReleaseRate,
		s.HeaterTime, s.ProbeLag, s.Noise, s.NoiseAR, s.Quantum, s.SpikeAdd}
	for _, v := range all {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return bad("a setting is %v", v)
		}
	}
	switch {
	case !(s.Interval > 0):
		return bad("sampling interval %g s is not positive", s.Interval)
	case !(s.Duration >= 2*s.Interval):
		return bad("duration %g s holds fewer than 3 readings at %g s", s.Duration, s.Interval)
	case s.Duration/s.Interval > 1e8:
		return bad("duration %g s at %g s is more than 10⁸ readings", s.Duration, s.Interval)
	case s.Jitter < 0 || s.Jitter >= 0.5:
		return bad("jitter %g is outside [0, 0.5)", s.Jitter)
	case !(s.HeatCapacity > 0):
		return bad("heat capacity %g J/K is not positive", s.HeatCapacity)
	case s.CoolingConstant < 0:
		return bad("cooling constant %g 1/s is negative", s.CoolingConstant)
	case s.ReleaseRate < 0 || s.HeaterTime < 0 || s.ProbeLag < 0 || s.Noise < 0 || s.Quantum < 0:
		return bad("release rate, heater time, probe lag, noise and resolution must not be negative")
	case s.NoiseAR < 0 || s.NoiseAR >= 1:
		return bad("AR(1) coefficient %g is outside [0, 1)", s.NoiseAR)
	case s.CoolingConstant*s.ProbeLag >= 1:
		return bad("probe lag %g s is not short against 1/G = %g s", s.ProbeLag, 1/s.CoolingConstant)
	case s.Quantum > 0 && s.StartTemperature/s.Quantum > 1e14:
		return bad("resolution %g K is too fine for float64 at %g K", s.Quantum, s.StartTemperature)
	}
	return nil
}

// Truth returns the adiabatic temperature change Q/ε (K) the log encodes.
func (s Simulation) Truth() float64 { return s.Heat / s.HeatCapacity }

// Run generates the log: reading times t (s, from 0), probe readings theta
// (K) and the true corrected temperature change Q/ε (K). It returns nil
// slices and NaN when Validate fails.
func (s Simulation) Run() (t, theta []float64, truth float64) {
	if s.Validate() != nil {
		return nil, nil, math.NaN()
	}
	rng := rand.New(rand.NewPCG(s.Seed, s.Seed^0x9e3779b97f4a7c15))
	n := int(math.Floor(s.Duration/s.Interval+1e-9)) + 1
	t = make([]float64, n)
	for k := range t {
		t[k] = float64(k) * s.Interval
		if k > 0 && s.Jitter > 0 {
			t[k] += (2*rng.Float64() - 1) * s.Jitter * s.Interval
		}
	}
	theta = s.simClean(t)
	var e float64
	for k := range theta {
		w := rng.NormFloat64()
		if k == 0 || s.NoiseAR == 0 {
			e = s.Noise * w
		} else {
			e = s.NoiseAR*e + math.Sqrt(1-s.NoiseAR*s.NoiseAR)*s.Noise*w
		}
		theta[k] += e
	}
	for _, ts := range s.Spikes {
		k := int(math.Round(ts / s.Interval))
		if k >= 0 && k < n {
			theta[k] += s.SpikeAdd
		}
	}
	if s.Quantum > 0 {
		for k, v := range theta {
			theta[k] = s.Quantum * math.Round(v/s.Quantum)
		}
	}
	return t, theta, s.Truth()
}

// simClean returns the noise-free probe temperature at the times t
// (increasing, t[0] = 0).
//
// The state is v = (x, y, q, p): vessel and probe temperature relative to
// θ∞, heat still to be released by the first-order process (as a
// temperature, Q/ε at t_mix) and heater power over ε (K/s). Between events
// it obeys v′ = M·v with
//
//	x′ = −G·x + λ·q + p
//	y′ = (x − y)/τ
//	q′ = −λ·q
//	p′ = 0
//
// so v(t + h) = exp(M·h)·v(t) exactly. Without lag the y row is dropped and
// the probe reads x.
func (s Simulation) simClean(t []float64) []float64 {
	lag := s.ProbeLag > 0
	dim := 3
	ix, iy, iq, ip := 0, 0, 1, 2
	if lag {
		dim = 4
		iy, iq, ip = 1, 2, 3
	}
	gen := mat.NewDense(dim, dim, nil)
	g := s.CoolingConstant
	lambda := s.ReleaseRate
	gen.Set(ix, ix, -g)
	gen.Set(ix, iq, lambda)
	gen.Set(ix, ip, 1)
	gen.Set(iq, iq, -lambda)
	if lag {
		gen.Set(iy, ix, 1/s.ProbeLag)
		gen.Set(iy, iy, -1/s.ProbeLag)
	}
	expm := func(h float64) *mat.Dense {
		var a, e mat.Dense
		a.Scale(h, gen)
		e.Exp(&a)
		return &e
	}
	regular := expm(s.Interval) // one propagator serves an evenly sampled log
	v := mat.NewVecDense(dim, nil)
	x0 := s.StartTemperature - s.ConvergenceTemperature
	v.SetVec(ix, x0)
	if lag {
		// In step with the drift mode e^{−Gt}: y = x/(1 − Gτ).
		v.SetVec(iy, x0/(1-g*s.ProbeLag))
	}
	rise := s.Truth()
	type event struct {
		at    float64
		apply func()
	}
	var events []event
	if s.HeaterTime > 0 {
		events = append(events,
			event{s.MixTime, func() { v.SetVec(ip, rise/s.HeaterTime) }},
			event{s.MixTime + s.HeaterTime, func() { v.SetVec(ip, 0) }})
	} else if lambda > 0 {
		events = append(events, event{s.MixTime, func() { v.SetVec(iq, v.AtVec(iq)+rise) }})
	} else {
		events = append(events, event{s.MixTime, func() { v.SetVec(ix, v.AtVec(ix)+rise) }})
	}
	for len(events) > 0 && events[0].at <= t[0] {
		events[0].apply()
		events = events[1:]
	}
	out := make([]float64, len(t))
	read := func() float64 {
		if lag {
			return v.AtVec(iy)
		}
		return v.AtVec(ix)
	}
	out[0] = s.ConvergenceTemperature + read()
	var w mat.VecDense
	step := func(h float64) {
		if h <= 0 {
			return
		}
		w.MulVec(expm(h), v)
		v.CopyVec(&w)
	}
	even := s.Jitter == 0
	for k := 1; k < len(t); k++ {
		now := t[k-1]
		for len(events) > 0 && events[0].at <= t[k] {
			step(events[0].at - now)
			now = events[0].at
			events[0].apply()
			events = events[1:]
		}
		if even && now == t[k-1] {
			w.MulVec(regular, v)
			v.CopyVec(&w)
		} else {
			step(t[k] - now)
		}
		out[k] = s.ConvergenceTemperature + read()
	}
	return out
}
