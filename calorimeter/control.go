package calorimeter

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"text/tabwriter"
)

// controlD2 is the bias-correction constant d2 for ranges of n = 2
// observations: the expected range of two independent unit normal variables,
// 2/√π = 1.1284, rounded to 1.128 as tabulated in the NIST/SEMATECH
// e-Handbook of Statistical Methods, §6.3.2.
const controlD2 = 1.128

// Names of the run rules reported in RuleViolation.Rule.
const (
	// RuleBeyond3Sigma flags a point more than 3σ from the centre.
	RuleBeyond3Sigma = "beyond-3-sigma"
	// RuleTwoOfThree2Sigma flags the point that makes two of three
	// consecutive points lie more than 2σ from the centre on the same side.
	RuleTwoOfThree2Sigma = "two-of-three-beyond-2-sigma"
	// RuleEightOneSide flags the point that makes eight points in a row lie
	// on the same side of the centre.
	RuleEightOneSide = "eight-on-one-side"
	// RuleSixTrend flags the point that makes six points in a row rise
	// (or fall) steadily.
	RuleSixTrend = "six-in-a-row-trend"
)

// ControlChart is an individuals (X) chart whose spread comes from the mean
// moving range of consecutive values. Following the NIST/SEMATECH
// e-Handbook of Statistical Methods, §6.3.2 (variables control charts;
// individuals charts use moving ranges of two):
//
//	MR_i  = |x_i − x_{i−1}|,        i = 2 … n
//	MR̄    = Σ MR_i / (n − 1)
//	σ     = MR̄ / d2,                d2 = 1.128 for ranges of n = 2
//	centre = x̄ = Σ x_i / n
//	Upper2, Lower2 = x̄ ± 2σ        (warning limits)
//	Upper3, Lower3 = x̄ ± 3σ        (action limits)
//
// Values keeps the series in the order given (run order), and Violations
// lists the run rules broken, in index order and, at one index, in the order
// the rules are listed at IndividualsChart.
type ControlChart struct {
	Values          []float64
	Centre          float64
	Sigma           float64
	MovingRangeMean float64
	Upper2, Lower2  float64
	Upper3, Lower3  float64
	Violations      []RuleViolation
}

// RuleViolation is one point flagged by a run rule. Index is the 0-based
// position in ControlChart.Values of the point that completes the pattern,
// Rule one of the Rule… names, and Detail says in plain words what was seen.
type RuleViolation struct {
	Index  int
	Rule   string
	Detail string
}

// IndividualsChart computes the centre, the moving-range σ, the 2σ and 3σ
// limits of values (in run order) and checks four run rules. It needs at
// least two finite values.
//
// The rules, each flagging the point that completes the pattern (the last
// point of the run), so that a point is flagged at most once per rule:
//
//   - beyond-3-sigma: the point lies more than 3σ from the centre.
//   - two-of-three-beyond-2-sigma: the point lies more than 2σ from the
//     centre and at least one of the two points before it lies more than 2σ
//     from the centre on the same side (near the start, the window is
//     shortened to the points that exist).
//   - eight-on-one-side: the point and the seven before it all lie strictly
//     on the same side of the centre; in a longer run, every point from the
//     eighth on is flagged.
//   - six-in-a-row-trend: the point and the five before it rise strictly
//     (or fall strictly) from each to the next; in a longer trend every
//     point from the sixth on is flagged.
//
// The first three are Western Electric rules as listed in the e-Handbook
// §6.3.2; the trend rule is test 3 of L. S. Nelson, "The Shewhart control
// chart — tests for special causes", J. Quality Technology 16 (1984) 237
// (from memory).
//
// When every moving range is zero (all values equal) σ is 0, the centre is
// that value, and no rule can fire.
func IndividualsChart(values []float64) (ControlChart, error) {
	n := len(values)
	if n < 2 {
		return ControlChart{}, fmt.Errorf("individuals chart: %d values given, at least 2 are needed", n)
	}
	for i, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ControlChart{}, fmt.Errorf("individuals chart: value %d is %v, not a finite number", i+1, v)
		}
	}
	c := ControlChart{Values: append([]float64(nil), values...)}

	var sum, mr float64
	for i, v := range values {
		sum += v
		if i > 0 {
			mr += math.Abs(v - values[i-1])
		}
	}
	c.MovingRangeMean = mr / float64(n-1)
	c.Sigma = c.MovingRangeMean / controlD2
	if c.MovingRangeMean == 0 {
		// All values are equal; the mean might differ from them by rounding.
		c.Centre = values[0]
	} else {
		c.Centre = sum / float64(n)
	}
	c.Upper2, c.Lower2 = c.Centre+2*c.Sigma, c.Centre-2*c.Sigma
	c.Upper3, c.Lower3 = c.Centre+3*c.Sigma, c.Centre-3*c.Sigma
	if c.Sigma > 0 {
		c.Violations = controlRules(c)
	}
	return c, nil
}

