package ledger

import (
	"bytes"
	"encoding/json"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// showLedger is an invented morning at the Larch Street lab: a calibration,
// three KCl runs, one failed and corrected under the same run_id, one
// corrected under a new run_id. The calibration and the first KCl log say
// when they were measured, days before; the third KCl log does not.
func showLedger(t *testing.T) ([]Row, *Report) {
	t.Helper()
	cal := sampleRow(0)
	cal.RunID, cal.Kind, cal.SampleID, cal.Formula = "cal-0302", "calibration", "", ""
	cal.Method = "electrical"
	cal.MolarEnthalpyKJPerMol, cal.UMolarEnthalpyKJPerMol = math.NaN(), math.NaN()
	cal.ExpandedUncertaintyKJPerMol, cal.CoverageFactor, cal.MolalityMolPerKg = math.NaN(), math.NaN(), math.NaN()
	cal.Calibration, cal.InputFile = "", "runs/cal-0302.csv"
	cal.DeltaTK, cal.HeatCapacityJPerK = 0.6624, 452.71
	cal.MeasuredAt = time.Date(2026, 2, 27, 16, 5, 0, 0, time.UTC)
	failed := sampleRow(1)
	failed.Status, failed.Checks = "fail", "fore-period:fail(drift 9.4 mK/min); spikes:pass"
	failed.MeasuredAt = time.Date(2026, 3, 1, 10, 12, 30, 500e6, time.UTC)
	fixed := sampleRow(2)
	fixed.RunID, fixed.Supersedes, fixed.Note = failed.RunID, failed.RunID, "fore period re-chosen by hand"
	fixed.MeasuredAt = failed.MeasuredAt // the same log, reduced again
	third := sampleRow(3)
	third.Checks = "fore-period:pass; spikes:warn(2 excluded)"
	renamed := sampleRow(4)
	renamed.RunID, renamed.Supersedes, renamed.Note = "kcl-003b", third.RunID, "sample mass was 2.530 g, not 2.503 g"
	path := newLedger(t, cal, failed, fixed, third, renamed)
	data := readFile(t, path)
	rows, err := Read(bytes.NewReader(data), "ledger.csv")
	if err != nil {
		t.Fatal(err)
	}
	rep, err := verifyBytes(data)
	if err != nil {
		t.Fatal(err)
	}
	return rows, rep
}

func checkGolden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("output differs from %s (go test -update rewrites it):\ngot:\n%s\nwant:\n%s", path, got, want)
	}
}

func TestWriteTable(t *testing.T) {
	rows, rep := showLedger(t)
	var buf bytes.Buffer
	if err := WriteTable(&buf, rows, rep.Superseded); err != nil {
		t.Fatal(err)
	}
	checkGolden(t, "show.txt", buf.Bytes())
	lines := strings.Split(strings.TrimSuffix(buf.String(), "\n"), "\n")
	if len(lines) != len(rows)+1 {
		t.Fatalf("%d lines, want a heading and %d rows", len(lines), len(rows))
	}
	// Columns line up in characters, not bytes: the heading has Δ.
	col := len([]rune(lines[0][:max(0, strings.Index(lines[0], "replaced by"))]))
	if !strings.Contains(lines[0], "replaced by") {
		t.Fatalf("heading %q has no replaced by column", lines[0])
	}
	// The times as set in showLedger, to the second; line 5 has none measured.
	for i, want := range []string{"2026-02-27 16:05:00", "2026-03-01 10:12:30", "2026-03-01 10:12:30"} {
		if !strings.Contains(lines[i+1], "  "+want+"  ") {
			t.Errorf("table line %q lacks measured time %s", lines[i+1], want)
		}
	}
	if n := strings.Count(lines[4], "2026-"); n != 1 {
		t.Errorf("table line %q shows %d times, want the recorded time only", lines[4], n)
	}
	// line in the file → what the replaced by column says
	want := map[string]string{"2": "", "3": "kcl-001", "4": "", "5": "kcl-003b", "6": ""}
	for _, l := range lines[1:] {
		line := strings.Fields(l)[0]
		by := ""
		if r := []rune(l); len(r) > col {
			by = strings.TrimSpace(string(r[col:]))
		}
		if by != want[line] {
			t.Errorf("line %s: replaced by %q, want %q", line, by, want[line])
		}
	}
}

