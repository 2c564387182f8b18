package logfile

import (
	"strings"
	"unicode"
)

// splitNameUnit splits a header cell into the quantity's name and its unit
// as written: "Temperature (°C)", "time [min]", "T/K", "Zeit in s", and,
// where the name already says what the unit measures, "Temp_C" or "time s".
func splitNameUnit(h string) (name, unit string) {
	h = strings.TrimSpace(h)
	if n := len(h); n >= 2 && (h[n-1] == ')' || h[n-1] == ']') {
		open := byte('(')
		if h[n-1] == ']' {
			open = '['
		}
		if i := strings.LastIndexByte(h, open); i >= 0 {
			return strings.TrimSpace(h[:i]), strings.TrimSpace(h[i+1 : n-1])
		}
	}
	if i := strings.LastIndexByte(h, '/'); i > 0 {
		if u := strings.TrimSpace(h[i+1:]); knownUnit(u) {
			return strings.TrimSpace(h[:i]), u
		}
	}
	if i := strings.LastIndex(strings.ToLower(h), " in "); i > 0 {
		if u := strings.TrimSpace(h[i+4:]); knownUnit(u) {
			return strings.TrimSpace(h[:i]), u
		}
	}
	if i := strings.LastIndexAny(h, " _"); i > 0 {
		name, u := strings.TrimSpace(h[:i]), h[i+1:]
		if (timeUnit(u) != "" && isTimeName(name)) || (temperatureUnit(u) != "" && isTemperatureName(name)) {
			return name, u
		}
	}
	return h, ""
}

// timeUnits maps the ways a time unit is written (lower case, without
// spaces or a final period) to the names Options.TimeUnit takes.
var timeUnits = map[string]string{
	"s": "s", "sec": "s", "secs": "s", "second": "s", "seconds": "s", "sek": "s",
	"min": "min", "mins": "min", "minute": "min", "minutes": "min", "m": "min",
	"h": "h", "hr": "h", "hrs": "h", "hour": "h", "hours": "h",
	"ms": "ms", "msec": "ms", "millisecond": "ms", "milliseconds": "ms",
	"mm:ss": "mm:ss", "m:ss": "mm:ss", "mm:ss.s": "mm:ss", "min:s": "mm:ss", "min:sec": "mm:ss",
	"hh:mm:ss": "hh:mm:ss", "h:mm:ss": "hh:mm:ss", "hh:mm:ss.s": "hh:mm:ss", "hh:mm:ss.ss": "hh:mm:ss",
	"hh:mm:ss.sss": "hh:mm:ss", "hh:mm:ss,s": "hh:mm:ss", "h:m:s": "hh:mm:ss",
	"hh:mm": "hh:mm", "h:mm": "hh:mm",
	"iso8601": "iso8601", "iso-8601": "iso8601", "iso": "iso8601",
}

// timeUnit returns the time unit u names ("s", "min", "h", "ms", "mm:ss",
// "hh:mm:ss", "hh:mm", "iso8601"), or "" when u names none.
func timeUnit(u string) string {
	u = strings.ToLower(strings.Join(strings.Fields(u), ""))
	u = strings.TrimSuffix(u, ".")
	return timeUnits[u]
}

// temperatureUnit returns "C", "K" or "F" for the ways those units are
// written (°C, ºC, ℃, degC, deg C, Celsius, K, kelvin, °F, …), or "".
func temperatureUnit(u string) string {
	u = strings.ToLower(strings.Join(strings.Fields(u), ""))
	u = strings.Map(func(r rune) rune {
		switch r {
		case '°', 'º', '˚', '.', 'â': // 'â': "Â°C", UTF-8 read as Latin-1 once
			return -1
		}
		return r
	}, u)
	for _, p := range []string{"degrees", "degree", "deg", "grad"} {
		if rest, ok := strings.CutPrefix(u, p); ok && rest != "" {
			u = rest
			break
		}
	}
	switch u {
	case "c", "celsius", "℃":
		return "C"
	case "k", "kelvin", "kelvins":
		return "K"
	case "f", "fahrenheit", "℉":
		return "F"
	}
	return ""
}

// otherUnits are units of the columns a calorimeter log carries besides
// time and temperature; they let "P/W" split at its slash.
var otherUnits = map[string]bool{
	"W": true, "mW": true, "kW": true, "V": true, "mV": true, "A": true, "mA": true,
	"J": true, "kJ": true, "Ω": true, "ohm": true, "%": true, "g": true, "mg": true,
	"kg": true, "mL": true, "ml": true, "L": true, "rpm": true, "Pa": true,
	"kPa": true, "hPa": true, "bar": true, "mbar": true, "K/s": true, "K/min": true,
}

