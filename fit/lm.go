package fit

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Model is a model y = f(x; p) evaluated one point at a time.
type Model func(x float64, p []float64) float64

// Jacobian writes the partial derivatives ∂f(x; p)/∂p_j into grad
// (len(grad) = len(p)).
type Jacobian func(x float64, p []float64, grad []float64)

// VectorModel writes the model values for all points into out, for models
// that are not y_i = f(x_i; p) point by point (a simulated record, say).
type VectorModel func(p []float64, out []float64)

// LMSettings tune LevenbergMarquardt. Zero values select the defaults.
type LMSettings struct {
	// MaxIterations bounds the number of trial steps (accepted or
	// rejected). Default 200·(m+1) for m parameters, at least 1000.
	MaxIterations int
	// ParamTol: converged when every step component satisfies
	// |δ_j| ≤ ParamTol·(|p_j| + ParamTol). Default 1e-10.
	ParamTol float64
	// GradTol: converged when the largest cosine between the residual
	// vector and a Jacobian column, |J_jᵀr|/(‖J_j‖·‖r‖), is at most GradTol.
	// Default 1e-12.
	GradTol float64
	// FuncTol: converged when both the actual and the predicted relative
	// reduction of the sum of squares are at most FuncTol. Default 1e-14.
	FuncTol float64
	// Lambda0 is the initial damping, relative to the scaling D². Default
	// 1e3: the first steps are short, nearly along the scaled gradient, and
	// the gain-ratio rule lowers λ by up to 3× per accepted step. (A small
	// start such as 1e-3 lets the first step of NIST StRD BoxBOD from start 1
	// jump onto the plateau b2 → ∞ and stall there; see the tests.)
	Lambda0 float64
}

// Status says how LevenbergMarquardt stopped.
type Status int

const (
	// ConvergedParam: the step became negligible next to the parameters.
	ConvergedParam Status = iota + 1
	// ConvergedCost: the sum of squares no longer decreases (relative
	// actual and predicted reduction below FuncTol), or it is zero.
	ConvergedCost
	// ConvergedGradient: the residuals are orthogonal to the Jacobian columns.
	ConvergedGradient
	// MaxIterations: the iteration limit was reached first.
	MaxIterations
	// Singular: converged, but the Jacobian at the solution has no full
	// column rank, so the covariance does not exist.
	Singular
	// NotFinite: the model gave NaN or ±Inf at every step tried.
	NotFinite
)

var lmStatusNames = map[Status]string{
	ConvergedParam:    "converged (parameter step)",
	ConvergedCost:     "converged (sum of squares)",
	ConvergedGradient: "converged (gradient)",
	MaxIterations:     "iteration limit reached",
	Singular:          "singular Jacobian",
	NotFinite:         "model not finite",
}

// String returns a short description of the status.
func (s Status) String() string {
	if n, ok := lmStatusNames[s]; ok {
		return n
	}
	return fmt.Sprintf("Status(%d)", int(s))
}

// Converged reports whether s is one of the converged states.
func (s Status) Converged() bool {
	return s == ConvergedParam || s == ConvergedCost || s == ConvergedGradient
}

// ErrNoConvergence is wrapped by the error returned when LevenbergMarquardt
// stops without converging.
var ErrNoConvergence = errors.New("no convergence")

// Nonlinear is the result of a nonlinear least-squares fit.
type Nonlinear struct {
	Params []float64
	// Cov = s²·(JᵀJ)⁻¹ at the solution; nil unless Status.Converged().
	Cov *mat.SymDense
	// ResidualSD s = √(SSR/DoF).
	ResidualSD float64
	DoF        int // N − len(Params)
	N          int
	SSR        float64 // Σ r_i²
	// Iterations counts trial steps (accepted and rejected).
	Iterations int
	// Evaluations counts evaluations of the model at all N points,
	// those for a numeric Jacobian included.
	Evaluations int
	Status      Status
	// Residuals are y − f, in input order.
	Residuals []float64
}

// ParamSD returns √diag(Cov), or nil when Cov is nil.
func (f *Nonlinear) ParamSD() []float64 {
	if f.Cov == nil {
		return nil
	}
	sd := make([]float64, len(f.Params))
	for i := range sd {
		sd[i] = math.Sqrt(math.Max(0, f.Cov.At(i, i)))
	}
	return sd
}

