package calorimeter

import (
	"errors"
	"fmt"
	"math"

	"calred/fit"
)

// Drift is a fitted fore or after line θ(t) = Intercept + Slope·t, together
// with the pair (Slope, DriftTemperature) that the heat-exchange
// corrections use and the noise figures its uncertainties rest on.
//
// The least-squares slope over a period is a weighted mean of the secant
// slopes of its intervals. Summation by parts turns
//
//	b = Σ_k β_k θ_k,   β_k = (t_k − t̄)/Σ_j (t_j − t̄)²
//
// into
//
//	b = Σ_i K_i·(θ_{i+1} − θ_i)/(t_{i+1} − t_i),   K_i = −(t_{i+1} − t_i)·Σ_{k≤i} β_k ≥ 0,  Σ_i K_i = 1
//
// (the parabolic kernel of the least-squares slope). Under Newton's law each
// secant slope is exactly G(θ∞ − θ̃_i), θ̃_i the time-averaged temperature
// over the interval (the mean-value form of dθ/dt = G(θ∞ − θ), DOMAIN §1–§2),
// so
//
//	b = G(θ∞ − T),   T = Σ_i K_i·(θ_i + θ_{i+1})/2
//
// holds exactly however curved the period is; the trapezoid θ̃_i ≈ (θ_i +
// θ_{i+1})/2 errs by O((GΔt)²). T is DriftTemperature. Pairing b with the
// plain mean of the readings instead is off by (G·D)²/60 of the drift for a
// period of length D (expand e^{−Gt} about the centre: b = g(θ_c)·(1 +
// (GD)²/40), mean − θ∞ = (θ_c − θ∞)(1 + (GD)²/24)), which matters in precise
// work (DOMAIN §2: "a least-squares slope over a long, curved period is not
// the drift at the period's mean temperature").
type Drift struct {
	Slope           float64 `json:"slope_k_per_s"`
	Intercept       float64 `json:"intercept_k"` // at t = 0 of the log
	MeanTemperature float64 `json:"mean_temperature_k"`
	ResidualSD      float64 `json:"residual_sd_k"`
	N               int     `json:"n"`

	// DriftTemperature T is the temperature at which Slope is the exact
	// Newtonian drift (see the type comment).
	DriftTemperature float64 `json:"drift_temperature_k"`
	Centre           float64 `json:"centre_s"` // mean time of the readings (s)
	// USlope, UIntercept and CovSlopeIntercept are the standard
	// uncertainties and covariance of the line, inflated for
	// autocorrelation: u² = Inflation²·s²·(XᵀX)⁻¹.
	USlope            float64 `json:"u_slope_k_per_s"`
	UIntercept        float64 `json:"u_intercept_k"`
	CovSlopeIntercept float64 `json:"cov_slope_intercept_k2_per_s"`
	// Lag1 is the lag-1 autocorrelation of the residuals as measured, 0
	// when the residuals do not vary at all (a flat period: there is no
	// correlation to measure, and none is used); Inflation = √((1+ρ)/(1−ρ))
	// with ρ = Lag1 corrected for its small-sample bias and kept in [0,
	// 0.95] (ρ = 0 and Inflation 1 for residuals that do not vary).
	Lag1      float64 `json:"lag1_autocorrelation"`
	Inflation float64 `json:"inflation"`
	Start     float64 `json:"start_s"` // first reading used (s)
	End       float64 `json:"end_s"`   // last reading used (s)
}

// At returns the value of the line at t and its standard uncertainty,
//
//	u²(L(t)) = Inflation²·s²·[1/n + (t − t̄)²/Σ(t_k − t̄)²]
//
// (DOMAIN §2, "uncertainty of an extrapolated line"), the slope–intercept
// covariance included by working about the centre t̄.
func (d Drift) At(t float64) (theta, u float64) {
	theta = d.Intercept + d.Slope*t
	uc2 := d.UIntercept*d.UIntercept - d.Centre*d.Centre*d.USlope*d.USlope // u² at the centre
	dt := t - d.Centre
	return theta, math.Sqrt(math.Max(0, uc2+dt*dt*d.USlope*d.USlope))
}

// driftMoments is the number of scaled moments kept for the series of a
// Newtonian curve (see driftFit.curve): the truncation error of the
// exponential series is below (G·h)²⁵/25!, < 3e-8 for G·h ≤ 5.
const driftMoments = 24

// driftFit holds what one drift period contributes: the least-squares line
// in centred time, the drift pair, and the moments needed for the exact
// Newtonian curve through the period. All of them are linear in the
// readings with weights fixed by the times, which is what lets the
// uncertainty of every method be propagated back to each reading in O(n).
type driftFit struct {
	t, y   []float64 // the period's readings
	n      int
	c, h   float64 // mean time, max |t − c|
	stt    float64 // Σ (t − c)²
	mean   float64 // mean reading: the line's value at c
	slope  float64 // K/s
	pairT  float64 // DriftTemperature
	mu     [driftMoments + 1]float64
	tStart float64
	tEnd   float64
	// Filled by finish, once the cooling constant is known.
	resid     []float64
	sd        float64
	lag1, rho float64
	infl      float64
}

