package calorimeter

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Status is the verdict of a check.
type Status string

// The verdicts, from best to worst.
const (
	Pass Status = "pass"
	Warn Status = "warn"
	Fail Status = "fail"
)

// Check is one named test of a run with its verdict and a line that says
// what was measured against what.
type Check struct {
	Name   string `json:"name"`
	Status Status `json:"status"`
	Detail string `json:"detail"`
}

// Worst returns the worst status among the checks (Pass for none).
func Worst(checks []Check) Status {
	w := Pass
	for _, c := range checks {
		switch c.Status {
		case Fail:
			return Fail
		case Warn:
			w = Warn
		}
	}
	return w
}

// CheckLimits are the thresholds of the run checks. A zero field takes its
// default (DefaultCheckLimits).
type CheckLimits struct {
	// MinForeS and MinAfterS are the shortest fore and after periods (s)
	// that pass; defaults 120 s and 180 s. Teaching practice flags fore
	// periods under about 2–3 min (DOMAIN §2); the after period must also
	// show the drift clear of the release tail, hence the extra minute.
	MinForeS, MinAfterS float64
	// MinPoints is the fewest readings in a drift period that pass;
	// default 20 (DOMAIN §2, "< 20 points"). Below 5 the check fails.
	MinPoints int
	// MaxResidualRatio is the largest drift residual SD, as a multiple of
	// the reading noise, that passes; default 2 (common practice: a drift
	// that fits to within twice the noise; AR(1) noise with ρ = 0.5 already
	// reads about 1.5).
	MaxResidualRatio float64
	// SpikeZ is the robust z-score beyond which a reading is a spike;
	// default 6 (a normal reading passes 6σ once in 5·10⁸).
	SpikeZ float64
	// MaxCurvatureZ is the largest z-score of residual curvature in a drift
	// period that is still linear in θ; default 3 (two-sided 0.27 %).
	MaxCurvatureZ float64
	// MinRiseSteps is the smallest rise, in resolution steps (or noise SDs
	// when larger), that passes; default 40, where the resolution of the two
	// end temperatures, δ/√6 together, stays near 1 % of the rise. Below 2
	// steps the check fails.
	MinRiseSteps float64
	// MaxLagRatio is the largest sampling interval, as a fraction of the
	// 63 % response time, that passes; default 0.5 (DOMAIN §2: "sampling
	// interval longer than τ/2").
	MaxLagRatio float64
	// MaxMethodSpread is the largest difference between a method and the
	// one reported, in units of the larger of their standard uncertainties,
	// that passes; default 1 (the issue: "method spread larger than u is a
	// warning").
	MaxMethodSpread float64
	// MaxRepeatFraction is the largest fraction of consecutive drift-period
	// readings that repeat the same value on a detected resolution step and
	// still pass; default 0.5 (above it the resolution, not the noise,
	// limits the drift fits).
	MaxRepeatFraction float64
	// MaxMixTimeU is the largest uncertainty of a detected mixing time (s)
	// that passes; default 10 s.
	MaxMixTimeU float64
}

// DefaultCheckLimits returns the documented defaults.
func DefaultCheckLimits() CheckLimits {
	return CheckLimits{
		MinForeS: 120, MinAfterS: 180, MinPoints: 20, MaxResidualRatio: 2, SpikeZ: 6,
		MaxCurvatureZ: 3, MinRiseSteps: 40, MaxLagRatio: 0.5, MaxMethodSpread: 1,
		MaxRepeatFraction: 0.5, MaxMixTimeU: 10,
	}
}

// withDefaults fills zero (or negative) fields with the defaults.
func (l CheckLimits) withDefaults() CheckLimits {
	d := DefaultCheckLimits()
	f := func(v *float64, def float64) {
		if !(*v > 0) {
			*v = def
		}
	}
	f(&l.MinForeS, d.MinForeS)
	f(&l.MinAfterS, d.MinAfterS)
	f(&l.MaxResidualRatio, d.MaxResidualRatio)
	f(&l.SpikeZ, d.SpikeZ)
	f(&l.MaxCurvatureZ, d.MaxCurvatureZ)
	f(&l.MinRiseSteps, d.MinRiseSteps)
	f(&l.MaxLagRatio, d.MaxLagRatio)
	f(&l.MaxMethodSpread, d.MaxMethodSpread)
	f(&l.MaxRepeatFraction, d.MaxRepeatFraction)
	f(&l.MaxMixTimeU, d.MaxMixTimeU)
	if l.MinPoints <= 0 {
		l.MinPoints = d.MinPoints
	}
	return l
}

