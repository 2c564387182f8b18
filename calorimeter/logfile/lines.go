package logfile

import (
	"bytes"
	"encoding/binary"
	"io"
	"strings"
	"unicode/utf16"
	"unicode/utf8"
)

// lineEnds splits a stream into lines ended by LF, CRLF or a lone CR (old
// Macintosh exports) and remembers how the first line ended.
type lineEnds struct {
	seen bool
	crlf bool
}

func (e *lineEnds) split(data []byte, atEOF bool) (int, []byte, error) {
	if len(data) == 0 {
		return 0, nil, nil
	}
	lf := bytes.IndexByte(data, '\n')
	end := len(data)
	if lf >= 0 {
		end = lf
	}
	cr := bytes.IndexByte(data[:end], '\r')
	switch {
	case lf > 0 && cr == lf-1:
		e.note(true)
		return lf + 1, data[:cr], nil
	case cr >= 0 && cr < len(data)-1:
		e.note(false)
		return cr + 1, data[:cr], nil
	case lf >= 0:
		e.note(false)
		return lf + 1, data[:lf], nil
	case !atEOF:
		return 0, nil, nil // a CR at the end may be the first half of CRLF
	case cr >= 0:
		e.note(false)
		return len(data), data[:cr], nil
	}
	return len(data), data, nil
}

func (e *lineEnds) note(crlf bool) {
	if !e.seen {
		e.seen, e.crlf = true, crlf
	}
}

// isBlanks reports whether s holds only spaces and tabs.
func isBlanks(s string) bool {
	return strings.TrimLeft(s, " \t") == ""
}

// isComment reports whether s is a '#' comment line (leading blanks allowed).
func isComment(s string) bool {
	s = strings.TrimLeft(s, " \t")
	return s != "" && s[0] == '#'
}

// isText reports whether s is a line of text: not blank, not a comment.
func isText(s string) bool { return !isBlanks(s) && !isComment(s) }

// splitFields splits a line at the delimiter d, appending the fields to
// dst[:0]. A space delimiter means runs of spaces and tabs. Blanks around a
// field are trimmed and a field in double quotes ("" inside for a quote) is
// taken as written. bad is the 1-based number of a field whose quotes do
// not close or are followed by text; it is 0 when the line is well formed.
func splitFields(dst []string, s string, d byte) (fields []string, bad int) {
	dst = dst[:0]
	if d == ' ' {
		return splitBlanks(dst, s)
	}
	if strings.IndexByte(s, '"') < 0 {
		for {
			i := strings.IndexByte(s, d)
			if i < 0 {
				return append(dst, trimBlanks(s, d)), 0
			}
			dst = append(dst, trimBlanks(s[:i], d))
			s = s[i+1:]
		}
	}
	for {
		s = trimLeftBlanks(s, d)
		if s != "" && s[0] == '"' {
			f, rest, ok := unquote(s)
			if !ok {
				return dst, len(dst) + 1
			}
			rest = trimLeftBlanks(rest, d)
			dst = append(dst, f)
			if rest == "" {
				return dst, 0
			}
			if rest[0] != d {
				return dst, len(dst)
			}
			s = rest[1:]
			continue
		}
		i := strings.IndexByte(s, d)
		if i < 0 {
			return append(dst, trimBlanks(s, d)), 0
		}
		dst = append(dst, trimBlanks(s[:i], d))
		s = s[i+1:]
	}
}

// splitBlanks splits at runs of spaces and tabs. A date token followed by a
// time-of-day token (2026-03-04 10:15:02) is kept as one field, so that ISO
// 8601 timestamps written with a space survive.
func splitBlanks(dst []string, s string) ([]string, int) {
	for {
		s = strings.TrimLeft(s, " \t")
		if s == "" {
			break
		}
		if s[0] == '"' {
			f, rest, ok := unquote(s)
			if !ok || (rest != "" && rest[0] != ' ' && rest[0] != '\t') {
				return dst, len(dst) + 1
			}
			dst = append(dst, f)
			s = rest
			continue
		}
		i := strings.IndexAny(s, " \t")
		if i < 0 {
			i = len(s)
		}
		tok := s[:i]
		s = s[i:]
		if isDate(tok) {
			rest := strings.TrimLeft(s, " \t")
			if rest != "" && isDigit(rest[0]) {
				j := strings.IndexAny(rest, " \t")
				if j < 0 {
					j = len(rest)
				}
				if strings.IndexByte(rest[:j], ':') > 0 {
					tok += " " + rest[:j]
					s = rest[j:]
				}
			}
		}
		dst = append(dst, tok)
	}
	return dst, 0
}

