package fit_test

import (
	"fmt"

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
	// Output:
	// intercept 21.5022 K, slope 5.971e-04 K/s ± 2.0e-05
	// at t = 60 s: 21.5381 ± 0.0008
}
