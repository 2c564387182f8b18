package ledger

import (
	"bufio"
	"bytes"
	"encoding/json"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"
)

// Filter selects rows; a zero field matches every row.
type Filter struct {
	Kind     string    // "sample" or "calibration"
	SampleID string    // exact sample_id
	Status   string    // "pass", "warn" or "fail"
	Since    time.Time // rows recorded (RecordedAt, not MeasuredAt) at or after this instant
}

// Match reports whether r passes every field of f that is set.
func (f Filter) Match(r Row) bool {
	return (f.Kind == "" || r.Kind == f.Kind) &&
		(f.SampleID == "" || r.SampleID == f.SampleID) &&
		(f.Status == "" || r.Status == f.Status) &&
		(f.Since.IsZero() || !r.RecordedAt.Before(f.Since))
}

// WriteTable writes rows as an aligned text table, one line per row: line in
// the file, time recorded, time measured (empty when not known), run, kind,
// sample, status, corrected temperature change, heat capacity, molar
// enthalpy of solution with its expanded uncertainty and coverage factor,
// and, for a row that a later correction replaced, the run_id of that
// correction under "replaced by" (superseded is Report.Superseded or the
// result of Superseded). Times are in UTC to the second; numbers are shown
// to six significant digits (WriteJSONLines gives them as stored); an empty
// cell stays empty.
func WriteTable(w io.Writer, rows []Row, superseded map[string]string) error {
	var buf bytes.Buffer
	tw := tabwriter.NewWriter(&buf, 0, 0, 2, ' ', 0)
	io.WriteString(tw, "line\trecorded (UTC)\tmeasured (UTC)\trun\tkind\tsample\tstatus\tΔT/K\tC/(J/K)\tΔsolH/(kJ/mol)\tU/(kJ/mol)\tk\treplaced by\n")
	for _, r := range rows {
		cells := []string{
			strconv.Itoa(r.Line),
			r.RecordedAt.UTC().Format("2006-01-02 15:04:05"),
			tableTime(r.MeasuredAt),
			r.RunID, r.Kind, r.SampleID, r.Status,
			tableNumber(r.DeltaTK),
			tableNumber(r.HeatCapacityJPerK),
			tableNumber(r.MolarEnthalpyKJPerMol),
			tableNumber(r.ExpandedUncertaintyKJPerMol),
			tableNumber(r.CoverageFactor),
			superseded[r.Hash],
		}
		for i, c := range cells {
			if i > 0 {
				io.WriteString(tw, "\t")
			}
			io.WriteString(tw, tableCell(c))
		}
		io.WriteString(tw, "\n")
	}
	tw.Flush()
	// A row with nothing in the last columns would end in padding.
	for line := range bytes.Lines(buf.Bytes()) {
		if _, err := w.Write(append(bytes.TrimRight(line, " \n"), '\n')); err != nil {
			return err
		}
	}
	return nil
}

// tableTime shows t in UTC to the second, the zero time as an empty cell.
func tableTime(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format("2006-01-02 15:04:05")
}

// tableNumber shows x to six significant digits, NaN as an empty cell.
func tableNumber(x float64) string {
	if math.IsNaN(x) {
		return ""
	}
	return strconv.FormatFloat(x, 'g', 6, 64)
}

// tableCell keeps a cell on one table cell: a tab would split it.
func tableCell(s string) string {
	return strings.ReplaceAll(s, "\t", " ")
}

// WriteJSONLines writes one JSON object per row: the header's keys in header
// order (numbers as JSON numbers, an empty number or an empty
// measured_at_utc as null, ledger_version as a number), then "line" (the row's line in the file) and
// "superseded_by" (the run_id of the correction that replaced the row, or
// null).
func WriteJSONLines(w io.Writer, rows []Row, superseded map[string]string) error {
	bw := bufio.NewWriter(w)
	for _, r := range rows {
		cells := r.cells()
		numbers := make(map[int]float64, colMolality-colDeltaT+1)
		for _, f := range r.numberCells() {
			numbers[f.col] = *f.v
		}
		bw.WriteByte('{')
		for col, key := range header {
			if col > 0 {
				bw.WriteByte(',')
			}
			writeJSON(bw, key)
			bw.WriteByte(':')
			if x, ok := numbers[col]; ok {
				writeJSON(bw, jsonNumber(x))
				continue
			}
			switch col {
			case colVersion:
				bw.WriteString(strconv.Itoa(Version))
			case colRecordedAt, colPrevHash, colRowHash:
				writeJSON(bw, cells[col])
			case colMeasuredAt:
				if cells[col] == "" {
					bw.WriteString("null")
				} else {
					writeJSON(bw, cells[col])
				}
			default:
				writeJSON(bw, *r.textField(col))
			}
		}
		bw.WriteString(`,"line":`)
		bw.WriteString(strconv.Itoa(r.Line))
		bw.WriteString(`,"superseded_by":`)
		if by, ok := superseded[r.Hash]; ok {
			writeJSON(bw, by)
		} else {
			bw.WriteString("null")
		}
		bw.WriteString("}\n")
	}
	return bw.Flush()
}

// jsonNumber is x for encoding/json, nil (null) for an empty (NaN) cell.
func jsonNumber(x float64) any {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return x
}

// writeJSON writes v as JSON; v is a string, a finite float64 or nil, which
// never fail to encode.
func writeJSON(w *bufio.Writer, v any) {
	b, _ := json.Marshal(v)
	w.Write(b)
}
