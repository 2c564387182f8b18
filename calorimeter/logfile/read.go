package logfile

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
)

// Options say what a file cannot say for itself. The zero value detects
// everything.
type Options struct {
	Name              string // file name used in errors and warnings (e.g. "run7.csv")
	TimeColumn        string // header name or 1-based index as text; "" = detect
	TemperatureColumn string // same
	TimeUnit          string // "s", "min", "h", "ms", "mm:ss", "hh:mm:ss", "hh:mm", "iso8601"; "" = detect
	TemperatureUnit   string // "C", "K", "F" (or °C, degC, kelvin, …); "" = from the header, else °C with a warning
	Delimiter         rune   // ',', ';', '\t', '|', or ' ' for runs of blanks; 0 = sniff
	Decimal           rune   // '.' or ','; 0 = sniff
}

// Validate reports options that can never work, whatever the file. Read
// calls it first; its errors are not *ParseError, since they are the
// caller's, not the file's.
func (o Options) Validate() error {
	switch o.Delimiter {
	case 0, ',', ';', '\t', '|', ' ':
	default:
		return fmt.Errorf("delimiter %q: want comma, semicolon, tab, pipe or space", o.Delimiter)
	}
	switch o.Decimal {
	case 0, '.', ',':
	default:
		return fmt.Errorf("decimal mark %q: want '.' or ','", o.Decimal)
	}
	if o.TimeUnit != "" && timeUnit(o.TimeUnit) == "" {
		return fmt.Errorf("time unit %q: want s, min, h, ms, mm:ss, hh:mm:ss, hh:mm or iso8601", o.TimeUnit)
	}
	if o.TemperatureUnit != "" && temperatureUnit(o.TemperatureUnit) == "" {
		return fmt.Errorf("temperature unit %q: want C, K or F", o.TemperatureUnit)
	}
	return nil
}

// Log is a temperature log as read: one entry per reading in Time,
// Temperature, Line and each Extra column.
type Log struct {
	Name        string
	Time        []float64            // elapsed seconds since the first reading
	Temperature []float64            // kelvin
	Line        []int                // 1-based source line of each reading
	Extra       map[string][]float64 // other numeric columns by name (unit stripped), NaN where blank
	Columns     []Column             // every column found, in order
	Meta        map[string]string    // "# key: value" lines before the data; keys lower case, '_' and blanks → '-'
	MetaLine    map[string]int       // line of each Meta key
	Dialect     Dialect
	// Start is the date and time of the first reading when the time
	// column holds ISO 8601 timestamps, zero otherwise. Without an offset
	// in the file it is the clock time as written, in UTC (Dialect.Offset
	// false).
	Start time.Time
	// TimeZero is the first reading's time as written, in seconds: the
	// value of a numeric or mm:ss column (so the file's own axis is
	// TimeZero + Time), seconds since midnight for clock times, 0 for
	// timestamps.
	TimeZero float64
	Warnings []Warning
}

// Column describes one field of the data lines.
type Column struct {
	Index int    `json:"index"` // 1-based field number
	Name  string `json:"name"`  // header name without its unit; "column N" when there is no header
	Unit  string `json:"unit"`  // unit as written in the header, "" when none
	Role  string `json:"role"`  // "time", "temperature", "extra" (numeric, in Log.Extra) or "ignored" (text or empty)
}

// Dialect is how the file was written, as detected or as given.
type Dialect struct {
	Delimiter       rune   // ',', ';', '\t', '|' or ' ' (runs of blanks)
	Decimal         rune   // '.' or ','
	HeaderLine      int    // line of the header; 0 when there is none
	Preamble        int    // text lines skipped before the header (comments and blank lines not counted)
	TimeBase        string // "elapsed" (s, min, h, ms, mm:ss), "clock" (hh:mm:ss, hh:mm) or "timestamp" (iso8601)
	TimeUnit        string // "s", "min", "h", "ms", "mm:ss", "hh:mm:ss", "hh:mm" or "iso8601"
	TemperatureUnit string // "C", "K" or "F"
	BOM             bool   // the file starts with a byte order mark
	CRLF            bool   // lines end with CR LF
	Encoding        string // "utf-8", "utf-16le", "utf-16be", or "latin-1" when header or comment text was not UTF-8
	Offset          bool   // timestamps carry Z or a UTC offset
}

