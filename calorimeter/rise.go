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

// RiseOptions steer AnalyseRise. The zero value detects everything and
// chooses the method automatically, with the default check limits.
type RiseOptions struct {
	// MixTime is the start of the process (s). NaN — or 0, which can never
	// be a mixing time since it leaves no fore period — means detect it.
	MixTime float64
	// Pre and Post fix the fore and after periods; nil means detect.
	Pre, Post *Period
	// Method is "auto" (also for ""), "regnault-pfaundler", "dickinson",
	// "extrapolation" or "model".
	Method string
	// UTemperature is the standard uncertainty of the probe's calibration
	// (K); 0 means none, and only when it is positive do probe terms enter
	// the uncertainties.
	UTemperature float64
	// ProbeCorrelation is the correlation coefficient between the
	// calibration errors of two readings of the run, in [0, 1]. 0 (the
	// default) treats the end temperatures' calibration errors as
	// independent, as the mixing-calibration sensitivities of DOMAIN §3 do,
	// and gives u(ΔT) a probe term √2·UTemperature; 1 is a pure offset that
	// cancels in ΔT and remains in the absolute temperatures.
	ProbeCorrelation float64
	// Limits are the check thresholds; zero fields take their defaults.
	Limits CheckLimits
}

// DefaultRiseOptions returns options that detect the mixing time and the
// periods and choose the method automatically.
func DefaultRiseOptions() RiseOptions {
	return RiseOptions{MixTime: math.NaN(), Method: MethodAuto, Limits: DefaultCheckLimits()}
}

// RiseUncertainty is one component of u(ΔT): its name, the standard
// uncertainty it contributes (K) and its degrees of freedom (math.Inf(1) for
// a type B evaluation; null in JSON).
type RiseUncertainty struct {
	Name string  `json:"name"`
	U    float64 `json:"u_k"`
	DoF  float64 `json:"dof"`
}

// MarshalJSON writes the degrees of freedom as null when infinite.
func (r RiseUncertainty) MarshalJSON() ([]byte, error) {
	return json.Marshal(struct {
		Name string  `json:"name"`
		U    riseNum `json:"u_k"`
		DoF  riseNum `json:"dof"`
	}{r.Name, riseNum(r.U), riseNum(r.DoF)})
}

// riseNum is a float64 that is written to JSON as null when not finite.
type riseNum float64

func (v riseNum) MarshalJSON() ([]byte, error) { return []byte(riseJSONNumber(float64(v))), nil }

// Rise is the reduction of one temperature log to a corrected temperature
// change.
type Rise struct {
	Points int
	// MixTime is the start of the process (s): as given, or detected where
	// the readings leave the fore drift (periodDetect). MixTimeU says how
	// sure the detection is (s; 0 when given): the profile-likelihood half
	// width of the onset, combined, when the model fit is trusted, with the
	// difference from the model's own start — a lagging probe leaves the
	// fore drift later than the process starts.
	MixTime     float64
	MixTimeU    float64
	MixDetected bool
	Periods     struct {
		Pre  Period `json:"pre"`
		Main Period `json:"main"`
		Post Period `json:"post"`
	}
	PreDrift, PostDrift Drift
	// Methods holds ΔT (K) for every method computed; "model" is absent
	// when the fit failed (the model-fit check says why), "dickinson" when
	// the readings leave the band between the drift lines.
	Methods map[string]float64
	MethodU map[string]float64 // u(ΔT) per method (K)
	// Method is the method reported and MethodReason one line on why.
	Method       string
	MethodReason string
	// DeltaT is the corrected temperature change (K, signed) and UDeltaT
	// its standard uncertainty; DoF its effective degrees of freedom
	// (Welch–Satterthwaite) and UParts its components.
	DeltaT, UDeltaT float64
	DoF             float64
	UParts          []RiseUncertainty
	// Tx is the equal-area (Dickinson) time and T60 the time the rise
	// reaches 60 % of its total (s).
	Tx, T60 float64
	// InitialTemperature is θ at the mixing time from the fore period;
	// FinalTemperature = InitialTemperature + DeltaT, the temperature the
	// contents would have reached at the mixing time without heat exchange
	// (K). With the extrapolation method they are the two drift lines at the
	// mixing time; with the model method the model's baseline. Their
	// standard uncertainties and covariance include the probe terms.
	InitialTemperature, FinalTemperature float64
	UInitial, UFinal, CovInitialFinal    float64
	// MeanTemperature is the run temperature (Initial + Final)/2 (K).
	MeanTemperature float64
	// G is the cooling constant (1/s) and ThetaInf the convergence
	// temperature (K) from the drift pairs (DOMAIN §2).
	G, ThetaInf float64
	// Excluded lists the indices of readings excluded as spikes.
	Excluded []int
	// Residuals holds for each reading its residual against the fore or
	// after drift curve (the period's Newtonian curve, the straight line when
	// the exchange is negligible) or, inside the main period, against the
	// model; NaN where there is none.
	Residuals []float64
	// Quantum is the reading resolution detected from the readings (K), 0
	// if none.
	Quantum float64
	// Noise is the robust reading noise σ (K) the checks compare with.
	Noise float64
	// ResponseTime is the time from the mixing time to 63 % of the rise (s).
	ResponseTime float64
	// SamplingInterval is the median interval between readings (s).
	SamplingInterval float64
	Checks           []Check
}