// checkContext carries what the checks look at.
type checkContext struct {
	res         *Rise
	times       []float64 // the caller's times (s), which Rise.Excluded indexes
	lim         CheckLimits
	fore, after *driftFit
	model       modelResult
	modelOK     bool
	sigma, dt   float64
	quantum     float64
}

// checkK formats a temperature (difference) with a unit that suits it.
func checkK(v float64) string {
	a := math.Abs(v)
	switch {
	case a == 0:
		return "0 K"
	case a < 1e-3:
		return fmt.Sprintf("%.3g mK", v*1e3)
	default:
		return fmt.Sprintf("%.3g K", v)
	}
}

// all runs every check, in a fixed order.
func (c *checkContext) all(afterLinear, foreLinear Check) []Check {
	out := []Check{
		c.mixTime(),
		c.periodLength("fore-period", "fore", c.fore, c.lim.MinForeS, "a drift fit"),
		c.periodLength("after-period", "after", c.after, c.lim.MinAfterS, "the after drift"),
		c.driftFit("fore-drift-fit", "fore", c.fore),
		c.driftFit("after-drift-fit", "after", c.after),
		foreLinear,
		afterLinear,
		c.spikes(),
		c.resolution(),
		c.samplingLag(),
		c.riseResolution(),
		c.modelFit(),
		c.methodAgreement(),
	}
	return out
}

func (c *checkContext) mixTime() Check {
	r := c.res
	if !r.MixDetected {
		return Check{"mix-time", Pass, fmt.Sprintf("mixing time %.4g s as given", r.MixTime)}
	}
	d := fmt.Sprintf("mixing time %.4g s ± %.2g s detected where the readings leave the fore drift", r.MixTime, r.MixTimeU)
	if r.MixTimeU > c.lim.MaxMixTimeU {
		return Check{"mix-time", Warn, d + fmt.Sprintf("; more uncertain than %.3g s (hint: give the mixing time)", c.lim.MaxMixTimeU)}
	}
	return Check{"mix-time", Pass, d}
}

func (c *checkContext) periodLength(name, which string, f *driftFit, minS float64, need string) Check {
	dur := f.tEnd - f.tStart
	switch {
	case f.n < 5:
		return Check{name, Fail, fmt.Sprintf("%s period has %s; fewer than 5 cannot show its drift and noise", which, riseReadings(f.n))}
	case dur < minS:
		return Check{name, Warn, fmt.Sprintf("%s period %.0f s is shorter than the %.0f s needed for %s", which, dur, minS, need)}
	case f.n < c.lim.MinPoints:
		return Check{name, Warn, fmt.Sprintf("%s period has %s, fewer than the %d needed for %s", which, riseReadings(f.n), c.lim.MinPoints, need)}
	}
	return Check{name, Pass, fmt.Sprintf("%s period %.0f s with %s", which, dur, riseReadings(f.n))}
}

func (c *checkContext) driftFit(name, which string, f *driftFit) Check {
	ratio := f.sd / c.sigma
	d := fmt.Sprintf("%s drift residual SD %s is %.2g times the reading noise %s", which, checkK(f.sd), ratio, checkK(c.sigma))
	if c.sigma > 0 && ratio > c.lim.MaxResidualRatio {
		return Check{name, Warn, d + fmt.Sprintf(" (limit %.3g): the drift is not the steady exchange Newton's law describes", c.lim.MaxResidualRatio)}
	}
	if f.rho > 0.5 {
		return Check{name, Pass, d + fmt.Sprintf("; residuals correlated (lag-1 %.2f), uncertainty inflated %.2g×", f.lag1, f.infl)}
	}
	return Check{name, Pass, d}
}

