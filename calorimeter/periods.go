package calorimeter

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"

	"calred/fit"
)

// Period is a time interval of the log in seconds since its first reading.
// It reads and writes JSON as [start, end].
type Period struct {
	Start, End float64
}

// MarshalJSON writes [start, end].
func (p Period) MarshalJSON() ([]byte, error) {
	return []byte("[" + riseJSONNumber(p.Start) + "," + riseJSONNumber(p.End) + "]"), nil
}

// UnmarshalJSON reads [start, end].
func (p *Period) UnmarshalJSON(b []byte) error {
	var v []float64
	if err := json.Unmarshal(b, &v); err != nil {
		return fmt.Errorf("period: %w", err)
	}
	if len(v) != 2 {
		return fmt.Errorf("period: want [start, end], got %d numbers", len(v))
	}
	p.Start, p.End = v[0], v[1]
	return nil
}

// riseJSONNumber formats a finite number for JSON and null otherwise.
func riseJSONNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "null"
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// ErrNoProcess is wrapped by AnalyseRise when no process (mixing, ampoule
// break, heater) can be found in the log.
var ErrNoProcess = errors.New("no process found")

// ErrNoChange is the ErrNoProcess of a log whose readings never change (a
// probe out of the vessel, the wrong file); errors.Is matches both.
var ErrNoChange = fmt.Errorf("%w: the temperature does not change at all", ErrNoProcess)

// periodPlan is the outcome of period detection.
type periodPlan struct {
	tm, tmU    float64 // mixing time and how sure its detection is (s)
	detected   bool    // tm was detected
	iStart, iF int     // readings [iStart, iF) form the fore period
	iP, iEnd   int     // readings [iP, iEnd) form the after period
	t1, t2     float64 // main period [t1, t2]
	tResp      float64 // provisional 63 % response time t63 − t_mix (s)
}

