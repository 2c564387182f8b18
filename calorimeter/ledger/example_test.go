package ledger_test

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"calred/calorimeter/ledger"
)

// An invented run at the Larch Street teaching lab: ammonium nitrate in
// water. Its numbers are made up for the example.
func ammoniumNitrateRun() ledger.Row {
	r := ledger.NewRow() // every number empty until set
	r.RecordedAt = time.Date(2026, 3, 2, 10, 15, 30, 500e6, time.UTC)
	r.MeasuredAt = time.Date(2026, 3, 2, 9, 48, 12, 0, time.UTC) // the log's first reading
	r.RunID, r.Kind, r.SampleID = "an-014", "sample", "NH4NO3-B2"
	r.Operator, r.Formula, r.Method = "T. Lindqvist", "NH4NO3", "dickinson"
	r.DeltaTK, r.UDeltaTK = -0.8412, 0.0042
	r.HeatCapacityJPerK, r.UHeatCapacityJPerK = 452.71, 0.81
	r.MolarEnthalpyKJPerMol, r.UMolarEnthalpyKJPerMol = 25.61, 0.16
	r.ExpandedUncertaintyKJPerMol, r.CoverageFactor = 0.33, 2.05
	r.MolalityMolPerKg = 0.1849
	r.Status, r.Checks = "pass", "fore-period:pass; after-period:pass"
	r.InputFile = "an-014.csv"
	r.ProgramVersion = "calred 0.1.0"
	return r
}

func ExampleAppend() {
	dir, err := os.MkdirTemp("", "ledger-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "ledger.csv")

	first := ammoniumNitrateRun()
	if _, err := ledger.Append(path, first); err != nil {
		fmt.Println(err)
		return
	}
	// The sample mass was mistyped: record the corrected result as a new
	// row that supersedes the first. The first row stays.
	fixed := first
	fixed.RecordedAt = first.RecordedAt.Add(20 * time.Minute)
	fixed.MolarEnthalpyKJPerMol = 25.68
	fixed.Supersedes, fixed.Note = "an-014", "sample mass 2.503 g, not 2.530 g"
	written, err := ledger.Append(path, fixed)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("line", written[0].Line, "chained to", written[0].PrevHash[:12])

	// Recording the run again without naming it in supersedes is refused.
	_, err = ledger.Append(path, first)
	fmt.Println(err != nil)

	data, err := os.ReadFile(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	rep, err := ledger.Verify(bytes.NewReader(data), "ledger.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	rows, _ := ledger.Read(bytes.NewReader(data), "ledger.csv")
	fmt.Println(rep.Rows, "rows; last hash", rep.LastHash[:12])
	ledger.WriteTable(os.Stdout, rows, rep.Superseded)
	// The hashes were recomputed from the same two rows, written to a file
	// by Append, with Python 3.11's hashlib through the recipe of doc.go
	// (python3 recipe.py ledger.csv → "2 rows, last hash 4caf3719d87c…";
	// line 3's prev_hash cell begins 0c086b3c5494).

	// Output:
	// line 3 chained to 0c086b3c5494
	// true
	// 2 rows; last hash 4caf3719d87c
	// line  recorded (UTC)       measured (UTC)       run     kind    sample     status  ΔT/K     C/(J/K)  ΔsolH/(kJ/mol)  U/(kJ/mol)  k     replaced by
	// 2     2026-03-02 10:15:30  2026-03-02 09:48:12  an-014  sample  NH4NO3-B2  pass    -0.8412  452.71   25.61           0.33        2.05  an-014
	// 3     2026-03-02 10:35:30  2026-03-02 09:48:12  an-014  sample  NH4NO3-B2  pass    -0.8412  452.71   25.68           0.33        2.05
}

func ExampleVerify() {
	dir, err := os.MkdirTemp("", "ledger-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "ledger.csv")
	r := ammoniumNitrateRun()
	second := r
	second.RunID = "an-015"
	if _, err := ledger.Append(path, r, second); err != nil {
		fmt.Println(err)
		return
	}
	data, err := os.ReadFile(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	// Someone "corrects" the first result in a text editor.
	edited := bytes.Replace(data, []byte(",25.61,"), []byte(",25.16,"), 1)
	_, err = ledger.Verify(bytes.NewReader(edited), "ledger.csv")
	fmt.Println(err)
	// Output:
	// ledger.csv:2: bad hash: row_hash does not match the row's contents
}
