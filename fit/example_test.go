package fit_test

import (
	"fmt"
	"math"

	"calred/fit"
)

func ExampleLine() {
	// A fore-period-like record: temperature (°C) against time (s).
	t := []float64{0, 10, 20, 30, 40, 50}
	y := []float64{21.502, 21.509, 21.513, 21.521, 21.526, 21.532}
	f, err := fit.Line(t, y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("intercept %.4f K, slope %.3e K/s ± %.1e\n", f.Params[0], f.Params[1], f.ParamSD()[1])
	fmt.Printf("at t = 60 s: %.4f ± %.4f\n", f.Eval(60), f.EvalU(60))
	// Computed with scipy 1.10.1: /usr/bin/python3 -c 'import numpy as np,
	// scipy.stats as st; t=np.arange(6)*10.; y=np.array([21.502,21.509,
	// 21.513,21.521,21.526,21.532]); r=st.linregress(t,y);
	// print(r.intercept, r.slope, r.stderr)' → 21.502238 0.00059714
	// 2.0068e-05; at 60 s 21.538067 with u = s·√(1/6 + 35²/1750) = 0.00078.

	// Output:
	// intercept 21.5022 K, slope 5.971e-04 K/s ± 2.0e-05
	// at t = 60 s: 21.5381 ± 0.0008
}

func ExampleLevenbergMarquardt() {
	// Newtonian approach to a convergence temperature:
	// θ(t) = θ∞ + (θ0 − θ∞)·exp(−k·t), invented readings (°C, s).
	t := []float64{0, 60, 120, 180, 240, 300, 360, 420}
	y := []float64{25.000, 24.412, 23.931, 23.538, 23.215, 22.954, 22.738, 22.563}
	model := func(t float64, p []float64) float64 {
		return p[0] + (p[1]-p[0])*math.Exp(-p[2]*t)
	}
	f, err := fit.LevenbergMarquardt(model, nil, t, y, []float64{20, 25, 1e-3}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	sd := f.ParamSD()
	fmt.Println(f.Status)
	fmt.Printf("θ∞ = %.3f ± %.3f °C, k = %.4e ± %.1e 1/s\n", f.Params[0], sd[0], f.Params[2], sd[2])
	// Computed with scipy 1.10.1: /usr/bin/python3 -c 'import numpy as np,
	// scipy.optimize as so; t=np.arange(8)*60.; y=np.array([25.000,24.412,
	// 23.931,23.538,23.215,22.954,22.738,22.563]); p,c=so.curve_fit(lambda
	// t,a,b,k: a+(b-a)*np.exp(-k*t), t, y, p0=[20,25,1e-3]);
	// print(p, np.sqrt(np.diag(c)))' → θ∞ = 21.77559 ± 0.00271 °C,
	// k = 3.357458e-3 ± 5.26e-6 1/s.

	// Output:
	// converged (parameter step)
	// θ∞ = 21.776 ± 0.003 °C, k = 3.3575e-03 ± 5.3e-06 1/s
}

func ExampleChangePoint() {
	// A slow drift that turns into a steep rise at t = 45 s, between readings.
	var t, y []float64
	for i := range 12 {
		v := 10 * float64(i)
		y0 := 20 + 0.001*v
		if v >= 45 {
			y0 = 20.045 + 0.02*(v-45)
		}
		t = append(t, v)
		y = append(y, y0)
	}
	k, gain, err := fit.ChangePoint(t, y, 3)
	if err != nil {
		fmt.Println(err)
		return
	}
	// Both pieces are exact lines, so the gain is the SSR of one line through
	// all points: 0.28974 K² by the closed form C_yy − C_xy²/C_xx (scipy
	// 1.10.1, linregress on the same points: SSR 0.289736).
	fmt.Printf("split before t = %g s, SSR reduced by %.4f K²\n", t[k], gain)
	// Output:
	// split before t = 50 s, SSR reduced by 0.2897 K²
}