// MarshalJSON writes the result with the key names of the command-line
// contract (mix_time_s, periods, drift.pre/post, methods, method,
// delta_t_k, u_delta_t_k, checks …); numbers that are not finite are null
// and the per-reading residuals are left out.
func (r Rise) MarshalJSON() ([]byte, error) {
	nums := func(m map[string]float64) map[string]riseNum {
		out := make(map[string]riseNum, len(m))
		for k, v := range m {
			out[k] = riseNum(v)
		}
		return out
	}
	drift := func(d Drift) map[string]any {
		return map[string]any{
			"slope_k_per_s": riseNum(d.Slope), "intercept_k": riseNum(d.Intercept),
			"mean_temperature_k": riseNum(d.MeanTemperature), "residual_sd_k": riseNum(d.ResidualSD),
			"n": d.N, "drift_temperature_k": riseNum(d.DriftTemperature), "centre_s": riseNum(d.Centre),
			"u_slope_k_per_s": riseNum(d.USlope), "u_intercept_k": riseNum(d.UIntercept),
			"cov_slope_intercept_k2_per_s": riseNum(d.CovSlopeIntercept),
			"lag1_autocorrelation":         riseNum(d.Lag1), "inflation": riseNum(d.Inflation),
			"start_s": riseNum(d.Start), "end_s": riseNum(d.End),
		}
	}
	checks := r.Checks
	if checks == nil {
		checks = []Check{}
	}
	excluded := r.Excluded
	if excluded == nil {
		excluded = []int{}
	}
	return json.Marshal(map[string]any{
		"points": r.Points, "mix_time_s": riseNum(r.MixTime), "u_mix_time_s": riseNum(r.MixTimeU),
		"mix_detected": r.MixDetected, "periods": r.Periods,
		"drift":   map[string]any{"pre": drift(r.PreDrift), "post": drift(r.PostDrift)},
		"methods": nums(r.Methods), "u_methods": nums(r.MethodU),
		"method": r.Method, "method_reason": r.MethodReason,
		"delta_t_k": riseNum(r.DeltaT), "u_delta_t_k": riseNum(r.UDeltaT), "dof": riseNum(r.DoF),
		"u_parts": r.UParts, "tx_s": riseNum(r.Tx), "t60_s": riseNum(r.T60),
		"initial_temperature_k": riseNum(r.InitialTemperature), "final_temperature_k": riseNum(r.FinalTemperature),
		"u_initial_temperature_k": riseNum(r.UInitial), "u_final_temperature_k": riseNum(r.UFinal),
		"cov_initial_final_k2": riseNum(r.CovInitialFinal), "mean_temperature_k": riseNum(r.MeanTemperature),
		"cooling_constant_per_s": riseNum(r.G), "convergence_temperature_k": riseNum(r.ThetaInf),
		"excluded": excluded, "quantum_k": riseNum(r.Quantum), "noise_k": riseNum(r.Noise),
		"response_time_s": riseNum(r.ResponseTime), "sampling_interval_s": riseNum(r.SamplingInterval),
		"checks": checks, "status": Worst(r.Checks),
	})
}

// ErrRiseInput is wrapped by AnalyseRise errors about its input (too few
// readings, times not increasing, values not finite, options out of range).
// Every AnalyseRise error is about the data: it wraps ErrRiseInput,
// ErrTooFewReadings (a period too short to fit) or ErrNoProcess.
var ErrRiseInput = errors.New("bad temperature log")

// riseMinPoints is the fewest readings AnalyseRise accepts: three for each
// drift period (a line with a residual), and room for a main period.
const riseMinPoints = 10

// riseData is the record with spikes removed.
type riseData struct {
	t, y    []float64
	orig    []int // index of each kept reading in the caller's slices
	sigma   float64
	dt      float64
	quantum float64
}

