package ledger

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"
)

// Reasons a ledger file or a new row is refused, as VerifyError.Reason and
// RowError.Reason.
const (
	ReasonWrongHeader       = "wrong header"
	ReasonTornTail          = "torn tail"
	ReasonUnparseableRow    = "unparseable row"
	ReasonUnparseableCell   = "unparseable cell"
	ReasonBadHash           = "bad hash"
	ReasonBrokenChain       = "broken chain"
	ReasonDuplicateRunID    = "duplicate run_id"
	ReasonUnknownSupersedes = "unknown supersedes"
	ReasonStaleSupersedes   = "stale supersedes"
	ReasonInvalidCell       = "invalid cell" // RowError only: a value the file cannot hold
)

// VerifyError is the first problem Read or Verify found in a ledger file, and
// the parse error of this package.
type VerifyError struct {
	Name   string // file name given to Read or Verify, or the path given to Append
	Line   int    // 1-based line of the file
	Column string // header name of the cell at fault, or ""
	Reason string // one of the Reason… constants
	Detail string // what is wrong, in words
}

// Error returns "NAME:LINE: REASON (COLUMN): DETAIL", for example
//
//	ledger.csv:51: bad hash: row_hash does not match the row's contents
func (e *VerifyError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s:%d: %s", e.Name, e.Line, e.Reason)
	if e.Column != "" {
		fmt.Fprintf(&b, " (%s)", e.Column)
	}
	if e.Detail != "" {
		b.WriteString(": ")
		b.WriteString(e.Detail)
	}
	return b.String()
}

// Report sums up what Verify found: the whole ledger when it is intact, the
// rows before the first problem when not.
type Report struct {
	Rows int // rows after the header

	// LastHash is the row_hash of the last row (the SHA-256 of the header
	// line when there is no row): the prev_hash the next row will carry.
	// Kept outside the file, it lets a later Verify show that no whole
	// rows were cut from the end.
	LastHash string

	// Superseded maps the row_hash of every replaced row to the run_id of
	// the row that replaced it (see Append for the rule).
	Superseded map[string]string
}

// Verify reads a whole ledger and checks, line by line: the header; that
// every row parses; that each row's row_hash matches its contents; that its
// prev_hash is the row_hash of the row before (the header's hash for the
// first row); the run_id and supersedes rules of Append; and that the file
// ends with a line end. It returns the first problem as a *VerifyError; name
// is used in messages only. On a problem the Report describes the rows
// before the faulty line.
func Verify(r io.Reader, name string) (*Report, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("read ledger %s: %w", name, err)
	}
	prev := genesisHash
	prevLine := 1
	var ix runIndex
	rep := &Report{}
	verr := scan(data, name, func(row Row, body []byte) *VerifyError {
		if rowHash(row.PrevHash, body) != row.Hash {
			return &VerifyError{Name: name, Line: row.Line, Reason: ReasonBadHash,
				Detail: "row_hash does not match the row's contents"}
		}
		if row.PrevHash != prev {
			of := fmt.Sprintf("the row_hash of line %d", prevLine)
			if prevLine == 1 {
				of = "the hash of the header line"
			}
			return &VerifyError{Name: name, Line: row.Line, Column: header[colPrevHash], Reason: ReasonBrokenChain,
				Detail: fmt.Sprintf("prev_hash %.12s… is not %s (%.12s…): a row before it was removed, inserted or changed", row.PrevHash, of, prev)}
		}
		if reason, detail := ix.check(row); reason != "" {
			return &VerifyError{Name: name, Line: row.Line, Reason: reason, Detail: detail}
		}
		ix.add(row)
		prev, prevLine = row.Hash, row.Line
		rep.Rows++
		return nil
	})
	rep.LastHash = prev
	rep.Superseded = ix.superseded()
	if verr != nil {
		return rep, verr
	}
	return rep, nil
}

// Read parses every row of a ledger without checking hashes, the chain or
// the run_id rules (Verify does). Errors are *VerifyError: a wrong header, a
// row or cell that does not parse, or a torn tail. On an error the rows
// before the faulty line are returned with it, so that a reader can still
// show them.
func Read(r io.Reader, name string) ([]Row, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("read ledger %s: %w", name, err)
	}
	var rows []Row
	verr := scan(data, name, func(row Row, _ []byte) *VerifyError {
		rows = append(rows, row)
		return nil
	})
	if verr != nil {
		return rows, verr
	}
	return rows, nil
}

