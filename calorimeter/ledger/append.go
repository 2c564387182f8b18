package ledger

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"sync"
	"time"

	"github.com/gofrs/flock"
)

// RowError is a row that Append refused; nothing was written.
type RowError struct {
	Index  int    // 0-based position of the row among Append's arguments
	RunID  string // the row's run_id
	Column string // header name of the cell at fault, or ""
	Reason string // ReasonInvalidCell, ReasonDuplicateRunID, ReasonUnknownSupersedes or ReasonStaleSupersedes
	Detail string
}

// Error returns `run "RUN": REASON (COLUMN): DETAIL`.
func (e *RowError) Error() string {
	who := fmt.Sprintf("run %q", e.RunID)
	if e.RunID == "" {
		who = fmt.Sprintf("row %d", e.Index+1)
	}
	s := who + ": " + e.Reason
	if e.Column != "" {
		s += " (" + e.Column + ")"
	}
	return s + ": " + e.Detail
}

// appendMu serialises Append calls within one process; the file lock does
// the same between processes (and, with flock(2), between goroutines too,
// but not with the fcntl locks some systems use instead).
var appendMu sync.Mutex

// Append appends rows to the ledger at path and returns them as written:
// RecordedAt set (a zero RecordedAt becomes the time of the call, UTC),
// MeasuredAt in UTC (a zero MeasuredAt stays zero: not known), PrevHash,
// Hash and Line filled in.
//
// Append holds an exclusive lock on the file path+".lock" (created beside
// the ledger and left there) while it reads the ledger and writes. It
// creates the ledger with its header when the file is absent or empty.
// Before writing it checks, and refuses with an error, when:
//   - the header differs from Header (*VerifyError naming the difference);
//   - the last line has no line end, a torn tail (*VerifyError; the message
//     points to `calred ledger verify`);
//   - a row in the file does not parse (*VerifyError);
//   - a new row breaks the rules below or holds a value the file cannot
//     (a line break, an infinite number, an unknown kind or status, a
//     year outside 0 to 9999):
//     *RowError.
//
// Append does not recompute the hashes of the rows already there; Verify
// does. The rules for run_id and supersedes, applied to the new rows in
// order after the existing ones:
//   - a run_id appears once, except for corrections;
//   - a correction names in supersedes the run_id it replaces; that run_id
//     must be in the ledger and must not have been replaced by a row of
//     another run_id (a further correction supersedes the replacing run);
//   - a correction may keep the run_id it replaces (supersedes == run_id)
//     or take a new one that is not yet in the ledger.
//
// The replaced row is the newest row of the superseded run_id. Nothing is
// ever rewritten: the old row stays, and Report.Superseded marks it.
//
// All rows of one call are written with one write call and synced to disk
// before Append returns; if the write fails part way, the file is cut back
// to its former length.
func Append(path string, rows ...Row) ([]Row, error) {
	out := make([]Row, len(rows))
	now := time.Now().UTC()
	for i, r := range rows {
		if r.RecordedAt.IsZero() {
			r.RecordedAt = now
		}
		r.RecordedAt = r.RecordedAt.UTC()
		if !r.MeasuredAt.IsZero() {
			r.MeasuredAt = r.MeasuredAt.UTC()
		}
		if col, why := r.check(); col >= 0 {
			return nil, fmt.Errorf("append to ledger %s: %w", path,
				&RowError{Index: i, RunID: r.RunID, Column: header[col], Reason: ReasonInvalidCell, Detail: why})
		}
		out[i] = r
	}

	appendMu.Lock()
	defer appendMu.Unlock()
	// Readable by all, like the ledger: a lab's users share one ledger, and
	// each opens the lock file to lock it.
	lock := flock.New(path+".lock", flock.SetPermissions(0o644))
	if err := lock.Lock(); err != nil {
		return nil, fmt.Errorf("append to ledger %s: lock: %w", path, err)
	}
	// Unlock closes the lock file, which releases the lock even when it
	// reports an error; the rows are written by then.
	defer lock.Unlock()

	f, err := os.OpenFile(path, os.O_RDWR|os.O_APPEND, 0)
	if err != nil && !errors.Is(err, fs.ErrNotExist) {
		return nil, fmt.Errorf("append to ledger: %w", err)
	}
	var data []byte
	if f != nil {
		defer f.Close()
		if data, err = io.ReadAll(f); err != nil {
			return nil, fmt.Errorf("append to ledger: %w", err)
		}
	}

	prev, lines := genesisHash, 1
	var ix runIndex
	if len(data) > 0 {
		verr := scan(data, path, func(row Row, _ []byte) *VerifyError {
			ix.add(row)
			prev, lines = row.Hash, row.Line
			return nil
		})
		if verr != nil {
			return nil, fmt.Errorf("append to ledger: %w; check the file with `calred ledger verify %s`", verr, path)
		}
	}

	var buf []byte
	if len(data) == 0 {
		buf = append(buf, headerLine...)
		buf = append(buf, '\n')
	}
	for i := range out {
		r := &out[i]
		r.Line = lines + 1 + i
		if reason, detail := ix.check(*r); reason != "" {
			return nil, fmt.Errorf("append to ledger %s: %w", path,
				&RowError{Index: i, RunID: r.RunID, Reason: reason, Detail: detail})
		}
		r.PrevHash = prev
		start := len(buf)
		buf = appendCSV(buf, r.cells()[:colRowHash])
		r.Hash = rowHash(prev, buf[start:])
		buf = append(buf, ',')
		buf = append(buf, r.Hash...)
		buf = append(buf, '\n')
		ix.add(*r)
		prev = r.Hash
	}
	if len(buf) == 0 {
		return out, nil
	}

	created := false
	if f == nil {
		f, err = os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL|os.O_APPEND, 0o644)
		if err != nil {
			return nil, fmt.Errorf("append to ledger: %w", err)
		}
		defer f.Close()
		created = true
	}
	if n, err := f.Write(buf); err != nil {
		if n > 0 && f.Truncate(int64(len(data))) == nil {
			return nil, fmt.Errorf("append to ledger %s: %w (the partial write was removed)", path, err)
		}
		return nil, fmt.Errorf("append to ledger %s: %w", path, err)
	}
	if err := f.Sync(); err != nil {
		return nil, fmt.Errorf("append to ledger %s: the rows may not be on disk: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return nil, fmt.Errorf("append to ledger %s: %w", path, err)
	}
	if created {
		if err := syncDir(filepath.Dir(path)); err != nil {
			return nil, fmt.Errorf("append to ledger %s: the new file may not be on disk: %w", path, err)
		}
	}
	return out, nil
}

// syncDir makes the creation of a file in dir durable. Windows cannot sync
// a directory, and needs not.
func syncDir(dir string) error {
	if runtime.GOOS == "windows" {
		return nil
	}
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	defer d.Close()
	return d.Sync()
}
