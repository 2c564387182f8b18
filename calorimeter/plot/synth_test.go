package plot

import (
	"math"
	"math/rand/v2"
)

// synthRun describes an invented coffee-cup run for the figure tests: the
// vessel follows Newton's law dθ/dt = G(θ∞ − θ) + q(t), with a first-order
// release q = R·λ·exp(−λ(t − t_mix)) after the mixing time (common practice
// for simulated thermograms; the numbers are typical of DOMAIN §1).
type synthRun struct {
	n        int     // readings
	step     float64 // s between readings
	mix      float64 // s
	rise     float64 // K, adiabatic rise R
	lambda   float64 // 1/s
	g        float64 // 1/s, cooling constant
	thetaInf float64 // K, convergence temperature
	theta0   float64 // K at t = 0
	noise    float64 // K, standard deviation of the reading noise
	spikes   []int   // readings to spoil by +0.8 K
	seed     uint64
}

func defaultRun(n int) synthRun {
	return synthRun{
		n: n, step: 900.0 / float64(n-1), mix: 300, rise: 5, lambda: 1.0 / 25,
		g: 2e-4, thetaInf: 297.15, theta0: 293.85, noise: 0.004, spikes: []int{n / 9, n * 7 / 9}, seed: 7,
	}
}

// thermogram simulates the run and reduces it the simple way: least-squares
// drift lines over the fore (0 … t_mix) and after (t_mix + 150 s … end)
// periods and the equal-area time found by bisection on trapezoid areas.
func (s synthRun) thermogram() Thermogram {
	rng := rand.New(rand.NewPCG(s.seed, 1))
	th := Thermogram{Title: "Run KX-14: KCl in water (invented)", Method: "equal-area"}
	theta := s.theta0
	const dt = 0.05 // s, Euler step
	t := 0.0
	for i := range s.n {
		target := float64(i) * s.step
		for t < target-1e-9 {
			h := math.Min(dt, target-t)
			q := 0.0
			if t >= s.mix {
				q = s.rise * s.lambda * math.Exp(-s.lambda*(t-s.mix))
			}
			theta += h * (s.g*(s.thetaInf-theta) - q)
			t += h
		}
		th.Time = append(th.Time, target)
		th.Temperature = append(th.Temperature, theta+s.noise*rng.NormFloat64())
	}
	for _, i := range s.spikes {
		th.Temperature[i] += 0.8
	}
	th.Excluded = append([]int(nil), s.spikes...)
	end := th.Time[s.n-1]
	th.Pre = [2]float64{0, s.mix}
	th.Main = [2]float64{s.mix, s.mix + 150}
	th.Post = [2]float64{s.mix + 150, end}
	th.MixTime = s.mix
	ex := map[int]bool{}
	for _, i := range s.spikes {
		ex[i] = true
	}
	fit := func(p [2]float64) Line {
		var n, st, sT, stt, stT float64
		for i, ti := range th.Time {
			if ti >= p[0] && ti <= p[1] && !ex[i] {
				n++
				st += ti
				sT += th.Temperature[i]
				stt += ti * ti
				stT += ti * th.Temperature[i]
			}
		}
		b := (n*stT - st*sT) / (n*stt - st*st)
		return Line{Slope: b, Intercept: (sT - b*st) / n}
	}
	th.PreLine, th.PostLine = fit(th.Pre), fit(th.Post)
	// Equal areas: ∫_mix^tx (θ − pre) dt = ∫_tx^end (post − θ) dt, so
	// areaDiff(tx) = Σ_{t < tx} (θ − pre)·Δt + Σ_{t > tx} (θ − post)·Δt
	// (trapezoids over the main period) is zero at tx.
	areaDiff := func(tx float64) float64 {
		var a float64
		for i := 1; i < s.n; i++ {
			t0, t1 := th.Time[i-1], th.Time[i]
			if t1 <= th.Main[0] || t0 >= th.Main[1] || ex[i] || ex[i-1] {
				continue
			}
			l := th.PreLine
			if (t0+t1)/2 > tx {
				l = th.PostLine
			}
			a += (th.Temperature[i-1] - l.At(t0) + th.Temperature[i] - l.At(t1)) / 2 * (t1 - t0)
		}
		return a
	}
	lo, hi := th.Main[0], th.Main[1]
	for range 60 {
		mid := (lo + hi) / 2
		if (areaDiff(mid) > 0) == (areaDiff(hi) > 0) {
			hi = mid
		} else {
			lo = mid
		}
	}
	th.Tx = (lo + hi) / 2
	th.DeltaT = th.PostLine.At(th.Tx) - th.PreLine.At(th.Tx)
	th.UDeltaT = 0.012
	return th
}
