package logfile

import (
	"fmt"
	"slices"
	"strconv"
	"strings"
	"unicode"
)

// sniffDelimiters are tried in this order; the first with the most data
// lines of one field count wins.
var sniffDelimiters = []byte{'\t', ';', ',', '|', ' '}

// sniff settles the dialect, the columns and their units from the buffered
// first lines, and returns the index in win of the first line after the
// header (or of the first data line when there is no header).
func (rd *reader) sniff(win []winLine) (int, error) {
	d := &rd.log.Dialect
	if d.Encoding == "utf-8" {
		for i := range win {
			if s, changed := latin1(win[i].text); changed {
				win[i].text = s
				d.Encoding = "latin-1"
			}
		}
	}
	text := func(i int) bool { return isText(win[i].text) }

	// The delimiter: the one that gives the most data lines of one field count.
	cands := sniffDelimiters
	if rd.opt.Delimiter != 0 {
		cands = []byte{byte(rd.opt.Delimiter)}
	}
	bestScore, k := 0, 0
	for _, c := range cands {
		counts, seen := map[int]int{}, map[int]int{}
		for i := range win {
			if !text(i) {
				continue
			}
			if f, bad := splitFields(nil, win[i].text, c); bad == 0 && isData(f) {
				if counts[len(f)] == 0 {
					seen[len(f)] = i
				}
				counts[len(f)]++
			}
		}
		// The commonest field count; of two as common, the one seen first.
		n, score := 0, 0
		for m, sc := range counts {
			if sc > score || (sc == score && seen[m] < seen[n]) {
				n, score = m, sc
			}
		}
		if score > bestScore {
			bestScore, k, rd.delim = score, n, c
		}
	}
	if bestScore == 0 {
		switch {
		case !slices.ContainsFunc(win, func(l winLine) bool { return isText(l.text) }):
			return 0, rd.errf(0, 0, "no readings")
		case rd.eof:
			return 0, rd.errf(0, 0, "no data lines: want a column of times and one of temperatures")
		}
		return 0, rd.errf(0, 0, "no data lines in the first %d lines: want a column of times and one of temperatures", win[len(win)-1].num)
	}
	fields := make([][]string, len(win))
	first := -1
	for i := range win {
		if text(i) {
			fields[i], _ = splitFields(nil, win[i].text, rd.delim)
			if first < 0 && len(fields[i]) == k && isData(fields[i]) {
				first = i
			}
		}
	}

	// The header: the nearest line above the first data line that reads as
	// names. Lines of the data's width in between are data with a fault,
	// which the row reader will report.
	hdr, start := -1, first
	var names []string
	for i := first - 1; i >= 0; i-- {
		if !text(i) {
			continue
		}
		if hf := headerFields(win[i].text, rd.delim, k); isHeader(hf) {
			if n, ok := fits(hf, k, fields[first:]); ok {
				hdr, names, k = i, hf[:min(n, len(hf))], n
				break
			}
		}
		if len(fields[i]) == k && !isHeader(fields[i]) {
			start = i
			continue
		}
		break
	}
	if hdr >= 0 {
		start = hdr + 1
	} else {
		// A header written as a comment ("# t/s  T/K"), just above the data.
		for i := start - 1; i >= 0 && !text(i); i-- {
			if !isComment(win[i].text) {
				continue
			}
			c := strings.TrimLeft(strings.TrimLeft(win[i].text, " \t"), "#")
			if _, _, meta := parseMeta(c); !meta {
				if hf := headerFields(c, rd.delim, k); isHeader(hf) && namesQuantity(hf) {
					if n, ok := fits(hf, k, fields[start:]); ok {
						hdr, names, k = i, hf[:min(n, len(hf))], n
					}
				}
			}
			break
		}
	}
	rd.ncol = k
	above := start
	if hdr >= 0 {
		above = hdr
	}
	for i := range above {
		if text(i) {
			d.Preamble++
		}
	}
	if hdr >= 0 {
		d.HeaderLine = win[hdr].num
	}
	d.Delimiter = rune(rd.delim)

	// What the cells in each column look like.
	stats := make([]colStats, k)
	for i := start; i < len(win); i++ {
		f := fields[i]
		if len(f) < k || !allEmpty(f[k:]) {
			continue
		}
		for j := range k {
			stats[j].add(f[j])
		}
	}
	rd.cols = make([]Column, k)
	for j := range rd.cols {
		c := &rd.cols[j]
		c.Index = j + 1
		if names != nil {
			c.Name, c.Unit = splitNameUnit(names[j])
		}
		if c.Name == "" {
			c.Name = "column " + strconv.Itoa(j+1)
		}
	}
	if err := rd.roles(names, stats, win[first].num); err != nil {
		return 0, err
	}
	if err := rd.units(stats, win[first].num); err != nil {
		return 0, err
	}
	rd.log.Columns = rd.cols
	rd.meta(win[:start], hdr)
	return start, nil
}

