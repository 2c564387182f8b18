package fit

import (
	"fmt"
	"math"
)

// ChangePoint finds where a series stops following one straight line. It
// tries every split of the points, in input order, into a first segment
// [0, k) and a second [k, n), each of at least minSeg points, fits an
// independent least-squares line to each (the lines need not meet, so a
// jump is found as well as a kink), and returns the k with the least total
// sum of squared residuals, together with the reduction it brings,
//
//	gain = SSR(one line through all n points) − [SSR(0, k) + SSR(k, n)],
//
// where the SSR of a line on a segment is C_yy − C_xy²/C_xx, from the
// segment's centred co-moments. These are accumulated in one forward and
// one backward pass by the stable updating formulae of Welford (1962) as
// generalised by Chan, Golub & LeVeque (Am. Stat. 37 (1983) 242), so the
// search costs O(n). The x are normally increasing (times); k then splits
// at x[k].
//
// The gain is not an F statistic with the usual distribution, since the
// split was chosen to maximise it (Andrews, Econometrica 61 (1993) 821);
// compare it with the residual variance of the two-line fit and judge with
// a margin. minSeg must be at least 3 so that both lines have residuals.
func ChangePoint(x, y []float64, minSeg int) (k int, gain float64, err error) {
	const what = "change point"
	if err := fitCheckXY(what, x, y, nil); err != nil {
		return 0, 0, err
	}
	if minSeg < 3 {
		return 0, 0, fmt.Errorf("%s: minimum segment of %d points is below 3", what, minSeg)
	}
	n := len(x)
	if n < 2*minSeg {
		return 0, 0, fmt.Errorf("%s: %w: %d points cannot form two segments of %d", what, ErrTooFewPoints, n, minSeg)
	}
	// left[j]: SSR of the line through points [0, j); right[j]: through [j, n).
	left := make([]float64, n+1)
	right := make([]float64, n+1)
	var acc cpMoments
	for j := 0; j < n; j++ {
		acc.add(x[j], y[j])
		left[j+1] = acc.ssr()
	}
	total := acc.ssr()
	if math.IsNaN(total) {
		return 0, 0, fmt.Errorf("%s: %w: all %d x values equal %v", what, ErrSingular, n, x[0])
	}
	acc = cpMoments{}
	for j := n - 1; j >= 0; j-- {
		acc.add(x[j], y[j])
		right[j] = acc.ssr()
	}
	best := math.Inf(1)
	k = -1
	for j := minSeg; j <= n-minSeg; j++ {
		s := left[j] + right[j]
		if s < best { // NaN (a segment with all x equal) never wins
			best, k = s, j
		}
	}
	if k < 0 {
		return 0, 0, fmt.Errorf("%s: %w: no split of %d points gives two segments with distinct x", what, ErrSingular, n)
	}
	return k, math.Max(0, total-best), nil
}

// cpMoments holds the running count, means and centred co-moments of (x, y).
type cpMoments struct {
	n             float64
	mx, my        float64
	cxx, cxy, cyy float64
}

// add includes one point (Welford's update).
func (m *cpMoments) add(x, y float64) {
	m.n++
	dx := x - m.mx
	dy := y - m.my
	m.mx += dx / m.n
	m.my += dy / m.n
	// (x − new mean) = dx·(n−1)/n
	m.cxx += dx * (x - m.mx)
	m.cxy += dx * (y - m.my)
	m.cyy += dy * (y - m.my)
}

// ssr is the residual sum of squares of the least-squares line, NaN when
// all x are equal and there is more than one point.
func (m *cpMoments) ssr() float64 {
	if m.n < 2 {
		return 0
	}
	if !(m.cxx > 0) {
		return math.NaN()
	}
	return math.Max(0, m.cyy-m.cxy*m.cxy/m.cxx)
}