// LevenbergMarquardt fits y_i ≈ f(x_i; p) by nonlinear least squares,
// starting from p0. jac may be nil for a numeric Jacobian (central
// differences). s may be nil for the defaults.
//
// When the fit does not converge (Status MaxIterations, NotFinite or
// Singular) the error is non-nil and the result, if non-nil, holds the last
// accepted point for inspection.
func LevenbergMarquardt(f Model, jac Jacobian, x, y, p0 []float64, s *LMSettings) (*Nonlinear, error) {
	const what = "levenberg-marquardt fit"
	if err := fitCheckXY(what, x, y, nil); err != nil {
		return nil, err
	}
	eval := func(p, out []float64) {
		for i, xi := range x {
			out[i] = f(xi, p)
		}
	}
	var jf lmJacobian
	if jac != nil {
		grad := make([]float64, len(p0))
		jf = func(p, _ []float64, j *mat.Dense) int {
			for i, xi := range x {
				jac(xi, p, grad)
				j.SetRow(i, grad)
			}
			return 0
		}
	}
	return lmSolve(what, eval, jf, y, p0, s)
}

// LevenbergMarquardtVector fits y ≈ f(p) for a model that computes all n
// values at once, with a numeric Jacobian (central differences). n must
// equal len(y).
func LevenbergMarquardtVector(f VectorModel, n int, y, p0 []float64, s *LMSettings) (*Nonlinear, error) {
	const what = "levenberg-marquardt fit"
	if n != len(y) {
		return nil, fmt.Errorf("%s: %w: n = %d but y has %d values", what, ErrLength, n, len(y))
	}
	if err := fitCheckFinite(what, "y", y); err != nil {
		return nil, err
	}
	return lmSolve(what, f, nil, y, p0, s)
}

// lmJacobian fills j (n×m) at p, given the model values fp at p, and
// returns the number of full model evaluations it used.
type lmJacobian func(p, fp []float64, j *mat.Dense) int

// lmNumericJacobian returns a central-difference Jacobian of eval,
//
//	∂f_i/∂p_j ≈ (f_i(p + h_j e_j) − f_i(p − h_j e_j)) / (2h_j),
//	h_j = ε^(1/3)·max(|p_j|, 1e-6),
//
// the step that balances the O(h²) truncation error against the O(ε/h)
// rounding error of a central difference (Nocedal & Wright, Numerical
// Optimization, 2nd ed., §8.1); h_j is rounded so that p_j ± h_j is exact.
func lmNumericJacobian(eval func(p, out []float64), n int) lmJacobian {
	fp1 := make([]float64, n)
	fm1 := make([]float64, n)
	h3 := math.Cbrt(0x1p-52)
	return func(p, _ []float64, j *mat.Dense) int {
		q := append([]float64(nil), p...)
		for k := range p {
			h := h3 * math.Max(math.Abs(p[k]), 1e-6)
			up := p[k] + h
			dn := p[k] - h
			q[k] = up
			eval(q, fp1)
			q[k] = dn
			eval(q, fm1)
			q[k] = p[k]
			d := up - dn
			for i := 0; i < n; i++ {
				j.Set(i, k, (fp1[i]-fm1[i])/d)
			}
		}
		return 2 * len(p)
	}
}