// AnalyseRise reduces a temperature log — t in seconds (increasing), theta
// in kelvin — to the corrected temperature change by every method, chooses
// one, and checks the run.
//
// The record is split into the fore period, the main period from t1 to t2
// and the after period (periodDetect says how, unless RiseOptions fix
// them). Each drift period is fitted by a straight line and its honest drift
// pair (see Drift); the pairs give G and θ∞ and the Newtonian curve of each
// period. Single readings that stand more than SpikeZ noise SDs off the
// line through their neighbours (riseSpikes), and drift-period readings
// whose robust z-score of the residual exceeds SpikeZ, are excluded as
// spikes and listed.
//
// The methods (methodGeom.eval and modelFit give the formulas) are
// Regnault–Pfaundler, Dickinson, extrapolation to the mixing time and the
// model fit. Method "auto" chooses by this rule:
//
//  1. regnault-pfaundler when the after period is long enough (MinAfterS
//     and MinPoints) and its drift is linear in θ (the after-drift-linear
//     check passes): the heat-exchange integral is then exact under
//     Newton's law whatever the release shape or probe lag;
//  2. otherwise model, when the model fit converged with a residual SD at
//     most MaxResidualRatio times the reading noise: it needs only a short
//     or curved after period;
//  3. otherwise regnault-pfaundler, with the reason saying what failed.
//
// Uncertainty. Every closed-form method depends on the readings only
// through linear statistics — each drift period's mean, slope and drift
// temperature, and the trapezoid sum over the main period — with weights
// fixed by the times. The gradient of the method with respect to these
// (central differences) is carried back to a sensitivity for each reading,
// and the noise variance is summed period by period with the AR(1)
// covariance of its residuals (driftFit.driftCov): fit covariances,
// slope–intercept correlation and end-reading noise are all in it, and
// autocorrelated noise is weighted exactly rather than by a blanket factor.
// Components: fore-drift and after-drift (ν = n − 2, reduced by
// (1 − ρ)/(1 + ρ)), main-readings (σ and ρ pooled from the two drift
// periods); with a detected resolution δ each period's noise is taken as at
// least δ/(2√3) and the share δ²/12 of its variance is reported as the
// resolution component (type B) — rounding that the measured scatter and
// its autocorrelation already show, so nothing is counted twice;
// probe-calibration UTemperature·√(2(1 − r)) when UTemperature > 0 (r =
// ProbeCorrelation). Dickinson and
// extrapolation add line-curvature: the difference the straight lines make
// against the Newtonian curves; extrapolation adds instant-release, the
// equal-area minus mixing-time difference on the curves (DOMAIN §2: bias ≈
// (r2 − r1)(t_x − t_mix)), and mixing-time, |r2 − r1|·MixTimeU. The model's
// u comes from its fit covariance, inflated by √((1+ρ)/(1−ρ)) with ρ the
// lag-1 autocorrelation of its residuals. DoF is the
// Welch–Satterthwaite ν_eff = u⁴/Σ(u_i⁴/ν_i) (JCGM 100:2008, G.2).
func AnalyseRise(t, theta []float64, opt RiseOptions) (*Rise, error) {
	if err := riseValidate(t, theta, &opt); err != nil {
		return nil, err
	}
	lim := opt.Limits.withDefaults()
	n := len(t)
	res := &Rise{Points: n, Methods: map[string]float64{}, MethodU: map[string]float64{}}

	quantum := riseQuantum(theta)
	sigma := periodNoise(t, theta)
	if quantum > 0 {
		sigma = math.Max(sigma, quantum/math.Sqrt(12))
	}
	dt := riseMedianStep(t)
	excluded := riseSpikes(t, theta, sigma, lim.SpikeZ)
	d := riseKeep(t, theta, excluded)
	d.sigma, d.dt, d.quantum = sigma, dt, quantum

	pl, err := periodDetect(d, opt, lim)
	if err != nil {
		return nil, fmt.Errorf("period detection: %w", err)
	}
	preStart := d.t[pl.iStart]
	postEnd := d.t[pl.iEnd-1]
	if opt.Pre != nil {
		preStart = opt.Pre.Start
	}
	if opt.Post != nil {
		postEnd = opt.Post.End
	}

	// Final drift fits, with the robust residual test for spikes.
	var fore, after *driftFit
	var G float64
	for round := 0; ; round++ {
		iStart := sort0(d.t, preStart)
		iF := sortAfter(d.t, pl.t1)
		iP := sort0(d.t, pl.t2)
		iEnd := sortAfter(d.t, postEnd)
		pl.iStart, pl.iF, pl.iP, pl.iEnd = iStart, iF, iP, iEnd
		if fore, err = newDriftFit(d.t[iStart:iF], d.y[iStart:iF]); err != nil {
			return nil, fmt.Errorf("fore period: %w", err)
		}
		if after, err = newDriftFit(d.t[iP:iEnd], d.y[iP:iEnd]); err != nil {
			return nil, fmt.Errorf("after period: %w", err)
		}
		// The cooling constant needs the two drift temperatures apart by
		// more than their noise (and the resolution and float rounding).
		dT := after.pairT - fore.pairT
		need := math.Max(5*sigma*math.Sqrt(1/float64(fore.n)+1/float64(after.n)),
			math.Max(quantum, 1e-9*math.Abs(fore.pairT)))
		if !(math.Abs(dT) > need) {
			return nil, fmt.Errorf("drift: %w: the after period is only %s from the fore period, within the %s its noise allows (hint: check the mixing time and periods)",
				ErrNoProcess, checkK(dT), checkK(need))
		}
		G = (fore.slope - after.slope) / dT
		fore.finish(G)
		after.finish(G)
		if round == 3 {
			break
		}
		var more []int
		for _, p := range []struct {
			f   *driftFit
			off int
		}{{fore, iStart}, {after, iP}} {
			centre, scale := riseRobust(p.f.resid)
			for k, v := range p.f.resid {
				if math.Abs(v-centre) > lim.SpikeZ*math.Max(scale, sigma) {
					more = append(more, d.orig[p.off+k])
				}
			}
		}
		if len(more) == 0 {
			break
		}
		excluded = append(excluded, more...)
		slices.Sort(excluded)
		excluded = slices.Compact(excluded)
		nd := riseKeep(t, theta, excluded)
		nd.sigma, nd.dt, nd.quantum = sigma, dt, quantum
		d = nd
	}
	res.Excluded = excluded
	res.Quantum = quantum
	res.Noise = sigma
	res.SamplingInterval = dt
	res.MixTime = pl.tm
	res.MixTimeU = pl.tmU
	res.MixDetected = pl.detected
	res.Periods.Pre = Period{preStart, pl.t1}
	res.Periods.Main = Period{pl.t1, pl.t2}
	res.Periods.Post = Period{pl.t2, postEnd}
	res.PreDrift = fore.drift()
	res.PostDrift = after.drift()

	// Main period: interior readings and trapezoid weights.
	iA, iB := sortAfter(d.t, pl.t1), sort0(d.t, pl.t2)
	geom, st, wMain, nodes := methodSetup(d.t[iA:iB], d.y[iA:iB], pl.t1, pl.t2, pl.tm, fore, after)
	mr := geom.eval(st)
	res.G, res.ThetaInf = mr.G, mr.thetaInf
	grad := geom.methodGradient(st)

	// Noise covariance of the outputs, period by period.
	var covF, covP, covM [outCount * outCount]float64
	gF := make([][3]float64, outCount)
	gP := make([][3]float64, outCount)
	for j := 0; j < outCount; j++ {
		gF[j] = [3]float64{grad[j][0], grad[j][1], grad[j][2]}
		gP[j] = [3]float64{grad[j][3], grad[j][4], grad[j][5]}
	}
	// Noise SDs, never below the rounding error of one reading δ/(2√3).
	qv := quantum * quantum / 12
	sdF := math.Sqrt(math.Max(fore.sd*fore.sd, qv))
	sdP := math.Sqrt(math.Max(after.sd*after.sd, qv))
	sdM := math.Sqrt((sdF*sdF + sdP*sdP) / 2)
	rhoM := (fore.rho + after.rho) / 2
	fore.driftCov(gF, sdF, fore.rho, covF[:])
	after.driftCov(gP, sdP, after.rho, covP[:])
	riseMainCov(wMain, grad, sdM, rhoM, covM[:])
	nuF := float64(fore.n-2) * (1 - fore.rho) / (1 + fore.rho)
	nuP := float64(after.n-2) * (1 - after.rho) / (1 + after.rho)

	// The noise components of output j. With a detected resolution δ, the
	// share δ²/12 of each period's noise variance is rounding: it is reported
	// as the resolution component (type B), the rest as measured scatter.
	noiseParts := func(j int) []RiseUncertainty {
		v := func(c [outCount * outCount]float64) float64 { return math.Max(0, c[j*outCount+j]) }
		share := func(sd float64) float64 {
			if !(sd > 0) {
				return 0
			}
			return math.Min(1, qv/(sd*sd))
		}
		vf, vp, vm := v(covF), v(covP), v(covM)
		qf, qp, qm := share(sdF), share(sdP), share(sdM)
		out := []RiseUncertainty{
			{"fore-drift", math.Sqrt(vf * (1 - qf)), nuF},
			{"after-drift", math.Sqrt(vp * (1 - qp)), nuP},
			{"main-readings", math.Sqrt(vm * (1 - qm)), nuF + nuP},
		}
		if quantum > 0 {
			out = append(out, RiseUncertainty{"resolution", math.Sqrt(vf*qf + vp*qp + vm*qm), math.Inf(1)})
		}
		return out
	}
	var common []RiseUncertainty
	if opt.UTemperature > 0 {
		common = append(common, RiseUncertainty{"probe-calibration",
			opt.UTemperature * math.Sqrt(2*(1-opt.ProbeCorrelation)), math.Inf(1)})
	}
	parts := map[string][]RiseUncertainty{}
	values := map[string]float64{
		MethodRegnaultPfaundler: mr.rp, MethodDickinson: mr.dick, MethodExtrapolation: mr.extrap,
	}
	parts[MethodRegnaultPfaundler] = append(noiseParts(outRP), common...)
	parts[MethodDickinson] = append(append(noiseParts(outDickinson), common...),
		RiseUncertainty{"line-curvature", math.Abs(mr.dick - mr.dickCurve), math.Inf(1)})
	parts[MethodExtrapolation] = append(append(noiseParts(outExtrapolation), common...),
		RiseUncertainty{"line-curvature", math.Abs(mr.extrap - mr.extrapCurve), math.Inf(1)},
		RiseUncertainty{"instant-release", math.Abs(mr.extrapCurve - riseFinite(mr.dickCurve, mr.rp)), math.Inf(1)})

	// T60, Tx and the response time from the main-period readings.
	yNodes := append(append([]float64{mr.theta0}, d.y[iA:iB]...), mr.thetaN)
	lF := methodLine{fore.mean, fore.slope, fore.c}
	lP := methodLine{after.mean, after.slope, after.c}
	res.Tx = mr.tx
	res.T60 = methodFraction(nodes, yNodes, lF, lP, 0.6)
	if t63 := methodFraction(nodes, yNodes, lF, lP, 1-math.Exp(-1)); !math.IsNaN(t63) {
		res.ResponseTime = math.Max(t63-pl.tm, 0)
	} else {
		res.ResponseTime = pl.tResp
	}

	// The model.
	g0 := fore.slope - mr.G*(mr.initCurve-fore.pairT)
	mG := mr.G
	if !(mG > 0) {
		mG = 1e-6
	}
	mfit := modelFit(d.t[pl.iStart:pl.iEnd], d.y[pl.iStart:pl.iEnd], iA-pl.iStart, iB-pl.iStart,
		[6]float64{mr.initCurve, g0, mG, mr.rp, res.ResponseTime, pl.tm}, dt)
	modelOK := mfit.ok && mfit.sd <= lim.MaxResidualRatio*sigma
	if modelOK && pl.detected {
		// The detected time is where the readings leave the fore drift; a
		// lagging probe leaves it later than the process starts. The model's
		// start says by how much.
		res.MixTimeU = math.Hypot(pl.tmU, mfit.mix-pl.tm)
		pl.tmU = res.MixTimeU
	}
	parts[MethodExtrapolation] = append(parts[MethodExtrapolation],
		RiseUncertainty{"mixing-time", math.Abs(after.slope-fore.slope) * res.MixTimeU, math.Inf(1)})
	if mfit.ok {
		values[MethodModel] = mfit.rise
		parts[MethodModel] = append([]RiseUncertainty{{"model-fit", mfit.u, float64(mfit.dof) / (mfit.infl * mfit.infl)}}, common...)
	}
	if math.IsNaN(mr.dick) {
		delete(values, MethodDickinson)
	}
	for name, v := range values {
		res.Methods[name] = v
		u, _ := riseCombine(parts[name])
		res.MethodU[name] = u
	}

	// Checks that the choice depends on.
	cc := &checkContext{res: res, times: t, lim: lim, fore: fore, after: after, model: mfit, modelOK: modelOK,
		sigma: sigma, dt: dt, quantum: quantum}
	afterLinear := cc.driftLinear("after-drift-linear", after, pl.t2)
	foreLinear := cc.driftLinear("fore-drift-linear", fore, pl.t1)
	afterLong := after.tEnd-after.tStart >= lim.MinAfterS && after.n >= lim.MinPoints

	// Method choice.
	method := opt.Method
	switch method {
	case "", MethodAuto:
		switch {
		case afterLong && afterLinear.Status == Pass:
			method = MethodRegnaultPfaundler
			res.MethodReason = fmt.Sprintf("auto: the after period (%.0f s, %s) is long enough and its drift is linear in θ", after.tEnd-after.tStart, riseReadings(after.n))
		case modelOK:
			method = MethodModel
			why := "too short"
			if afterLong {
				why = "not linear in θ"
			}
			res.MethodReason = fmt.Sprintf("auto: the after period is %s for regnault-pfaundler and the model fit converged (residual SD %.2g K)", why, mfit.sd)
		default:
			method = MethodRegnaultPfaundler
			res.MethodReason = "auto: regnault-pfaundler although the after period is short or curved, because the model fit is unavailable: " + cc.modelWhy()
		}
	default:
		if _, ok := values[method]; !ok {
			why := cc.modelWhy()
			if method == MethodDickinson {
				why = "the readings leave the band between the fore and after lines, so no equal-area time exists"
			}
			return nil, fmt.Errorf("method %s: not available for this run: %s", method, why)
		}
		res.MethodReason = "chosen by the caller"
	}
	res.Method = method
	res.DeltaT = values[method]
	res.UParts = parts[method]
	res.UDeltaT, res.DoF = riseCombine(res.UParts)

	// Initial and final temperatures.
	riseEnds(res, method, mr, mfit, covF, covP, covM, opt)

	res.Residuals = riseResiduals(n, d, pl, fore, after, mfit, t, theta)
	res.Checks = cc.all(afterLinear, foreLinear)
	return res, nil
}