// Superseded computes Report.Superseded from rows in file order (as Read
// returns them), without checking the rules: the row_hash of every replaced
// row maps to the run_id of the row that replaced it.
func Superseded(rows []Row) map[string]string {
	var ix runIndex
	for _, r := range rows {
		ix.add(r)
	}
	return ix.superseded()
}

// scan checks the header of data and parses every whole row after it,
// calling fn with the row and the bytes its hash covers. It stops at the
// first problem, from scan or from fn.
func scan(data []byte, name string, fn func(row Row, body []byte) *VerifyError) *VerifyError {
	fail := func(line int, col int, reason, detail string) *VerifyError {
		e := &VerifyError{Name: name, Line: line, Reason: reason, Detail: detail}
		if col >= 0 && col < numColumns {
			e.Column = header[col]
		}
		return e
	}
	if len(data) == 0 {
		return fail(1, -1, ReasonWrongHeader, "the file is empty; a ledger starts with its header line")
	}
	line, rest, whole := bytes.Cut(data, []byte{'\n'})
	if !whole && strings.HasPrefix(headerLine, string(line)) {
		return fail(1, -1, ReasonTornTail, "the header line has no line end: the file was cut short")
	}
	if string(line) != headerLine {
		return fail(1, -1, ReasonWrongHeader, headerDiff(line))
	}
	for n := 2; len(rest) > 0; n++ {
		line, rest, whole = bytes.Cut(rest, []byte{'\n'})
		if !whole {
			return fail(n, -1, ReasonTornTail, "the last line has no line end: the file was cut short or a write was interrupted")
		}
		row, body, col, reason, detail := parseRow(line)
		if reason != "" {
			return fail(n, col, reason, detail)
		}
		row.Line = n
		if e := fn(row, body); e != nil {
			return e
		}
	}
	return nil
}

// headerDiff says how a first line differs from the header.
func headerDiff(line []byte) string {
	if bytes.HasPrefix(line, []byte("\xef\xbb\xbf")) {
		return "the file starts with a byte-order mark; a ledger starts with its header line"
	}
	if bytes.HasSuffix(line, []byte{'\r'}) {
		return "the header ends with a carriage return (CRLF line ends); a ledger uses LF line ends"
	}
	cells, serr := splitCSV(line)
	if serr != nil {
		return "the first line is not a ledger header: " + serr.why
	}
	for i, want := range header {
		if i >= len(cells) {
			return fmt.Sprintf("has %d columns, want %d: column %d %q is missing", len(cells), numColumns, i+1, want)
		}
		if cells[i] != want {
			return fmt.Sprintf("column %d is %q, want %q", i+1, clip(cells[i]), want)
		}
	}
	if len(cells) > numColumns {
		return fmt.Sprintf("has %d columns, want %d: column %d %q is extra", len(cells), numColumns, numColumns+1, clip(cells[numColumns]))
	}
	return "header cells are quoted; want the plain line " + strconv.Quote(headerLine)
}

