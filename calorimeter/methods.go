package calorimeter

import (
	"errors"
	"fmt"
	"math"

	"calred/fit"
)

// Names of the methods for the corrected temperature change, as used in
// RiseOptions.Method and as keys of Rise.Methods.
const (
	MethodAuto              = "auto"
	MethodRegnaultPfaundler = "regnault-pfaundler"
	MethodDickinson         = "dickinson"
	MethodExtrapolation     = "extrapolation"
	MethodModel             = "model"
)

// methodNames lists the methods in the order they are reported.
var methodNames = []string{MethodRegnaultPfaundler, MethodDickinson, MethodExtrapolation, MethodModel}

// methodGeom is what the methods need besides the linear statistics: the
// two drift periods, the main period [t1, t2], the mixing time and the
// trapezoid weights of the two end nodes of the main period.
type methodGeom struct {
	fore, after *driftFit
	t1, t2, tm  float64
	w0, wn      float64
}

// methodStats are the linear statistics of the readings through which every
// method depends on the data: each drift period's mean reading m, slope b
// and drift temperature T, and the trapezoid sum S = Σ w_k θ_k over the
// readings strictly inside the main period.
type methodStats struct {
	mF, bF, TF, mP, bP, TP, S float64
}

// methodStatCount is the number of fields of methodStats.
const methodStatCount = 7

// add adds d to the i-th statistic (in field order).
func (s *methodStats) add(i int, d float64) {
	switch i {
	case 0:
		s.mF += d
	case 1:
		s.bF += d
	case 2:
		s.TF += d
	case 3:
		s.mP += d
	case 4:
		s.bP += d
	case 5:
		s.TP += d
	case 6:
		s.S += d
	}
}

// methodResult holds what the closed-form methods give for one set of
// statistics.
type methodResult struct {
	G, thetaInf    float64
	theta0, thetaN float64 // Newtonian fore value at t1, after value at t2
	rp             float64
	dick, tx       float64 // equal area with the straight drift lines
	extrap         float64 // straight lines at t_mix
	initCurve      float64 // Newtonian fore curve at t_mix
	initLine       float64 // fore line at t_mix
	dickCurve      float64 // equal area with the Newtonian curves
	extrapCurve    float64 // Newtonian curves at t_mix
}

// methodOutputs are the results whose covariance is propagated: the three
// closed-form methods and the two versions of the initial temperature.
func (r methodResult) outputs() []float64 {
	return []float64{r.rp, r.dick, r.extrap, r.initCurve, r.initLine}
}

const (
	outRP = iota
	outDickinson
	outExtrapolation
	outInitCurve
	outInitLine
	outCount
)

// methodSetup builds the main period [t1, t2] from the readings strictly
// inside it (t, y) and the two drift fits: the trapezoid nodes (t1, the
// readings, t2), the weights w_k = (t_{k+1} − t_{k−1})/2 of the readings and
// of the two end nodes, and the statistics.
func methodSetup(t, y []float64, t1, t2, tm float64, fore, after *driftFit) (*methodGeom, methodStats, []float64, []float64) {
	g := &methodGeom{fore: fore, after: after, t1: t1, t2: t2, tm: tm}
	nodes := append(append([]float64{t1}, t...), t2)
	w := make([]float64, len(t))
	var S float64
	for k := range t {
		w[k] = (nodes[k+2] - nodes[k]) / 2
		S += w[k] * y[k]
	}
	g.w0 = (nodes[1] - nodes[0]) / 2
	g.wn = (nodes[len(nodes)-1] - nodes[len(nodes)-2]) / 2
	st := methodStats{fore.mean, fore.slope, fore.pairT, after.mean, after.slope, after.pairT, S}
	return g, st, w, nodes
}