// driftLinear tests that a drift period holds no curvature beyond the one
// Newton's law gives it: a quadratic fitted to the residuals against the
// period's Newtonian curve must have a second-order coefficient within
// MaxCurvatureZ standard uncertainties (inflated for autocorrelation) of 0.
//
// A period whose residuals have no scatter at all (readings that never
// change, or lie exactly on the curve) leaves no noise to judge the
// curvature against: a flat period passes, and otherwise the curvature's
// effect over the period is compared with the reading noise instead.
func (c *checkContext) driftLinear(name string, f *driftFit, edge float64) Check {
	which := "after"
	if name == "fore-drift-linear" {
		which = "fore"
	}
	if f.n < 6 {
		return Check{name, Warn, fmt.Sprintf("%s period has %s, too few to test that its drift is linear in θ", which, riseReadings(f.n))}
	}
	c2, u2 := checkCurvature(f.t, f.resid)
	u := u2 * f.infl
	// The curvature's effect at the period's edge next to the main period.
	h := math.Max(edge-f.c, f.c-edge)
	effect := c2 * h * h
	if !(u > 0) {
		if periodFlat(f.y) {
			return Check{name, Pass, fmt.Sprintf("%s period is flat (%s, all %.6g K): no noise to judge a curvature against", which, riseReadings(f.n), f.y[0])}
		}
		d := fmt.Sprintf("%s drift has no residual noise to judge a curvature against; its curvature beyond Newton's law %.2g K/s² gives %s over the period", which, c2, checkK(effect))
		if math.Abs(effect) > c.sigma {
			return Check{name, Warn, d + fmt.Sprintf(", more than the reading noise %s: not linear in θ", checkK(c.sigma))}
		}
		return Check{name, Pass, d + fmt.Sprintf(", within the reading noise %s", checkK(c.sigma))}
	}
	z := c2 / u
	d := fmt.Sprintf("%s drift curvature beyond Newton's law %.2g K/s² (z = %.1f, %s over the period)", which, c2, z, checkK(effect))
	if math.Abs(z) > c.lim.MaxCurvatureZ {
		return Check{name, Warn, d + fmt.Sprintf(": not linear in θ (limit |z| %.3g); heat may still be entering or the period holds part of the main period", c.lim.MaxCurvatureZ)}
	}
	return Check{name, Pass, d}
}

func (c *checkContext) spikes() Check {
	ex := c.res.Excluded
	if len(ex) == 0 {
		return Check{"spikes", Pass, fmt.Sprintf("no reading beyond robust z %.3g", c.lim.SpikeZ)}
	}
	var at []string
	for i, k := range ex {
		if i == 5 {
			at = append(at, "…")
			break
		}
		at = append(at, fmt.Sprintf("%.6g s", c.times[k]))
	}
	what := riseReadings(len(ex)) + " excluded as spikes"
	if len(ex) == 1 {
		what = "1 reading excluded as a spike"
	}
	return Check{"spikes", Warn, fmt.Sprintf("%s beyond robust z %.3g (at %s)", what, c.lim.SpikeZ, strings.Join(at, ", "))}
}

func (c *checkContext) resolution() Check {
	if c.quantum == 0 {
		return Check{"resolution", Pass, "no resolution step visible in the readings"}
	}
	var same, total int
	for _, f := range []*driftFit{c.fore, c.after} {
		for k := 1; k < f.n; k++ {
			total++
			if math.Abs(f.y[k]-f.y[k-1]) < c.quantum/2 {
				same++
			}
		}
	}
	frac := float64(same) / float64(max(total, 1))
	d := fmt.Sprintf("readings on %s steps; %.0f %% of consecutive drift readings repeat", checkK(c.quantum), 100*frac)
	if frac > c.lim.MaxRepeatFraction {
		return Check{"resolution", Warn, d + fmt.Sprintf(" (limit %.0f %%): the readings are stuck on a coarse resolution", 100*c.lim.MaxRepeatFraction)}
	}
	return Check{"resolution", Pass, d}
}

func (c *checkContext) samplingLag() Check {
	resp := c.res.ResponseTime
	d := fmt.Sprintf("sampling interval %.3g s against a 63 %% response time of %.3g s", c.dt, resp)
	if !(resp > 0) || c.dt > c.lim.MaxLagRatio*resp {
		return Check{"sampling-lag", Warn, fmt.Sprintf("sampling interval %.3g s is longer than %.2g of the 63 %% response time %.3g s: the main period is under-sampled", c.dt, c.lim.MaxLagRatio, resp)}
	}
	return Check{"sampling-lag", Pass, d}
}

