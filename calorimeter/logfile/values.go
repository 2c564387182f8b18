package logfile

import (
	"math"
	"strconv"
	"time"
)

// number parses a plain decimal number: an optional sign, digits with at
// most one decimal mark, an optional exponent. dec is the decimal mark the
// file uses ('.' or ','); 0 accepts either. It returns the mark the text
// used (0 when it has none). Hexadecimal, underscores, "inf" and "nan",
// which strconv.ParseFloat would take, are refused, and so are values
// beyond the float64 range. A comma is read as a decimal mark or refused,
// never dropped.
func number(s string, dec byte) (v float64, mark byte, ok bool) {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && isDigit(s[i]) {
		i++
		digits++
	}
	if i < len(s) && (s[i] == '.' || s[i] == ',') {
		mark = s[i]
		if dec != 0 && mark != dec {
			return 0, mark, false
		}
		i++
		for i < len(s) && isDigit(s[i]) {
			i++
			digits++
		}
	}
	if digits == 0 {
		return 0, mark, false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		exp := 0
		for i < len(s) && isDigit(s[i]) {
			i++
			exp++
		}
		if exp == 0 {
			return 0, mark, false
		}
	}
	if i != len(s) {
		return 0, mark, false
	}
	text := s
	if mark == ',' {
		b := []byte(s)
		for j := range b {
			if b[j] == ',' {
				b[j] = '.'
			}
		}
		text = string(b)
	}
	v, err := strconv.ParseFloat(text, 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, mark, false
	}
	return v, mark, true
}

func isDigit(c byte) bool { return '0' <= c && c <= '9' }

// clock is a time written with colons: h:mm, h:mm:ss or mm:ss, with an
// optional fraction of the last part.
type clock struct {
	neg   bool
	parts int        // 2 or 3
	p     [3]float64 // the parts, left to right; the fraction is in the last
}

// parseClock reads [-]a:bb or [-]a:bb:cc, with an optional fraction
// (after '.' or ',') on the last part. The first part has any number of
// digits (timers run past 24 h and 60 min); the others have two and are
// below 60.
func parseClock(s string) (c clock, ok bool) {
	i := 0
	if i < len(s) && s[i] == '-' {
		c.neg = true
		i++
	}
	start := i
	for i < len(s) && isDigit(s[i]) {
		i++
	}
	if i == start || i-start > 9 || i >= len(s) || s[i] != ':' {
		return c, false
	}
	c.p[0] = float64(atoi(s[start:i]))
	c.parts = 1
	for c.parts < 3 && i < len(s) && s[i] == ':' {
		if i+3 > len(s) || !isDigit(s[i+1]) || !isDigit(s[i+2]) {
			return c, false
		}
		v := atoi(s[i+1 : i+3])
		if v >= 60 {
			return c, false
		}
		c.p[c.parts] = float64(v)
		c.parts++
		i += 3
	}
	if i < len(s) && (s[i] == '.' || s[i] == ',') {
		f, ok := fraction(s[i+1:])
		if !ok {
			return c, false
		}
		c.p[c.parts-1] += f
		i = len(s)
	}
	return c, i == len(s)
}

// seconds is the clock's value with the given layout: "mm:ss" for two
// parts as minutes and seconds, anything else as hours, minutes and
// seconds (two parts: hours and minutes).
func (c clock) seconds(layout string) float64 {
	var s float64
	switch {
	case c.parts == 2 && layout == "mm:ss":
		s = c.p[0]*60 + c.p[1]
	case c.parts == 2:
		s = c.p[0]*3600 + c.p[1]*60
	default:
		s = c.p[0]*3600 + c.p[1]*60 + c.p[2]
	}
	if c.neg {
		return -s
	}
	return s
}

// fraction reads the digits after a decimal mark as a fraction of one.
func fraction(s string) (float64, bool) {
	if s == "" || len(s) > 18 {
		return 0, false
	}
	for i := 0; i < len(s); i++ {
		if !isDigit(s[i]) {
			return 0, false
		}
	}
	return float64(atoi(s)) / math.Pow10(len(s)), true
}

// atoi converts a short run of ASCII digits checked by the caller.
func atoi(s string) int {
	n := 0
	for i := 0; i < len(s); i++ {
		n = n*10 + int(s[i]-'0')
	}
	return n
}

