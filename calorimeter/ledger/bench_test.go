package ledger

import (
	"bytes"
	"fmt"
	"path/filepath"
	"testing"
)

// A busy instrument records perhaps 20 runs a day: 10 000 rows is more than
// a year of work.
const benchRows = 10000

// BenchmarkVerify checks a 10 000-row ledger. Target: under 100 ms per
// verify on one core, so that `calred ledger verify` answers at once.
func BenchmarkVerify(b *testing.B) {
	data := readFile(b, newLedger(b, sampleRows(benchRows)...))
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, err := Verify(bytes.NewReader(data), "ledger.csv"); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkAppend appends one row to a ledger of 10 000 rows and more; each
// append reads the whole file under the lock. Target: under 100 ms per
// append, small beside the reduction that produced the row.
func BenchmarkAppend(b *testing.B) {
	path := filepath.Join(b.TempDir(), "ledger.csv")
	if _, err := Append(path, sampleRows(benchRows)...); err != nil {
		b.Fatal(err)
	}
	i := 0
	for b.Loop() {
		r := sampleRow(0)
		r.RunID = fmt.Sprintf("bench-%d", i)
		i++
		if _, err := Append(path, r); err != nil {
			b.Fatal(err)
		}
	}
}