// riseEnds sets the initial and final temperatures and their covariance.
func riseEnds(res *Rise, method string, mr methodResult, mfit modelResult, covF, covP, covM [outCount * outCount]float64, opt RiseOptions) {
	cv := func(i, j int) float64 {
		return covF[i*outCount+j] + covP[i*outCount+j] + covM[i*outCount+j]
	}
	var vi, cid float64 // var(initial), cov(initial, ΔT) from the noise
	switch method {
	case MethodModel:
		res.InitialTemperature = mfit.theta0
		vi, cid = mfit.uTheta0*mfit.uTheta0, mfit.covT0A
	case MethodExtrapolation, MethodDickinson:
		res.InitialTemperature = mr.initLine
		j := outExtrapolation
		if method == MethodDickinson {
			j = outDickinson
		}
		vi, cid = cv(outInitLine, outInitLine), cv(outInitLine, j)
	default:
		res.InitialTemperature = mr.initCurve
		vi, cid = cv(outInitCurve, outInitCurve), cv(outInitCurve, outRP)
	}
	uT := opt.UTemperature
	r := opt.ProbeCorrelation
	// ΔT's variance without its probe part (that part is put back below
	// through the end temperatures' own calibration errors).
	vd := res.UDeltaT * res.UDeltaT
	if uT > 0 {
		vd -= 2 * (1 - r) * uT * uT
	}
	res.FinalTemperature = res.InitialTemperature + res.DeltaT
	res.UInitial = math.Sqrt(math.Max(0, vi+uT*uT))
	res.UFinal = math.Sqrt(math.Max(0, vi+vd+2*cid+uT*uT))
	res.CovInitialFinal = vi + cid + r*uT*uT
	res.MeanTemperature = (res.InitialTemperature + res.FinalTemperature) / 2
}

