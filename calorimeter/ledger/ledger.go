package ledger

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"
)

// Version is the ledger format version. It is written in the
// ledger_version column of every row; from the first release on, a change
// to the header or to the hash rule gives a new version. Before it the
// format is still settling and stays at 1 (measured_at_utc was added so):
// no ledger of an earlier layout exists outside this project's tests.
const Version = 1

// Row is one reduced run. Float fields use NaN for "empty" (an empty cell in
// the file).
type Row struct {
	RecordedAt time.Time // when the row was appended, UTC; RFC 3339 with fractional seconds in the file
	MeasuredAt time.Time // when the run was measured (its first reading), UTC as RecordedAt; zero when unknown (an empty cell)

	RunID    string // names the run; unique in the ledger except for corrections, see Append
	Kind     string // "sample" or "calibration"
	SampleID string
	Operator string
	Formula  string
	Method   string // method of the corrected temperature change

	DeltaTK  float64 // corrected temperature change, K (signed)
	UDeltaTK float64 // its standard uncertainty, K

	HeatCapacityJPerK  float64 // heat capacity (energy equivalent) used, J/K
	UHeatCapacityJPerK float64 // its standard uncertainty, J/K

	MolarEnthalpyKJPerMol       float64 // molar enthalpy of solution, kJ/mol
	UMolarEnthalpyKJPerMol      float64 // its combined standard uncertainty, kJ/mol
	ExpandedUncertaintyKJPerMol float64 // U = k·u, kJ/mol
	CoverageFactor              float64 // k, dimensionless

	MolalityMolPerKg float64 // final molality, mol/kg

	Status string // worst check: "pass", "warn" or "fail"
	Checks string // compact summary, e.g. "fore-period:pass; spikes:warn(2 excluded)"

	InputFile   string // the log's file name as given
	InputSHA256 string // the log's SHA-256, 64 lower-case hex digits, or ""

	Calibration    string // calibration file hash or calibration run id used
	ProgramVersion string
	Note           string
	Supersedes     string // run_id of the row this one corrects ("" normally)

	PrevHash string // hex SHA-256 of the row before (filled by Append)
	Hash     string // hex SHA-256 of this row (filled by Append)

	Line int // 1-based line in the file when read back (not stored)
}

// NewRow returns a Row whose numbers are all empty (NaN): the zero Row
// would record zeros.
func NewRow() Row {
	var r Row
	for _, f := range r.numberCells() {
		*f.v = math.NaN()
	}
	return r
}

// The columns, in file order.
const (
	colVersion = iota
	colRecordedAt
	colMeasuredAt
	colRunID
	colKind
	colSampleID
	colOperator
	colFormula
	colMethod
	colDeltaT
	colUDeltaT
	colHeatCapacity
	colUHeatCapacity
	colMolarEnthalpy
	colUMolarEnthalpy
	colExpandedU
	colCoverage
	colMolality
	colStatus
	colChecks
	colInputFile
	colInputSHA256
	colCalibration
	colProgramVersion
	colNote
	colSupersedes
	colPrevHash
	colRowHash
	numColumns
)

var header = [numColumns]string{
	colVersion:        "ledger_version",
	colRecordedAt:     "recorded_at_utc",
	colMeasuredAt:     "measured_at_utc",
	colRunID:          "run_id",
	colKind:           "kind",
	colSampleID:       "sample_id",
	colOperator:       "operator",
	colFormula:        "formula",
	colMethod:         "method",
	colDeltaT:         "delta_t_k",
	colUDeltaT:        "u_delta_t_k",
	colHeatCapacity:   "heat_capacity_j_per_k",
	colUHeatCapacity:  "u_heat_capacity_j_per_k",
	colMolarEnthalpy:  "molar_enthalpy_kj_per_mol",
	colUMolarEnthalpy: "u_molar_enthalpy_kj_per_mol",
	colExpandedU:      "expanded_uncertainty_kj_per_mol",
	colCoverage:       "coverage_factor",
	colMolality:       "molality_mol_per_kg",
	colStatus:         "status",
	colChecks:         "checks",
	colInputFile:      "input_file",
	colInputSHA256:    "input_sha256",
	colCalibration:    "calibration",
	colProgramVersion: "program_version",
	colNote:           "note",
	colSupersedes:     "supersedes",
	colPrevHash:       "prev_hash",
	colRowHash:        "row_hash",
}

// headerLine is the first line of every ledger, without its line end.
var headerLine = strings.Join(header[:], ",")

// genesisHash is the prev_hash of the first row: the SHA-256 of the header
// line (without its line end).
var genesisHash = hashHex([]byte(headerLine))

// Header returns the column names of the ledger, in file order. The first
// column, ledger_version, holds Version in every row.
func Header() []string {
	return append([]string(nil), header[:]...)
}

// Kinds and statuses a row may carry.
var (
	kinds    = []string{"sample", "calibration"}
	statuses = []string{"pass", "warn", "fail"}
)

// textColumns are the cells that hold free text; they pass through SafeCell
// on the way into the file and UnsafeCell on the way out.
var textColumns = []int{
	colRunID, colKind, colSampleID, colOperator, colFormula, colMethod,
	colStatus, colChecks, colInputFile, colInputSHA256, colCalibration,
	colProgramVersion, colNote, colSupersedes,
}