// namesQuantity reports whether some cell names time or temperature, by
// name or unit; a comment must do so to be taken for the header.
func namesQuantity(h []string) bool {
	for _, s := range h {
		name, unit := splitNameUnit(s)
		if isTimeName(name) || isTemperatureName(name) || timeUnit(unit) != "" || temperatureUnit(unit) != "" {
			return true
		}
	}
	return false
}

// fits reports whether header fields h match data lines of k fields, and
// the width to use. A header may be narrower than the data when the data
// lines end with delimiters that the header lacks.
func fits(h []string, k int, data [][]string) (int, bool) {
	n := len(h)
	for n > 0 && h[n-1] == "" {
		n--
	}
	if n == k || (n < k && len(h) >= k) {
		return k, true
	}
	if n > k || n < 2 {
		return 0, false
	}
	for _, f := range data {
		if len(f) == k && !allEmpty(f[n:]) {
			return 0, false
		}
	}
	return n, true
}

// colStats counts the kinds of cell in a column of the buffered data.
type colStats struct {
	kinds        [cellText + 1]int
	point, comma int // numbers written with a decimal point, a decimal comma
}

func (s *colStats) add(cell string) {
	k, mark := kindOf(cell)
	s.kinds[k]++
	switch mark {
	case '.':
		s.point++
	case ',':
		s.comma++
	}
}

// numeric reports whether the column holds numbers (or nothing) only.
func (s *colStats) numeric() bool {
	return s.kinds[cellClock2]+s.kinds[cellClock3]+s.kinds[cellTimestamp]+s.kinds[cellText] == 0
}

// mostly returns the commonest kind of filled cell.
func (s *colStats) mostly() cellKind {
	best := cellBlank
	for k := cellNumber; k <= cellText; k++ {
		if s.kinds[k] > s.kinds[best] || (best == cellBlank && s.kinds[k] > 0) {
			best = k
		}
	}
	return best
}

// roles picks the time and temperature columns: as the options say, else
// by unit, else by name, else by content; the rest are extra (numeric) or
// ignored.
func (rd *reader) roles(names []string, stats []colStats, firstLine int) error {
	line := rd.log.Dialect.HeaderLine
	rd.timeAt, rd.tempAt = -1, -1
	var err error
	if rd.opt.TimeColumn != "" {
		if rd.timeAt, err = rd.pick(rd.opt.TimeColumn, "time", names); err != nil {
			return err
		}
	}
	if rd.opt.TemperatureColumn != "" {
		if rd.tempAt, err = rd.pick(rd.opt.TemperatureColumn, "temperature", names); err != nil {
			return err
		}
	}
	if rd.timeAt >= 0 && rd.timeAt == rd.tempAt {
		return rd.errf(line, rd.timeAt+1, "time and temperature are both column %d", rd.timeAt+1)
	}
	isTime := func(c Column) bool {
		return timeUnit(c.Unit) != "" ||
			(temperatureUnit(c.Unit) == "" && isTimeName(c.Name) && !isTemperatureName(c.Name))
	}
	isTemp := func(c Column) bool {
		return temperatureUnit(c.Unit) != "" ||
			(timeUnit(c.Unit) == "" && isTemperatureName(c.Name) && !isTimeName(c.Name))
	}
	if names != nil {
		if rd.timeAt < 0 {
			rd.timeAt = rd.choose(isTime, rd.tempAt, "time")
		}
		if rd.tempAt < 0 {
			rd.tempAt = rd.choose(isTemp, rd.timeAt, "temperature")
		}
	}
	if names == nil {
		line = firstLine
	}
	if rd.timeAt < 0 {
		for j := range stats {
			if k := stats[j].mostly(); j != rd.tempAt && (k == cellClock2 || k == cellClock3 || k == cellTimestamp) {
				rd.timeAt = j
				break
			}
		}
		if rd.timeAt < 0 {
			rd.timeAt = firstNumeric(stats, rd.tempAt)
		}
		if rd.timeAt < 0 {
			return rd.errf(line, 0, "no time column: none is named as time or holds times")
		}
		if names != nil {
			rd.warnf(line, "no column is named as time: using column %d %q", rd.timeAt+1, rd.cols[rd.timeAt].Name)
		}
	}
	if rd.tempAt < 0 {
		rd.tempAt = firstNumeric(stats, rd.timeAt)
		if rd.tempAt < 0 {
			return rd.errf(line, 0, "no temperature column: none is named as temperature and no other holds numbers")
		}
		if names != nil {
			rd.warnf(line, "no column is named as temperature: using column %d %q", rd.tempAt+1, rd.cols[rd.tempAt].Name)
		}
	}
	used := map[string]bool{}
	for j := range rd.cols {
		c := &rd.cols[j]
		switch {
		case j == rd.timeAt:
			c.Role = "time"
		case j == rd.tempAt:
			c.Role = "temperature"
		case !stats[j].numeric() || (stats[j].kinds[cellNumber] == 0 && (names == nil || strings.TrimSpace(names[j]) == "")):
			c.Role = "ignored"
		default:
			c.Role = "extra"
			name := c.Name
			if used[name] {
				name = fmt.Sprintf("%s (column %d)", name, j+1)
			}
			used[name] = true
			c.Name = name
			rd.extra = append(rd.extra, j)
		}
	}
	rd.xvals = make([][]float64, len(rd.extra))
	rd.xrow = make([]float64, len(rd.extra))
	return nil
}