// Warning is something Read did that the user should know: a reading
// skipped, a unit assumed, a column chosen among several.
type Warning struct {
	File string
	Line int // 0 when it concerns the whole file
	Msg  string
}

// String gives the warning as "run7.csv:42: blank temperature cell: reading skipped".
func (w Warning) String() string { return position(w.File, w.Line) + w.Msg }

// ParseError is a file Read cannot accept, with the place that shows why.
// Every error Read returns for its input, I/O errors included, is a
// *ParseError.
type ParseError struct {
	File   string
	Line   int // 1-based; 0 when the error concerns the whole file
	Column int // 1-based field number; 0 when not about one field
	Err    error
}

// Error gives `run7.csv:42: temperature "2x.1" is not a number`.
func (e *ParseError) Error() string { return position(e.File, e.Line) + e.Err.Error() }

func (e *ParseError) Unwrap() error { return e.Err }

func position(file string, line int) string {
	switch {
	case file != "" && line > 0:
		return file + ":" + strconv.Itoa(line) + ": "
	case file != "":
		return file + ": "
	case line > 0:
		return "line " + strconv.Itoa(line) + ": "
	}
	return ""
}

// Limits of the reader.
const (
	sniffLines     = 48      // lines of text (not comments or blank) buffered to sniff the dialect
	sniffMaxLines  = 512     // lines of any kind buffered at most
	maxLineBytes   = 1 << 20 // longest line accepted
	listedBlanks   = 20      // rows skipped for blank cells that get a warning each
	clockTurnover  = 12 * 3600.0
	secondsPerDay  = 24 * 3600.0
	zeroCelsiusInK = 273.15 // ITS-90: 0 °C = 273.15 K exactly, by definition of the Celsius scale
	// maxTemperatureK is the highest temperature a reading may have: far
	// above anything a solution calorimeter's probe reads (water's critical
	// point is 647.096 K, IAPWS-95) yet clear of every real log, so that
	// only a wrong unit or a corrupt cell is refused. Our own limit.
	maxTemperatureK = 10000
)

// Read reads a temperature log. It sniffs the dialect from the first few
// dozen lines, then streams the rest line by line, keeping only the
// readings. See the package documentation for the files it accepts.
func Read(r io.Reader, opt Options) (*Log, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	rd := &reader{opt: opt, log: &Log{
		Name:     opt.Name,
		Extra:    map[string][]float64{},
		Meta:     map[string]string{},
		MetaLine: map[string]int{},
	}}
	rd.log.Dialect.Encoding = "utf-8"
	src := rd.decode(bufio.NewReaderSize(r, 64<<10))
	rd.sc = bufio.NewScanner(src)
	rd.sc.Buffer(make([]byte, 64<<10), maxLineBytes)
	rd.sc.Split(rd.ends.split)

	win, err := rd.window()
	if err != nil {
		return nil, err
	}
	start, err := rd.sniff(win)
	if err != nil {
		return nil, err
	}
	for _, ln := range win[start:] {
		if err := rd.row(ln.num, ln.text); err != nil {
			return nil, err
		}
	}
	for {
		text, ok, err := rd.next()
		if err != nil {
			return nil, err
		}
		if !ok {
			break
		}
		if err := rd.row(rd.line, text); err != nil {
			return nil, err
		}
	}
	return rd.finish()
}

// decode strips a byte order mark and, for UTF-16, converts to UTF-8.
func (rd *reader) decode(br *bufio.Reader) io.Reader {
	d := &rd.log.Dialect
	b, _ := br.Peek(3)
	switch {
	case len(b) >= 3 && b[0] == 0xEF && b[1] == 0xBB && b[2] == 0xBF:
		d.BOM = true
		br.Discard(3)
	case len(b) >= 2 && b[0] == 0xFF && b[1] == 0xFE:
		d.BOM, d.Encoding = true, "utf-16le"
		br.Discard(2)
		return &utf16Reader{src: br, order: binary.LittleEndian}
	case len(b) >= 2 && b[0] == 0xFE && b[1] == 0xFF:
		d.BOM, d.Encoding = true, "utf-16be"
		br.Discard(2)
		return &utf16Reader{src: br, order: binary.BigEndian}
	}
	return br
}