func knownUnit(u string) bool {
	return timeUnit(u) != "" || temperatureUnit(u) != "" || otherUnits[u]
}

var timeWords = map[string]bool{
	"time": true, "elapsed": true, "clock": true, "timestamp": true, "datetime": true,
	"zeit": true, "uhrzeit": true, "messzeit": true, "tiempo": true, "runtime": true,
}

var temperatureWords = map[string]bool{
	"temperature": true, "temp": true, "temperatur": true, "temperatura": true,
	"température": true, "theta": true, "θ": true, "ϑ": true,
}

// nameWords splits a column name into words at blanks and at _ - . /.
func nameWords(name string) []string {
	return strings.FieldsFunc(name, func(r rune) bool {
		return unicode.IsSpace(r) || strings.ContainsRune("_-./", r)
	})
}

// isTimeName reports whether a column name says time: a word such as time,
// elapsed, clock, timestamp or zeit, or a lower-case t standing alone.
func isTimeName(name string) bool {
	w := nameWords(name)
	if len(w) > 0 && w[0] == "t" {
		return true
	}
	for _, x := range w {
		if timeWords[strings.ToLower(x)] {
			return true
		}
	}
	return false
}

// isTemperatureName reports whether a column name says temperature: a word
// such as temperature, temp or θ, a capital T standing first (T, T vessel),
// or a probe number (T1, Temp2, θ3).
func isTemperatureName(name string) bool {
	w := nameWords(name)
	if len(w) > 0 && w[0] == "T" {
		return true
	}
	for _, x := range w {
		x = strings.ToLower(x)
		if temperatureWords[x] {
			return true
		}
		for _, p := range []string{"t", "temp", "θ"} {
			if rest, ok := strings.CutPrefix(x, p); ok && allDigits(rest) {
				return true
			}
		}
	}
	return false
}

// isNameCell reports whether a header cell reads as a name rather than a
// value: it is not a value and starts with a letter or an opening bracket.
func isNameCell(s string) bool {
	if s == "" || isValue(s) {
		return false
	}
	r := []rune(s)[0]
	return unicode.IsLetter(r) || strings.ContainsRune("([_%°#'", r)
}

// isHeader reports whether the fields read as column names: at least one
// name and no more values than names.
func isHeader(f []string) bool {
	names, values := 0, 0
	for _, s := range f {
		switch {
		case isNameCell(s):
			names++
		case s != "":
			values++
		}
	}
	return names > 0 && names >= values
}

// isData reports whether the fields read as a data line: two fields or
// more, at least two of them values, and values at least half of the cells
// that are not blank.
func isData(f []string) bool {
	if len(f) < 2 {
		return false
	}
	values, filled := 0, 0
	for _, s := range f {
		if s == "" {
			continue
		}
		filled++
		if isValue(s) {
			values++
		}
	}
	return values >= 2 && 2*values >= filled
}

// headerFields splits a candidate header line into k fields if it can. With
// blanks as the delimiter a header such as "Time (s)   Temp (°C)" splits
// into more tokens than the data, so runs of two or more blanks are tried,
// then tokens in brackets are joined to the name before them.
func headerFields(text string, d byte, k int) []string {
	f, bad := splitFields(nil, text, d)
	if bad > 0 {
		return nil
	}
	if d != ' ' || len(f) == k {
		return f
	}
	var wide []string
	for _, s := range splitRuns(text) {
		wide = append(wide, strings.Trim(s, `"`))
	}
	if len(wide) == k {
		return wide
	}
	var joined []string
	depth := 0
	for _, s := range f {
		if len(joined) > 0 && (depth > 0 || s[0] == '(' || s[0] == '[' || s[0] == '/') {
			joined[len(joined)-1] += " " + s
		} else {
			joined = append(joined, s)
		}
		depth += strings.Count(s, "(") + strings.Count(s, "[") - strings.Count(s, ")") - strings.Count(s, "]")
	}
	if len(joined) == k {
		return joined
	}
	return f
}

// splitRuns splits at runs of two or more blanks (or any tab).
func splitRuns(s string) []string {
	var out []string
	s = strings.Trim(s, " \t")
	for s != "" {
		i := 0
		for i < len(s) {
			if s[i] == '\t' || (s[i] == ' ' && i+1 < len(s) && (s[i+1] == ' ' || s[i+1] == '\t')) {
				break
			}
			i++
		}
		out = append(out, s[:i])
		s = strings.TrimLeft(s[i:], " \t")
	}
	return out
}