// lmSolve is the Levenberg–Marquardt iteration shared by both entry points.
//
// Each trial step δ solves the damped linear least-squares problem
//
//	min ‖J·δ − r‖² + λ‖D·δ‖²
//
// (Marquardt 1963), with D² the running maximum of diag(JᵀJ) over the
// iterations (Moré 1978, §3). It is solved without normal equations: one
// QR factorisation of [J | r] per accepted point gives R and Qᵀr, and each
// trial reduces to the QR of the small stacked matrix [R; √λ·D]. A step is
// accepted when it lowers the sum of squares; λ then shrinks by
// max(1/3, 1 − (2ρ − 1)³) with ρ the ratio of actual to predicted
// reduction, otherwise λ grows by ν and ν doubles (Nielsen 1999; Madsen,
// Nielsen & Tingleff 2004, §3.2).
func lmSolve(what string, eval func(p, out []float64), jac lmJacobian, y, p0 []float64, s *LMSettings) (*Nonlinear, error) {
	n, m := len(y), len(p0)
	if m == 0 {
		return nil, fmt.Errorf("%s: no parameters to fit", what)
	}
	if err := fitCheckFinite(what, "p0", p0); err != nil {
		return nil, err
	}
	if n < m+1 {
		return nil, fmt.Errorf("%s: %w: %d points for %d parameters, need at least %d",
			what, ErrTooFewPoints, n, m, m+1)
	}
	set := lmDefaults(s, m)
	if jac == nil {
		jac = lmNumericJacobian(eval, n)
	}

	res := &Nonlinear{N: n, DoF: n - m}
	p := append([]float64(nil), p0...)
	fp := make([]float64, n)
	r := make([]float64, n)
	eval(p, fp)
	res.Evaluations++
	ssr, ok := lmResiduals(y, fp, r)
	if !ok {
		return nil, fmt.Errorf("%s: %w: the model is not finite at the starting point", what, ErrNotFinite)
	}

	jm := mat.NewDense(n, m, nil)
	aug := mat.NewDense(n, m+1, nil)
	var rq mat.Dense // R of [J | r]
	rmat := make([]float64, m*m)
	qtr := make([]float64, m)
	d2 := make([]float64, m) // D², running max of diag(JᵀJ)
	colNorm := make([]float64, m)
	grad := make([]float64, m)
	delta := make([]float64, m)
	pt := make([]float64, m)
	ft := make([]float64, n)
	rt := make([]float64, n)

	// factor refreshes J, R, Qᵀr, D and the gradient at p.
	factor := func() {
		res.Evaluations += jac(p, fp, jm)
		aug.Slice(0, n, 0, m).(*mat.Dense).Copy(jm)
		aug.SetCol(m, r)
		var qr mat.QR
		qr.Factorize(aug)
		qr.RTo(&rq)
		for i := 0; i < m; i++ {
			for k := 0; k < m; k++ {
				rmat[i*m+k] = rq.At(i, k)
			}
			qtr[i] = rq.At(i, m)
		}
		for k := 0; k < m; k++ {
			var c2, g float64
			for i := 0; i <= k; i++ { // JᵀJ = RᵀR, Jᵀr = Rᵀ·Qᵀr
				c2 += rmat[i*m+k] * rmat[i*m+k]
				g += rmat[i*m+k] * qtr[i]
			}
			colNorm[k] = math.Sqrt(c2)
			grad[k] = g
			d2[k] = math.Max(d2[k], c2)
		}
	}
	factor()
	for k := range d2 {
		if d2[k] == 0 {
			d2[k] = 1 // a parameter without influence at p0 (Moré 1978)
		}
	}

	lambda := set.Lambda0
	nu := 2.0
	status := Status(0)
	for status == 0 {
		if ssr == 0 {
			status = ConvergedCost
			break
		}
		if lmGradCos(grad, colNorm, ssr) <= set.GradTol {
			status = ConvergedGradient
			break
		}
		if res.Iterations >= set.MaxIterations {
			status = MaxIterations
			break
		}
		res.Iterations++
		pred, err := lmStep(rmat, qtr, d2, lambda, m, delta)
		if err != nil {
			lambda *= nu
			nu *= 2
			continue
		}
		small := true
		for k := range p {
			pt[k] = p[k] + delta[k]
			if math.Abs(delta[k]) > set.ParamTol*(math.Abs(p[k])+set.ParamTol) {
				small = false
			}
		}
		eval(pt, ft)
		res.Evaluations++
		ssrT, finite := lmResiduals(y, ft, rt)
		if finite && ssrT < ssr {
			rho := (ssr - ssrT) / pred
			actual := (ssr - ssrT) / ssr
			copy(p, pt)
			copy(fp, ft)
			copy(r, rt)
			ssr = ssrT
			lambda *= math.Max(1.0/3, 1-math.Pow(2*rho-1, 3))
			nu = 2
			factor()
			switch {
			case small:
				status = ConvergedParam
			case actual <= set.FuncTol && pred/ssr <= set.FuncTol:
				status = ConvergedCost
			}
			continue
		}
		// Rejected. A negligible step that still does not lower the sum of
		// squares means p is a minimum to working precision.
		if small && finite {
			status = ConvergedParam
			break
		}
		lambda *= nu
		nu *= 2
		if math.IsInf(lambda, 0) {
			status = NotFinite
			if finite {
				status = ConvergedParam
			}
		}
	}

	res.Params = p
	res.SSR = ssr
	res.Residuals = r
	res.ResidualSD = math.Sqrt(ssr / float64(res.DoF))
	res.Status = status
	switch status {
	case MaxIterations:
		return res, fmt.Errorf("%s: %w: %d iterations, sum of squares %.6g", what, ErrNoConvergence, res.Iterations, ssr)
	case NotFinite:
		return res, fmt.Errorf("%s: %w: %w: the model is not finite near p = %v", what, ErrNoConvergence, ErrNotFinite, p)
	}
	cov, err := lmCovariance(rmat, m, ssr/float64(res.DoF))
	if err != nil {
		res.Status = Singular
		return res, fmt.Errorf("%s: %w", what, err)
	}
	res.Cov = cov
	return res, nil
}

// lmDefaults fills zero settings with defaults.
func lmDefaults(s *LMSettings, m int) LMSettings {
	var set LMSettings
	if s != nil {
		set = *s
	}
	if set.MaxIterations <= 0 {
		set.MaxIterations = max(1000, 200*(m+1))
	}
	if set.ParamTol <= 0 {
		set.ParamTol = 1e-10
	}
	if set.GradTol <= 0 {
		set.GradTol = 1e-12
	}
	if set.FuncTol <= 0 {
		set.FuncTol = 1e-14
	}
	if set.Lambda0 <= 0 {
		set.Lambda0 = 1e3
	}
	return set
}