// reader holds the state of one Read.
type reader struct {
	opt  Options
	log  *Log
	sc   *bufio.Scanner
	ends lineEnds
	line int  // line number of the last line scanned
	eof  bool // the sniffing window holds the whole input

	delim  byte
	dec    byte // decimal mark; 0 until a number shows it
	ncol   int  // fields in a data line
	cols   []Column
	timeAt int // 0-based field of time
	tempAt int // 0-based field of temperature
	extra  []int
	xvals  [][]float64 // values of the extra columns, in the order of extra
	xrow   []float64
	fields []string

	timeUnit string
	factor   float64 // seconds per unit for numeric time
	tempUnit string

	started    bool
	first      float64   // first reading's time value (numeric in its unit, else seconds)
	firstStamp time.Time // first timestamp
	dayShift   float64   // seconds added to a clock after midnight
	prevRaw    float64   // previous reading's clock, shifted
	prev       float64   // previous reading's elapsed time, s
	prevLine   int
	blanks     int // rows skipped for blank cells
}

// winLine is a line buffered for sniffing.
type winLine struct {
	num  int
	text string
}

// next returns the next line, or ok false at the end of the input.
func (rd *reader) next() (text string, ok bool, err error) {
	if rd.sc.Scan() {
		rd.line++
		return string(rd.sc.Bytes()), true, nil
	}
	if err := rd.sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return "", false, rd.errf(rd.line+1, 0, "line longer than %d bytes", maxLineBytes)
		}
		return "", false, rd.errf(rd.line+1, 0, "read: %w", err)
	}
	return "", false, nil
}

// window buffers the first lines, up to sniffLines lines of text.
func (rd *reader) window() ([]winLine, error) {
	var win []winLine
	text := 0
	for text < sniffLines && len(win) < sniffMaxLines {
		s, ok, err := rd.next()
		if err != nil {
			return nil, err
		}
		if !ok {
			rd.eof = true
			break
		}
		if isText(s) {
			text++
		}
		win = append(win, winLine{rd.line, s})
	}
	return win, nil
}

// errf makes a *ParseError at a line and field (0 for none).
func (rd *reader) errf(line, col int, format string, a ...any) error {
	return &ParseError{File: rd.opt.Name, Line: line, Column: col, Err: fmt.Errorf(format, a...)}
}

func (rd *reader) warnf(line int, format string, a ...any) {
	rd.log.Warnings = append(rd.log.Warnings, Warning{File: rd.opt.Name, Line: line, Msg: fmt.Sprintf(format, a...)})
}

// row reads one line after the header.
func (rd *reader) row(num int, text string) error {
	if !isText(text) {
		return nil
	}
	f, bad := splitFields(rd.fields, text, rd.delim)
	rd.fields = f
	if bad > 0 {
		return rd.errf(num, bad, "column %d: quote not closed or followed by text", bad)
	}
	if allEmpty(f) {
		return nil
	}
	if len(f) != rd.ncol {
		if len(f) < rd.ncol || !allEmpty(f[rd.ncol:]) {
			return rd.errf(num, 0, "%s, want %d as in the %s", plural(len(f), "field"), rd.ncol, rd.shape())
		}
		f = f[:rd.ncol]
	}
	tcell, Tcell := f[rd.timeAt], f[rd.tempAt]
	var tv timeValue
	var kelvin float64
	var err error
	if tcell != "" {
		if tv, err = rd.parseTime(num, tcell); err != nil {
			return err
		}
	}
	if Tcell != "" {
		if kelvin, err = rd.parseTemperature(num, Tcell); err != nil {
			return err
		}
	}
	for i, at := range rd.extra {
		rd.xrow[i] = math.NaN()
		if f[at] == "" {
			continue
		}
		v, ok := rd.parseNumber(f[at])
		if !ok {
			c := rd.cols[at]
			return rd.errf(num, at+1, "column %d %q: %s", at+1, c.Name, rd.notNumber(f[at]))
		}
		rd.xrow[i] = v
	}
	if tcell == "" || Tcell == "" {
		rd.blanks++
		if rd.blanks <= listedBlanks {
			what := "time cell"
			switch {
			case tcell == "" && Tcell == "":
				what = "time and temperature cells"
			case Tcell == "":
				what = "temperature cell"
			}
			rd.warnf(num, "blank %s: reading skipped", what)
		}
		return nil
	}
	t, err := rd.elapsed(num, tcell, tv)
	if err != nil {
		return err
	}
	l := rd.log
	l.Time = append(l.Time, t)
	l.Temperature = append(l.Temperature, kelvin)
	l.Line = append(l.Line, num)
	for i := range rd.extra {
		rd.xvals[i] = append(rd.xvals[i], rd.xrow[i])
	}
	return nil
}