func (c *checkContext) riseResolution() Check {
	step := math.Max(c.quantum, c.sigma)
	what := "noise SDs"
	if c.quantum >= c.sigma {
		what = "resolution steps"
	}
	steps := math.Abs(c.res.DeltaT) / step
	d := fmt.Sprintf("rise %s is %.3g %s of %s", checkK(c.res.DeltaT), steps, what, checkK(step))
	switch {
	case steps < 2:
		return Check{"rise-resolution", Fail, d + ": indistinguishable from the readings' resolution"}
	case steps < c.lim.MinRiseSteps:
		return Check{"rise-resolution", Warn, d + fmt.Sprintf(", fewer than the %.3g needed", c.lim.MinRiseSteps)}
	}
	return Check{"rise-resolution", Pass, d}
}

// modelWhy says why the model is unavailable or was not trusted.
func (c *checkContext) modelWhy() string {
	switch {
	case !c.model.ok:
		return "model fit failed: " + c.model.reason
	case !c.modelOK:
		return fmt.Sprintf("model residual SD %s is %.2g times the reading noise %s (limit %.3g)",
			checkK(c.model.sd), c.model.sd/c.sigma, checkK(c.sigma), c.lim.MaxResidualRatio)
	}
	return "model available"
}

func (c *checkContext) modelFit() Check {
	m := c.model
	if !m.ok || !c.modelOK {
		return Check{"model-fit", Warn, c.modelWhy()}
	}
	lag := "no probe lag"
	if m.lag {
		lag = fmt.Sprintf("probe lag %.3g s", m.tau)
	}
	release := fmt.Sprintf("first-order release at %.3g 1/s", m.rate)
	if m.shape == modelPulse {
		release = fmt.Sprintf("constant-power release for %.4g s", 1/m.rate)
	}
	return Check{"model-fit", Pass, fmt.Sprintf("model converged in %d iterations on %d points: residual SD %s (%.2g × noise), %s, %s, G %.3g 1/s",
		m.iters, m.nBins, checkK(m.sd), m.sd/c.sigma, release, lag, m.g)}
}

func (c *checkContext) methodAgreement() Check {
	r := c.res
	names := make([]string, 0, len(r.Methods))
	for k := range r.Methods {
		names = append(names, k)
	}
	sort.Strings(names)
	worst, wname, wlim := 0.0, "", 0.0
	for _, k := range names {
		if k == r.Method {
			continue
		}
		diff := math.Abs(r.Methods[k] - r.DeltaT)
		lim := c.lim.MaxMethodSpread * math.Max(r.UDeltaT, r.MethodU[k])
		if lim > 0 && diff/lim > worst {
			worst, wname, wlim = diff/lim, k, lim
		}
	}
	if wname == "" {
		return Check{"method-agreement", Pass, "no other method to compare"}
	}
	diff := r.Methods[wname] - r.DeltaT
	d := fmt.Sprintf("largest difference from %s: %s by %s (%.2g %%), against u %s",
		r.Method, wname, checkK(diff), 100*diff/math.Abs(r.DeltaT), checkK(wlim/c.lim.MaxMethodSpread))
	if worst > 1 {
		return Check{"method-agreement", Warn, "methods disagree: " + d}
	}
	return Check{"method-agreement", Pass, d}
}

// checkCurvature returns the second-order coefficient of the least-squares
// quadratic through (t, r) and its standard uncertainty, in O(n) by the
// polynomial p2(t) = s² − a·s − b (s = t − t̄) orthogonal to 1 and s over
// the points (Forsythe, J. SIAM 5 (1957) 74): c2 = Σp2·r/Σp2², u²(c2) =
// s²_res/Σp2² with s²_res the residual variance of the quadratic on n − 3
// degrees of freedom.
func checkCurvature(t, r []float64) (c2, u float64) {
	n := float64(len(t))
	var st float64
	for _, v := range t {
		st += v
	}
	c := st / n
	var s2, s3, sr, s1r, rr, rm float64
	for k, v := range t {
		s := v - c
		q := s * s
		s2 += q
		s3 += q * s
		sr += r[k]
		s1r += s * r[k]
	}
	rm = sr / n
	a := s3 / s2
	b := s2 / n
	var pp, pr float64
	for k, v := range t {
		s := v - c
		p := s*s - a*s - b
		pp += p * p
		pr += p * r[k]
		d := r[k] - rm
		rr += d * d
	}
	c2 = pr / pp
	ssr := rr - s1r*s1r/s2 - pr*pr/pp
	return c2, math.Sqrt(math.Max(0, ssr/(n-3)) / pp)
}
