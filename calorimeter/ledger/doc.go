// Package ledger keeps the record of reduced runs: an append-only CSV file,
// one row per run (failed runs included), each row chained to the one
// before by a SHA-256 hash, appended under a file lock.
//
// # Format
//
// The file is UTF-8 text with LF line ends, one physical line per row.
// Cells are separated by commas; a cell that holds a comma or a double quote
// is put in double quotes, with its quotes doubled (RFC 4180), and no other
// cell is quoted. Text cells may not hold line breaks. The first line is the
// header, Header joined by commas, and never changes within a version:
//
//	ledger_version,recorded_at_utc,measured_at_utc,run_id,kind,sample_id,
//	operator,formula,method,delta_t_k,u_delta_t_k,
//	heat_capacity_j_per_k,u_heat_capacity_j_per_k,
//	molar_enthalpy_kj_per_mol,u_molar_enthalpy_kj_per_mol,
//	expanded_uncertainty_kj_per_mol,coverage_factor,molality_mol_per_kg,
//	status,checks,input_file,input_sha256,calibration,program_version,note,
//	supersedes,prev_hash,row_hash
//
// (shown here on several lines; in the file it is one). Units are in the
// names: K, J/K, kJ/mol, mol/kg; coverage_factor is dimensionless.
//
//   - ledger_version is Version (1) in every row. The format is not yet
//     released: columns added before the first release, measured_at_utc
//     among them, keep version 1, since no ledger of an earlier layout
//     exists outside this project's tests. From the first release on, a
//     changed header gives a new version.
//   - recorded_at_utc is the time of the append, RFC 3339 in UTC with
//     fractional seconds as needed (time.RFC3339Nano), e.g.
//     2026-03-02T09:41:07.318Z.
//   - measured_at_utc is when the run was measured, in the same form: the
//     time of the log's first reading (or of the heating period's, for one
//     of several in a log) when the log gives a date, empty when it does not
//     (elapsed seconds, clock times without a date). Runs reduced together
//     long after they were measured share a recorded_at_utc but keep their
//     own measured_at_utc. Filter.Since looks at recorded_at_utc.
//   - Numbers are written by strconv.FormatFloat(x, 'g', -1, 64), the
//     shortest form that reads back to the same float64; an empty cell is
//     "not applicable" (NaN in Row).
//   - kind is sample or calibration; status is pass, warn or fail, the
//     worst of the checks summed up in checks.
//   - input_sha256 is the SHA-256 of the log file, in hex; calibration names
//     the calibration used (its file's hash or its run_id).
//   - Text cells go through SafeCell: one that a spreadsheet would run as
//     a formula (it starts with = + - @, a tab or a carriage return, and is
//     not a plain number) gets a leading apostrophe, and one that starts with
//     an apostrophe gets a second. Read gives the text back as it was given.
//   - prev_hash and row_hash are 64 lower-case hex digits, never quoted.
//
// # Hash chain
//
// Each row's hash covers the row's line up to, not including, the comma
// before its row_hash cell ("body", which ends with the prev_hash cell),
// and the hash of the row before:
//
//	row_hash = hex(SHA-256(prev_hash + "\n" + body))
//
// where prev_hash is the 64 hex characters, as in the file. The first
// row's prev_hash is hex(SHA-256(header line)), the header line taken
// without its line end; every later row's prev_hash is the row_hash of the
// row before. An auditor can check a ledger without this program:
//
//	import hashlib, sys
//	data = open(sys.argv[1], "rb").read()
//	assert data.endswith(b"\n"), "torn tail: the last line has no line end"
//	lines = data.split(b"\n")[:-1]
//	prev = hashlib.sha256(lines[0]).hexdigest().encode()
//	for n, line in enumerate(lines[1:], start=2):
//	    body, _, row_hash = line.rpartition(b",")
//	    prev_cell = body.rpartition(b",")[2]
//	    got = hashlib.sha256(prev_cell + b"\n" + body).hexdigest().encode()
//	    assert got == row_hash, "line %d: bad hash" % n
//	    assert prev_cell == prev, "line %d: broken chain" % n
//	    prev = row_hash
//	print(len(lines) - 1, "rows, last hash", prev.decode())
//
// A changed byte in a row breaks that row's hash; a row removed, inserted or
// moved breaks the chain at the row after it. Verify checks each row's own
// hash before its link, so a changed cell, even the row_hash cell itself,
// is reported as a bad hash on its own line, and a row whose hash was
// recomputed after a change as a broken chain on the next line. Rows cut
// from the end leave a shorter, intact chain: keep Report.LastHash outside
// the file (in the run's report or notebook) to show later that nothing was
// cut. Whoever may rewrite the whole file can recompute every hash: the
// chain shows change, it does not prevent it; copies kept elsewhere do.
//
// # Lock and torn tail
//
// Append takes an exclusive lock (flock(2) on Unix, LockFileEx on Windows,
// through github.com/gofrs/flock) on the file LEDGER.lock beside the ledger, reads the ledger, checks it and
// the new rows, writes all new rows with one write call, syncs the file to
// disk and releases the lock. Every writer must go through Append; file
// systems that do not honour flock, some network mounts among them, do not
// serialise writers.
//
// Every row ends with a line end, so a file whose last byte is not a line
// end was cut in the middle of a row, by a crash, a full disk or an
// interrupted copy: a torn tail. Verify reports it at that line, and Append
// refuses to write after it, so that a partial row is never joined to a new
// one; nothing is repaired automatically. Whoever repairs it removes the
// partial line, notes why, and records the run again.
//
// # Corrections
//
// No row is ever changed or removed. A corrected result is a new row whose
// supersedes cell names the run_id it replaces, with the reason in note;
// the correction may keep that run_id or take a new one. The replaced run
// must be in the ledger and must still stand: once run A is replaced by run
// B, a further correction supersedes B. Report.Superseded maps each
// replaced row's hash to the run that replaced it, and WriteTable and
// WriteJSONLines mark replaced rows from it.
//
// # Records practice
//
// The ledger serves the ALCOA+ principles for electronic records
// (attributable, legible, contemporaneous, original, accurate; complete,
// consistent, enduring, available) as follows: who ran the reduction
// (operator) and with what (program_version, calibration); plain text any
// CSV reader opens; the time is taken when the row is written, beside the
// time of measurement the log gives; the raw log
// is named by its SHA-256; numbers are stored so that they read back
// exactly; failures are recorded as well as passes and corrections are new
// rows with their reason; one fixed header per version; every append is
// synced to disk. It supports the audit trail that 21 CFR Part 11 and EU GMP
// Annex 11 ask for (no silent overwrite, who, when, why), but it has no
// electronic signatures or access control, and validating the tool for
// regulated use stays the laboratory's job.
package ledger