// shape names what fixes the field count, for the wrong-count error.
func (rd *reader) shape() string {
	if rd.log.Dialect.HeaderLine > 0 {
		return fmt.Sprintf("header (line %d)", rd.log.Dialect.HeaderLine)
	}
	return "first data lines"
}

// parseNumber reads a number with the file's decimal mark, settling the
// mark at the first number that shows one.
func (rd *reader) parseNumber(s string) (float64, bool) {
	v, mark, ok := number(s, rd.dec)
	if ok && rd.dec == 0 && mark != 0 {
		rd.dec = mark
	}
	return v, ok
}

// notNumber explains why s is not a number, naming a decimal mark that
// does not match the file's.
func (rd *reader) notNumber(s string) string {
	if rd.dec != 0 {
		other := byte('.')
		if rd.dec == '.' {
			other = ','
		}
		if _, _, ok := number(s, other); ok {
			return fmt.Sprintf("%q has a decimal %s, but this file uses decimal %ss", s, markName(other), markName(rd.dec))
		}
	}
	return fmt.Sprintf("%q is not a number", s)
}

func markName(m byte) string {
	if m == ',' {
		return "comma"
	}
	return "point"
}

// timeValue is a time cell read in its column's unit.
type timeValue struct {
	v    float64   // numeric value in the unit, or seconds of a clock or timer
	ts   time.Time // timestamp
	zone bool
}

func (rd *reader) parseTime(num int, s string) (timeValue, error) {
	col := rd.timeAt + 1
	switch rd.timeUnit {
	case "iso8601":
		t, zone, ok := parseTimestamp(s)
		if !ok {
			return timeValue{}, rd.errf(num, col, "time %q is not an ISO 8601 date and time", s)
		}
		return timeValue{ts: t, zone: zone}, nil
	case "mm:ss", "hh:mm:ss", "hh:mm":
		c, ok := parseClock(s)
		if !ok || (c.parts == 3) != (rd.timeUnit == "hh:mm:ss") {
			return timeValue{}, rd.errf(num, col, "time %q is not %s", s, rd.timeUnit)
		}
		if c.neg && rd.timeUnit != "mm:ss" {
			return timeValue{}, rd.errf(num, col, "time %q is not a clock time", s)
		}
		return timeValue{v: c.seconds(rd.timeUnit)}, nil
	}
	v, ok := rd.parseNumber(s)
	if !ok {
		return timeValue{}, rd.errf(num, col, "time %s", rd.notNumber(s))
	}
	return timeValue{v: v}, nil
}

func (rd *reader) parseTemperature(num int, s string) (float64, error) {
	col := rd.tempAt + 1
	v, ok := rd.parseNumber(s)
	if !ok {
		return 0, rd.errf(num, col, "temperature %s", rd.notNumber(s))
	}
	k := toKelvin(v, rd.tempUnit)
	if k > maxTemperatureK {
		if rd.tempUnit == "K" {
			return 0, rd.errf(num, col, "temperature %s K is above %g K, hotter than any calorimeter reads", s, float64(maxTemperatureK))
		}
		return 0, rd.errf(num, col, "temperature %s %s is %s K, above %g K, hotter than any calorimeter reads", s, unitSymbol(rd.tempUnit), messageNumber(k, 6), float64(maxTemperatureK))
	}
	if !(k >= 0) {
		if rd.tempUnit == "K" {
			return 0, rd.errf(num, col, "temperature %s K is below absolute zero", s)
		}
		return 0, rd.errf(num, col, "temperature %s %s is %s K, below absolute zero", s, unitSymbol(rd.tempUnit), messageNumber(k, 6))
	}
	return k, nil
}

// toKelvin converts a temperature in unit u ("C", "K", "F") to kelvin:
//
//	T/K = t/°C + 273.15
//	T/K = (t/°F − 32)·5/9 + 273.15
//
// (ITS-90 and the definition of the Fahrenheit scale; NIST SP 811, B.8).
func toKelvin(v float64, u string) float64 {
	switch u {
	case "C":
		return v + zeroCelsiusInK
	case "F":
		return (v-32)*(5.0/9.0) + zeroCelsiusInK
	}
	return v
}