// numberCell is a numeric column and the field that holds it.
type numberCell struct {
	col int
	v   *float64
}

// numberCells pairs every numeric column of r with its field.
func (r *Row) numberCells() []numberCell {
	return []numberCell{
		{colDeltaT, &r.DeltaTK},
		{colUDeltaT, &r.UDeltaTK},
		{colHeatCapacity, &r.HeatCapacityJPerK},
		{colUHeatCapacity, &r.UHeatCapacityJPerK},
		{colMolarEnthalpy, &r.MolarEnthalpyKJPerMol},
		{colUMolarEnthalpy, &r.UMolarEnthalpyKJPerMol},
		{colExpandedU, &r.ExpandedUncertaintyKJPerMol},
		{colCoverage, &r.CoverageFactor},
		{colMolality, &r.MolalityMolPerKg},
	}
}

// textField returns the field of r that holds text column col.
func (r *Row) textField(col int) *string {
	switch col {
	case colRunID:
		return &r.RunID
	case colKind:
		return &r.Kind
	case colSampleID:
		return &r.SampleID
	case colOperator:
		return &r.Operator
	case colFormula:
		return &r.Formula
	case colMethod:
		return &r.Method
	case colStatus:
		return &r.Status
	case colChecks:
		return &r.Checks
	case colInputFile:
		return &r.InputFile
	case colInputSHA256:
		return &r.InputSHA256
	case colCalibration:
		return &r.Calibration
	case colProgramVersion:
		return &r.ProgramVersion
	case colNote:
		return &r.Note
	case colSupersedes:
		return &r.Supersedes
	}
	panic(fmt.Sprintf("ledger: column %d is not a text column", col))
}

// cells returns the stored cells of r in file order, text neutralised with
// SafeCell. The row_hash cell is r.Hash as it stands.
func (r *Row) cells() []string {
	c := make([]string, numColumns)
	c[colVersion] = strconv.Itoa(Version)
	c[colRecordedAt] = r.RecordedAt.UTC().Format(time.RFC3339Nano)
	if !r.MeasuredAt.IsZero() {
		c[colMeasuredAt] = r.MeasuredAt.UTC().Format(time.RFC3339Nano)
	}
	for _, col := range textColumns {
		c[col] = SafeCell(*r.textField(col))
	}
	for _, f := range r.numberCells() {
		c[f.col] = formatNumber(*f.v)
	}
	c[colPrevHash] = r.PrevHash
	c[colRowHash] = r.Hash
	return c
}

// formatNumber writes x so that it parses back to the same float64; NaN is
// the empty cell.
func formatNumber(x float64) string {
	if math.IsNaN(x) {
		return ""
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// check reports the first thing about r that the file cannot hold, as the
// column at fault and why.
func (r *Row) check() (col int, why string) {
	if r.RunID == "" {
		return colRunID, "is empty"
	}
	if !oneOf(r.Kind, kinds) {
		return colKind, fmt.Sprintf("%q is not one of %s", clip(r.Kind), strings.Join(kinds, ", "))
	}
	if !oneOf(r.Status, statuses) {
		return colStatus, fmt.Sprintf("%q is not one of %s", clip(r.Status), strings.Join(statuses, ", "))
	}
	for _, f := range []struct {
		col int
		t   time.Time
	}{{colRecordedAt, r.RecordedAt}, {colMeasuredAt, r.MeasuredAt}} {
		if y := f.t.UTC().Year(); y < 0 || y > 9999 {
			return f.col, fmt.Sprintf("year %d is outside 0 to 9999, the four-digit years of RFC 3339", y)
		}
	}
	if r.InputSHA256 != "" && !isHash(r.InputSHA256) {
		return colInputSHA256, fmt.Sprintf("%q is not 64 lower-case hexadecimal digits", clip(r.InputSHA256))
	}
	for _, col := range textColumns {
		s := *r.textField(col)
		if !utf8.ValidString(s) {
			return col, "is not valid UTF-8"
		}
		if strings.ContainsAny(s, "\r\n") {
			return col, "contains a line break; a ledger row is one line"
		}
	}
	for _, f := range r.numberCells() {
		if math.IsInf(*f.v, 0) {
			return f.col, "is infinite"
		}
	}
	return -1, ""
}

func oneOf(s string, set []string) bool {
	for _, v := range set {
		if s == v {
			return true
		}
	}
	return false
}

// isHash reports whether s is 64 lower-case hexadecimal digits.
func isHash(s string) bool {
	if len(s) != 2*sha256.Size {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !('0' <= c && c <= '9' || 'a' <= c && c <= 'f') {
			return false
		}
	}
	return true
}

func hashHex(b []byte) string {
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:])
}

// rowHash is the hash rule of doc.go: SHA-256 over the previous row's hash
// in hex, a line feed, and the row's line up to the comma before row_hash.
func rowHash(prevHash string, body []byte) string {
	h := sha256.New()
	h.Write([]byte(prevHash))
	h.Write([]byte{'\n'})
	h.Write(body)
	return hex.EncodeToString(h.Sum(nil))
}
