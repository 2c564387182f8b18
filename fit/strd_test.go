package fit

import (
	"bufio"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The NIST StRD files in ../testdata/nist-strd are copies of the originals
// (https://www.itl.nist.gov/div898/strd/); see the README there.

var strdDataLines = regexp.MustCompile(`Data\s+\(lines\s+(\d+)\s+to\s+(\d+)\)`)

// strdReadDat returns x and y of a NIST StRD .dat file, reading the data
// lines named in its header ("Data (lines a to b)"), columns y then x.
func strdReadDat(t testing.TB, name string) (x, y []float64) {
	t.Helper()
	path := filepath.Join("..", "testdata", "nist-strd", name)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var lines []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		lines = append(lines, sc.Text())
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	from, to := 0, 0
	for _, l := range lines[:min(len(lines), 20)] {
		if m := strdDataLines.FindStringSubmatch(l); m != nil {
			from, _ = strconv.Atoi(m[1])
			to, _ = strconv.Atoi(m[2])
		}
	}
	if from == 0 || to > len(lines) {
		t.Fatalf("%s: no usable data line range in the header", name)
	}
	for i := from; i <= to; i++ {
		fs := strings.Fields(lines[i-1])
		if len(fs) != 2 {
			t.Fatalf("%s:%d: want 2 fields, got %q", name, i, lines[i-1])
		}
		yv, err1 := strconv.ParseFloat(fs[0], 64)
		xv, err2 := strconv.ParseFloat(fs[1], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("%s:%d: %v %v", name, i, err1, err2)
		}
		x = append(x, xv)
		y = append(y, yv)
	}
	return x, y
}

// strdReadCSV returns x and y of a two-column CSV "y,x" with a header.
func strdReadCSV(t testing.TB, name string) (x, y []float64) {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "testdata", "nist-strd", name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range recs[1:] {
		yv, err1 := strconv.ParseFloat(r[0], 64)
		xv, err2 := strconv.ParseFloat(r[1], 64)
		if err1 != nil || err2 != nil {
			t.Fatalf("%s:%d: %v %v", name, i+2, err1, err2)
		}
		x = append(x, xv)
		y = append(y, yv)
	}
	return x, y
}

// lre is the log relative error used by NIST StRD to score results,
//
//	LRE = −log10(|q − c|/|c|),
//
// capped at 15 (agreement to the last digit of float64).
func lre(q, c float64) float64 {
	if q == c {
		return 15
	}
	v := -math.Log10(math.Abs(q-c) / math.Abs(c))
	if math.IsNaN(v) {
		return 0
	}
	return math.Min(v, 15)
}

// checkLRE fails t unless LRE(got, cert) ≥ min.
func checkLRE(t *testing.T, what string, got, cert, min float64) {
	t.Helper()
	l := lre(got, cert)
	if l < min {
		t.Errorf("%s = %.15g, certified %.15g: LRE %.2f < %.1f", what, got, cert, l, min)
		return
	}
	t.Logf("%s: LRE %.1f", what, l)
}

func TestLRE(t *testing.T) {
	// analytic: a relative error of 1e-7 gives LRE 7.
	if got := lre(1+1e-7, 1); math.Abs(got-7) > 1e-6 {
		t.Errorf("lre(1+1e-7, 1) = %v, want 7", got)
	}
}
