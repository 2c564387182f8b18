package ledger

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestMain lets the test binary act as one appending process of
// TestAppendManyProcesses: with CALRED_LEDGER_HELPER=1 it appends and exits.
func TestMain(m *testing.M) {
	if os.Getenv("CALRED_LEDGER_HELPER") == "1" {
		os.Exit(helperAppend())
	}
	os.Exit(m.Run())
}

var testT0 = time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)

// sampleRow is run i of an invented series at the Larch Street teaching
// lab: potassium chloride dissolved in 100 g of water. The numbers are made
// up; they only need to differ from row to row.
func sampleRow(i int) Row {
	r := NewRow()
	r.RecordedAt = testT0.Add(time.Duration(i)*time.Minute + 250*time.Millisecond)
	r.RunID = fmt.Sprintf("kcl-%03d", i)
	r.Kind = "sample"
	r.SampleID = "KCL-LOT7"
	r.Operator = "M. Ibarra"
	r.Formula = "KCl"
	r.Method = "regnault-pfaundler"
	r.DeltaTK = -0.4123 - float64(i)*1e-4
	r.UDeltaTK = 0.0031
	r.HeatCapacityJPerK = 452.7 + float64(i)/8
	r.UHeatCapacityJPerK = 0.81
	r.MolarEnthalpyKJPerMol = 17.19 + float64(i)/1000
	r.UMolarEnthalpyKJPerMol = 0.17
	r.ExpandedUncertaintyKJPerMol = 0.35
	r.CoverageFactor = 2.06
	r.MolalityMolPerKg = 0.1342
	r.Status = "pass"
	r.Checks = "fore-period:pass; spikes:pass"
	r.InputFile = fmt.Sprintf("runs/kcl-%03d.csv", i)
	r.InputSHA256 = hashHex([]byte(r.InputFile))
	r.Calibration = "cal-0302"
	r.ProgramVersion = "calred 0.1.0"
	return r
}

func sampleRows(n int) []Row {
	rows := make([]Row, n)
	for i := range rows {
		rows[i] = sampleRow(i)
	}
	return rows
}

// newLedger appends rows to a new ledger in a temporary directory and
// returns its path.
func newLedger(t testing.TB, rows ...Row) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "ledger.csv")
	if _, err := Append(path, rows...); err != nil {
		t.Fatal(err)
	}
	return path
}

func readFile(t testing.TB, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func verifyBytes(data []byte) (*Report, error) {
	return Verify(bytes.NewReader(data), "ledger.csv")
}

// sameNumber compares two stored numbers: both empty, or equal to within
// a relative 1e-15 (they should be bit-identical after the round trip).
func sameNumber(a, b float64) bool {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.IsNaN(a) && math.IsNaN(b)
	}
	return math.Abs(a-b) <= 1e-15*math.Max(math.Abs(a), math.Abs(b))
}

// rowDiff names the first field in which a and b differ, or "".
func rowDiff(a, b Row) string {
	if !a.RecordedAt.Equal(b.RecordedAt) {
		return fmt.Sprintf("recorded_at %v != %v", a.RecordedAt, b.RecordedAt)
	}
	if !a.MeasuredAt.Equal(b.MeasuredAt) || a.MeasuredAt.IsZero() != b.MeasuredAt.IsZero() {
		return fmt.Sprintf("measured_at %v != %v", a.MeasuredAt, b.MeasuredAt)
	}
	for _, col := range textColumns {
		if x, y := *a.textField(col), *b.textField(col); x != y {
			return fmt.Sprintf("%s %q != %q", header[col], x, y)
		}
	}
	an, bn := a.numberCells(), b.numberCells()
	for i := range an {
		if !sameNumber(*an[i].v, *bn[i].v) {
			return fmt.Sprintf("%s %v != %v", header[an[i].col], *an[i].v, *bn[i].v)
		}
	}
	if a.PrevHash != b.PrevHash || a.Hash != b.Hash {
		return "hashes differ"
	}
	if a.Line != b.Line {
		return fmt.Sprintf("line %d != %d", a.Line, b.Line)
	}
	return ""
}

