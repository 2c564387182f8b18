package logfile

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"
)

// Summary is what a log holds and how it was read, for `calred inspect`.
type Summary struct {
	File            string            `json:"file"`
	Delimiter       string            `json:"delimiter"`    // "comma", "semicolon", "tab", "pipe", "spaces"
	DecimalMark     string            `json:"decimal_mark"` // "point", "comma"
	Encoding        string            `json:"encoding"`
	BOM             bool              `json:"bom"`
	CRLF            bool              `json:"crlf"`
	HeaderLine      int               `json:"header_line"` // 0: no header
	PreambleLines   int               `json:"preamble_lines"`
	Columns         []Column          `json:"columns"`
	TimeBase        string            `json:"time_base"` // "elapsed", "clock", "timestamp"
	TimeUnit        string            `json:"time_unit"`
	TemperatureUnit string            `json:"temperature_unit"` // "C", "K", "F" as written in the file
	Points          int               `json:"points"`
	TimeZeroS       float64           `json:"time_zero_s"` // first reading's time as written, s (see Log.TimeZero)
	SpanS           float64           `json:"span_s"`
	IntervalS       float64           `json:"interval_s"` // median interval between readings
	IntervalMinS    float64           `json:"interval_min_s"`
	IntervalMaxS    float64           `json:"interval_max_s"`
	TemperatureMinK float64           `json:"temperature_min_k"`
	TemperatureMaxK float64           `json:"temperature_max_k"`
	TemperatureMinC float64           `json:"temperature_min_c"`
	TemperatureMaxC float64           `json:"temperature_max_c"`
	Gaps            []Gap             `json:"gaps"`            // intervals longer than GapFactor × the median
	DuplicateTimes  []int             `json:"duplicate_times"` // lines whose time equals the reading before
	NonMonotonic    []int             `json:"non_monotonic"`   // lines whose time is before the reading before (never in a Log from Read)
	Meta            map[string]string `json:"meta"`
	Warnings        []string          `json:"warnings"`
	// Start is the first reading's date and time: RFC 3339 when the
	// timestamps carry an offset, "2006-01-02T15:04:05" (local time of an
	// unknown zone) when they do not, the time of day "15:04:05" for clock
	// times, and "" for elapsed times.
	Start string `json:"start"`
}

// Gap is an interval between two readings longer than GapFactor times the
// median interval.
type Gap struct {
	AfterLine int     `json:"after_line"` // line of the reading before the gap
	FromS     float64 `json:"from_s"`
	ToS       float64 `json:"to_s"`
}

// GapFactor: an interval longer than this many median intervals is a gap.
const GapFactor = 3