// isDate reports whether s looks like an ISO 8601 calendar date.
func isDate(s string) bool {
	return len(s) == 10 && s[4] == '-' && s[7] == '-' &&
		allDigits(s[:4]) && allDigits(s[5:7]) && allDigits(s[8:])
}

// unquote reads a double-quoted field at the start of s and returns its
// text and what follows the closing quote.
func unquote(s string) (field, rest string, ok bool) {
	var b []byte
	start := 1
	for j := 1; ; {
		k := strings.IndexByte(s[j:], '"')
		if k < 0 {
			return "", "", false
		}
		j += k
		if j+1 < len(s) && s[j+1] == '"' {
			b = append(b, s[start:j+1]...)
			j += 2
			start = j
			continue
		}
		if b == nil {
			return s[start:j], s[j+1:], true
		}
		return string(append(b, s[start:j]...)), s[j+1:], true
	}
}

// trimBlanks trims spaces, and tabs unless the tab is the delimiter.
func trimBlanks(s string, d byte) string {
	if d == '\t' {
		return strings.Trim(s, " ")
	}
	return strings.Trim(s, " \t")
}

func trimLeftBlanks(s string, d byte) string {
	if d == '\t' {
		return strings.TrimLeft(s, " ")
	}
	return strings.TrimLeft(s, " \t")
}

// allEmpty reports whether every field is empty.
func allEmpty(f []string) bool {
	for _, s := range f {
		if s != "" {
			return false
		}
	}
	return true
}

// latin1 decodes text that is not valid UTF-8 as ISO 8859-1, where the
// degree sign is the single byte 0xB0. It reports whether it changed s.
func latin1(s string) (string, bool) {
	if utf8.ValidString(s) {
		return s, false
	}
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		b.WriteRune(rune(s[i]))
	}
	return b.String(), true
}

// utf16Reader turns UTF-16 text (after its byte order mark) into UTF-8, as
// spreadsheets write when asked for "Unicode text".
type utf16Reader struct {
	src   io.Reader
	order binary.ByteOrder
	raw   [4096]byte
	nraw  int
	buf   []byte
	out   []byte
	err   error
}

func (u *utf16Reader) Read(p []byte) (int, error) {
	for len(u.out) == 0 {
		if u.err != nil {
			return 0, u.err
		}
		n, err := u.src.Read(u.raw[u.nraw:])
		u.nraw += n
		if err != nil {
			u.err = err
		}
		u.decode(err != nil)
	}
	n := copy(p, u.out)
	u.out = u.out[n:]
	return n, nil
}

// decode converts the whole code units held in raw, keeping a trailing
// half (an odd byte or a lone high surrogate) for the next read unless
// final.
func (u *utf16Reader) decode(final bool) {
	u.buf = u.buf[:0]
	i := 0
	for i+1 < u.nraw {
		c := rune(u.order.Uint16(u.raw[i:]))
		if c >= 0xD800 && c < 0xDC00 { // high surrogate
			if i+3 >= u.nraw {
				if !final {
					break
				}
				u.buf = utf8.AppendRune(u.buf, utf8.RuneError)
				i += 2
				continue
			}
			r := utf16.DecodeRune(c, rune(u.order.Uint16(u.raw[i+2:])))
			if r == utf8.RuneError {
				u.buf = utf8.AppendRune(u.buf, r)
				i += 2
				continue
			}
			u.buf = utf8.AppendRune(u.buf, r)
			i += 4
			continue
		}
		if c >= 0xDC00 && c < 0xE000 { // low surrogate alone
			c = utf8.RuneError
		}
		u.buf = utf8.AppendRune(u.buf, c)
		i += 2
	}
	if final && i < u.nraw {
		u.buf = utf8.AppendRune(u.buf, utf8.RuneError)
		i = u.nraw
	}
	u.nraw = copy(u.raw[:], u.raw[i:u.nraw])
	u.out = u.buf
}
