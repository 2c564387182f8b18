package logfile

import (
	"strings"
	"testing"
)

// TestReadOneMoreBlank: one blank cell beyond those listed is "1 more
// reading", not "1 more readings".
func TestReadOneMoreBlank(t *testing.T) {
	// listedBlanks rows are listed one by one, the one after them counted.
	in := "t (s),T (K)\n0,290\n" + repeatRows(listedBlanks+1, "%d,\n")
	l, err := Read(strings.NewReader(in), Options{Name: "x.csv"})
	if err != nil {
		t.Fatal(err)
	}
	n := len(l.Warnings)
	if want := "x.csv: 1 more reading skipped for blank cells (not listed)"; n != listedBlanks+1 || l.Warnings[n-1].String() != want {
		t.Errorf("%d warnings, last %v, want %d with the last %q", n, l.Warnings[n-1], listedBlanks+1, want)
	}
}