// Period detection (DOMAIN §2, "period detection").
//
// Noise σ: the robust standard deviation of the readings' departures from
// the line through their neighbours,
//
//	d_k = θ_k − [θ_{k−1}(t_{k+1} − t_k) + θ_{k+1}(t_k − t_{k−1})]/(t_{k+1} − t_{k−1}),
//
// scaled by 1.4826·MAD and by √(1 + a² + b²) for the interpolation weights
// a, b (√1.5 for even sampling), which ignores the few readings of the main
// period. Long logs are averaged into about 10⁴ bins first.
//
// Start of the process: the local least-squares slope over a window of
// 2w + 1 readings, with the smallest w at which its largest departure from
// the median slope exceeds 30 times its noise σ/√Σ(t − t̄)² (at least 8
// times with the largest window, else ErrNoProcess). Walking back from the
// peak to where the departure falls below 10 % of the peak brackets the
// onset; readings before it give a provisional fore fit (quadratic), and
// the first of three consecutive readings more than 4 residual SDs off it
// marks the departure. The mixing time is then the onset time τ of a hinge
//
//	θ(t) = fore(t) + [t > τ]·(a·(t − τ) + b·(t − τ)²),   a ≥ 0 (in the direction of the rise),
//
// fitted over the departure and the first part of the rise (to 15 % of it,
// at least four readings past the departure and at most 40),
// minimising the sum of squares over τ on a grid of Δt/5. The linear term
// follows an instantaneous or first-order release, the quadratic a release
// seen through a lagging probe or a heater. MixTimeU is the half-width of
// the set of τ whose sum of squares is within one residual variance of the
// best, the profile-likelihood 1σ interval (at least the grid step/√12).
//
// End of the main period: with the fore pair and a provisional after pair
// (the last 40 % of the record after t_mix) the drift g(θ) = g_i − G(θ −
// T_i) is known, and the departure e = slope − g(θ) of the local slope from
// it has noise σ_e, the larger of σ/√Σ(t − t̄)² and the robust spread of e
// in the provisional after period. Counted back from the end of the log,
// the last place where e exceeds 4σ_e in the direction of the process in
// two neighbouring windows marks t_c, the end of the visible release. The
// tail below that limit still carries a heat of about 4σ_e·τ_tail, where
// τ_tail is the time e takes to fall from 30 % of its peak to 4σ_e over the
// logarithm of that ratio (bounded by Δt and three 63 % response times: a
// first-order release gives 1/λ, a heater the probe lag). The main period
// ends at
//
//	t2 = t_c + max(2τ_tail, τ_tail·ln(4σ_e·τ_tail/ε)),   ε = σ/(10√n_after),
//
// when that tail has fallen below a tenth of the noise on the after
// period's mean — a tail a·e^{−t/τ} shrinks by e^{−m} over m time
// constants. The after period keeps at least a quarter of the record after
// t_mix (and MinAfterS) unless t_c + 2τ_tail itself reaches further.
func periodDetect(d *riseData, opt RiseOptions, lim CheckLimits) (periodPlan, error) {
	var pl periodPlan
	t, y := d.t, d.y
	n := len(t)
	pl.iStart, pl.iEnd = 0, n
	if opt.Pre != nil {
		pl.iStart = sort0(t, opt.Pre.Start)
	}
	if opt.Post != nil {
		pl.iEnd = sortAfter(t, opt.Post.End)
	}
	bins := periodBins(t[pl.iStart:pl.iEnd], y[pl.iStart:pl.iEnd], pl.iStart)

	// A log whose readings never change holds no process to look for.
	if math.IsNaN(opt.MixTime) && periodFlat(y[pl.iStart:pl.iEnd]) {
		return pl, fmt.Errorf("%w (%s of %.6g K from %.4g s to %.4g s), so the log holds no process",
			ErrNoChange, riseReadings(pl.iEnd-pl.iStart), y[pl.iStart], t[pl.iStart], t[pl.iEnd-1])
	}

	// The local slopes and the process they show.
	peak, err := periodPeak(bins, periodNoise(bins.t, bins.y))
	if err != nil && math.IsNaN(opt.MixTime) {
		return pl, fmt.Errorf("%w (hint: give the mixing time)", err)
	}

	// Mixing time.
	switch {
	case !math.IsNaN(opt.MixTime):
		pl.tm = opt.MixTime
	default:
		tm, u, err := periodMixTime(d, bins, peak, opt.Pre, pl.iStart)
		if err != nil {
			return pl, err
		}
		pl.tm, pl.tmU, pl.detected = tm, u, true
	}

	// Fore period: up to the mixing time (less twice its uncertainty).
	if opt.Pre != nil {
		pl.iF = sortAfter(t, opt.Pre.End)
		pl.t1 = opt.Pre.End
	} else {
		pl.iF = sortAfter(t, pl.tm-2*pl.tmU)
		if pl.iF > 0 {
			pl.t1 = t[pl.iF-1]
		}
	}
	if pl.iF-pl.iStart < 3 {
		return pl, fmt.Errorf("fore period: %w: %s before the mixing time %.4g s, need at least 3",
			ErrTooFewReadings, riseReadings(pl.iF-pl.iStart), pl.tm)
	}

	// After period.
	if opt.Post != nil {
		pl.iP = sort0(t, opt.Post.Start)
		pl.t2 = opt.Post.Start
		pl.tResp = periodResponse(d, pl)
	} else {
		if err := periodEnd(d, bins, peak, &pl, lim); err != nil {
			return pl, err
		}
	}
	if pl.iEnd-pl.iP < 3 {
		return pl, fmt.Errorf("after period: %w: %s after %.4g s, need at least 3 (the temperature may still be changing at the end of the log)",
			ErrTooFewReadings, riseReadings(pl.iEnd-pl.iP), pl.t2)
	}
	if !(pl.t1 < pl.t2) {
		return pl, fmt.Errorf("main period: starts at %.4g s but ends at %.4g s", pl.t1, pl.t2)
	}
	return pl, nil
}