func TestHeader(t *testing.T) {
	h := Header()
	if len(h) != numColumns {
		t.Fatalf("Header has %d columns, want %d", len(h), numColumns)
	}
	if h[0] != "ledger_version" || h[len(h)-2] != "prev_hash" || h[len(h)-1] != "row_hash" {
		t.Errorf("Header = %v: want ledger_version first, prev_hash and row_hash last", h)
	}
	// The names CONTRACT.md gives to the results of reduce --json.
	if h[1] != "recorded_at_utc" || h[2] != "measured_at_utc" {
		t.Errorf("Header = %v: want recorded_at_utc, then measured_at_utc, after ledger_version", h)
	}
	for _, name := range []string{"recorded_at_utc", "measured_at_utc", "run_id", "kind", "delta_t_k", "u_delta_t_k",
		"heat_capacity_j_per_k", "u_heat_capacity_j_per_k", "molar_enthalpy_kj_per_mol",
		"u_molar_enthalpy_kj_per_mol", "expanded_uncertainty_kj_per_mol", "coverage_factor",
		"molality_mol_per_kg", "status", "input_sha256", "supersedes"} {
		found := false
		for _, c := range h {
			found = found || c == name
		}
		if !found {
			t.Errorf("Header lacks %q", name)
		}
	}
	seen := map[string]bool{}
	for _, c := range h {
		if c != strings.ToLower(c) || strings.ContainsAny(c, " -,\"") || seen[c] {
			t.Errorf("column %q is not unique snake_case", c)
		}
		seen[c] = true
	}
	// The header that doc.go shows, on several lines, is this one.
	doc := string(readFile(t, "doc.go"))
	start := strings.Index(doc, "//\tledger_version,")
	end := strings.Index(doc, "// (shown here on several lines")
	if start < 0 || end < start {
		t.Fatal("doc.go does not show the header")
	}
	shown := strings.NewReplacer("//\t", "", "\n", "", "//", "").Replace(doc[start:end])
	if shown != headerLine {
		t.Errorf("doc.go shows the header\n%s\nwant\n%s", shown, headerLine)
	}
	h[0] = "changed"
	if Header()[0] != "ledger_version" {
		t.Error("Header returns the package's own slice")
	}
}