// Summarise describes a log: how it was written, how many readings over
// what span, the sampling interval, the temperature range, and where the
// time axis has gaps or repeats. It works on any Log, also one not made by
// Read.
func Summarise(l *Log) Summary {
	d := l.Dialect
	s := Summary{
		File:            l.Name,
		Delimiter:       delimiterName(d.Delimiter),
		DecimalMark:     map[rune]string{'.': "point", ',': "comma"}[d.Decimal],
		Encoding:        d.Encoding,
		BOM:             d.BOM,
		CRLF:            d.CRLF,
		HeaderLine:      d.HeaderLine,
		PreambleLines:   d.Preamble,
		Columns:         append([]Column{}, l.Columns...),
		TimeBase:        d.TimeBase,
		TimeUnit:        d.TimeUnit,
		TemperatureUnit: d.TemperatureUnit,
		Points:          len(l.Time),
		TimeZeroS:       l.TimeZero,
		Gaps:            []Gap{},
		DuplicateTimes:  []int{},
		NonMonotonic:    []int{},
		Meta:            map[string]string{},
		Warnings:        []string{},
	}
	for k, v := range l.Meta {
		s.Meta[k] = v
	}
	for _, w := range l.Warnings {
		s.Warnings = append(s.Warnings, w.String())
	}
	switch {
	case d.TimeBase == "timestamp" && !l.Start.IsZero() && d.Offset:
		s.Start = l.Start.Format("2006-01-02T15:04:05.999999999Z07:00")
	case d.TimeBase == "timestamp" && !l.Start.IsZero():
		s.Start = l.Start.Format("2006-01-02T15:04:05.999999999")
	case d.TimeBase == "clock" && len(l.Time) > 0:
		s.Start = clockText(l.TimeZero)
	}
	n := len(l.Time)
	if n == 0 {
		return s
	}
	line := func(i int) int {
		if i < len(l.Line) {
			return l.Line[i]
		}
		return i + 1
	}
	s.SpanS = l.Time[n-1] - l.Time[0]
	s.TemperatureMinK, s.TemperatureMaxK = math.Inf(1), math.Inf(-1)
	for _, t := range l.Temperature {
		s.TemperatureMinK = math.Min(s.TemperatureMinK, t)
		s.TemperatureMaxK = math.Max(s.TemperatureMaxK, t)
	}
	if len(l.Temperature) == 0 {
		s.TemperatureMinK, s.TemperatureMaxK = 0, 0
	} else {
		s.TemperatureMinK, s.TemperatureMaxK = nano(s.TemperatureMinK), nano(s.TemperatureMaxK)
		s.TemperatureMinC = nano(s.TemperatureMinK - zeroCelsiusInK)
		s.TemperatureMaxC = nano(s.TemperatureMaxK - zeroCelsiusInK)
	}
	if n < 2 {
		return s
	}
	dt := make([]float64, n-1)
	for i := 1; i < n; i++ {
		dt[i-1] = l.Time[i] - l.Time[i-1]
		switch tol := timeTolerance(l.Time[i]); {
		case dt[i-1] < -tol:
			s.NonMonotonic = append(s.NonMonotonic, line(i))
		case dt[i-1] <= tol:
			s.DuplicateTimes = append(s.DuplicateTimes, line(i))
		}
	}
	sorted := slices.Clone(dt)
	slices.Sort(sorted)
	s.IntervalMinS, s.IntervalMaxS = sorted[0], sorted[len(sorted)-1]
	s.IntervalS = median(sorted)
	if s.IntervalS > 0 {
		for i, x := range dt {
			if x > GapFactor*s.IntervalS {
				s.Gaps = append(s.Gaps, Gap{AfterLine: line(i), FromS: l.Time[i], ToS: l.Time[i+1]})
			}
		}
	}
	return s
}

// nano rounds a temperature to 1 nK, far below any thermometer's
// resolution, so that 24.952 °C read back from 298.102 K prints as written
// and not as 24.951999999999998.
func nano(x float64) float64 {
	if math.Abs(x) > 1e9 {
		return x
	}
	return math.Round(x*1e9) / 1e9
}

// median of sorted values: the middle one, or the mean of the two middle ones.
func median(sorted []float64) float64 {
	n := len(sorted)
	if n%2 == 1 {
		return sorted[n/2]
	}
	return (sorted[n/2-1] + sorted[n/2]) / 2
}

func delimiterName(d rune) string {
	switch d {
	case ',':
		return "comma"
	case ';':
		return "semicolon"
	case '\t':
		return "tab"
	case '|':
		return "pipe"
	case ' ':
		return "spaces"
	}
	return ""
}

// clockText writes seconds since midnight as hh:mm:ss with any fraction;
// days beyond the first count on in the hours.
func clockText(sec float64) string {
	whole := math.Floor(sec)
	frac := sec - whole
	h, m, s := int64(whole)/3600, int64(whole)/60%60, int64(whole)%60
	out := fmt.Sprintf("%02d:%02d:%02d", h, m, s)
	if f := formatNumber(frac, 6); f != "0" {
		out += strings.TrimPrefix(f, "0")
	}
	return out
}