// eval computes every closed-form method from the statistics.
//
// The drift pairs give the cooling constant and convergence temperature
// (DOMAIN §2),
//
//	G = (g_i − g_f)/(T_f − T_i),   θ∞ = T_i + g_i/G,
//
// and the drift function g(θ) = g_i − G(θ − T_i), linear in θ.
//
// Regnault–Pfaundler integrates g over the main period by the trapezoid
// rule on the readings (any spacing):
//
//	ΔT = (θ_n − θ_0) − ∫_{t1}^{t2} g(θ) dt
//	   = (θ_n − θ_0) − [g_i·(t2 − t1) − G·(∫θ dt − T_i·(t2 − t1))]
//
// which for even sampling is the classic n·Δt·g_i − G·Δt·[(θ_0 + θ_n)/2 +
// Σθ_k − n·T_i] (DOMAIN §2; ISO 1928 isoperibol annex). The end values θ_0
// and θ_n are not single readings but the fore and after periods' Newtonian
// curves (driftFit.curve) at t1 and t2: each is as good as the mean of its
// period, so one noisy reading cannot dominate, and it carries no line
// curvature bias.
//
// Extrapolation is L_post(t_mix) − L_pre(t_mix) with the straight lines;
// Dickinson is L_post(t_x) − L_pre(t_x), t_x chosen so that the areas
// between the readings and the two extrapolated lines are equal (ASTM D240
// practice; DOMAIN §2). Both are also evaluated with the Newtonian curves in
// place of the lines, which measures what the lines' curvature costs.
func (g *methodGeom) eval(s methodStats) methodResult {
	var r methodResult
	r.G = (s.bF - s.bP) / (s.TP - s.TF)
	r.thetaInf = s.TF + s.bF/r.G
	cF := g.fore.curve(r.G, s.mF, s.bF, s.TF)
	cP := g.after.curve(r.G, s.mP, s.bP, s.TP)
	r.theta0 = cF.at(g.t1)
	r.thetaN = cP.at(g.t2)
	span := g.t2 - g.t1
	area := g.w0*r.theta0 + s.S + g.wn*r.thetaN // ∫θ dt over the main period
	exchange := s.bF*span - r.G*(area-s.TF*span)
	r.rp = r.thetaN - r.theta0 - exchange

	lF := methodLine{s.mF, s.bF, g.fore.c}
	lP := methodLine{s.mP, s.bP, g.after.c}
	r.extrap = lP.at(g.tm) - lF.at(g.tm)
	r.initLine = lF.at(g.tm)
	r.initCurve = cF.at(g.tm)
	r.extrapCurve = cP.at(g.tm) - r.initCurve
	r.tx = methodEqualArea(g.t1, g.t2, area, lF, lP)
	r.dick = lP.at(r.tx) - lF.at(r.tx)
	txc := methodEqualArea(g.t1, g.t2, area, cF, cP)
	r.dickCurve = cP.at(txc) - cF.at(txc)
	return r
}

// methodRef is a reference curve extrapolated into the main period.
type methodRef interface {
	at(t float64) float64
	integral(a, b float64) float64
}

// methodLine is m + b·(t − c).
type methodLine struct{ m, b, c float64 }

func (l methodLine) at(t float64) float64 { return l.m + l.b*(t-l.c) }
func (l methodLine) integral(a, b float64) float64 {
	return l.m*(b-a) + l.b*((b-l.c)*(b-l.c)-(a-l.c)*(a-l.c))/2
}

// methodEqualArea returns the time t_x in [t1, t2] at which
//
//	A(t_x) = ∫_{t1}^{t2} θ dt − ∫_{t1}^{t_x} pre dt − ∫_{t_x}^{t2} post dt = 0,
//
// i.e. the area between the readings and the pre curve before t_x equals the
// area between the post curve and the readings after it. dA/dt_x =
// post(t_x) − pre(t_x), the rise itself, so A is monotonic and the root is
// found by bisection polished with Newton steps. NaN when A does not change
// sign on [t1, t2] (the readings leave the band between the curves).
func methodEqualArea(t1, t2, area float64, pre, post methodRef) float64 {
	fa := func(x float64) float64 {
		return area - pre.integral(t1, x) - post.integral(x, t2)
	}
	lo, hi := t1, t2
	flo, fhi := fa(lo), fa(hi)
	if math.IsNaN(flo) || math.IsNaN(fhi) || flo*fhi > 0 {
		return math.NaN()
	}
	if flo == 0 {
		return lo
	}
	if fhi == 0 {
		return hi
	}
	for i := 0; i < 200 && hi-lo > 1e-9*(1+math.Abs(hi)); i++ {
		mid := lo + (hi-lo)/2
		fm := fa(mid)
		if (fm < 0) == (flo < 0) {
			lo, flo = mid, fm
		} else {
			hi = mid
		}
	}
	x := lo + (hi-lo)/2
	for i := 0; i < 3; i++ { // Newton polish: A′ = post − pre
		d := post.at(x) - pre.at(x)
		if d == 0 {
			break
		}
		nx := x - fa(x)/d
		if !(nx >= t1 && nx <= t2) {
			break
		}
		x = nx
	}
	return x
}