func TestAppendReadRoundTrip(t *testing.T) {
	awkward := sampleRow(1)
	awkward.Kind = "calibration"
	awkward.Note = `vessel "B", lid replaced; stirrer at 300 rpm`
	awkward.Checks = "fore-period:warn(drift 2.1 mK/min); spikes:warn(2 excluded)"
	awkward.MolarEnthalpyKJPerMol = math.NaN()
	awkward.UMolarEnthalpyKJPerMol = math.NaN()
	awkward.DeltaTK = 1.0000000000000002            // 1 + 2^-52: the next float64 after 1 (IEEE 754)
	awkward.HeatCapacityJPerK = 5e-324              // smallest subnormal float64 (IEEE 754)
	awkward.MolalityMolPerKg = math.Copysign(0, -1) // negative zero keeps its sign
	awkward.SampleID = " padded "
	awkward.InputSHA256 = ""
	awkward.Operator = "Zoë Ångström"
	// Measured the evening before, logged at UTC+1 to the nanosecond.
	awkward.MeasuredAt = time.Date(2026, 3, 1, 18, 42, 7, 123456789, time.FixedZone("UTC+1", 3600))
	in := []Row{sampleRow(0), awkward} // sampleRow(0) has no MeasuredAt: not known
	path := filepath.Join(t.TempDir(), "ledger.csv")
	written, err := Append(path, in...)
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	got, err := Read(f, "ledger.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(in) {
		t.Fatalf("read %d rows, want %d", len(got), len(in))
	}
	for i := range got {
		if d := rowDiff(got[i], written[i]); d != "" {
			t.Errorf("row %d read back differs from what Append returned: %s", i, d)
		}
		in[i].PrevHash, in[i].Hash, in[i].Line = written[i].PrevHash, written[i].Hash, i+2
		if d := rowDiff(got[i], in[i]); d != "" {
			t.Errorf("row %d read back differs from what was given: %s", i, d)
		}
	}
	if math.Float64bits(got[1].MolalityMolPerKg) != math.Float64bits(math.Copysign(0, -1)) {
		t.Errorf("-0 read back as %v", got[1].MolalityMolPerKg)
	}
	if written[0].PrevHash != genesisHash || written[1].PrevHash != written[0].Hash {
		t.Error("the rows are not chained to the header and to each other")
	}
	// The unknown time is an empty cell and the known one is stored in UTC:
	// 18:42:07.123456789 at UTC+1 is 17:42:07.123456789Z.
	lines := strings.Split(string(readFile(t, path)), "\n")
	if want := ",2026-03-02T09:00:00.25Z,,kcl-000,"; !strings.Contains(lines[1], want) {
		t.Errorf("line 2 = %q, want it to contain %q", lines[1], want)
	}
	if want := ",2026-03-01T17:42:07.123456789Z,kcl-001,"; !strings.Contains(lines[2], want) {
		t.Errorf("line 3 = %q, want it to contain %q", lines[2], want)
	}
	if !got[0].MeasuredAt.IsZero() || got[1].MeasuredAt.Location() != time.UTC {
		t.Errorf("MeasuredAt read back as %v and %v, want zero and a time in UTC", got[0].MeasuredAt, got[1].MeasuredAt)
	}
}

func TestAppendRecordedAt(t *testing.T) {
	r := sampleRow(0)
	r.RecordedAt = time.Time{}
	before := time.Now()
	path := filepath.Join(t.TempDir(), "ledger.csv")
	got, err := Append(path, r)
	if err != nil {
		t.Fatal(err)
	}
	after := time.Now()
	at := got[0].RecordedAt
	if at.Before(before) || at.After(after) || at.Location() != time.UTC {
		t.Errorf("zero RecordedAt became %v, want the time of the call (%v … %v) in UTC", at, before, after)
	}
	berlin := time.FixedZone("UTC+1", 3600)
	r.RunID = "kcl-900"
	r.RecordedAt = time.Date(2026, 3, 2, 10, 30, 0, 0, berlin)
	got, err = Append(path, r)
	if err != nil {
		t.Fatal(err)
	}
	if want := "2026-03-02T09:30:00Z"; !bytes.Contains(readFile(t, path), []byte(","+want+",")) || got[0].RecordedAt.Location() != time.UTC {
		t.Errorf("a time at UTC+1 was not stored as %s", want)
	}
}

