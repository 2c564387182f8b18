package fit

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Linear is the result of a linear least-squares fit
//
//	y ≈ Σ_j p_j·x^j   (j = 0..Degree)
//
// or y ≈ b·x through the origin.
//
// Internally x is centred and scaled,
//
//	t = (x − Centre)/h,   h = max_i |x_i − Centre|,
//
// and the weighted design √w_i·t_i^j is solved by Householder QR (gonum/mat),
// never by the normal equations (Golub & Van Loan, Matrix Computations,
// 4th ed., §5.3). Eval, Slope and their uncertainties are evaluated in the
// centred coordinates; Params and Cov are the same fit re-expressed in the
// original x.
type Linear struct {
	Degree int
	// Centre is the weighted mean x̄ used for centring (0 for fits through the origin).
	Centre float64
	// Params are the coefficients in the original x: p0 + p1·x + p2·x² …;
	// for fits through the origin Params = [0, b].
	Params []float64
	// Cov is the covariance of Params (original x):
	//
	//	Cov = s²·(XᵀWX)⁻¹   (relative weights, the default)
	//	Cov = (XᵀWX)⁻¹      (AbsoluteWeights)
	//
	// For fits through the origin row and column 0 are zero.
	Cov *mat.SymDense
	// ResidualSD is s = √(Σ w_i r_i² / DoF).
	ResidualSD float64
	// SSR is the (weighted) sum of squared residuals Σ w_i r_i².
	SSR float64
	// DoF = N − number of fitted parameters.
	DoF int
	N   int
	// Residuals are y − fit, unweighted, in input order.
	Residuals []float64
	// Origin is true for a fit through the origin.
	Origin bool
	// AbsoluteWeights is true when w were taken as 1/σ² with σ known, so that
	// Cov is not scaled by s².
	AbsoluteWeights bool

	scale float64       // h; x = Centre + h·t
	coef  []float64     // coefficients in t (for Origin: coef[0] multiplies t)
	covT  *mat.SymDense // covariance of coef
}

// Line fits y ≈ p0 + p1·x by unweighted least squares.
// It needs at least 3 points (so that a residual standard deviation exists)
// and at least two distinct x.
func Line(x, y []float64) (*Linear, error) {
	return linearFit("line fit", x, y, nil, 1, false, false)
}

// Polynomial fits y ≈ Σ_{j=0}^{degree} p_j·x^j by unweighted least squares.
// It needs at least degree+2 points and degree+1 distinct x.
func Polynomial(x, y []float64, degree int) (*Linear, error) {
	return linearFit("polynomial fit", x, y, nil, degree, false, false)
}

// WeightedPolynomial fits a polynomial minimising Σ w_i r_i². The weights are
// relative (w_i ∝ 1/σ_i²): the covariance is scaled by s² estimated from the
// residuals. All weights must be finite and positive.
func WeightedPolynomial(x, y, w []float64, degree int) (*Linear, error) {
	if w == nil {
		return nil, fmt.Errorf("weighted polynomial fit: %w: w is nil", ErrLength)
	}
	return linearFit("weighted polynomial fit", x, y, w, degree, false, false)
}

// WeightedPolynomialAbsolute is WeightedPolynomial with absolute weights
// w_i = 1/σ_i², σ_i known standard uncertainties of y_i: Cov = (XᵀWX)⁻¹, not
// scaled by s². ResidualSD is then the square root of the reduced χ²,
// which should be near 1 when the σ_i are right.
func WeightedPolynomialAbsolute(x, y, w []float64, degree int) (*Linear, error) {
	if w == nil {
		return nil, fmt.Errorf("weighted polynomial fit: %w: w is nil", ErrLength)
	}
	return linearFit("weighted polynomial fit", x, y, w, degree, false, true)
}

// ThroughOrigin fits y ≈ b·x, with relative weights w (nil for unweighted).
// It needs at least 2 points and one non-zero x.
func ThroughOrigin(x, y, w []float64) (*Linear, error) {
	return linearFit("fit through origin", x, y, w, 1, true, false)
}