// methodFraction returns the first time at or after t1 at which the
// fraction of the rise reached,
//
//	F(t) = (θ(t) − pre(t))/(post(t) − pre(t)),
//
// passes frac, interpolating linearly between readings (t, y increasing t,
// the main-period readings with the two end nodes). NaN when it never does.
func methodFraction(t, y []float64, pre, post methodRef, frac float64) float64 {
	prevT, prevF := math.NaN(), math.NaN()
	for k := range t {
		d := post.at(t[k]) - pre.at(t[k])
		f := (y[k] - pre.at(t[k])) / d
		if f >= frac {
			if math.IsNaN(prevF) {
				return t[k]
			}
			return prevT + (frac-prevF)/(f-prevF)*(t[k]-prevT)
		}
		prevT, prevF = t[k], f
	}
	return math.NaN()
}

// methodGradient returns ∂output/∂stat for every closed-form output, by
// central differences with steps of 10⁻⁵ of the rise T_f − T_i (at least
// 10⁻⁸ K) for m and T, a thousandth of that per second for b, and the
// matching K·s for S: far above rounding, and small against the rise that
// sets the scale of G's nonlinearity.
func (g *methodGeom) methodGradient(s methodStats) [outCount][methodStatCount]float64 {
	k := 1e-5 * math.Max(math.Abs(s.TP-s.TF), 1e-3) // K, well inside the rise
	steps := [methodStatCount]float64{k, k / 1000, k, k, k / 1000, k, 100 * k * math.Max(1, g.t2-g.t1)}
	var grad [outCount][methodStatCount]float64
	for i := 0; i < methodStatCount; i++ {
		up, dn := s, s
		up.add(i, steps[i])
		dn.add(i, -steps[i])
		ou := g.eval(up).outputs()
		od := g.eval(dn).outputs()
		for j := 0; j < outCount; j++ {
			grad[j][i] = (ou[j] - od[j]) / (2 * steps[i])
		}
	}
	return grad
}

// The model method.
//
// The whole record (spikes excluded) is fitted by Levenberg–Marquardt
// (fit.LevenbergMarquardtVector) with the solution of Newton's law for a
// release starting at t_mix, optionally seen through a probe with a
// first-order lag τ = 1/c (DOMAIN §2, "model fit"):
//
//	θ(t) = θ_0 + g_0·φ(t − t_mix) + A·R(t − t_mix)·[t > t_mix]
//	φ(s) = (1 − e^{−Gs})/G
//
// θ_0 and g_0 are the baseline temperature and drift at t_mix and A = Q/ε
// is the corrected temperature change. Two release shapes are tried, and
// the one with the smaller sum of squares kept:
//
//	first order, rate λ:          R(s) = λ·C2(G, λ; s)          (lag: λ·c·C3(G, λ, c; s))
//	constant power for a time d:  R(s) = [Y(s) − Y(s − d)]/d,  Y(u) = φ(u)  (lag: φ(u) − C2(G, c; u)),  Y = 0 for u ≤ 0
//
// with C2 and C3 the convolutions of two and three decaying exponentials,
//
//	C2(a, b; s) = (e^{−as} − e^{−bs})/(b − a)
//	C3(a, b, c; s) = [C2(a, b; s) − C2(b, c; s)]/(c − a)
//
// (the vessel integrates the release, the probe integrates the vessel).
// Parameters: θ_0, g_0, G, A, ln λ or ln d, t_mix (about the detected
// mixing time, in units of the response time) and, with lag, ln c. The
// lag model is kept when it lowers the sum of squares significantly (F > 10
// for one extra parameter). Records are averaged into bins weighted by
// their counts — at most 100 in each drift period and 2000 in the main
// period, where a bin never spans more than a twentieth of the 63 %
// response time — which leaves the fit of a smooth curve unchanged to
// second order in the bin width.

// modelShape is the release shape of the model.
type modelShape int

const (
	modelFirstOrder modelShape = iota
	modelPulse
)

// modelResult is the outcome of the model fit.
type modelResult struct {
	ok      bool
	reason  string // why it failed
	shape   modelShape
	params  []float64
	rise, u float64
	dof     int
	sd      float64 // residual SD per reading
	lag     bool
	tau     float64 // probe lag (s), with lag
	rate    float64 // λ (1/s) or 1/d
	mix     float64 // fitted t_mix
	g       float64 // fitted G
	theta0  float64 // baseline at t_mix
	uTheta0 float64
	covT0A  float64 // cov(θ_0, A)
	iters   int
	nBins   int
	infl    float64 // autocorrelation inflation applied to the covariance
	tRef    float64 // reference time of the fit (s)
	tScale  float64 // scale of the t_mix parameter (s)
}