func TestAppendCreatesAndKeeps(t *testing.T) {
	dir := t.TempDir()
	t.Run("no rows creates a header-only ledger", func(t *testing.T) {
		path := filepath.Join(dir, "empty.csv")
		if _, err := Append(path); err != nil {
			t.Fatal(err)
		}
		if got := string(readFile(t, path)); got != headerLine+"\n" {
			t.Errorf("file = %q, want the header line", got)
		}
		rep, err := Verify(bytes.NewReader(readFile(t, path)), "empty.csv")
		if err != nil || rep.Rows != 0 || rep.LastHash != genesisHash {
			t.Errorf("Verify = %+v, %v; want 0 rows ending at the header's hash", rep, err)
		}
	})
	t.Run("an empty file gets its header", func(t *testing.T) {
		path := filepath.Join(dir, "zero.csv")
		if err := os.WriteFile(path, nil, 0o644); err != nil {
			t.Fatal(err)
		}
		if _, err := Append(path, sampleRow(0)); err != nil {
			t.Fatal(err)
		}
		if _, err := verifyBytes(readFile(t, path)); err != nil {
			t.Error(err)
		}
	})
	t.Run("a refused row creates no file", func(t *testing.T) {
		path := filepath.Join(dir, "never.csv")
		bad := sampleRow(0)
		bad.Kind = "blank"
		if _, err := Append(path, bad); err == nil {
			t.Fatal("a row of kind blank was accepted")
		}
		if _, err := os.Stat(path); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("the refused append left a file: %v", err)
		}
	})
	t.Run("appends extend the chain", func(t *testing.T) {
		path := filepath.Join(dir, "grow.csv")
		var last string
		for i := range 5 {
			got, err := Append(path, sampleRow(i))
			if err != nil {
				t.Fatal(err)
			}
			if i > 0 && got[0].PrevHash != last {
				t.Errorf("row %d: prev_hash %s, want %s", i, got[0].PrevHash, last)
			}
			if got[0].Line != i+2 {
				t.Errorf("row %d: Line %d, want %d", i, got[0].Line, i+2)
			}
			last = got[0].Hash
		}
		rep, err := verifyBytes(readFile(t, path))
		if err != nil || rep.Rows != 5 || rep.LastHash != last {
			t.Errorf("Verify = %+v, %v; want 5 rows ending at %s", rep, err, last)
		}
	})
}

func TestAppendRefusesRow(t *testing.T) {
	tests := []struct {
		name   string
		change func(*Row)
		column string
	}{
		{"empty run_id", func(r *Row) { r.RunID = "" }, "run_id"},
		{"unknown kind", func(r *Row) { r.Kind = "solid" }, "kind"},
		{"unknown status", func(r *Row) { r.Status = "ok" }, "status"},
		{"upper-case input hash", func(r *Row) { r.InputSHA256 = strings.ToUpper(r.InputSHA256) }, "input_sha256"},
		{"short input hash", func(r *Row) { r.InputSHA256 = "abc" }, "input_sha256"},
		{"line break in note", func(r *Row) { r.Note = "first\nsecond" }, "note"},
		{"carriage return in checks", func(r *Row) { r.Checks = "a\rb" }, "checks"},
		{"invalid UTF-8 in operator", func(r *Row) { r.Operator = "M\xffI" }, "operator"},
		{"infinite heat capacity", func(r *Row) { r.HeatCapacityJPerK = math.Inf(1) }, "heat_capacity_j_per_k"},
		// RFC 3339 §5.6: date-fullyear = 4DIGIT, years 0000 to 9999.
		{"measured in year 10000", func(r *Row) { r.MeasuredAt = time.Date(10000, 1, 1, 0, 0, 0, 0, time.UTC) }, "measured_at_utc"},
		{"measured in year -1", func(r *Row) { r.MeasuredAt = time.Date(-1, 6, 1, 0, 0, 0, 0, time.UTC) }, "measured_at_utc"},
		{"recorded in year 10000", func(r *Row) { r.RecordedAt = time.Date(10000, 1, 1, 0, 0, 0, 0, time.UTC) }, "recorded_at_utc"},
	}
	path := newLedger(t, sampleRow(0))
	before := readFile(t, path)
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := sampleRow(1)
			tt.change(&r)
			_, err := Append(path, sampleRow(2), r)
			var re *RowError
			if !errors.As(err, &re) {
				t.Fatalf("Append error = %v, want a *RowError", err)
			}
			if re.Reason != ReasonInvalidCell || re.Column != tt.column || re.Index != 1 {
				t.Errorf("RowError = %+v, want %s in column %s of row index 1", re, ReasonInvalidCell, tt.column)
			}
			if !bytes.Equal(readFile(t, path), before) {
				t.Error("the refused call changed the file")
			}
		})
	}
}