func unitSymbol(u string) string {
	switch u {
	case "C":
		return "°C"
	case "F":
		return "°F"
	}
	return "K"
}

// elapsed turns a reading's time into seconds since the first reading,
// turning a clock past midnight and refusing time that goes back.
func (rd *reader) elapsed(num int, s string, tv timeValue) (float64, error) {
	d := &rd.log.Dialect
	var t float64
	switch rd.log.Dialect.TimeBase {
	case "timestamp":
		if !rd.started {
			rd.firstStamp = tv.ts
			rd.log.Start = tv.ts
			d.Offset = tv.zone
		} else if tv.zone != d.Offset {
			if d.Offset {
				return 0, rd.errf(num, rd.timeAt+1, "time %q has no UTC offset, unlike the first reading", s)
			}
			return 0, rd.errf(num, rd.timeAt+1, "time %q has a UTC offset, unlike the first reading", s)
		}
		t = float64(tv.ts.Unix()-rd.firstStamp.Unix()) + float64(tv.ts.Nanosecond()-rd.firstStamp.Nanosecond())*1e-9
	case "clock":
		c := tv.v + rd.dayShift
		if rd.started && c < rd.prevRaw-clockTurnover {
			rd.dayShift += secondsPerDay
			c += secondsPerDay
		}
		if !rd.started {
			rd.first = c
			rd.log.TimeZero = c
		}
		rd.prevRaw = c
		t = c - rd.first
	default:
		if !rd.started {
			rd.first = tv.v
			rd.log.TimeZero = tv.v * rd.factor
		}
		t = (tv.v - rd.first) * rd.factor
	}
	if math.IsInf(t, 0) || math.IsNaN(t) {
		return 0, rd.errf(num, rd.timeAt+1, "time %q is out of range", s)
	}
	if rd.started && t < rd.prev-timeTolerance(rd.prev) {
		return 0, rd.errf(num, rd.timeAt+1, "time %q is %s s before the reading on line %d", s, messageNumber(rd.prev-t, 3), rd.prevLine)
	}
	rd.started = true
	rd.prev, rd.prevLine = t, num
	return t, nil
}

// timeTolerance is how close two times must be to count as equal: 1 ns,
// or 1e-12 of the time for long spans.
func timeTolerance(t float64) float64 { return math.Max(1e-9, 1e-12*math.Abs(t)) }

// finish checks the result and gathers the extra columns.
func (rd *reader) finish() (*Log, error) {
	l := rd.log
	if len(l.Time) == 0 {
		return nil, rd.errf(0, 0, "no readings")
	}
	if rd.blanks > listedBlanks {
		more := rd.blanks - listedBlanks
		word := "readings"
		if more == 1 {
			word = "reading"
		}
		rd.warnf(0, "%d more %s skipped for blank cells (not listed)", more, word)
	}
	for i, at := range rd.extra {
		l.Extra[rd.cols[at].Name] = rd.xvals[i]
	}
	if rd.dec == 0 {
		rd.dec = '.'
	}
	l.Dialect.Decimal = rune(rd.dec)
	l.Dialect.CRLF = rd.ends.crlf
	return l, nil
}

// formatNumber formats x with at most the given decimals, trailing zeros
// dropped; from 10¹⁵ up, where that would run to many digits, as %g with 6
// significant digits (1e+300).
func formatNumber(x float64, decimals int) string {
	if math.Abs(x) >= 1e15 {
		return strconv.FormatFloat(x, 'g', 6, 64)
	}
	s := strconv.FormatFloat(x, 'f', decimals, 64)
	if strings.IndexByte(s, '.') >= 0 {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if s == "-0" {
		s = "0"
	}
	return s
}

// messageNumber formats x for an error message: as formatNumber, and as %g
// with 6 significant digits where the decimals would round it to 0.
func messageNumber(x float64, decimals int) string {
	if a := math.Abs(x); a > 0 && a < 0.5*math.Pow(10, -float64(decimals)) {
		return strconv.FormatFloat(x, 'g', 6, 64)
	}
	return formatNumber(x, decimals)
}
