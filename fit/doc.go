// Package fit does numerical least-squares fitting on []float64: linear
// fits (straight lines, polynomials, weighted, through the origin) with
// their full covariance, nonlinear fits by Levenberg–Marquardt, and small
// robust and diagnostic helpers. It knows nothing of calorimetry.
//
// # Linear least squares
//
// Polynomial fits minimise Σ w_i (y_i − Σ_j p_j x_i^j)². The abscissa is
// centred on its weighted mean and scaled to [−1, 1],
//
//	t = (x − x̄)/h,   h = max |x_i − x̄|,
//
// and the weighted design matrix √w_i·t_i^j is factorised by Householder
// QR, A = QR, never by forming the normal equations, which square the
// condition number (Golub & Van Loan, Matrix Computations, 4th ed., 2013,
// §5.3). The covariance of the coefficients is
//
//	Σ = s²·(AᵀA)⁻¹ = s²·R⁻¹R⁻ᵀ,   s² = Σ w_i r_i² / (n − p),
//
// (without s² for absolute weights) and is carried to the original x by the
// binomial expansion of (x − x̄)^j. Values and slopes of the fitted curve and
// their uncertainties are evaluated in the centred coordinates, which keeps
// full accuracy for abscissae far from zero (clock times, for instance).
// The results reach 9 or more significant digits on the NIST StRD linear
// datasets Norris, Pontius and NoInt1 (see the tests).
//
// # Nonlinear least squares
//
// LevenbergMarquardt minimises Σ (y_i − f(x_i; p))². Each trial step δ solves
//
//	min ‖J·δ − r‖² + λ‖D·δ‖²
//
// with Marquardt's scaled damping (Marquardt, J. SIAM 11 (1963) 431):
// D² = diag(JᵀJ), kept as the running maximum over the iterations so that
// the scaling never collapses (Moré, The Levenberg–Marquardt algorithm:
// implementation and theory, Lect. Notes Math. 630 (1978) 105). The
// damped problem is solved by QR — of [J | r] once per accepted point, then
// of the small stacked matrix [R; √λ·D] per trial — never by the normal
// equations. A trial is accepted when it lowers the sum of squares; λ is
// then multiplied by max(1/3, 1 − (2ρ − 1)³), ρ being the ratio of the
// actual to the predicted reduction, and otherwise by ν, with ν doubling on
// each consecutive rejection (Nielsen, IMM-REP-1999-05; Madsen, Nielsen &
// Tingleff, Methods for Non-Linear Least Squares Problems, 2nd ed., 2004).
// The iteration stops on a negligible step, a negligible relative reduction
// (actual and predicted, as in MINPACK), a gradient orthogonal to the
// Jacobian columns, or the iteration limit. At the solution
//
//	Cov = s²·(JᵀJ)⁻¹,   s² = SSR/(n − m),
//
// from the same QR factor (Bates & Watts, Nonlinear Regression Analysis and
// Its Applications, 1988, §2.3). A missing Jacobian is replaced by central
// differences with relative steps. The fits reach 6 or more significant
// digits in the parameters from both NIST StRD starting points of Misra1a,
// BoxBOD, MGH17 and Chwirut2 (see the tests).
//
// # Robust and diagnostic helpers
//
// Median, MAD and RobustZ (median-centred, MAD-scaled z-scores, 1.4826·MAD
// estimating σ for normal data), Lag1Autocorrelation (to judge whether
// residuals are independent), and ChangePoint, which locates where a series
// leaves a straight line by the best split into two independent line fits.
package fit