// curve is the fitted model at t.
func (m modelResult) curve(t float64) float64 {
	return modelEval(m.shape, t-m.tRef, m.params, m.tScale)
}

// modelC2 is C2(a, b; s), stable when a ≈ b.
func modelC2(a, b, s float64) float64 {
	lo, d := a, b-a
	if d < 0 {
		lo, d = b, -d
	}
	z := d * s
	if z < 1e-9 {
		return s * math.Exp(-lo*s) * (1 - z/2)
	}
	return math.Exp(-lo*s) * (-math.Expm1(-z)) / d
}

// modelC3 is C3(a, b, c; s), symmetric in its rates.
func modelC3(a, b, c, s float64) float64 {
	x, y, z := a, b, c
	if x > y {
		x, y = y, x
	}
	if y > z {
		y, z = z, y
	}
	if x > y {
		x, y = y, x
	}
	if (z-x)*s < 1e-4 {
		m := (x + y + z) / 3
		return s * s / 2 * math.Exp(-m*s)
	}
	return (modelC2(x, y, s) - modelC2(y, z, s)) / (z - x)
}

// modelEval is the model at u = t − t_ref for parameters p, where p[5] =
// 1 + (t_mix − t_ref)/scale: working about a reference time with a
// parameter of order 1 keeps the numeric Jacobian's step (relative to the
// parameter) well sized whatever the clock.
func modelEval(shape modelShape, u float64, p []float64, scale float64) float64 {
	th0, g0, G, A, k, tm := p[0], p[1], p[2], p[3], math.Exp(p[4]), (p[5]-1)*scale
	t := u
	v := th0 + g0*riseExpm1(G, t-tm)
	s := t - tm
	if s <= 0 {
		return v
	}
	lag := len(p) > 6
	c := 0.0
	if lag {
		c = math.Exp(p[6])
	}
	switch shape {
	case modelPulse:
		y := func(u float64) float64 {
			if u <= 0 {
				return 0
			}
			if lag {
				return riseExpm1(G, u) - modelC2(G, c, u)
			}
			return riseExpm1(G, u)
		}
		return v + A*(y(s)-y(s-k))/k
	default:
		if lag {
			return v + A*k*c*modelC3(G, k, c, s)
		}
		return v + A*k*modelC2(G, k, s)
	}
}

// modelData is the (binned) record the model is fitted to.
type modelData struct {
	t, y, sw []float64 // bin mean time, bin mean reading, √count
}

// modelBin averages the readings of each segment [lo, hi) into at most
// maxPoints bins of equal count, never across segments.
func modelBin(t, y []float64, segments [][2]int, maxPoints []int) modelData {
	var d modelData
	for si, seg := range segments {
		lo, hi := seg[0], seg[1]
		n := hi - lo
		if n <= 0 {
			continue
		}
		per := 1
		if n > maxPoints[si] {
			per = (n + maxPoints[si] - 1) / maxPoints[si]
		}
		for k := lo; k < hi; k += per {
			e := min(hi, k+per)
			var st, sy float64
			for i := k; i < e; i++ {
				st += t[i]
				sy += y[i]
			}
			c := float64(e - k)
			d.t = append(d.t, st/c)
			d.y = append(d.y, sy/c)
			d.sw = append(d.sw, math.Sqrt(c))
		}
	}
	return d
}