func TestHeaderMismatch(t *testing.T) {
	good := headerLine + "\n"
	tests := []struct {
		name   string
		file   string
		detail string
	}{
		{"renamed column", strings.Replace(good, "sample_id", "sampleid", 1), `column 6 is "sampleid", want "sample_id"`},
		{"missing column", strings.Replace(good, ",note", "", 1), `column 25 is "supersedes", want "note"`},
		{"last column missing", strings.Replace(good, ",row_hash", "", 1), `has 27 columns, want 28: column 28 "row_hash" is missing`},
		{"extra column", strings.Replace(good, "row_hash", "row_hash,signature", 1), `column 29 "signature" is extra`},
		{"header without measured_at_utc", strings.Replace(good, ",measured_at_utc", "", 1), `column 3 is "run_id", want "measured_at_utc"`},
		{"CRLF line end", strings.Replace(good, "\n", "\r\n", 1), "carriage return"},
		{"byte-order mark", "\xef\xbb\xbf" + good, "byte-order mark"},
		{"quoted cells", `"` + strings.ReplaceAll(headerLine, ",", `","`) + "\"\n", "quoted"},
		{"another CSV", "time_s,temperature_c\n0,21.3\n", `column 1 is "time_s", want "ledger_version"`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := verifyBytes([]byte(tt.file))
			var ve *VerifyError
			if !errors.As(err, &ve) || ve.Line != 1 || ve.Reason != ReasonWrongHeader || !strings.Contains(ve.Detail, tt.detail) {
				t.Errorf("Verify error = %v, want line 1 %s containing %q", err, ReasonWrongHeader, tt.detail)
			}
			path := filepath.Join(t.TempDir(), "ledger.csv")
			if err := os.WriteFile(path, []byte(tt.file), 0o644); err != nil {
				t.Fatal(err)
			}
			_, err = Append(path, sampleRow(0))
			if !errors.As(err, &ve) || ve.Reason != ReasonWrongHeader || !strings.Contains(err.Error(), tt.detail) {
				t.Errorf("Append error = %v, want %s naming %q", err, ReasonWrongHeader, tt.detail)
			}
			if got := readFile(t, path); string(got) != tt.file {
				t.Error("Append changed a file with a wrong header")
			}
		})
	}
}

func TestInjectionCells(t *testing.T) {
	tests := []struct {
		name   string
		given  string
		stored string // the operator cell as it stands in the file, CSV quoting included
	}{
		{"formula", `=HYPERLINK("x")`, `"'=HYPERLINK(""x"")"`},
		{"plus", "+1", "'+1"},
		{"minus expression", "-2+3", "'-2+3"},
		{"at", "@SUM(A1)", "'@SUM(A1)"},
		{"tab", "\tx", "'\tx"},
		{"leading apostrophe", "'quoted", "''quoted"},
		{"negative number", "-1.5", "-1.5"},
		{"number with exponent", "-1.5e3", "-1.5e3"},
		{"plain text", "R. Osei", "R. Osei"},
	}
	var rows []Row
	for i, tt := range tests {
		r := sampleRow(i)
		r.Operator = tt.given
		rows = append(rows, r)
	}
	path := newLedger(t, rows...)
	data := readFile(t, path)
	lines := strings.Split(string(data), "\n")
	got, err := Read(bytes.NewReader(data), "ledger.csv")
	if err != nil {
		t.Fatal(err)
	}
	for i, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			// The operator cell sits between sample_id and formula.
			want := ",KCL-LOT7," + tt.stored + ",KCl,"
			if !strings.Contains(lines[i+1], want) {
				t.Errorf("line %d = %q, want it to contain %q", i+2, lines[i+1], want)
			}
			if got[i].Operator != tt.given {
				t.Errorf("read back %q, want %q", got[i].Operator, tt.given)
			}
		})
	}
	if _, err := verifyBytes(data); err != nil {
		t.Error(err)
	}
}

