package ledger

// SafeCell returns s in a form that a spreadsheet shows as text instead of
// running it as a formula. A cell is dangerous when its first character is
// one of
//
//	=  +  -  @  tab  carriage return
//
// (the characters the OWASP "CSV Injection" page lists), unless the whole cell
// is a plain number: an optional minus sign, digits with an optional decimal
// point, and an optional exponent, the form strconv.FormatFloat writes
// ("-1.5", "-1.5e3", "2e-07"). A leading plus sign is not exempt, since a
// spreadsheet turns "+1" into the formula =+1.
//
// SafeCell prefixes a dangerous cell with one apostrophe ('), and it escapes a
// cell that itself begins with an apostrophe with a second one, so that
// UnsafeCell can undo it exactly:
//
//	"=SUM(A1)" → "'=SUM(A1)"     "'quoted" → "''quoted"
//	"-1.5"     → "-1.5"          "note"    → "note"
func SafeCell(s string) string {
	if s == "" {
		return s
	}
	switch s[0] {
	case '\'':
		return "'" + s
	case '=', '+', '-', '@', '\t', '\r':
		if isPlainNumber(s) {
			return s
		}
		return "'" + s
	}
	return s
}

// UnsafeCell reverses SafeCell: it removes one leading apostrophe, if there is
// one. UnsafeCell(SafeCell(s)) == s for every s.
func UnsafeCell(s string) string {
	if len(s) > 0 && s[0] == '\'' {
		return s[1:]
	}
	return s
}

// isPlainNumber reports whether s is
//
//	-? ( digits [ . digits? ] | . digits ) ( [eE] [+-]? digits )?
//
// which covers every finite number strconv.FormatFloat(x, 'g', -1, 64)
// writes, and nothing a spreadsheet would read as a formula.
func isPlainNumber(s string) bool {
	i := 0
	if i < len(s) && s[i] == '-' {
		i++
	}
	intDigits := digitsAt(s, i)
	i += intDigits
	fracDigits := 0
	if i < len(s) && s[i] == '.' {
		i++
		fracDigits = digitsAt(s, i)
		i += fracDigits
	}
	if intDigits == 0 && fracDigits == 0 {
		return false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		n := digitsAt(s, i)
		if n == 0 {
			return false
		}
		i += n
	}
	return i == len(s)
}

// digitsAt counts the ASCII digits of s starting at i.
func digitsAt(s string, i int) int {
	n := 0
	for i+n < len(s) && '0' <= s[i+n] && s[i+n] <= '9' {
		n++
	}
	return n
}