// choose returns the first column for which is holds, other than skip,
// warning when there are several; -1 when there is none.
func (rd *reader) choose(is func(Column) bool, skip int, what string) int {
	var found []int
	for j, c := range rd.cols {
		if j != skip && is(c) {
			found = append(found, j)
		}
	}
	if len(found) == 0 {
		return -1
	}
	if len(found) > 1 {
		var list []string
		for _, j := range found {
			list = append(list, fmt.Sprintf("%d %q", j+1, rd.cols[j].Name))
		}
		last := len(list) - 1
		rd.warnf(rd.log.Dialect.HeaderLine, "columns %s and %s each name %s: using column %d",
			strings.Join(list[:last], ", "), list[last], what, found[0]+1)
	}
	return found[0]
}

func firstNumeric(stats []colStats, skip int) int {
	for j := range stats {
		if j != skip && stats[j].numeric() && stats[j].kinds[cellNumber] > 0 {
			return j
		}
	}
	return -1
}

// pick finds the column an option names, by header text, name or number.
func (rd *reader) pick(spec, what string, names []string) (int, error) {
	spec = strings.TrimSpace(spec)
	for j, c := range rd.cols {
		if strings.EqualFold(spec, c.Name) || (names != nil && strings.EqualFold(spec, strings.TrimSpace(names[j]))) {
			return j, nil
		}
	}
	if n, err := strconv.Atoi(spec); err == nil {
		if n < 1 || n > len(rd.cols) {
			return 0, rd.errf(rd.log.Dialect.HeaderLine, 0, "%s column %d: the data lines have %d columns", what, n, len(rd.cols))
		}
		return n - 1, nil
	}
	var list []string
	for _, c := range rd.cols {
		list = append(list, strconv.Quote(c.Name))
	}
	return 0, rd.errf(rd.log.Dialect.HeaderLine, 0, "no %s column %q: the columns are %s", what, spec, strings.Join(list, ", "))
}

