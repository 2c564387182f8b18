// Package plot draws the figures of a calorimetric reduction with
// gonum.org/v1/plot: the thermogram of one run (WriteThermogram) and the
// control chart of a recorded quantity over many runs (WriteControlChart).
// Each writes one SVG, PNG or PDF document to an io.Writer; nothing is
// written when drawing fails.
//
// # Colours
//
// Every colour comes from the eight-colour palette of M. Okabe and K. Ito,
// "Color Universal Design (CUD): how to make figures and presentations that
// are friendly to colorblind people" (2008), which stays distinguishable
// under the common colour-vision deficiencies:
//
//	black          #000000   readings, ΔT arrow, mixing and equal-area times; centre line
//	blue           #0072B2   fore period: band, drift line, residuals; control chart values
//	vermillion     #D55E00   after period: band, drift line, residuals; ±3σ limits
//	yellow         #F0E442   main period band
//	sky blue       #56B4E9   equal area left of tₓ
//	orange         #E69F00   equal area right of tₓ; ±2σ limits (dashed)
//	bluish green   #009E73   fitted model curve
//	reddish purple #CC79A7   excluded spikes; rule violations
//
// Period bands and areas are tints of these colours (the colour with
// partial opacity over white); shapes and dash patterns repeat the
// distinction colour makes, so the figures survive grey-scale printing.
//
// # Thinning
//
// A log of 10⁵ readings would make an SVG of many megabytes and show no
// more than a few thousand points on a page. When more than
// Options.MaxPoints readings (default 4000) are to be drawn, the readings
// are cut into MaxPoints/2 buckets of consecutive readings and each bucket
// contributes its lowest and its highest reading (one marker when they are
// the same reading), so spikes and the extent of the noise survive. The
// residual panel is thinned the same way to MaxPoints/2 markers, the model
// curve and the equal-area outlines to MaxPoints vertices. When thinned,
// a thin stroke joins each bucket's lowest and highest point so the band of
// noise reads as a band. Excluded readings are never thinned.
//
// # What is drawn, for tests and readers of the SVG
//
// In the SVG each marker is one <path> element: a reading is a filled
// circle in black (no style attribute, black being SVG's default fill), an
// excluded spike an × stroked in reddish purple, a residual a filled circle
// in blue (fore period), vermillion (after period) or grey (elsewhere). The
// legend adds one sample of each kind it lists.
package plot