// modelFit fits the model to the readings t, y (spikes excluded) from the
// fore start to the after end. iMain and iPost are the indices where the
// main and after periods begin; start holds θ_0, g_0, G, A, the 63 %
// response time (s) and t_mix; dt is the sampling interval (s).
func modelFit(t, y []float64, iMain, iPost int, start [6]float64, dt float64) modelResult {
	resp := math.Max(start[4], dt)
	mainMax := 2000
	if dt > 0 && iPost > iMain {
		mainMax = max(mainMax, int((t[iPost-1]-t[iMain])/(resp/20))+1)
	}
	d := modelBin(t, y, [][2]int{{0, iMain}, {iMain, iPost}, {iPost, len(t)}}, []int{modelDriftBins, mainMax, modelDriftBins})
	n := len(d.t)
	tRef, scale := start[5], resp
	for i := range d.t {
		d.t[i] -= tRef
	}
	yw := make([]float64, n)
	for i := range yw {
		yw[i] = d.sw[i] * d.y[i]
	}
	fitShape := func(shape modelShape, p0 []float64) (*fit.Nonlinear, error) {
		model := func(p []float64, out []float64) {
			for i := range out {
				out[i] = d.sw[i] * modelEval(shape, d.t[i], p, scale)
			}
		}
		return fit.LevenbergMarquardtVector(model, n, yw, p0, &modelLM)
	}
	base := []float64{start[0], start[1], start[2], start[3], 0, 1}
	res := modelResult{nBins: n, tRef: tRef, tScale: scale}
	var best *fit.Nonlinear
	var firstErr error
	for _, shape := range []modelShape{modelFirstOrder, modelPulse} {
		p0 := append([]float64(nil), base...)
		if shape == modelFirstOrder {
			p0[4] = math.Log(1 / resp)
		} else {
			p0[4] = math.Log(resp / (1 - math.Exp(-1)))
		}
		f, err := fitShape(shape, p0)
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		if best == nil || f.SSR < best.SSR {
			best, res.shape = f, shape
		}
	}
	if best == nil {
		res.reason = modelWhy(firstErr)
		return res
	}
	// With lag: share the fitted response between release and probe.
	p1 := append(append([]float64(nil), best.Params...), 0)
	k := math.Exp(best.Params[4])
	if res.shape == modelFirstOrder {
		p1[4] = math.Log(k / 0.7)
		p1[6] = math.Log(k / 0.3)
	} else {
		p1[6] = -math.Log(math.Max(dt/2, 0.05*k))
	}
	if lg, err := fitShape(res.shape, p1); err == nil && lg.SSR < best.SSR {
		if f := (best.SSR - lg.SSR) / (lg.SSR / float64(lg.DoF)); f > 10 {
			best = lg
			res.lag = true
		}
	}
	p := best.Params
	if math.IsNaN(p[3]) || !(p[2] > -1e-2) {
		res.reason = fmt.Sprintf("the fitted cooling constant %.3g 1/s is not physical", p[2])
		return res
	}
	// Autocorrelated noise: inflate the covariance by the lag-1
	// autocorrelation of the fit's own weighted residuals, which for binned
	// stretches already hold the correlated variance of the bin means.
	infl := math.Sqrt((1 + driftRho(fit.Lag1Autocorrelation(best.Residuals), n)) /
		(1 - driftRho(fit.Lag1Autocorrelation(best.Residuals), n)))
	res.infl = infl
	res.ok = true
	res.params = append([]float64(nil), p...)
	res.rise = p[3]
	res.u = math.Sqrt(math.Max(0, best.Cov.At(3, 3))) * infl
	res.uTheta0 = math.Sqrt(math.Max(0, best.Cov.At(0, 0))) * infl
	res.covT0A = best.Cov.At(0, 3) * infl * infl
	res.theta0 = p[0]
	res.dof = best.DoF
	res.sd = best.ResidualSD
	res.mix = tRef + (p[5]-1)*scale
	res.g = p[2]
	res.iters = best.Iterations
	res.rate = math.Exp(p[4])
	if res.shape == modelPulse {
		res.rate = 1 / res.rate
	}
	if res.lag {
		res.tau = math.Exp(-p[6])
		// λ and 1/τ enter a first-order response symmetrically; call the
		// slower the release.
		if res.shape == modelFirstOrder && res.tau > 1/res.rate {
			res.tau, res.rate = 1/res.rate, 1/res.tau
		}
	}
	return res
}

// modelWhy turns a fit error into the reason given in the model-fit check.
func modelWhy(err error) string {
	switch {
	case errors.Is(err, fit.ErrNoConvergence):
		return "the fit did not converge: " + err.Error()
	case errors.Is(err, fit.ErrSingular):
		return "the data do not determine every model parameter: " + err.Error()
	}
	return err.Error()
}

// modelDriftBins caps the bins of each drift period in the model fit: the
// drift is smooth, so a bin of 1 % of the period changes the fit by
// θ″w²/24, far below any noise.
const modelDriftBins = 100

// modelLM are the Levenberg–Marquardt settings of the model fit. The start
// (from the drift pairs and Regnault–Pfaundler) is already close, so the
// damping starts small: λ0 = 10⁻² instead of fit's cautious 10³ takes a
// quarter of the iterations to the same minimum. Clean runs converge in
// 20–40 trial steps; 300 bounds the cost of a log the model cannot fit.
var modelLM = fit.LMSettings{Lambda0: 1e-2, MaxIterations: 300}