// lmResiduals sets r = y − f and returns Σr² and whether all are finite.
func lmResiduals(y, f, r []float64) (float64, bool) {
	var s float64
	for i := range y {
		r[i] = y[i] - f[i]
		s += r[i] * r[i]
	}
	return s, !math.IsNaN(s) && !math.IsInf(s, 0)
}

// lmGradCos is max_j |J_jᵀr|/(‖J_j‖·‖r‖), the MINPACK gradient test.
func lmGradCos(grad, colNorm []float64, ssr float64) float64 {
	rn := math.Sqrt(ssr)
	c := 0.0
	for k, g := range grad {
		if colNorm[k] > 0 {
			c = math.Max(c, math.Abs(g)/(colNorm[k]*rn))
		}
	}
	return c
}

// lmStep solves min ‖R·δ − Qᵀr‖² + λ‖D·δ‖² by QR of [R; √λ·D] into delta
// and returns the reduction of the sum of squares the linear model predicts,
//
//	‖r‖² − ‖r − J·δ‖² = ‖R·δ‖² + 2λ‖D·δ‖²
//
// (Madsen, Nielsen & Tingleff 2004, eq. 3.10 in this scaling).
func lmStep(rmat, qtr, d2 []float64, lambda float64, m int, delta []float64) (float64, error) {
	a := mat.NewDense(2*m, m, nil)
	b := mat.NewVecDense(2*m, nil)
	sl := math.Sqrt(lambda)
	for i := 0; i < m; i++ {
		for k := i; k < m; k++ {
			a.Set(i, k, rmat[i*m+k])
		}
		a.Set(m+i, i, sl*math.Sqrt(d2[i]))
		b.SetVec(i, qtr[i])
	}
	var qr mat.QR
	qr.Factorize(a)
	var x mat.VecDense
	if err := qr.SolveVecTo(&x, false, b); err != nil {
		var c mat.Condition
		if !errors.As(err, &c) || math.IsInf(float64(c), 0) {
			return 0, err
		}
	}
	var rd2, dd2 float64
	for i := 0; i < m; i++ {
		delta[i] = x.AtVec(i)
		dd2 += d2[i] * delta[i] * delta[i]
	}
	for i := 0; i < m; i++ {
		var s float64
		for k := i; k < m; k++ {
			s += rmat[i*m+k] * delta[k]
		}
		rd2 += s * s
	}
	pred := rd2 + 2*lambda*dd2
	if !(pred > 0) || math.IsInf(pred, 0) {
		return 0, fmt.Errorf("%w: no predicted reduction", ErrSingular)
	}
	return pred, nil
}

// lmCovariance returns s²·(JᵀJ)⁻¹ = s²·R⁻¹R⁻ᵀ from the m×m triangle R of J.
func lmCovariance(rmat []float64, m int, s2 float64) (*mat.SymDense, error) {
	maxd := 0.0
	for j := 0; j < m; j++ {
		maxd = math.Max(maxd, math.Abs(rmat[j*m+j]))
	}
	// Rank test on the unscaled R: columns with very different scales are
	// legitimate, so compare each diagonal with its own column norm.
	for j := 0; j < m; j++ {
		var cn float64
		for i := 0; i <= j; i++ {
			cn += rmat[i*m+j] * rmat[i*m+j]
		}
		cn = math.Sqrt(cn)
		if d := math.Abs(rmat[j*m+j]); !(d > 1e-13*cn) || maxd == 0 {
			return nil, fmt.Errorf("%w: parameter %d is not determined by the data at the solution (|R_jj| = %.3g, column norm %.3g)",
				ErrSingular, j, d, cn)
		}
	}
	rt := mat.NewTriDense(m, mat.Upper, nil)
	for i := 0; i < m; i++ {
		for j := i; j < m; j++ {
			rt.SetTri(i, j, rmat[i*m+j])
		}
	}
	var ri mat.TriDense
	if err := ri.InverseTri(rt); err != nil {
		var c mat.Condition
		if !errors.As(err, &c) || math.IsInf(float64(c), 0) {
			return nil, fmt.Errorf("%w: %v", ErrSingular, err)
		}
	}
	cov := mat.NewSymDense(m, nil)
	for i := 0; i < m; i++ {
		for j := i; j < m; j++ {
			var sum float64
			for k := j; k < m; k++ {
				sum += ri.At(i, k) * ri.At(j, k)
			}
			cov.SetSym(i, j, s2*sum)
		}
	}
	return cov, nil
}
