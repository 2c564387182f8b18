package fit

import (
	"math"
	"slices"
)

// madToSigma turns a median absolute deviation into a consistent estimate
// of the standard deviation for normal data: 1/Φ⁻¹(3/4) = 1/0.6744897… ≈
// 1.4826 (Rousseeuw & Croux, J. Am. Stat. Assoc. 88 (1993) 1273).
const madToSigma = 1.4826

// meanADToSigma is √(π/2) ≈ 1.2533, the ratio σ/E|X − μ| for normal data,
// used when the MAD is zero (Iglewicz & Hoaglin, How to Detect and Handle
// Outliers, ASQC 1993, the modified z-score).
const meanADToSigma = 1.2533141373155003

// Median returns the median of v (the mean of the two middle values for an
// even count) without modifying v. It returns NaN for an empty slice or when
// v holds a NaN.
func Median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := slices.Clone(v)
	for _, e := range s {
		if math.IsNaN(e) {
			return math.NaN()
		}
	}
	slices.Sort(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return s[n/2-1] + (s[n/2]-s[n/2-1])/2
}

// MAD returns the raw median absolute deviation median_i |v_i − median(v)|,
// not scaled to a standard deviation (multiply by 1.4826 for that).
func MAD(v []float64) float64 {
	m := Median(v)
	d := make([]float64, len(v))
	for i, e := range v {
		d[i] = math.Abs(e - m)
	}
	return Median(d)
}

// RobustZ returns the robust z-scores
//
//	z_i = (v_i − median(v)) / (1.4826·MAD)
//
// When MAD = 0 (half or more of the values equal the median) the scale is instead
// 1.2533·mean_i |v_i − median(v)| (Iglewicz & Hoaglin 1993); when that is
// zero too, all values are equal and every z is 0.
func RobustZ(v []float64) []float64 {
	m := Median(v)
	scale := madToSigma * MAD(v)
	if !(scale > 0) && len(v) > 0 {
		var s float64
		for _, e := range v {
			s += math.Abs(e - m)
		}
		scale = meanADToSigma * s / float64(len(v))
	}
	z := make([]float64, len(v))
	for i, e := range v {
		if scale > 0 {
			z[i] = (e - m) / scale
		} else if math.IsNaN(e - m) {
			z[i] = math.NaN()
		}
	}
	return z
}

// Lag1Autocorrelation returns the lag-1 sample autocorrelation of r,
//
//	r1 = Σ_{t=1}^{n−1} (r_t − r̄)(r_{t+1} − r̄) / Σ_{t=1}^{n} (r_t − r̄)²
//
// (Box, Jenkins & Reinsel, Time Series Analysis, 4th ed., eq. 2.1.12).
// Residuals of a good fit give r1 near 0, within about ±2/√n; a slow
// systematic misfit gives r1 near 1. It returns NaN for fewer than 2
// values or when all values are equal.
func Lag1Autocorrelation(r []float64) float64 {
	n := len(r)
	if n < 2 {
		return math.NaN()
	}
	var mean float64
	for _, e := range r {
		mean += e
	}
	mean /= float64(n)
	var num, den float64
	for t, e := range r {
		d := e - mean
		den += d * d
		if t+1 < n {
			num += d * (r[t+1] - mean)
		}
	}
	if !(den > 0) {
		return math.NaN()
	}
	return num / den
}