func TestReadRefusesCell(t *testing.T) {
	// Each case writes one row whose stored cells are changed after
	// encoding; Read checks no hash, so only the cell is at fault.
	tests := []struct {
		name   string
		change func(cells []string) []string
		reason string
		column string
	}{
		{"other version", set(colVersion, "2"), ReasonUnparseableCell, "ledger_version"},
		{"time without zone", set(colRecordedAt, "2026-03-02T09:00:00"), ReasonUnparseableCell, "recorded_at_utc"},
		{"time at an offset", set(colRecordedAt, "2026-03-02T10:00:00+01:00"), ReasonUnparseableCell, "recorded_at_utc"},
		{"time with a space", set(colRecordedAt, "2026-03-02 09:00:00Z"), ReasonUnparseableCell, "recorded_at_utc"},
		{"empty recorded time", set(colRecordedAt, ""), ReasonUnparseableCell, "recorded_at_utc"},
		{"measured time without zone", set(colMeasuredAt, "2026-03-01T17:42:07"), ReasonUnparseableCell, "measured_at_utc"},
		{"measured time at an offset", set(colMeasuredAt, "2026-03-01T18:42:07+01:00"), ReasonUnparseableCell, "measured_at_utc"},
		{"measured date only", set(colMeasuredAt, "2026-03-01"), ReasonUnparseableCell, "measured_at_utc"},
		{"measured word", set(colMeasuredAt, "yesterday"), ReasonUnparseableCell, "measured_at_utc"},
		{"word for a number", set(colDeltaT, "abc"), ReasonUnparseableCell, "delta_t_k"},
		{"number with a plus sign", set(colDeltaT, "+1.5"), ReasonUnparseableCell, "delta_t_k"},
		{"hexadecimal number", set(colDeltaT, "0x1p-2"), ReasonUnparseableCell, "delta_t_k"},
		{"infinite number", set(colMolality, "Inf"), ReasonUnparseableCell, "molality_mol_per_kg"},
		{"number out of range", set(colCoverage, "1e400"), ReasonUnparseableCell, "coverage_factor"},
		{"NaN spelt out", set(colUDeltaT, "NaN"), ReasonUnparseableCell, "u_delta_t_k"},
		{"unknown kind", set(colKind, "solid"), ReasonUnparseableCell, "kind"},
		{"unknown status", set(colStatus, "ok"), ReasonUnparseableCell, "status"},
		{"empty run_id", set(colRunID, ""), ReasonUnparseableCell, "run_id"},
		{"formula not neutralised", set(colOperator, "=1+1"), ReasonUnparseableCell, "operator"},
		{"stray apostrophe", set(colNote, "'fine"), ReasonUnparseableCell, "note"},
		{"short hash", set(colRowHash, "abc"), ReasonUnparseableCell, "row_hash"},
		{"upper-case hash", func(c []string) []string { c[colPrevHash] = strings.ToUpper(c[colPrevHash]); return c }, ReasonUnparseableCell, "prev_hash"},
		{"too few cells", func(c []string) []string { return c[:numColumns-1] }, ReasonUnparseableRow, ""},
		{"too many cells", func(c []string) []string { return append(c, "x") }, ReasonUnparseableRow, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := sampleRow(0)
			r.PrevHash, r.Hash = genesisHash, genesisHash
			line := appendCSV(nil, tt.change(r.cells()))
			checkReadError(t, line, tt.reason, tt.column)
		})
	}
	r := sampleRow(0)
	r.PrevHash, r.Hash = genesisHash, genesisHash
	good := string(appendCSV(nil, r.cells()))
	raw := []struct {
		name, line, reason, column string
	}{
		{"blank line", "", ReasonUnparseableRow, ""},
		{"CRLF line end", good + "\r", ReasonUnparseableRow, ""},
		{"invalid UTF-8", strings.Replace(good, "Ibarra", "Ib\xffarra", 1), ReasonUnparseableRow, ""},
		{"quote inside a cell", strings.Replace(good, "Ibarra", `Ib"arra`, 1), ReasonUnparseableRow, "operator"},
		{"unclosed quote", strings.Replace(good, "M. Ibarra", `"M. Ibarra`, 1), ReasonUnparseableRow, "operator"},
		{"text after a closing quote", strings.Replace(good, "M. Ibarra", `"M." Ibarra`, 1), ReasonUnparseableRow, "operator"},
		{"quoted hash", strings.Replace(good, ","+genesisHash+","+genesisHash, ","+genesisHash+`,"`+genesisHash+`"`, 1), ReasonUnparseableCell, "row_hash"},
	}
	for _, tt := range raw {
		t.Run(tt.name, func(t *testing.T) {
			checkReadError(t, []byte(tt.line), tt.reason, tt.column)
		})
	}
	t.Run("needless quotes are accepted", func(t *testing.T) {
		line := strings.Replace(good, "M. Ibarra", `"M. Ibarra"`, 1)
		rows, err := Read(strings.NewReader(headerLine+"\n"+line+"\n"), "ledger.csv")
		if err != nil || len(rows) != 1 || rows[0].Operator != "M. Ibarra" {
			t.Errorf("Read = %v, %v", rows, err)
		}
	})
}