// riseMainCov adds the noise covariance of the outputs through the
// main-period readings (sensitivity ∂y_j/∂S·w_k, AR(1) as in driftCov).
func riseMainCov(w []float64, grad [outCount][methodStatCount]float64, sd, rho float64, cov []float64) {
	var z, sn [outCount]float64
	for k := len(w) - 1; k >= 0; k-- {
		var s [outCount]float64
		for j := 0; j < outCount; j++ {
			if k < len(w)-1 {
				z[j] = rho * (sn[j] + z[j])
			}
			s[j] = grad[j][6] * w[k]
		}
		for j := 0; j < outCount; j++ {
			for l := 0; l < outCount; l++ {
				cov[j*outCount+l] += sd * sd * (s[j]*s[l] + s[j]*z[l] + s[l]*z[j])
			}
		}
		sn = s
	}
}

// riseFinite returns v, or alt when v is NaN.
func riseFinite(v, alt float64) float64 {
	if math.IsNaN(v) {
		return alt
	}
	return v
}

// riseCombine returns the root sum of squares of the components and the
// Welch–Satterthwaite effective degrees of freedom (JCGM 100:2008, G.2b).
func riseCombine(parts []RiseUncertainty) (u, dof float64) {
	var u2, den float64
	for _, p := range parts {
		u2 += p.U * p.U
		if p.U > 0 && !math.IsInf(p.DoF, 1) {
			den += math.Pow(p.U, 4) / p.DoF
		}
	}
	u = math.Sqrt(u2)
	if den == 0 {
		return u, math.Inf(1)
	}
	return u, u2 * u2 / den
}