// controlSide is +1 above the centre, −1 below and 0 on it.
func controlSide(x, centre float64) int {
	switch {
	case x > centre:
		return 1
	case x < centre:
		return -1
	}
	return 0
}

// controlBeyond is the side (+1, −1) on which x lies more than k·σ from the
// centre, or 0 when it lies within.
func controlBeyond(c ControlChart, x, k float64) int {
	switch {
	case x > c.Centre+k*c.Sigma:
		return 1
	case x < c.Centre-k*c.Sigma:
		return -1
	}
	return 0
}

func controlSideWord(s int) string {
	if s > 0 {
		return "above"
	}
	return "below"
}

func controlNum(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }

// controlRules checks the four run rules in index order.
func controlRules(c ControlChart) []RuleViolation {
	var out []RuleViolation
	x := c.Values
	run, trend := 0, 0 // length of the current one-side run and monotone run (in points)
	lastSide, lastDir := 0, 0
	for i, v := range x {
		z := (v - c.Centre) / c.Sigma
		if s := controlBeyond(c, v, 3); s != 0 {
			out = append(out, RuleViolation{Index: i, Rule: RuleBeyond3Sigma,
				Detail: fmt.Sprintf("value %s is %.2fσ %s the centre, beyond the 3σ limit", controlNum(v), math.Abs(z), controlSideWord(s))})
		}

		if s := controlBeyond(c, v, 2); s != 0 {
			k := 0
			for j := max(0, i-2); j < i; j++ {
				if controlBeyond(c, x[j], 2) == s {
					k++
				}
			}
			if k > 0 {
				out = append(out, RuleViolation{Index: i, Rule: RuleTwoOfThree2Sigma,
					Detail: fmt.Sprintf("%d of the last %d values lie beyond 2σ %s the centre", k+1, i-max(0, i-2)+1, controlSideWord(s))})
			}
		}

		s := controlSide(v, c.Centre)
		if s != 0 && s == lastSide {
			run++
		} else if s != 0 {
			run = 1
		} else {
			run = 0
		}
		lastSide = s
		if run >= 8 {
			out = append(out, RuleViolation{Index: i, Rule: RuleEightOneSide,
				Detail: fmt.Sprintf("%d values in a row lie %s the centre", run, controlSideWord(s))})
		}

		if i == 0 {
			trend = 1
			continue
		}
		d := controlSide(v, x[i-1])
		switch {
		case d != 0 && d == lastDir:
			trend++
		case d != 0:
			trend = 2
		default:
			trend = 1
		}
		lastDir = d
		if trend >= 6 {
			word := "rising"
			if d < 0 {
				word = "falling"
			}
			out = append(out, RuleViolation{Index: i, Rule: RuleSixTrend,
				Detail: fmt.Sprintf("%d values in a row steadily %s", trend, word)})
		}
	}
	return out
}

// Summary writes a plain-text account of the chart to w: the number of
// values, centre, σ (with the mean moving range it came from), the 2σ and 3σ
// limits, and one line per rule violation naming the point by its label.
// Units are the caller's to add (for example in a heading). labels names the
// points in the order of Values (run ids); when labels is nil the points are
// named by their 1-based position "#1", "#2", ….
func (c ControlChart) Summary(w io.Writer, labels []string) error {
	if labels != nil && len(labels) != len(c.Values) {
		return fmt.Errorf("control chart summary: %d labels given for %d values", len(labels), len(c.Values))
	}
	name := func(i int) string {
		if labels != nil && labels[i] != "" {
			return labels[i]
		}
		return "#" + strconv.Itoa(i+1)
	}
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintf(tw, "values\t%d\n", len(c.Values))
	fmt.Fprintf(tw, "centre (mean)\t%s\n", controlNum(c.Centre))
	fmt.Fprintf(tw, "sigma\t%s\t(mean moving range %s / 1.128)\n", controlNum(c.Sigma), controlNum(c.MovingRangeMean))
	fmt.Fprintf(tw, "3-sigma limits\t%s\t%s\n", controlNum(c.Lower3), controlNum(c.Upper3))
	fmt.Fprintf(tw, "2-sigma limits\t%s\t%s\n", controlNum(c.Lower2), controlNum(c.Upper2))
	if err := tw.Flush(); err != nil {
		return fmt.Errorf("control chart summary: %w", err)
	}
	if len(c.Violations) == 0 {
		_, err := fmt.Fprintln(w, "rule violations: none")
		return controlWrap(err)
	}
	if _, err := fmt.Fprintf(w, "rule violations: %d\n", len(c.Violations)); err != nil {
		return controlWrap(err)
	}
	tw = tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	for _, v := range c.Violations {
		if v.Index < 0 || v.Index >= len(c.Values) {
			return fmt.Errorf("control chart summary: violation index %d is outside the %d values", v.Index, len(c.Values))
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\n", name(v.Index), controlNum(c.Values[v.Index]), v.Rule, v.Detail)
	}
	return controlWrap(tw.Flush())
}

func controlWrap(err error) error {
	if err == nil {
		return nil
	}
	return fmt.Errorf("control chart summary: %w", err)
}
