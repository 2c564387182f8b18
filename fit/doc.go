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
package fit