// WriteText prints the summary as an aligned table, every number with its unit.
func (s Summary) WriteText(w io.Writer) error {
	tw := tabwriter.NewWriter(w, 0, 8, 2, ' ', 0)
	row := func(label string, cells ...string) {
		fmt.Fprintln(tw, label+"\t"+strings.Join(cells, "\t"))
	}
	var format []string
	if s.Delimiter != "" {
		format = append(format, s.Delimiter+"-separated")
	}
	if s.DecimalMark != "" {
		format = append(format, "decimal "+s.DecimalMark)
	}
	if enc := encodingNames[s.Encoding]; enc != "" && s.BOM {
		format = append(format, enc+" with byte order mark")
	} else if enc != "" {
		format = append(format, enc)
	}
	if s.CRLF {
		format = append(format, "CRLF line ends")
	}
	row("file", s.File)
	row("format", strings.Join(format, ", "))
	preamble := plural(s.PreambleLines, "preamble line")
	switch {
	case s.HeaderLine > 0:
		row("header", fmt.Sprintf("line %d, after %s", s.HeaderLine, preamble))
	default:
		row("header", "none, "+preamble)
	}
	for i, c := range s.Columns {
		label := ""
		if i == 0 {
			label = "columns"
		}
		unit := c.Unit
		if unit == "" {
			unit = "-"
		}
		row(label, strconv.Itoa(c.Index), c.Name, unit, c.Role)
	}
	base := s.TimeBase + " (" + s.TimeUnit + ")"
	switch {
	case s.Start != "":
		base += ", first reading at " + s.Start
	case s.TimeZeroS != 0:
		base += ", first reading at " + formatNumber(s.TimeZeroS, 3) + " s"
	}
	row("time base", base)
	row("temperature unit", unitSymbol(s.TemperatureUnit))
	span := formatNumber(s.SpanS, 3) + " s"
	if s.SpanS >= 120 {
		span += " (" + formatNumber(s.SpanS/60, 2) + " min)"
	}
	row("span", fmt.Sprintf("%s over %s", plural(s.Points, "reading"), span))
	row("interval", fmt.Sprintf("%s s median, %s s to %s s",
		formatNumber(s.IntervalS, 3), formatNumber(s.IntervalMinS, 3), formatNumber(s.IntervalMaxS, 3)))
	row("temperature", fmt.Sprintf("%s K to %s K (%s °C to %s °C)",
		formatNumber(s.TemperatureMinK, 6), formatNumber(s.TemperatureMaxK, 6),
		formatNumber(s.TemperatureMinC, 6), formatNumber(s.TemperatureMaxC, 6)))
	if len(s.Gaps) == 0 {
		row("gaps", "none")
	}
	for i, g := range s.Gaps {
		label := ""
		if i == 0 {
			label = "gaps"
		}
		row(label, fmt.Sprintf("after line %d: %s s to %s s (%s s)", g.AfterLine,
			formatNumber(g.FromS, 3), formatNumber(g.ToS, 3), formatNumber(g.ToS-g.FromS, 3)))
	}
	row("repeated times", lineList(s.DuplicateTimes))
	if len(s.NonMonotonic) > 0 {
		row("time going back", lineList(s.NonMonotonic))
	}
	keys := make([]string, 0, len(s.Meta))
	for k := range s.Meta {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	if len(keys) == 0 {
		row("metadata", "none")
	}
	for i, k := range keys {
		label := ""
		if i == 0 {
			label = "metadata"
		}
		row(label, k, s.Meta[k])
	}
	if len(s.Warnings) == 0 {
		row("warnings", "none")
	}
	for i, m := range s.Warnings {
		label := ""
		if i == 0 {
			label = "warnings"
		}
		row(label, m)
	}
	return tw.Flush()
}

var encodingNames = map[string]string{
	"utf-8": "UTF-8", "utf-16le": "UTF-16LE", "utf-16be": "UTF-16BE", "latin-1": "Latin-1 (ISO 8859-1)",
}

// plural writes "1 reading", "2 readings".
func plural(n int, thing string) string {
	if n == 1 {
		return "1 " + thing
	}
	return strconv.Itoa(n) + " " + thing + "s"
}

// lineList writes line numbers as "none" or "lines 12, 13".
func lineList(lines []int) string {
	if len(lines) == 0 {
		return "none"
	}
	parts := make([]string, len(lines))
	for i, n := range lines {
		parts[i] = strconv.Itoa(n)
	}
	if len(lines) == 1 {
		return "line " + parts[0]
	}
	return "lines " + strings.Join(parts, ", ")
}
