package calorimeter

import "math"

// Liquid water at 0.1 MPa, for the heat capacity of calorimeter contents
// and for hot/cold water mixing calibrations. Temperatures are absolute
// (K); the fits are written in the Celsius temperature t = T − 273.15 K.

// waterCpCoeff are the coefficients, in J g⁻¹ K⁻¹ and powers of t/°C, of a
// least-squares polynomial through IAPWS-95 isobaric heat capacities at
// 0.1 MPa, 0–60 °C [DOMAIN §4; IAPWS-95: Wagner & Pruß, J. Phys. Chem.
// Ref. Data 31 (2002) 387, evaluated with python3-iapws 1.5.3]. Its largest
// deviation from the table is 9·10⁻⁵ J g⁻¹ K⁻¹:
//
//	c_p = 4.2193618232 − 3.3814895026e-3 t + 1.1535621815e-4 t²
//	      − 2.1441462645e-6 t³ + 2.2819097889e-8 t⁴ − 1.0217510404e-10 t⁵
var waterCpCoeff = [...]float64{
	4.2193618232,
	-3.3814895026e-3,
	1.1535621815e-4,
	-2.1441462645e-6,
	2.2819097889e-8,
	-1.0217510404e-10,
}

// Range of the water fits, K (0–60 °C).
const (
	WaterTMin = 273.15
	WaterTMax = 333.15
)

// waterFitDeviation is the largest deviation of the c_p polynomial from
// IAPWS-95 over its range, J g⁻¹ K⁻¹ (DOMAIN §4; re-checked at every row of
// testdata/water-iapws95-0.1MPa.csv by the tests).
const waterFitDeviation = 9e-5

// waterIAPWSRelU is the relative standard uncertainty taken for IAPWS-95's
// own c_p of liquid water at 0.1 MPa: 0.1 %, from memory of the release's
// uncertainty figure for the liquid (not checked against the release).
const waterIAPWSRelU = 1e-3

// WaterValid reports whether the water functions are valid at the
// absolute temperature t in K: 273.15 K ≤ t ≤ 333.15 K (0–60 °C), the
// range of the fits. Outside it the functions still return the polynomial
// values, which are extrapolations; callers check WaterValid and warn.
func WaterValid(t float64) bool {
	return t >= WaterTMin && t <= WaterTMax
}

// WaterCp returns the specific isobaric heat capacity of liquid water at
// 0.1 MPa, in J/(g·K), at the absolute temperature t in K, from the
// polynomial fit to IAPWS-95 given on waterCpCoeff (valid 273.15–333.15 K,
// within 9·10⁻⁵ J/(g·K) of IAPWS-95).
func WaterCp(t float64) float64 {
	x := t - 273.15
	c := 0.0
	for i := len(waterCpCoeff) - 1; i >= 0; i-- {
		c = c*x + waterCpCoeff[i]
	}
	return c
}

// waterH is the antiderivative of the c_p polynomial, J/g, zero at 0 °C:
//
//	h(t) = Σ_i c_i t^(i+1)/(i + 1)
func waterH(t float64) float64 {
	x := t - 273.15
	h := 0.0
	for i := len(waterCpCoeff) - 1; i >= 0; i-- {
		h = h*x + waterCpCoeff[i]/float64(i+1)
	}
	return h * x
}

// WaterEnthalpyChange returns h(t2) − h(t1) in J/g for liquid water at
// 0.1 MPa between the absolute temperatures t1 and t2 in K, the exact
// integral of the WaterCp polynomial:
//
//	h(t2) − h(t1) = ∫_{t1}^{t2} c_p dT
//
// It agrees with IAPWS-95 enthalpy differences to 4·10⁻⁴ J/g over 0–60 °C
// (largest deviation 3.2·10⁻⁴ J/g from the table, whose h is given to
// 10⁻⁴ J/g).
func WaterEnthalpyChange(t1, t2 float64) float64 {
	return waterH(t2) - waterH(t1)
}

// WaterCpU returns the standard uncertainty, in J/(g·K), assigned to
// WaterCp(t): the fit's largest deviation from IAPWS-95 (9·10⁻⁵ J/(g·K),
// taken whole as a standard uncertainty) combined in quadrature with
// IAPWS-95's own uncertainty of c_p in liquid water, 0.1 % (from memory):
//
//	u(c_p) = √( (9·10⁻⁵)² + (10⁻³·c_p)² )
//
// About 0.0042 J/(g·K) near room temperature; the IAPWS term dominates.
func WaterCpU(t float64) float64 {
	return math.Hypot(waterFitDeviation, waterIAPWSRelU*WaterCp(t))
}

// WaterEnthalpyChangeU returns a standard uncertainty, in J/g, for
// WaterEnthalpyChange(t1, t2), taking the error of c_p as fully
// correlated across the interval:
//
//	u(Δh) = u(c_p at the mean temperature)·|t2 − t1|
func WaterEnthalpyChangeU(t1, t2 float64) float64 {
	return WaterCpU((t1+t2)/2) * math.Abs(t2-t1)
}

// waterKellNum and waterKellDen are Kell's (1975) coefficients for the
// density of air-free water at 0.1 MPa, as given by Jones & Harris, J. Res.
// NIST 97 (1992) 335 (DOMAIN §4), t in °C:
//
//	ρ = (999.83952 + 16.945176 t − 7.9870401e-3 t² − 46.170461e-6 t³
//	     + 105.56302e-9 t⁴ − 280.54253e-12 t⁵)/(1 + 16.879850e-3 t)  kg/m³
//
// The denominator's coefficient is 16.879850e-3; the misprint 16.897850e-3
// found in some copies is off by up to 0.53 kg/m³ over 0–60 °C.
var waterKellNum = [...]float64{
	999.83952,
	16.945176,
	-7.9870401e-3,
	-46.170461e-6,
	105.56302e-9,
	-280.54253e-12,
}

const waterKellDen = 16.879850e-3

// WaterDensity returns the density of air-free liquid water at 0.1 MPa in
// kg/m³ at the absolute temperature t in K, from Kell's 1975 formula
// (waterKellNum); within 0.004 kg/m³ of IAPWS-95 over 0–60 °C.
func WaterDensity(t float64) float64 {
	x := t - 273.15
	n := 0.0
	for i := len(waterKellNum) - 1; i >= 0; i-- {
		n = n*x + waterKellNum[i]
	}
	return n / (1 + waterKellDen*x)
}