// linearFit is the common solver; what names the fit in errors.
func linearFit(what string, x, y, w []float64, degree int, origin, absolute bool) (*Linear, error) {
	if degree < 0 {
		return nil, fmt.Errorf("%s: degree %d is negative", what, degree)
	}
	if err := fitCheckXY(what, x, y, w); err != nil {
		return nil, err
	}
	n := len(x)
	p := degree + 1
	if origin {
		p = 1
	}
	if n < p+1 {
		return nil, fmt.Errorf("%s: %w: %d points for %d parameters, need at least %d",
			what, ErrTooFewPoints, n, p, p+1)
	}
	weight := func(i int) float64 {
		if w == nil {
			return 1
		}
		return w[i]
	}

	// Centre (weighted mean) and scale.
	centre := 0.0
	if !origin {
		var sw, swx float64
		for i := range x {
			sw += weight(i)
			swx += weight(i) * x[i]
		}
		centre = swx / sw
	}
	scale := 0.0
	for _, v := range x {
		scale = math.Max(scale, math.Abs(v-centre))
	}
	if scale == 0 && p > 1 || scale == 0 && origin {
		return nil, fmt.Errorf("%s: %w: all %d x values equal %v", what, ErrSingular, n, x[0])
	}
	if scale == 0 { // degree 0: any scale will do
		scale = 1
	}

	// Weighted design A_ij = √w_i·t_i^j (origin: √w_i·t_i) and b_i = √w_i·y_i.
	a := mat.NewDense(n, p, nil)
	b := mat.NewVecDense(n, nil)
	for i := range x {
		sq := math.Sqrt(weight(i))
		t := (x[i] - centre) / scale
		v := sq
		if origin {
			v *= t
		}
		for j := 0; j < p; j++ {
			a.Set(i, j, v)
			v *= t
		}
		b.SetVec(i, sq*y[i])
	}

	var qr mat.QR
	qr.Factorize(a)
	var r mat.Dense
	qr.RTo(&r)
	if err := linearCheckRank(&r, n, p); err != nil {
		return nil, fmt.Errorf("%s: %w", what, err)
	}
	var c mat.VecDense
	if err := qr.SolveVecTo(&c, false, b); err != nil {
		var cond mat.Condition
		if !errors.As(err, &cond) {
			return nil, fmt.Errorf("%s: %w", what, err)
		}
		// Ill-conditioned but of full rank by linearCheckRank: keep the solution.
	}
	f := &Linear{
		Degree:          degree,
		Centre:          centre,
		N:               n,
		DoF:             n - p,
		Origin:          origin,
		AbsoluteWeights: absolute,
		scale:           scale,
		coef:            make([]float64, p),
		Residuals:       make([]float64, n),
	}
	if origin {
		f.Degree = 1
	}
	for j := range f.coef {
		f.coef[j] = c.AtVec(j)
	}
	for i := range x {
		res := y[i] - f.Eval(x[i])
		f.Residuals[i] = res
		f.SSR += weight(i) * res * res
	}
	s2 := f.SSR / float64(f.DoF)
	f.ResidualSD = math.Sqrt(s2)

	// (AᵀA)⁻¹ = R⁻¹R⁻ᵀ.
	rt := mat.NewTriDense(p, mat.Upper, nil)
	for i := 0; i < p; i++ {
		for j := i; j < p; j++ {
			rt.SetTri(i, j, r.At(i, j))
		}
	}
	var ri mat.TriDense
	if err := ri.InverseTri(rt); err != nil {
		var cond mat.Condition
		if !errors.As(err, &cond) {
			return nil, fmt.Errorf("%s: %w: %v", what, ErrSingular, err)
		}
	}
	factor := s2
	if absolute {
		factor = 1
	}
	f.covT = mat.NewSymDense(p, nil)
	for i := 0; i < p; i++ {
		for j := i; j < p; j++ {
			var sum float64
			for k := j; k < p; k++ { // R⁻¹ upper: (R⁻¹)_ik nonzero for k ≥ i, (R⁻¹)_jk for k ≥ j
				sum += ri.At(i, k) * ri.At(j, k)
			}
			f.covT.SetSym(i, j, factor*sum)
		}
	}
	f.linearToOriginal()
	return f, nil
}

// linearCheckRank reports ErrSingular when a diagonal element of R is
// negligible next to the largest one (rank-revealing test on the scaled design).
func linearCheckRank(r *mat.Dense, n, p int) error {
	maxd := 0.0
	for j := 0; j < p; j++ {
		maxd = math.Max(maxd, math.Abs(r.At(j, j)))
	}
	tol := 10 * float64(max(n, p)) * 0x1p-52 * maxd
	for j := 0; j < p; j++ {
		if d := math.Abs(r.At(j, j)); !(d > tol) {
			return fmt.Errorf("%w: column %d of the design is dependent on the others (|R_jj| = %.3g, tolerance %.3g)",
				ErrSingular, j, d, tol)
		}
	}
	return nil
}