// periodFlat reports whether the readings y never change: their range is
// within float rounding (1e-12 of their size, as riseQuantum allows).
func periodFlat(y []float64) bool {
	if len(y) == 0 {
		return false
	}
	lo, hi := y[0], y[0]
	for _, v := range y {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return hi-lo <= 1e-12*math.Max(math.Abs(lo), math.Abs(hi))
}

// sort0 returns the index of the first t ≥ v.
func sort0(t []float64, v float64) int {
	i, _ := slices.BinarySearch(t, v)
	return i
}

// sortAfter returns the index of the first t > v.
func sortAfter(t []float64, v float64) int {
	i := sort0(t, v)
	for i < len(t) && t[i] <= v {
		i++
	}
	return i
}

// periodSeries is the record averaged into bins of equal count, with the
// raw index range of each bin.
type periodSeries struct {
	t, y   []float64
	lo, hi []int // raw indices [lo, hi) of each bin
}

// periodBins averages t, y (raw indices starting at off) into at most about
// 10⁴ bins; short records are kept as they are.
func periodBins(t, y []float64, off int) periodSeries {
	n := len(t)
	per := 1
	if n > 20000 {
		per = (n + 9999) / 10000
	}
	var s periodSeries
	for k := 0; k < n; k += per {
		e := min(n, k+per)
		var st, sy float64
		for i := k; i < e; i++ {
			st += t[i]
			sy += y[i]
		}
		c := float64(e - k)
		s.t = append(s.t, st/c)
		s.y = append(s.y, sy/c)
		s.lo = append(s.lo, off+k)
		s.hi = append(s.hi, off+e)
	}
	return s
}

// periodNoise is the robust noise estimate described at periodDetect, from
// at most 20 000 evenly spread values.
func periodNoise(t, y []float64) float64 {
	n := len(t)
	if n < 3 {
		return 0
	}
	stride := max(1, (n-2)/20000)
	var d []float64
	for k := 1; k < n-1; k += stride {
		span := t[k+1] - t[k-1]
		a := (t[k+1] - t[k]) / span
		b := (t[k] - t[k-1]) / span
		d = append(d, (y[k]-(a*y[k-1]+b*y[k+1]))/math.Sqrt(1+a*a+b*b))
	}
	s := 1.4826 * fit.MAD(d)
	if !(s > 0) {
		// More than half the departures are zero (readings stuck on a
		// resolution step): the mean absolute deviation, as fit.RobustZ does.
		m := fit.Median(d)
		var sum float64
		for _, v := range d {
			sum += math.Abs(v - m)
		}
		s = 1.2533141373155003 * sum / float64(len(d))
	}
	return s
}

// periodSlopes returns the least-squares slope of y on t over the window
// [k − hw, k + hw] (clipped at the ends) and its noise factor 1/√Σ(t − t̄)².
func periodSlopes(t, y []float64, hw int) (slope, inv []float64) {
	n := len(t)
	slope = make([]float64, n)
	inv = make([]float64, n)
	for k := range t {
		lo, hi := max(0, k-hw), min(n, k+hw+1)
		var st, sy float64
		for i := lo; i < hi; i++ {
			st += t[i]
			sy += y[i]
		}
		m := float64(hi - lo)
		ct, cy := st/m, sy/m
		var stt, sty float64
		for i := lo; i < hi; i++ {
			dt := t[i] - ct
			stt += dt * dt
			sty += dt * (y[i] - cy)
		}
		slope[k] = sty / stt
		inv[k] = 1 / math.Sqrt(stt)
	}
	return slope, inv
}

// periodPeakInfo is the strongest departure of the local slope.
type periodPeakInfo struct {
	hw     int
	slope  []float64
	inv    []float64
	median float64
	p      int     // bin of the peak
	sign   float64 // +1 for a rise, −1 for a fall
	excess float64 // |slope_p − median| (K/s)
	ratio  float64 // excess over its noise
	noise  float64 // σ of the binned readings
}

// periodPeak finds the process in the binned record (see periodDetect).
func periodPeak(b periodSeries, noise float64) (periodPeakInfo, error) {
	n := len(b.t)
	var best periodPeakInfo
	best.ratio = -1
	for _, hw := range []int{2, 3, 5, 8, 12, 18, 27, 40} {
		if hw > 2 && 8*hw > n {
			break
		}
		sl, inv := periodSlopes(b.t, b.y, hw)
		med := fit.Median(sl)
		p, ex := 0, -1.0
		for k, v := range sl {
			if e := math.Abs(v - med); e > ex {
				p, ex = k, e
			}
		}
		ratio := math.Inf(1)
		if noise > 0 {
			ratio = ex / (noise * inv[p])
		}
		info := periodPeakInfo{hw: hw, slope: sl, inv: inv, median: med, p: p,
			sign: math.Copysign(1, sl[p]-med), excess: ex, ratio: ratio, noise: noise}
		if ratio >= 30 {
			return info, nil
		}
		if ratio > best.ratio {
			best = info
		}
	}
	if best.ratio >= 8 {
		return best, nil
	}
	return best, fmt.Errorf("%w: the largest departure of the temperature slope from its median is %.2g times its noise (at least 8 needed)",
		ErrNoProcess, math.Max(0, best.ratio))
}

// periodMixTime detects the mixing time (see periodDetect).
func periodMixTime(d *riseData, b periodSeries, pk periodPeakInfo, pre *Period, iStart int) (tm, u float64, err error) {
	t, y := d.t, d.y
	var iF int // raw end (exclusive) of the provisional fore period
	if pre != nil {
		iF = sortAfter(t, pre.End)
	} else {
		j := pk.p
		for j > 0 && pk.sign*(pk.slope[j]-pk.median) > 0.1*pk.excess {
			j--
		}
		j -= pk.hw
		if j < 0 {
			return 0, 0, fmt.Errorf("%w: the temperature is already changing at the start of the log (%.4g s)", ErrNoProcess, t[iStart])
		}
		iF = b.hi[j]
	}
	if iF-iStart < 3 {
		return 0, 0, fmt.Errorf("fore period: %w: the process starts near %.4g s, leaving %s before it",
			ErrTooFewReadings, t[min(iF, len(t)-1)], riseReadings(iF-iStart))
	}
	base, sd, err := periodBaseline(t[iStart:iF], y[iStart:iF])
	if err != nil {
		return 0, 0, fmt.Errorf("fore period: %w", err)
	}
	sd = math.Max(sd, d.sigma)
	n := len(t)
	// Departure: three readings in a row beyond 4 SD in the direction of the process.
	iD := -1
	for k := iF; k+2 < n; k++ {
		if pk.sign*(y[k]-base(t[k])) > 4*sd && pk.sign*(y[k+1]-base(t[k+1])) > 4*sd && pk.sign*(y[k+2]-base(t[k+2])) > 4*sd {
			iD = k
			break
		}
	}
	if iD < 0 {
		return 0, 0, fmt.Errorf("%w: no reading after %.4g s departs from the fore drift by more than 4 noise SDs (%.2g K)", ErrNoProcess, t[iF-1], 4*sd)
	}
	// Refit the baseline on everything before the search window.
	win := math.Max(30, 10*d.dt)
	iLo := sort0(t, t[iD]-win)
	if iLo > iF {
		if b2, sd2, err := periodBaseline(t[iStart:iLo], y[iStart:iLo]); err == nil {
			base, sd = b2, math.Max(sd2, d.sigma)
		}
	} else {
		iLo = iF
	}
	// Size of the rise, for the extent of the hinge fit: the last fifth of
	// the record against the departure.
	var tail []float64
	for k := n - max(3, (n-iD)/5); k < n; k++ {
		tail = append(tail, y[k])
	}
	rise := math.Abs(fit.Median(tail) - base(t[iD]))
	iE := iD + 4
	for iE < n-1 && iE < iD+40 && pk.sign*(y[iE]-base(t[iE])) < 0.15*rise {
		iE++
	}
	iE = min(iE, n-1)
	r := make([]float64, iE+1-iLo)
	for k := iLo; k <= iE; k++ {
		r[k-iLo] = pk.sign * (y[k] - base(t[k]))
	}
	tt := t[iLo : iE+1]
	a := t[max(iLo-1, 0)]
	z := t[iD]
	step := math.Max(d.dt/5, (z-a)/500)
	type cand struct{ tau, ssr float64 }
	var cs []cand
	bestSSR := math.Inf(1)
	for tau := a; tau <= z+step/2; tau += step {
		s := periodHinge(tt, r, tau)
		cs = append(cs, cand{tau, s})
		if s < bestSSR {
			bestSSR, tm = s, tau
		}
	}
	lo, hi := tm, tm
	for _, c := range cs {
		if c.ssr-bestSSR <= sd*sd {
			lo, hi = math.Min(lo, c.tau), math.Max(hi, c.tau)
		}
	}
	u = math.Max((hi-lo)/2, step/math.Sqrt(12))
	return tm, u, nil
}

// periodBaseline fits the provisional fore drift: a quadratic when there are
// at least 10 readings, else a line; it returns the fit and its residual SD.
func periodBaseline(t, y []float64) (func(float64) float64, float64, error) {
	deg := 2
	if len(t) < 10 {
		deg = 1
	}
	f, err := fit.Polynomial(t, y, deg)
	if err != nil {
		return nil, 0, err
	}
	return f.Eval, f.ResidualSD, nil
}

// periodHinge is the sum of squares of r about 0 before tau and about the
// best a·s + b·s² (a ≥ 0, s = t − tau) after it.
func periodHinge(t, r []float64, tau float64) float64 {
	var ss, s2, s3, s4, sr, s2r float64
	for k := range t {
		if t[k] <= tau {
			ss += r[k] * r[k]
			continue
		}
		s := t[k] - tau
		q := s * s
		s2 += q
		s3 += q * s
		s4 += q * q
		sr += s * r[k]
		s2r += q * r[k]
		ss += r[k] * r[k]
	}
	if s2 == 0 {
		return ss
	}
	// Unconstrained 2×2 normal equations.
	det := s2*s4 - s3*s3
	best := ss - sr*sr/s2 // b = 0
	if sr < 0 {
		best = ss
	}
	if det > 1e-300*s2*s4 {
		a := (sr*s4 - s2r*s3) / det
		b := (s2*s2r - s3*sr) / det
		if a >= 0 {
			best = math.Min(best, ss-(a*sr+b*s2r))
		}
	}
	bOnly := ss - s2r*s2r/s4 // a = 0
	return math.Min(best, bOnly)
}

// periodEnd detects the end of the main period (see periodDetect).
func periodEnd(d *riseData, b periodSeries, pk periodPeakInfo, pl *periodPlan, lim CheckLimits) error {
	t, y := d.t, d.y
	fore, err := newDriftFit(t[pl.iStart:pl.iF], y[pl.iStart:pl.iF])
	if err != nil {
		return fmt.Errorf("fore period: %w", err)
	}
	tEnd := t[pl.iEnd-1]
	iA := sort0(t, pl.tm+0.6*(tEnd-pl.tm))
	if pl.iEnd-iA < 3 {
		iA = pl.iEnd - 3
	}
	after, err := newDriftFit(t[iA:pl.iEnd], y[iA:pl.iEnd])
	if err != nil {
		return fmt.Errorf("after period: %w", err)
	}
	G := (fore.slope - after.slope) / (after.pairT - fore.pairT)
	if math.IsNaN(G) || math.IsInf(G, 0) {
		G = 0
	}
	lF := methodLine{fore.mean, fore.slope, fore.c}
	lP := methodLine{after.mean, after.slope, after.c}
	iTm := min(sortAfter(t, pl.tm), iA)
	t63 := methodFraction(t[iTm:iA], y[iTm:iA], lF, lP, 1-math.Exp(-1))
	resp := t63 - pl.tm
	if math.IsNaN(resp) || resp < d.dt {
		resp = d.dt
	}
	pl.tResp = resp

	// Departure of the local slope from the Newtonian drift.
	g := func(th float64) float64 { return fore.slope - G*(th-fore.pairT) }
	nb := len(b.t)
	e := make([]float64, nb)
	for k := range e {
		e[k] = pk.slope[k] - g(b.y[k])
	}
	var ref []float64
	for k := range e {
		if b.t[k] >= t[iA] && k < nb-pk.hw {
			ref = append(ref, e[k])
		}
	}
	spread := 0.0
	if len(ref) >= 5 {
		spread = 1.4826 * fit.MAD(ref)
	}
	last := -1
	over := func(k int) bool {
		return pk.sign*e[k] > 4*math.Max(spread, pk.noise*pk.inv[k])
	}
	for k := nb - 1 - pk.hw; k >= 1 && b.t[k-1] > pl.tm; k-- {
		if over(k) && over(k-1) {
			last = k
			break
		}
	}
	tc := pl.tm
	if last >= 0 {
		tc = b.t[min(nb-1, last+pk.hw)]
	}
	// Margin for the tail below the detection limit: the tail's time
	// constant from the decay of the departure, and the remaining heat at
	// t_c, about 4σ_e·τ_tail, shrunk below a tenth of the after period's
	// noise on its mean.
	tauTail := resp
	if last > pk.p {
		// The departure falls from 30 % of the peak to the detection limit
		// between tA and t_c: a two-point exponential decay time.
		k30 := pk.p
		for k30 < last && pk.sign*e[k30] > 0.3*pk.excess {
			k30++
		}
		lim4 := 4 * math.Max(spread, pk.noise*pk.inv[last])
		if ratio := 0.3 * pk.excess / lim4; ratio > 1.5 {
			tauTail = (b.t[last] - b.t[k30]) / math.Log(ratio)
		}
	} else if last >= 0 {
		tauTail = d.dt
	}
	tauTail = math.Min(math.Max(tauTail, d.dt), 3*resp)
	sdE := spread
	if last >= 0 {
		sdE = math.Max(spread, pk.noise*pk.inv[last])
	}
	target := 0.1 * d.sigma / math.Sqrt(float64(pl.iEnd-iA))
	margin := 2 * tauTail
	if remain := 4 * sdE * tauTail; target > 0 && remain > target {
		margin = math.Max(margin, tauTail*math.Log(remain/target))
	}
	t2 := tc + margin
	// Keep a quarter of the post-mixing record (at least MinAfterS) for the
	// after period unless the departure itself reaches further.
	if cap := tEnd - math.Max(lim.MinAfterS, 0.25*(tEnd-pl.tm)); t2 > cap {
		t2 = math.Max(cap, tc+2*tauTail)
	}
	pl.iP = sort0(t, t2)
	if pl.iP < pl.iEnd {
		pl.t2 = t[pl.iP]
	} else {
		pl.t2 = t2
	}
	return nil
}

// periodResponse is the 63 % response time t63 − t_mix for given periods.
func periodResponse(d *riseData, pl periodPlan) float64 {
	t, y := d.t, d.y
	fore, err1 := newDriftFit(t[pl.iStart:pl.iF], y[pl.iStart:pl.iF])
	after, err2 := newDriftFit(t[pl.iP:pl.iEnd], y[pl.iP:pl.iEnd])
	if err1 != nil || err2 != nil {
		return d.dt
	}
	lF := methodLine{fore.mean, fore.slope, fore.c}
	lP := methodLine{after.mean, after.slope, after.c}
	iTm := min(sortAfter(t, pl.tm), pl.iP)
	t63 := methodFraction(t[iTm:pl.iP], y[iTm:pl.iP], lF, lP, 1-math.Exp(-1))
	if math.IsNaN(t63) || t63-pl.tm < d.dt {
		return d.dt
	}
	return t63 - pl.tm
}