// riseResiduals returns the residual of every reading (see Rise.Residuals).
func riseResiduals(n int, d *riseData, pl periodPlan, fore, after *driftFit, mfit modelResult, t, theta []float64) []float64 {
	out := make([]float64, n)
	cF := fore.curve((fore.slope-after.slope)/(after.pairT-fore.pairT), fore.mean, fore.slope, fore.pairT)
	cP := after.curve((fore.slope-after.slope)/(after.pairT-fore.pairT), after.mean, after.slope, after.pairT)
	for k := range out {
		switch tk := t[k]; {
		case tk >= fore.tStart && tk <= pl.t1:
			out[k] = theta[k] - cF.at(tk)
		case tk >= pl.t2 && tk <= after.tEnd:
			out[k] = theta[k] - cP.at(tk)
		case tk > pl.t1 && tk < pl.t2 && mfit.ok:
			out[k] = theta[k] - mfit.curve(tk)
		default:
			out[k] = math.NaN()
		}
	}
	return out
}

// riseValidate checks the input and normalises the options.
func riseValidate(t, theta []float64, opt *RiseOptions) error {
	bad := func(format string, a ...any) error {
		return fmt.Errorf("rise: %w: %s", ErrRiseInput, fmt.Sprintf(format, a...))
	}
	n := len(t)
	switch {
	case len(theta) != n:
		return bad("%d times but %d temperatures", n, len(theta))
	case n < riseMinPoints:
		return bad("%s, need at least %d (three for each drift period and a main period)", riseReadings(n), riseMinPoints)
	}
	for k := range t {
		if math.IsNaN(t[k]) || math.IsInf(t[k], 0) {
			return bad("time of reading %d is %v", k, t[k])
		}
		if math.IsNaN(theta[k]) || math.IsInf(theta[k], 0) {
			return bad("temperature of reading %d is %v", k, theta[k])
		}
		if !(theta[k] > 0) {
			return bad("temperature of reading %d is %g K, not above absolute zero (give kelvin)", k, theta[k])
		}
		if k > 0 && !(t[k] > t[k-1]) {
			return bad("time does not increase at reading %d (%g s after %g s)", k, t[k], t[k-1])
		}
	}
	if opt.MixTime == 0 {
		opt.MixTime = math.NaN()
	}
	t0, tn := t[0], t[n-1]
	if !math.IsNaN(opt.MixTime) && !(opt.MixTime > t0 && opt.MixTime < tn) {
		return bad("mixing time %g s is outside the log (%g s to %g s)", opt.MixTime, t0, tn)
	}
	for _, p := range []struct {
		name string
		p    *Period
	}{{"fore period", opt.Pre}, {"after period", opt.Post}} {
		if p.p == nil {
			continue
		}
		if math.IsNaN(p.p.Start) || math.IsNaN(p.p.End) || !(p.p.Start < p.p.End) {
			return bad("%s [%g, %g] s does not have start < end", p.name, p.p.Start, p.p.End)
		}
		// A given period must lie within the readings (one mean sampling
		// interval of slack at each end): a period reaching past them would
		// be reported as used while fewer readings were.
		slack := (tn - t0) / float64(n-1)
		if p.p.Start < t0-slack || p.p.End > tn+slack {
			return bad("%s [%g, %g] s reaches outside the log (%g s to %g s)", p.name, p.p.Start, p.p.End, t0, tn)
		}
	}
	if opt.Pre != nil && opt.Post != nil && !(opt.Pre.End < opt.Post.Start) {
		return bad("fore period ends at %g s, not before the after period starts at %g s", opt.Pre.End, opt.Post.Start)
	}
	if !math.IsNaN(opt.MixTime) {
		if opt.Pre != nil && opt.MixTime < opt.Pre.End {
			return bad("mixing time %g s is before the end of the fore period %g s", opt.MixTime, opt.Pre.End)
		}
		if opt.Post != nil && opt.MixTime > opt.Post.Start {
			return bad("mixing time %g s is after the start of the after period %g s", opt.MixTime, opt.Post.Start)
		}
	}
	switch opt.Method {
	case "", MethodAuto, MethodRegnaultPfaundler, MethodDickinson, MethodExtrapolation, MethodModel:
	default:
		return bad("unknown method %q (want auto, regnault-pfaundler, dickinson, extrapolation or model)", opt.Method)
	}
	if math.IsNaN(opt.UTemperature) || opt.UTemperature < 0 || math.IsInf(opt.UTemperature, 0) {
		return bad("probe calibration uncertainty %g K is not a non-negative number", opt.UTemperature)
	}
	if !(opt.ProbeCorrelation >= 0 && opt.ProbeCorrelation <= 1) {
		return bad("probe correlation %g is outside [0, 1]", opt.ProbeCorrelation)
	}
	return nil
}

