package plot_test

import (
	"bytes"
	"fmt"
	"image/png"
	"math"

	"calred/calorimeter"
	"calred/calorimeter/plot"
)

// ExampleWriteThermogram draws an invented ten-minute run, read every 5 s:
// a fore drift, a step of 2 K at 300 s smoothed over 20 s, an after drift.
func ExampleWriteThermogram() {
	th := plot.Thermogram{
		Title:    "Run QA-1 (invented)",
		Pre:      [2]float64{0, 300},
		Main:     [2]float64{300, 400},
		Post:     [2]float64{400, 600},
		PreLine:  plot.Line{Slope: 1e-4, Intercept: 294.00},
		PostLine: plot.Line{Slope: -2e-4, Intercept: 296.10},
		MixTime:  300,
		Tx:       310,
		Method:   "equal-area",
	}
	for t := 0.0; t <= 600; t += 5 {
		T := th.PreLine.At(t)
		if t > 300 {
			T += (th.PostLine.At(t) - th.PreLine.At(t)) * (1 - math.Exp(-(t-300)/20))
		}
		th.Time = append(th.Time, t)
		th.Temperature = append(th.Temperature, T)
	}
	th.DeltaT = th.PostLine.At(th.Tx) - th.PreLine.At(th.Tx)
	th.UDeltaT = 0.004

	format, err := plot.FormatFromName("qa-1.png")
	if err != nil {
		fmt.Println(err)
		return
	}
	var b bytes.Buffer
	if err := plot.WriteThermogram(&b, format, th, plot.Options{}); err != nil {
		fmt.Println(err)
		return
	}
	img, err := png.Decode(&b)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s, %d×%d px, ΔT = %.3f K\n", format, img.Bounds().Dx(), img.Bounds().Dy(), th.DeltaT)
	// analytic: ΔT = (296.10 − 2e-4·310) − (294.00 + 1e-4·310) = 2.007 K.

	// Output:
	// png, 1200×800 px, ΔT = 2.007 K
}

// ExampleWriteControlChart charts five invented heat-capacity
// calibrations in run order.
func ExampleWriteControlChart() {
	chart, err := calorimeter.IndividualsChart([]float64{452.3, 451.8, 452.9, 452.1, 452.6})
	if err != nil {
		fmt.Println(err)
		return
	}
	var b bytes.Buffer
	if err := plot.WriteControlChart(&b, "svg", chart, nil, "Heat capacity", "J/K", plot.Options{}); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(bytes.HasPrefix(b.Bytes(), []byte("<?xml")), bytes.Contains(b.Bytes(), []byte("Heat capacity / (J/K)")))
	// Output:
	// true true
}

func ExampleFormatFromName() {
	for _, name := range []string{"run7.svg", "RUN7.PNG", "run7.jpg"} {
		f, err := plot.FormatFromName(name)
		fmt.Printf("%q %v\n", f, err)
	}
	// Output:
	// "svg" <nil>
	// "png" <nil>
	// "" plot file "run7.jpg": extension ".jpg" is not one of .svg, .png, .pdf
}