// units settles the time unit, the temperature unit and the decimal mark.
func (rd *reader) units(stats []colStats, firstLine int) error {
	d := &rd.log.Dialect
	line := d.HeaderLine
	tc := rd.cols[rd.timeAt]
	given, header := timeUnit(rd.opt.TimeUnit), timeUnit(tc.Unit)
	content := ""
	switch stats[rd.timeAt].mostly() {
	case cellTimestamp:
		content = "iso8601"
	case cellClock3:
		content = "hh:mm:ss"
	case cellClock2:
		content = "mm:ss"
	}
	switch {
	case given != "":
		rd.timeUnit = given
		if header != "" && header != given {
			rd.warnf(line, "time unit %s given overrides %s in the header", given, header)
		}
	case header != "":
		rd.timeUnit = header
	case content != "":
		rd.timeUnit = content
	case tc.Unit != "":
		return rd.errf(line, rd.timeAt+1, "column %d %q: time unit %q is not s, min, h, ms, mm:ss, hh:mm:ss or iso8601", rd.timeAt+1, tc.Name, tc.Unit)
	default:
		rd.timeUnit = "s"
		if line > 0 {
			rd.warnf(line, "column %d %q: no time unit given: assuming seconds", rd.timeAt+1, tc.Name)
		}
	}
	d.TimeUnit = rd.timeUnit
	switch rd.timeUnit {
	case "iso8601":
		d.TimeBase = "timestamp"
	case "hh:mm:ss", "hh:mm":
		d.TimeBase = "clock"
	default:
		d.TimeBase = "elapsed"
	}
	rd.factor = map[string]float64{"s": 1, "min": 60, "h": 3600, "ms": 1e-3, "mm:ss": 1}[rd.timeUnit]

	Tc := rd.cols[rd.tempAt]
	tgiven, theader := temperatureUnit(rd.opt.TemperatureUnit), temperatureUnit(Tc.Unit)
	switch {
	case tgiven != "":
		rd.tempUnit = tgiven
		if theader != "" && theader != tgiven {
			rd.warnf(line, "temperature unit %s given overrides %s in the header", unitSymbol(tgiven), unitSymbol(theader))
		}
	case theader != "":
		rd.tempUnit = theader
	case Tc.Unit != "":
		return rd.errf(line, rd.tempAt+1, "column %d %q: temperature unit %q is not °C, K or °F", rd.tempAt+1, Tc.Name, Tc.Unit)
	default:
		rd.tempUnit = "C"
		if line > 0 {
			rd.warnf(line, "column %d %q: no temperature unit given: assuming °C", rd.tempAt+1, Tc.Name)
		}
	}
	d.TemperatureUnit = rd.tempUnit
	if line == 0 {
		rd.warnf(firstLine, "no header line: taking column %d as time in %s and column %d as temperature in %s",
			rd.timeAt+1, unitWords[rd.timeUnit], rd.tempAt+1, unitSymbol(rd.tempUnit))
	}

	switch {
	case rd.opt.Decimal != 0:
		rd.dec = byte(rd.opt.Decimal)
	case rd.delim == ',':
		rd.dec = '.'
	default:
		points, commas := 0, 0
		for j := range stats {
			if rd.cols[j].Role == "ignored" {
				continue
			}
			points += stats[j].point
			commas += stats[j].comma
		}
		switch {
		case commas > points:
			rd.dec = ','
		case points > commas:
			rd.dec = '.'
		} // as many of each (or none): the first number with a mark decides
	}
	return nil
}

// unitWords names the time units in prose.
var unitWords = map[string]string{
	"s": "seconds", "min": "minutes", "h": "hours", "ms": "milliseconds",
	"mm:ss": "mm:ss", "hh:mm:ss": "hh:mm:ss", "hh:mm": "hh:mm", "iso8601": "ISO 8601 timestamps",
}

// meta collects "# key: value" comment lines above the data.
func (rd *reader) meta(win []winLine, hdr int) {
	l := rd.log
	for i, ln := range win {
		if i == hdr || !isComment(ln.text) {
			continue
		}
		key, value, ok := parseMeta(strings.TrimLeft(strings.TrimLeft(ln.text, " \t"), "#"))
		if !ok {
			continue
		}
		if at, dup := l.MetaLine[key]; dup {
			rd.warnf(ln.num, "metadata %q given again: keeping the value from line %d", key, at)
			continue
		}
		l.Meta[key] = value
		l.MetaLine[key] = ln.num
	}
}

// parseMeta reads "key: value". A key starts with a letter and holds
// letters, digits, blanks, '_', '-' and '.'; it is returned in lower case
// with '_' and runs of blanks as '-' (so "Sample mass" and "sample_mass"
// both give "sample-mass").
func parseMeta(s string) (key, value string, ok bool) {
	s = strings.TrimSpace(s)
	i := strings.IndexByte(s, ':')
	if i <= 0 || i > 40 {
		return "", "", false
	}
	k := strings.TrimSpace(s[:i])
	for j, r := range k {
		if j == 0 && !unicode.IsLetter(r) {
			return "", "", false
		}
		if !unicode.IsLetter(r) && !unicode.IsDigit(r) && !strings.ContainsRune(" _-.", r) {
			return "", "", false
		}
	}
	k = strings.Join(strings.FieldsFunc(strings.ToLower(k), func(r rune) bool { return r == ' ' || r == '_' || r == '\t' }), "-")
	return k, strings.TrimSpace(s[i+1:]), true
}