// parseTimestamp reads an ISO 8601 date and time of day:
//
//	YYYY-MM-DD[T| ]hh:mm[:ss[(.|,)fff…]][Z | ±hh[:mm] | ±hhmm]
//
// zone reports whether the text carries Z or a UTC offset; without one the
// time is returned in UTC as written.
func parseTimestamp(s string) (t time.Time, zone bool, ok bool) {
	if len(s) < 16 || s[4] != '-' || s[7] != '-' {
		return t, false, false
	}
	if !allDigits(s[0:4]) || !allDigits(s[5:7]) || !allDigits(s[8:10]) {
		return t, false, false
	}
	if s[10] != 'T' && s[10] != 't' && s[10] != ' ' {
		return t, false, false
	}
	year, month, day := atoi(s[0:4]), atoi(s[5:7]), atoi(s[8:10])
	rest := s[11:]
	// hh:mm
	if len(rest) < 5 || !allDigits(rest[0:2]) || rest[2] != ':' || !allDigits(rest[3:5]) {
		return t, false, false
	}
	hour, minute, sec, nsec := atoi(rest[0:2]), atoi(rest[3:5]), 0, 0
	rest = rest[5:]
	if len(rest) >= 3 && rest[0] == ':' && allDigits(rest[1:3]) {
		sec = atoi(rest[1:3])
		rest = rest[3:]
		if len(rest) > 0 && (rest[0] == '.' || rest[0] == ',') {
			j := 1
			for j < len(rest) && isDigit(rest[j]) {
				j++
			}
			if j == 1 || j > 10 {
				return t, false, false
			}
			frac := rest[1:j]
			nsec = atoi(frac)
			for k := len(frac); k < 9; k++ {
				nsec *= 10
			}
			rest = rest[j:]
		}
	}
	if month < 1 || month > 12 || day < 1 || hour > 23 || minute > 59 || sec > 59 {
		return t, false, false
	}
	loc := time.UTC
	switch {
	case rest == "":
	case rest == "Z" || rest == "z":
		zone = true
	case rest[0] == '+' || rest[0] == '-':
		off, ok := utcOffset(rest[1:])
		if !ok {
			return t, false, false
		}
		if rest[0] == '-' {
			off = -off
		}
		zone = true
		if off != 0 {
			loc = time.FixedZone("", off)
		}
	default:
		return t, false, false
	}
	t = time.Date(year, time.Month(month), day, hour, minute, sec, nsec, loc)
	if t.Day() != day { // 2026-02-30 and the like roll over: refuse them
		return time.Time{}, false, false
	}
	return t, zone, true
}

// utcOffset reads hh, hh:mm or hhmm as seconds east of UTC.
func utcOffset(s string) (int, bool) {
	var h, m int
	switch {
	case len(s) == 2 && allDigits(s):
		h = atoi(s)
	case len(s) == 4 && allDigits(s):
		h, m = atoi(s[:2]), atoi(s[2:])
	case len(s) == 5 && s[2] == ':' && allDigits(s[:2]) && allDigits(s[3:]):
		h, m = atoi(s[:2]), atoi(s[3:])
	default:
		return 0, false
	}
	if h > 23 || m > 59 {
		return 0, false
	}
	return h*3600 + m*60, true
}

func allDigits(s string) bool {
	for i := 0; i < len(s); i++ {
		if !isDigit(s[i]) {
			return false
		}
	}
	return s != ""
}

// cellKind is what a cell looks like before its column's unit is known.
type cellKind int

const (
	cellBlank cellKind = iota
	cellNumber
	cellClock2 // mm:ss or hh:mm
	cellClock3 // hh:mm:ss
	cellTimestamp
	cellText
)

// kindOf classifies a cell; for a number it also returns its decimal mark.
func kindOf(s string) (cellKind, byte) {
	if s == "" {
		return cellBlank, 0
	}
	if _, mark, ok := number(s, 0); ok {
		return cellNumber, mark
	}
	if c, ok := parseClock(s); ok {
		if c.parts == 2 {
			return cellClock2, 0
		}
		return cellClock3, 0
	}
	if _, _, ok := parseTimestamp(s); ok {
		return cellTimestamp, 0
	}
	return cellText, 0
}

// isValue reports whether a non-blank cell reads as a number, a clock time
// or a timestamp.
func isValue(s string) bool {
	k, _ := kindOf(s)
	return k != cellBlank && k != cellText
}