func TestWriteJSONLines(t *testing.T) {
	rows, rep := showLedger(t)
	var buf bytes.Buffer
	if err := WriteJSONLines(&buf, rows, rep.Superseded); err != nil {
		t.Fatal(err)
	}
	checkGolden(t, "show.jsonl", buf.Bytes())
	lines := strings.Split(strings.TrimSuffix(buf.String(), "\n"), "\n")
	if len(lines) != len(rows) {
		t.Fatalf("%d lines, want %d", len(lines), len(rows))
	}
	wantKeys := append(Header(), "line", "superseded_by")
	for i, l := range lines {
		dec := json.NewDecoder(strings.NewReader(l))
		dec.UseNumber()
		var keys []string
		if _, err := dec.Token(); err != nil {
			t.Fatal(err)
		}
		for dec.More() {
			k, err := dec.Token()
			if err != nil {
				t.Fatal(err)
			}
			keys = append(keys, k.(string))
			var v any
			if err := dec.Decode(&v); err != nil {
				t.Fatal(err)
			}
		}
		if strings.Join(keys, ",") != strings.Join(wantKeys, ",") {
			t.Errorf("line %d keys = %v, want %v", i+1, keys, wantKeys)
		}
		var obj map[string]any
		if err := json.Unmarshal([]byte(l), &obj); err != nil {
			t.Fatal(err)
		}
		r := rows[i]
		if obj["run_id"] != r.RunID || obj["note"] != r.Note || obj["row_hash"] != r.Hash || obj["line"] != float64(r.Line) {
			t.Errorf("line %d = %v does not match row %+v", i+1, obj, r)
		}
		if obj["ledger_version"] != float64(Version) {
			t.Errorf("ledger_version = %v, want %d", obj["ledger_version"], Version)
		}
		if x, ok := obj["heat_capacity_j_per_k"].(float64); !ok || !sameNumber(x, r.HeatCapacityJPerK) {
			t.Errorf("heat_capacity_j_per_k = %v, want %v", obj["heat_capacity_j_per_k"], r.HeatCapacityJPerK)
		}
		if math.IsNaN(r.MolarEnthalpyKJPerMol) != (obj["molar_enthalpy_kj_per_mol"] == nil) {
			t.Errorf("molar_enthalpy_kj_per_mol = %v for %v", obj["molar_enthalpy_kj_per_mol"], r.MolarEnthalpyKJPerMol)
		}
		if want := r.MeasuredAt.Format(time.RFC3339Nano); r.MeasuredAt.IsZero() && obj["measured_at_utc"] != nil ||
			!r.MeasuredAt.IsZero() && obj["measured_at_utc"] != want {
			t.Errorf("line %d measured_at_utc = %v, want %q (null when not known)", i+1, obj["measured_at_utc"], want)
		}
		by, replaced := rep.Superseded[r.Hash]
		if replaced && obj["superseded_by"] != by || !replaced && obj["superseded_by"] != nil {
			t.Errorf("line %d superseded_by = %v, want %q (replaced: %v)", i+1, obj["superseded_by"], by, replaced)
		}
	}
}

func TestFilter(t *testing.T) {
	rows, _ := showLedger(t)
	tests := []struct {
		name   string
		filter Filter
		want   string // run_ids kept
	}{
		{"everything", Filter{}, "cal-0302 kcl-001 kcl-001 kcl-003 kcl-003b"},
		{"calibrations", Filter{Kind: "calibration"}, "cal-0302"},
		{"samples", Filter{Kind: "sample"}, "kcl-001 kcl-001 kcl-003 kcl-003b"},
		{"one sample", Filter{SampleID: "KCL-LOT7"}, "kcl-001 kcl-001 kcl-003 kcl-003b"},
		{"failed", Filter{Status: "fail"}, "kcl-001"},
		// sampleRow(i) is recorded at 09:00:00.25 + i minutes
		{"since, inclusive", Filter{Since: testT0.Add(2*time.Minute + 250*time.Millisecond)}, "kcl-001 kcl-003 kcl-003b"},
		{"since and kind", Filter{Kind: "sample", Since: testT0.Add(3 * time.Minute)}, "kcl-003 kcl-003b"},
		{"nothing", Filter{Status: "warn"}, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var kept []string
			for _, r := range rows {
				if tt.filter.Match(r) {
					kept = append(kept, r.RunID)
				}
			}
			if got := strings.Join(kept, " "); got != tt.want {
				t.Errorf("kept %q, want %q", got, tt.want)
			}
		})
	}
}