// linearToOriginal fills Params and Cov from coef and covT by the linear map
//
//	Σ_j a_j ((x − c)/h)^j = Σ_k p_k x^k,   p_k = Σ_{j≥k} C(j,k)·(−c)^{j−k}·h^{−j}·a_j,
//
// so p = T·a and Cov = T·covT·Tᵀ (binomial expansion).
func (f *Linear) linearToOriginal() {
	if f.Origin {
		f.Params = []float64{0, f.coef[0] / f.scale}
		f.Cov = mat.NewSymDense(2, nil)
		f.Cov.SetSym(1, 1, f.covT.At(0, 0)/(f.scale*f.scale))
		return
	}
	p := len(f.coef)
	t := mat.NewDense(p, p, nil)
	// binom(j, k) row by row (Pascal's triangle).
	binom := make([]float64, p)
	for j := 0; j < p; j++ {
		for k := j; k > 0; k-- {
			if k == j {
				binom[k] = 1
			} else {
				binom[k] += binom[k-1]
			}
		}
		binom[0] = 1
		hj := math.Pow(f.scale, -float64(j))
		for k := 0; k <= j; k++ {
			t.Set(k, j, binom[k]*math.Pow(-f.Centre, float64(j-k))*hj)
		}
	}
	f.Params = make([]float64, p)
	for k := 0; k < p; k++ {
		var s float64
		for j := k; j < p; j++ {
			s += t.At(k, j) * f.coef[j]
		}
		f.Params[k] = s
	}
	var tc, c mat.Dense
	tc.Mul(t, f.covT)
	c.Mul(&tc, t.T())
	f.Cov = mat.NewSymDense(p, nil)
	for i := 0; i < p; i++ {
		for j := i; j < p; j++ {
			f.Cov.SetSym(i, j, 0.5*(c.At(i, j)+c.At(j, i)))
		}
	}
}

// basis fills g with the basis functions at x in centred coordinates and dg
// with their derivatives d/dx; either may be nil.
func (f *Linear) basis(x float64, g, dg []float64) {
	t := (x - f.Centre) / f.scale
	if f.Origin {
		if g != nil {
			g[0] = t
		}
		if dg != nil {
			dg[0] = 1 / f.scale
		}
		return
	}
	v, dv := 1.0, 0.0 // t^j and j·t^(j−1)
	for j := range f.coef {
		if g != nil {
			g[j] = v
		}
		if dg != nil {
			dg[j] = dv / f.scale
		}
		dv = float64(j+1) * v
		v *= t
	}
}

// quad returns aᵀ·covT·b.
func (f *Linear) quad(a, b []float64) float64 {
	var s float64
	for i := range a {
		for j := range b {
			s += a[i] * f.covT.At(i, j) * b[j]
		}
	}
	return s
}

// Eval returns the fitted value at x.
func (f *Linear) Eval(x float64) float64 {
	t := (x - f.Centre) / f.scale
	if f.Origin {
		return f.coef[0] * t
	}
	var s float64
	for j := len(f.coef) - 1; j >= 0; j-- {
		s = s*t + f.coef[j]
	}
	return s
}

// Slope returns the derivative dy/dx of the fitted curve at x.
func (f *Linear) Slope(x float64) float64 {
	dg := make([]float64, len(f.coef))
	f.basis(x, nil, dg)
	var s float64
	for j, c := range f.coef {
		s += c * dg[j]
	}
	return s
}

// EvalU returns the standard uncertainty of the fitted mean curve at x,
// from the full parameter covariance:
//
//	u²(ŷ(x)) = gᵀ·Σ·g,   g_j = t^j, t = (x − x̄)/h,
//
// which for a straight line is the textbook
//
//	u² = s²·[1/n + (x − x̄)²/Σ(x_i − x̄)²]
//
// (e.g. Draper & Smith, Applied Regression Analysis, 3rd ed., §3.1).
// It is not the uncertainty of a new observation (add s² for that).
func (f *Linear) EvalU(x float64) float64 {
	g := make([]float64, len(f.coef))
	f.basis(x, g, nil)
	return math.Sqrt(math.Max(0, f.quad(g, g)))
}

// SlopeU returns the standard uncertainty of Slope(x).
func (f *Linear) SlopeU(x float64) float64 {
	dg := make([]float64, len(f.coef))
	f.basis(x, nil, dg)
	return math.Sqrt(math.Max(0, f.quad(dg, dg)))
}

// CovEvalSlope returns the covariance between Eval(x) and Slope(x).
func (f *Linear) CovEvalSlope(x float64) float64 {
	g := make([]float64, len(f.coef))
	dg := make([]float64, len(f.coef))
	f.basis(x, g, dg)
	return f.quad(g, dg)
}

// ParamSD returns the standard deviations of Params, √diag(Cov).
func (f *Linear) ParamSD() []float64 {
	n, _ := f.Cov.Dims()
	sd := make([]float64, n)
	for i := range sd {
		sd[i] = math.Sqrt(math.Max(0, f.Cov.At(i, i)))
	}
	return sd
}