// newDriftFit fits the period made of the readings t, y (increasing t).
func newDriftFit(t, y []float64) (*driftFit, error) {
	n := len(t)
	if n < 3 {
		return nil, fmt.Errorf("drift fit: %w: %s, need at least 3", ErrTooFewReadings, riseReadings(n))
	}
	f := &driftFit{t: t, y: y, n: n, tStart: t[0], tEnd: t[n-1]}
	var st, sy float64
	for k := range t {
		st += t[k]
		sy += y[k]
	}
	f.c = st / float64(n)
	y0 := sy / float64(n)
	var sty, cy float64
	for k := range t {
		d := t[k] - f.c
		f.stt += d * d
		sty += d * (y[k] - y0)
		cy += y[k] - y0
		f.h = math.Max(f.h, math.Abs(d))
	}
	if !(f.stt > 0) {
		return nil, fmt.Errorf("drift fit: %w: all %d readings at %g s", ErrTooFewReadings, n, t[0])
	}
	f.mean = y0 + cy/float64(n)
	f.slope = sty / f.stt
	// Moments of u = (t − c)/h and the kernel temperature (reverse pass:
	// R = Σ_{j>i} β_j, so K_i = R·(t_{i+1} − t_i)).
	var r, pt float64
	for k := n - 1; k >= 0; k-- {
		u := (t[k] - f.c) / f.h
		p := 1.0
		for j := 0; j <= driftMoments; j++ {
			f.mu[j] += p
			p *= u
		}
		if k < n-1 {
			pt += r * (t[k+1] - t[k]) * (y[k] + y[k+1]) / 2
		}
		r += (t[k] - f.c) / f.stt
	}
	for j := range f.mu {
		f.mu[j] /= float64(n)
	}
	f.pairT = pt
	return f, nil
}

// riseCurve is the exact Newtonian temperature curve through a drift
// period,
//
//	N(τ) = m + g(m)·[φ(τ − c) − φ̄]/ψ,   φ(s) = (1 − e^{−Gs})/G,
//	φ̄ = (1/n)Σ φ(t_k − c),   ψ = 1 − G·φ̄ = (1/n)Σ e^{−G(t_k − c)},
//
// with m the mean reading and g(m) = b − G(m − T) the Newtonian drift at m.
// It is the solution of dθ/dt = G(θ∞ − θ) whose mean over the readings is
// m; with (b, T) exact it is exact, which the straight line is not.
type riseCurve struct {
	m, g, c, G, phibar, psi float64
}

// curve returns the Newtonian curve through the period for cooling
// constant G and drift pair (b, T), mean m (passed in so that the
// uncertainty code can perturb them).
func (f *driftFit) curve(G, m, b, T float64) riseCurve {
	rc := riseCurve{m: m, g: b - G*(m-T), c: f.c, G: G}
	gh := G * f.h
	if math.Abs(gh) <= 5 {
		// φ̄ = h·Σ_{j≥2} (−1)^{j+1} (Gh)^{j−1} μ_j / j!
		var s float64
		term := f.h // h·(Gh)^{j−1}/j! built up
		for j := 1; j <= driftMoments; j++ {
			term /= float64(j)
			if j >= 2 {
				term *= gh
				if j%2 == 0 {
					s -= term * f.mu[j]
				} else {
					s += term * f.mu[j]
				}
			}
		}
		rc.phibar = s
	} else {
		var s float64
		for _, tk := range f.t {
			s += riseExpm1(G, tk-f.c)
		}
		rc.phibar = s / float64(f.n)
	}
	rc.psi = 1 - G*rc.phibar
	return rc
}

// at is N(τ).
func (rc riseCurve) at(tau float64) float64 {
	return rc.m + rc.g*(riseExpm1(rc.G, tau-rc.c)-rc.phibar)/rc.psi
}

// integral is ∫_a^b N dt.
func (rc riseCurve) integral(a, b float64) float64 {
	return rc.m*(b-a) + rc.g*(risePhi2(rc.G, b-rc.c)-risePhi2(rc.G, a-rc.c)-rc.phibar*(b-a))/rc.psi
}

// riseExpm1 is φ(x) = (1 − e^{−Gx})/G, continuous through G = 0 (φ = x).
func riseExpm1(G, x float64) float64 {
	z := G * x
	if math.Abs(z) < 1e-5 {
		return x * (1 - z/2 + z*z/6)
	}
	return -math.Expm1(-z) / G
}

// risePhi2 is ∫_0^x φ(s) ds = (x − φ(x))/G, by its series where that
// difference would cancel.
func risePhi2(G, x float64) float64 {
	z := G * x
	if math.Abs(z) < 0.5 {
		// Σ_{j≥2} (−1)^j G^{j−2} x^j / j!
		var s float64
		term := x * x / 2
		for j := 2; j < 30; j++ {
			if j%2 == 0 {
				s += term
			} else {
				s -= term
			}
			term *= z / float64(j+1)
		}
		return s
	}
	return (x - riseExpm1(G, x)) / G
}