func TestMessagesClipLongCells(t *testing.T) {
	// A wrong file (a photo, a log) can have very long lines; messages
	// quote at most 40 characters of a cell.
	long := strings.Repeat("x", 5000)
	_, err := verifyBytes([]byte(long + "\n"))
	if err == nil || len(err.Error()) > 200 || !strings.Contains(err.Error(), strings.Repeat("x", 40)+"…") {
		t.Errorf("error for a 5000-character first line: %.300q", err)
	}
}

func set(col int, v string) func([]string) []string {
	return func(c []string) []string { c[col] = v; return c }
}

// checkReadError reads a ledger of a good row then line, and wants the
// error on line 3.
func checkReadError(t *testing.T, line []byte, reason, column string) {
	t.Helper()
	first := sampleRow(1)
	first.PrevHash, first.Hash = genesisHash, genesisHash
	data := headerLine + "\n" + string(appendCSV(nil, first.cells())) + "\n" + string(line) + "\n"
	rows, err := Read(strings.NewReader(data), "ledger.csv")
	var ve *VerifyError
	if !errors.As(err, &ve) {
		t.Fatalf("Read error = %v, want a *VerifyError", err)
	}
	if ve.Line != 3 || ve.Reason != reason || ve.Column != column || ve.Name != "ledger.csv" {
		t.Errorf("error %q: got line %d %q (%q), want line 3 %q (%q)", err, ve.Line, ve.Reason, ve.Column, reason, column)
	}
	if len(rows) != 1 {
		t.Errorf("Read returned %d rows before the faulty line, want 1", len(rows))
	}
	if _, verr := Verify(strings.NewReader(data), "ledger.csv"); verr == nil {
		t.Error("Verify accepted what Read refused")
	}
}

func TestVerifyErrorText(t *testing.T) {
	tests := []struct {
		name string
		err  VerifyError
		want string
	}{
		{"whole row", VerifyError{Name: "ledger.csv", Line: 51, Reason: ReasonBadHash, Detail: "row_hash does not match the row's contents"},
			"ledger.csv:51: bad hash: row_hash does not match the row's contents"},
		{"one cell", VerifyError{Name: "l.csv", Line: 12, Column: "delta_t_k", Reason: ReasonUnparseableCell, Detail: `"2x" is not a finite decimal number`},
			`l.csv:12: unparseable cell (delta_t_k): "2x" is not a finite decimal number`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := tt.err.Error(); got != tt.want {
				t.Errorf("Error() = %q, want %q", got, tt.want)
			}
		})
	}
}