// parseRow decodes one line of a ledger (without its line end). On a
// problem reason is set, with the column at fault (-1 for the whole line).
// body is the part of the line the row hash covers: everything before the
// comma that precedes row_hash.
func parseRow(line []byte) (row Row, body []byte, col int, reason, detail string) {
	switch {
	case len(line) == 0:
		return row, nil, -1, ReasonUnparseableRow, "the line is blank"
	case line[len(line)-1] == '\r':
		return row, nil, -1, ReasonUnparseableRow, "the line ends with a carriage return (CRLF line ends); a ledger uses LF line ends"
	case !utf8.Valid(line):
		return row, nil, -1, ReasonUnparseableRow, "the line is not valid UTF-8"
	}
	cells, serr := splitCSV(line)
	if serr != nil {
		return row, nil, serr.cell, ReasonUnparseableRow, serr.why
	}
	if len(cells) != numColumns {
		return row, nil, -1, ReasonUnparseableRow, fmt.Sprintf("has %d cells, want %d", len(cells), numColumns)
	}
	bad := func(col int, format string, a ...any) (Row, []byte, int, string, string) {
		return Row{}, nil, col, ReasonUnparseableCell, fmt.Sprintf(format, a...)
	}

	if c := cells[colVersion]; c != strconv.Itoa(Version) {
		return bad(colVersion, "%q, want %d: the row was not written by this ledger version", clip(c), Version)
	}
	c := cells[colRecordedAt]
	t, err := time.Parse(time.RFC3339Nano, c)
	if err != nil || !strings.HasSuffix(c, "Z") {
		return bad(colRecordedAt, "%q is not an RFC 3339 UTC time such as 2006-01-02T15:04:05.5Z", clip(c))
	}
	row.RecordedAt = t.UTC()
	if c := cells[colMeasuredAt]; c != "" {
		t, err := time.Parse(time.RFC3339Nano, c)
		if err != nil || !strings.HasSuffix(c, "Z") {
			return bad(colMeasuredAt, "%q is not empty or an RFC 3339 UTC time such as 2006-01-02T15:04:05.5Z", clip(c))
		}
		row.MeasuredAt = t.UTC()
	}
	for _, col := range textColumns {
		c := cells[col]
		s := UnsafeCell(c)
		if SafeCell(s) != c {
			if s == c {
				return bad(col, "%q starts with %q, which a spreadsheet runs as a formula, and is not neutralised", clip(c), c[:1])
			}
			return bad(col, "%q has a leading apostrophe the ledger did not write", clip(c))
		}
		*row.textField(col) = s
	}
	for _, f := range row.numberCells() {
		c := cells[f.col]
		if c == "" {
			*f.v = math.NaN()
			continue
		}
		x, err := strconv.ParseFloat(c, 64)
		if err != nil || !isPlainNumber(c) || math.IsInf(x, 0) {
			return bad(f.col, "%q is not a finite decimal number", clip(c))
		}
		*f.v = x
	}
	for _, col := range []int{colPrevHash, colRowHash} {
		if c := cells[col]; !isHash(c) {
			return bad(col, "%q is not 64 lower-case hexadecimal digits", clip(c))
		}
	}
	row.PrevHash, row.Hash = cells[colPrevHash], cells[colRowHash]
	if col, why := row.check(); col >= 0 {
		return bad(col, "%s", why)
	}
	tail := "," + row.Hash
	if !bytes.HasSuffix(line, []byte(tail)) {
		return bad(colRowHash, "is quoted; the ledger writes hashes unquoted")
	}
	return row, line[:len(line)-len(tail)], -1, "", ""
}

// clip shortens a cell quoted in a message to 40 characters.
func clip(s string) string {
	if r := []rune(s); len(r) > 40 {
		return string(r[:40]) + "…"
	}
	return s
}

// runIndex applies the run_id and supersedes rules (see Append) to rows in
// file order.
type runIndex struct {
	newest map[string]int // run_id → index in rows of its newest row
	rows   []indexedRow
}

type indexedRow struct {
	runID, hash string
	line        int
	replacedBy  string // run_id of the row that replaced this one, or ""
}

// check reports whether r may follow the rows added so far; reason is ""
// when it may.
func (ix *runIndex) check(r Row) (reason, detail string) {
	if r.Supersedes != "" {
		i, ok := ix.newest[r.Supersedes]
		if !ok {
			return ReasonUnknownSupersedes, fmt.Sprintf("supersedes %q, which is not in the ledger", r.Supersedes)
		}
		if by := ix.rows[i].replacedBy; by != "" {
			return ReasonStaleSupersedes, fmt.Sprintf("supersedes %q, which was already replaced by %q; a further correction supersedes %q",
				r.Supersedes, by, by)
		}
		if r.RunID == r.Supersedes {
			return "", ""
		}
	}
	if i, ok := ix.newest[r.RunID]; ok {
		return ReasonDuplicateRunID, fmt.Sprintf("run %q is already recorded on line %d; a correction names it in supersedes",
			r.RunID, ix.rows[i].line)
	}
	return "", ""
}

// add records r, which follows the rows added so far.
func (ix *runIndex) add(r Row) {
	if ix.newest == nil {
		ix.newest = make(map[string]int)
	}
	if r.Supersedes != "" {
		if i, ok := ix.newest[r.Supersedes]; ok && ix.rows[i].replacedBy == "" {
			ix.rows[i].replacedBy = r.RunID
		}
	}
	ix.newest[r.RunID] = len(ix.rows)
	ix.rows = append(ix.rows, indexedRow{runID: r.RunID, hash: r.Hash, line: r.Line})
}

// superseded returns the row_hash → replacing run_id map of Report.
func (ix *runIndex) superseded() map[string]string {
	m := make(map[string]string)
	for _, r := range ix.rows {
		if r.replacedBy != "" {
			m[r.hash] = r.replacedBy
		}
	}
	return m
}