// finish computes the residuals against the period's Newtonian curve, their
// standard deviation on n − 2 degrees of freedom and lag-1 autocorrelation.
func (f *driftFit) finish(G float64) {
	rc := f.curve(G, f.mean, f.slope, f.pairT)
	f.resid = make([]float64, f.n)
	var ss float64
	for k := range f.t {
		f.resid[k] = f.y[k] - rc.at(f.t[k])
		ss += f.resid[k] * f.resid[k]
	}
	f.sd = math.Sqrt(ss / float64(f.n-2))
	r1 := fit.Lag1Autocorrelation(f.resid)
	f.rho = driftRho(r1, f.n)
	if math.IsNaN(r1) {
		// 0/0: residuals that do not vary have no correlation to measure.
		r1 = 0
	}
	f.lag1 = r1
	f.infl = math.Sqrt((1 + f.rho) / (1 - f.rho))
}

// driftRho turns a measured lag-1 autocorrelation of n residuals into the
// coefficient used for the AR(1) noise model: corrected by the small-sample
// bias of the estimator, E[r1] ≈ ρ − (1 + 4ρ)/n (Marriott & Pope,
// Biometrika 41 (1954) 390, for AR(1) with an estimated mean), and kept in
// [0, 0.95] so that a chance negative value never shrinks an uncertainty.
func driftRho(r1 float64, n int) float64 {
	if math.IsNaN(r1) {
		return 0
	}
	rho := r1 + (1+4*r1)/float64(n)
	return math.Min(0.95, math.Max(0, rho))
}

// drift returns the exported summary of the fit.
func (f *driftFit) drift() Drift {
	ub := f.sd * f.infl / math.Sqrt(f.stt)
	um := f.sd * f.infl / math.Sqrt(float64(f.n))
	var sum float64
	for _, v := range f.y {
		sum += v
	}
	return Drift{
		Slope:             f.slope,
		Intercept:         f.mean - f.slope*f.c,
		MeanTemperature:   sum / float64(f.n),
		ResidualSD:        f.sd,
		N:                 f.n,
		DriftTemperature:  f.pairT,
		Centre:            f.c,
		USlope:            ub,
		UIntercept:        math.Sqrt(um*um + f.c*f.c*ub*ub),
		CovSlopeIntercept: -f.c * ub * ub,
		Lag1:              f.lag1,
		Inflation:         f.infl,
		Start:             f.tStart,
		End:               f.tEnd,
	}
}

// driftCov accumulates, for several outputs y_j that depend on the
// period's readings only through its mean m, slope b and drift temperature
// T, the covariance contribution
//
//	Cov(y_j, y_l) = Σ_k Σ_k′ s_jk s_lk′ Cov(e_k, e_k′),   s_jk = a_j/n + b_j(t_k − c)/Σ(t − c)² + κ_j·w^T_k
//
// with (a_j, b_j, κ_j) = ∂y_j/∂(m, b, T) and w^T the kernel weights of T.
// The noise is taken as stationary AR(1) with standard deviation sd and
// coefficient ρ between neighbouring readings, Cov(e_k, e_{k+i}) = sd²ρ^i,
// for which the double sum reduces to one backward pass,
//
//	Σ_k [s_jk s_lk + s_jk z_lk + s_lk z_jk],   z_k = ρ·(s_{k+1} + z_{k+1}),
//
// exact for AR(1) and equal to the √((1+ρ)/(1−ρ)) inflation of the white
// result when the s_k vary slowly (DOMAIN §2). It adds into cov (len(grad)²).
func (f *driftFit) driftCov(grad [][3]float64, sd, rho float64, cov []float64) {
	m := len(grad)
	s := make([]float64, m)
	z := make([]float64, m)
	sn := make([]float64, m) // s at k+1
	var r float64            // Σ_{j>k} β_j
	nf := float64(f.n)
	acc := make([]float64, m*m)
	for k := f.n - 1; k >= 0; k-- {
		var kHi, kLo float64
		if k < f.n-1 {
			kHi = r * (f.t[k+1] - f.t[k])
		}
		beta := (f.t[k] - f.c) / f.stt
		if k > 0 {
			kLo = (r + beta) * (f.t[k] - f.t[k-1])
		}
		wT := (kHi + kLo) / 2
		for j, g := range grad {
			if k < f.n-1 {
				z[j] = rho * (sn[j] + z[j])
			}
			s[j] = g[0]/nf + g[1]*beta + g[2]*wT
		}
		for j := 0; j < m; j++ {
			for l := 0; l < m; l++ {
				acc[j*m+l] += s[j]*s[l] + s[j]*z[l] + s[l]*z[j]
			}
		}
		copy(sn, s)
		r += beta
	}
	for i := range acc {
		cov[i] += sd * sd * acc[i]
	}
}

// ErrTooFewReadings is wrapped by AnalyseRise when a period holds too few
// readings for what it must show.
var ErrTooFewReadings = errors.New("too few readings")