// riseReadings is "1 reading" or "n readings", for messages.
func riseReadings(n int) string {
	if n == 1 {
		return "1 reading"
	}
	return strconv.Itoa(n) + " readings"
}

// riseQuantum detects the resolution of the readings: the smallest non-zero
// step between consecutive readings, accepted when every reading lies on
// that grid (within 1 % of a step; readings that vary continuously fail
// this at once). 0 when there is none.
func riseQuantum(y []float64) float64 {
	n := len(y)
	lo, hi := y[0], y[0]
	for _, v := range y {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	tol := 1e-12 * math.Max(math.Abs(lo), math.Abs(hi))
	q := math.Inf(1)
	for k := 1; k < n; k++ {
		if d := math.Abs(y[k] - y[k-1]); d > tol && d < q {
			q = d
		}
	}
	if math.IsInf(q, 1) || (hi-lo)/q > 1e9 {
		return 0
	}
	for _, v := range y {
		r := (v - y[0]) / q
		if math.Abs(r-math.Round(r)) > 0.01 {
			return 0
		}
	}
	return q
}

// riseMedianStep is the median interval between readings.
func riseMedianStep(t []float64) float64 {
	stride := max(1, (len(t)-1)/20000)
	var d []float64
	for k := 1; k < len(t); k += stride {
		d = append(d, t[k]-t[k-1])
	}
	return fit.Median(d)
}

// riseSpikes finds single-reading spikes from the departures of each
// reading from the line through its neighbours,
//
//	d_k = θ_k − (a·θ_{k−1} + b·θ_{k+1}),   a = (t_{k+1} − t_k)/(t_{k+1} − t_{k−1}),  b = 1 − a,
//
// whose noise SD is σ√(1 + a² + b²). A spike S at k gives d_k ≈ S and
// d_{k±1} ≈ −S/2; a smooth peak or the kink at the start of a release gives
// neighbours of the same sign or near zero. A reading is a spike when |d_k|
// exceeds z noise SDs and both neighbouring departures have the opposite
// sign and at least a quarter of its size. A rise, however fast, has no
// such reading.
func riseSpikes(t, y []float64, sigma, z float64) []int {
	n := len(y)
	if !(sigma > 0) || n < 5 {
		return nil
	}
	d := make([]float64, n)
	lim := make([]float64, n)
	for k := 1; k < n-1; k++ {
		a := (t[k+1] - t[k]) / (t[k+1] - t[k-1])
		b := 1 - a
		d[k] = y[k] - (a*y[k-1] + b*y[k+1])
		lim[k] = z * sigma * math.Sqrt(1+a*a+b*b)
	}
	var out []int
	for k := 2; k < n-2; k++ {
		if math.Abs(d[k]) > lim[k] && d[k-1]*d[k] < 0 && d[k+1]*d[k] < 0 &&
			math.Abs(d[k-1]) > math.Abs(d[k])/4 && math.Abs(d[k+1]) > math.Abs(d[k])/4 {
			out = append(out, k)
		}
	}
	return out
}

// riseKeep returns the record without the excluded readings (sorted).
func riseKeep(t, y []float64, excluded []int) *riseData {
	n := len(t) - len(excluded)
	d := &riseData{t: make([]float64, 0, n), y: make([]float64, 0, n), orig: make([]int, 0, n)}
	j := 0
	for k := range t {
		if j < len(excluded) && excluded[j] == k {
			j++
			continue
		}
		d.t = append(d.t, t[k])
		d.y = append(d.y, y[k])
		d.orig = append(d.orig, k)
	}
	return d
}

// riseRobust returns the median and 1.4826·MAD of v, from at most 20 000
// evenly spread values (the robust z-score of fit.RobustZ at O(n) cost).
func riseRobust(v []float64) (centre, scale float64) {
	stride := max(1, len(v)/20000)
	s := make([]float64, 0, len(v)/stride+1)
	for k := 0; k < len(v); k += stride {
		s = append(s, v[k])
	}
	return fit.Median(s), 1.4826 * fit.MAD(s)
}
