package fit

import (
	"errors"
	"fmt"
	"math"
)

// Errors wrapped by the fitting functions; test for them with errors.Is.
var (
	// ErrTooFewPoints: fewer observations than the fit needs to estimate
	// its parameters and a residual standard deviation.
	ErrTooFewPoints = errors.New("too few points")
	// ErrSingular: the design (or Jacobian) has no full column rank, e.g.
	// all x equal, or a parameter the data cannot determine.
	ErrSingular = errors.New("singular design")
	// ErrNotFinite: an input value is NaN or infinite.
	ErrNotFinite = errors.New("value is not finite")
	// ErrLength: input slices of different lengths.
	ErrLength = errors.New("length mismatch")
	// ErrWeight: a weight that is not strictly positive.
	ErrWeight = errors.New("weight must be positive")
)

// fitCheckFinite reports the first value of v that is NaN or ±Inf.
func fitCheckFinite(what, name string, v []float64) error {
	for i, e := range v {
		if math.IsNaN(e) || math.IsInf(e, 0) {
			return fmt.Errorf("%s: %w: %s[%d] = %v", what, ErrNotFinite, name, i, e)
		}
	}
	return nil
}

// fitCheckXY checks a pair of abscissa/ordinate slices and optional weights.
func fitCheckXY(what string, x, y, w []float64) error {
	if len(x) != len(y) {
		return fmt.Errorf("%s: %w: x has %d values but y has %d", what, ErrLength, len(x), len(y))
	}
	if w != nil && len(w) != len(x) {
		return fmt.Errorf("%s: %w: x has %d values but w has %d", what, ErrLength, len(x), len(w))
	}
	if err := fitCheckFinite(what, "x", x); err != nil {
		return err
	}
	if err := fitCheckFinite(what, "y", y); err != nil {
		return err
	}
	if w != nil {
		if err := fitCheckFinite(what, "w", w); err != nil {
			return err
		}
		for i, e := range w {
			if !(e > 0) {
				return fmt.Errorf("%s: %w: w[%d] = %v", what, ErrWeight, i, e)
			}
		}
	}
	return nil
}
