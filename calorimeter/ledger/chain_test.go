package ledger

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// lines200 returns a 200-row ledger as its lines (the header first, no
// trailing empty line) and the ledger's bytes.
func lines200(t *testing.T) ([]string, []byte) {
	t.Helper()
	data := readFile(t, newLedger(t, sampleRows(200)...))
	return strings.Split(strings.TrimSuffix(string(data), "\n"), "\n"), data
}

func joinLines(lines []string) []byte {
	return []byte(strings.Join(lines, "\n") + "\n")
}

// bumpDigit changes the last digit of the first cell of line whose text is
// cell, keeping the line otherwise.
func bumpDigit(t *testing.T, line, cell string) string {
	t.Helper()
	i := strings.LastIndexAny(cell, "0123456789")
	if i < 0 || !strings.Contains(line, ","+cell+",") {
		t.Fatalf("cell %q is not in line %q", cell, line)
	}
	changed := cell[:i] + string('0'+(cell[i]-'0'+1)%10) + cell[i+1:]
	return strings.Replace(line, ","+cell+",", ","+changed+",", 1)
}

// rehash recomputes the row_hash of line from its own cells, as someone
// who changed it and knew the rule would.
func rehash(line string) string {
	body := line[:len(line)-65]
	prev := body[len(body)-64:]
	return body + "," + rowHash(prev, []byte(body))
}

func TestVerifyTampering(t *testing.T) {
	const at = 51 // line 51 of the file is row 50, sampleRows index 49
	row := sampleRow(at - 2)
	enthalpy := strconv.FormatFloat(row.MolarEnthalpyKJPerMol, 'g', -1, 64)
	tests := []struct {
		name   string
		change func(t *testing.T, lines []string) []string
		line   int
		reason string
	}{
		{"one digit of a result", func(t *testing.T, l []string) []string {
			l[at-1] = bumpDigit(t, l[at-1], enthalpy)
			return l
		}, at, ReasonBadHash},
		{"the row_hash cell itself", func(t *testing.T, l []string) []string {
			line := l[at-1]
			last := "0"
			if line[len(line)-1] == '0' {
				last = "1"
			}
			l[at-1] = line[:len(line)-1] + last
			return l
		}, at, ReasonBadHash},
		{"the prev_hash cell", func(t *testing.T, l []string) []string {
			line := l[at-1]
			prev := line[len(line)-129 : len(line)-65]
			l[at-1] = strings.Replace(line, prev, hashHex([]byte("forged")), 1)
			return l
		}, at, ReasonBadHash},
		{"a result changed and its hash recomputed", func(t *testing.T, l []string) []string {
			l[at-1] = rehash(bumpDigit(t, l[at-1], enthalpy))
			return l
		}, at + 1, ReasonBrokenChain},
		{"the row removed", func(t *testing.T, l []string) []string {
			return append(l[:at-1], l[at:]...)
		}, at, ReasonBrokenChain},
		{"two rows swapped", func(t *testing.T, l []string) []string {
			l[at-1], l[at] = l[at], l[at-1]
			return l
		}, at, ReasonBrokenChain},
		{"the row repeated", func(t *testing.T, l []string) []string {
			return append(l[:at], l[at-1:]...)
		}, at + 1, ReasonBrokenChain},
		{"the first row's link to the header", func(t *testing.T, l []string) []string {
			l[1] = strings.Replace(l[1], genesisHash, hashHex([]byte("another header")), 1)
			l[1] = rehash(l[1])
			return l
		}, 2, ReasonBrokenChain},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			lines, _ := lines200(t)
			data := joinLines(tt.change(t, lines))
			rep, err := verifyBytes(data)
			var ve *VerifyError
			if !errors.As(err, &ve) {
				t.Fatalf("Verify error = %v, want a *VerifyError", err)
			}
			if ve.Line != tt.line || ve.Reason != tt.reason {
				t.Errorf("Verify: %v; want line %d %s", err, tt.line, tt.reason)
			}
			if want := fmt.Sprintf("ledger.csv:%d: %s", tt.line, tt.reason); !strings.HasPrefix(err.Error(), want) {
				t.Errorf("message %q does not start with %q", err, want)
			}
			if rep == nil || rep.Rows != tt.line-2 {
				t.Errorf("Report = %+v; want the %d rows before line %d", rep, tt.line-2, tt.line)
			}
		})
	}
	t.Run("intact", func(t *testing.T) {
		lines, data := lines200(t)
		rep, err := verifyBytes(data)
		if err != nil {
			t.Fatal(err)
		}
		last := lines[len(lines)-1]
		if rep.Rows != 200 || rep.LastHash != last[len(last)-64:] || len(rep.Superseded) != 0 {
			t.Errorf("Report = %d rows, last %s, %d superseded; want 200, %s, 0", rep.Rows, rep.LastHash, len(rep.Superseded), last[len(last)-64:])
		}
	})
}

func TestTornTail(t *testing.T) {
	path := newLedger(t, sampleRows(10)...)
	whole := readFile(t, path)
	lastStart := bytes.LastIndexByte(whole[:len(whole)-1], '\n') + 1
	tests := []struct {
		name string
		size int // bytes kept
		line int
		rows int // whole rows before the torn line
	}{
		{"cut in the middle of the last row", lastStart + 100, 11, 9},
		{"only the last line end lost", len(whole) - 1, 11, 9},
		{"cut one byte into the last row", lastStart + 1, 11, 9},
		{"cut inside the header", 40, 1, 0},
		{"header without its line end", len(headerLine), 1, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			torn := append([]byte(nil), whole[:tt.size]...)
			rep, err := verifyBytes(torn)
			var ve *VerifyError
			if !errors.As(err, &ve) || ve.Reason != ReasonTornTail || ve.Line != tt.line {
				t.Fatalf("Verify error = %v, want line %d %s", err, tt.line, ReasonTornTail)
			}
			if rep.Rows != tt.rows {
				t.Errorf("Report.Rows = %d, want %d", rep.Rows, tt.rows)
			}
			rows, err := Read(bytes.NewReader(torn), "ledger.csv")
			if !errors.As(err, &ve) || ve.Reason != ReasonTornTail || len(rows) != tt.rows {
				t.Errorf("Read = %d rows, %v; want %d rows and %s", len(rows), err, tt.rows, ReasonTornTail)
			}

			p := filepath.Join(t.TempDir(), "ledger.csv")
			if err := os.WriteFile(p, torn, 0o644); err != nil {
				t.Fatal(err)
			}
			_, err = Append(p, sampleRow(10))
			if !errors.As(err, &ve) || ve.Reason != ReasonTornTail {
				t.Errorf("Append error = %v, want %s", err, ReasonTornTail)
			}
			if err != nil && !strings.Contains(err.Error(), "calred ledger verify "+p) {
				t.Errorf("Append error %q does not point to `calred ledger verify %s`", err, p)
			}
			if after := readFile(t, p); !bytes.Equal(after, torn) {
				t.Errorf("Append changed the torn file: %d bytes before, %d after", len(torn), len(after))
			}
		})
	}
}

func TestVerifyRowsCutFromTheEnd(t *testing.T) {
	// doc.go: rows cut from the end leave a shorter, intact chain, which
	// only a LastHash kept elsewhere shows.
	lines, data := lines200(t)
	full, err := verifyBytes(data)
	if err != nil {
		t.Fatal(err)
	}
	cut, err := verifyBytes(joinLines(lines[:150]))
	if err != nil {
		t.Fatalf("a ledger cut at a line end: %v", err)
	}
	if cut.Rows != 149 || cut.LastHash == full.LastHash {
		t.Errorf("cut ledger: %d rows, last hash %s; want 149 rows and a last hash other than %s", cut.Rows, cut.LastHash, full.LastHash)
	}
}

func TestSupersede(t *testing.T) {
	row := func(id, supersedes, note string) Row {
		r := sampleRow(0)
		r.RunID, r.Supersedes, r.Note = id, supersedes, note
		return r
	}
	type step struct {
		rows   []Row
		reason string // "" when accepted
	}
	tests := []struct {
		name     string
		steps    []step
		replaced map[int]string // line → run_id of the row that replaced it, after all steps
	}{
		{"duplicate run_id refused", []step{
			{[]Row{row("a", "", "")}, ""},
			{[]Row{row("a", "", "")}, ReasonDuplicateRunID},
		}, map[int]string{}},
		{"duplicate within one call refused whole", []step{
			{[]Row{row("a", "", ""), row("b", "", ""), row("a", "", "")}, ReasonDuplicateRunID},
			{[]Row{row("b", "", "")}, ""},
		}, map[int]string{}},
		{"unknown supersedes refused", []step{
			{[]Row{row("a", "", "")}, ""},
			{[]Row{row("b", "x", "")}, ReasonUnknownSupersedes},
			{[]Row{row("x", "x", "")}, ReasonUnknownSupersedes},
		}, map[int]string{}},
		{"correction keeping its run_id", []step{
			{[]Row{row("a", "", ""), row("b", "", "")}, ""},
			{[]Row{row("a", "a", "wrong sample mass entered")}, ""},
			{[]Row{row("a", "a", "second look at the fore period")}, ""},
		}, map[int]string{2: "a", 4: "a"}},
		{"correction under a new run_id", []step{
			{[]Row{row("a", "", "")}, ""},
			{[]Row{row("a2", "a", "recalibrated")}, ""},
			{[]Row{row("a3", "a", "again")}, ReasonStaleSupersedes},
			{[]Row{row("a", "a", "again")}, ReasonStaleSupersedes},
			{[]Row{row("a3", "a2", "again")}, ""},
		}, map[int]string{2: "a2", 3: "a3"}},
		{"correction may not take another run's id", []step{
			{[]Row{row("a", "", ""), row("b", "", "")}, ""},
			{[]Row{row("b", "a", "")}, ReasonDuplicateRunID},
		}, map[int]string{}},
		{"correction within the same call", []step{
			{[]Row{row("a", "", ""), row("a", "a", "typo in operator")}, ""},
		}, map[int]string{2: "a"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "ledger.csv")
			for i, s := range tt.steps {
				before, _ := os.ReadFile(path)
				_, err := Append(path, s.rows...)
				if s.reason == "" {
					if err != nil {
						t.Fatalf("step %d: %v", i+1, err)
					}
					continue
				}
				var re *RowError
				if !errors.As(err, &re) || re.Reason != s.reason {
					t.Fatalf("step %d: error %v, want %s", i+1, err, s.reason)
				}
				if after, _ := os.ReadFile(path); !bytes.Equal(before, after) {
					t.Errorf("step %d: the refused call changed the file", i+1)
				}
			}
			data := readFile(t, path)
			rep, err := verifyBytes(data)
			if err != nil {
				t.Fatal(err)
			}
			rows, err := Read(bytes.NewReader(data), "ledger.csv")
			if err != nil {
				t.Fatal(err)
			}
			got := map[int]string{}
			for _, r := range rows {
				if by, ok := rep.Superseded[r.Hash]; ok {
					got[r.Line] = by
				}
			}
			if fmt.Sprint(got) != fmt.Sprint(tt.replaced) {
				t.Errorf("replaced rows (line → by) = %v, want %v", got, tt.replaced)
			}
			if fmt.Sprint(Superseded(rows)) != fmt.Sprint(rep.Superseded) {
				t.Errorf("Superseded(rows) = %v, Verify gave %v", Superseded(rows), rep.Superseded)
			}
		})
	}
}

func TestVerifyRunRules(t *testing.T) {
	// A ledger that Append would not have written, with a valid chain:
	// Verify still applies the run_id rules.
	chain := func(rows ...Row) []byte {
		buf := []byte(headerLine + "\n")
		prev := genesisHash
		for _, r := range rows {
			r.PrevHash = prev
			start := len(buf)
			buf = appendCSV(buf, r.cells()[:colRowHash])
			prev = rowHash(prev, buf[start:])
			buf = append(buf, ","+prev+"\n"...)
		}
		return buf
	}
	a, b, stale := sampleRow(1), sampleRow(2), sampleRow(3)
	b.RunID, stale.RunID = a.RunID, "kcl-777"
	unknown := sampleRow(2)
	unknown.Supersedes = "kcl-404"
	fix := sampleRow(2)
	fix.Supersedes = a.RunID
	stale.Supersedes = a.RunID
	tests := []struct {
		name   string
		data   []byte
		line   int
		reason string
	}{
		{"repeated run_id", chain(a, b), 3, ReasonDuplicateRunID},
		{"supersedes an absent run", chain(a, unknown), 3, ReasonUnknownSupersedes},
		{"supersedes a replaced run", chain(a, fix, stale), 4, ReasonStaleSupersedes},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := verifyBytes(tt.data)
			var ve *VerifyError
			if !errors.As(err, &ve) || ve.Line != tt.line || ve.Reason != tt.reason {
				t.Errorf("Verify error = %v, want line %d %s", err, tt.line, tt.reason)
			}
		})
	}
}

// The appending processes of TestAppendManyProcesses.

// helperRow is row j of appending process w.
func helperRow(w, j int) Row {
	r := sampleRow(j)
	r.RunID = fmt.Sprintf("w%02d-r%02d", w, j)
	r.Operator = fmt.Sprintf("process %d", w)
	return r
}

// helperAppend appends CALRED_LEDGER_ROWS rows to CALRED_LEDGER_PATH,
// CALRED_LEDGER_BATCH rows per call, as process CALRED_LEDGER_WORKER. It
// returns the exit code of the process.
func helperAppend() int {
	path := os.Getenv("CALRED_LEDGER_PATH")
	w, err1 := strconv.Atoi(os.Getenv("CALRED_LEDGER_WORKER"))
	n, err2 := strconv.Atoi(os.Getenv("CALRED_LEDGER_ROWS"))
	batch, err3 := strconv.Atoi(os.Getenv("CALRED_LEDGER_BATCH"))
	if err := errors.Join(err1, err2, err3); err != nil || batch < 1 {
		fmt.Fprintln(os.Stderr, "helper: bad environment:", err)
		return 2
	}
	for j := 0; j < n; j += batch {
		var rows []Row
		for k := j; k < min(j+batch, n); k++ {
			rows = append(rows, helperRow(w, k))
		}
		if _, err := Append(path, rows...); err != nil {
			fmt.Fprintln(os.Stderr, "helper:", err)
			return 1
		}
	}
	return 0
}

func TestAppendManyProcesses(t *testing.T) {
	if testing.Short() {
		t.Skip("starts many processes")
	}
	const rowsEach = 25
	for _, procs := range []int{16, 8} {
		t.Run(fmt.Sprintf("%d processes", procs), func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "ledger.csv")
			batch := func(w int) int { return 1 + 4*(w%2) } // odd processes write 5 rows per call
			cmds := make([]*exec.Cmd, procs)
			outs := make([]*bytes.Buffer, procs)
			for w := range cmds {
				cmd := exec.Command(os.Args[0], "-test.run=^$")
				cmd.Env = append(os.Environ(),
					"CALRED_LEDGER_HELPER=1",
					"CALRED_LEDGER_PATH="+path,
					fmt.Sprintf("CALRED_LEDGER_WORKER=%d", w),
					fmt.Sprintf("CALRED_LEDGER_ROWS=%d", rowsEach),
					fmt.Sprintf("CALRED_LEDGER_BATCH=%d", batch(w)))
				outs[w] = new(bytes.Buffer)
				cmd.Stdout, cmd.Stderr = outs[w], outs[w]
				if err := cmd.Start(); err != nil {
					t.Fatal(err)
				}
				cmds[w] = cmd
			}
			for w, cmd := range cmds {
				if err := cmd.Wait(); err != nil {
					t.Errorf("process %d: %v\n%s", w, err, outs[w])
				}
			}
			data := readFile(t, path)
			rep, err := verifyBytes(data)
			if err != nil {
				t.Fatalf("Verify: %v", err)
			}
			if want := procs * rowsEach; rep.Rows != want {
				t.Errorf("%d rows, want %d", rep.Rows, want)
			}
			rows, err := Read(bytes.NewReader(data), "ledger.csv")
			if err != nil {
				t.Fatal(err)
			}
			line := map[string]int{}
			for _, r := range rows {
				if _, dup := line[r.RunID]; dup {
					t.Errorf("run %s recorded twice", r.RunID)
				}
				line[r.RunID] = r.Line
			}
			for w := range procs {
				for j := range rowsEach {
					id := helperRow(w, j).RunID
					l, ok := line[id]
					if !ok {
						t.Errorf("run %s is missing", id)
						continue
					}
					if j == 0 {
						continue
					}
					prev := line[helperRow(w, j-1).RunID]
					if j%batch(w) != 0 && l != prev+1 {
						t.Errorf("run %s on line %d does not follow %s (line %d) of the same call", id, l, helperRow(w, j-1).RunID, prev)
					}
					if l <= prev {
						t.Errorf("run %s (line %d) is before %s (line %d) that its process wrote first", id, l, helperRow(w, j-1).RunID, prev)
					}
				}
			}
		})
	}
}

func TestAppendGoroutines(t *testing.T) {
	// Appends from goroutines of one process are serialised as well.
	path := filepath.Join(t.TempDir(), "ledger.csv")
	const workers, each = 6, 10
	errs := make(chan error, workers)
	for w := range workers {
		go func() {
			for j := range each {
				if _, err := Append(path, helperRow(w, j)); err != nil {
					errs <- err
					return
				}
			}
			errs <- nil
		}()
	}
	for range workers {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
	rep, err := verifyBytes(readFile(t, path))
	if err != nil || rep.Rows != workers*each {
		t.Errorf("Verify = %+v, %v; want %d rows", rep, err, workers*each)
	}
}

func TestPythonAudit(t *testing.T) {
	// The Python recipe of doc.go, run on ledgers that Append wrote, must
	// agree with Verify.
	python := os.Getenv("CALRED_PYTHON")
	if python == "" {
		python = "python3"
	}
	if _, err := exec.LookPath(python); err != nil {
		t.Skipf("no %s to run the recipe of doc.go", python)
	}
	script := pythonRecipe(t)
	dir := t.TempDir()
	scriptPath := filepath.Join(dir, "audit.py")
	if err := os.WriteFile(scriptPath, []byte(script), 0o644); err != nil {
		t.Fatal(err)
	}
	rows := sampleRows(60)
	rows[3].Note = `lid "B", stirrer 300 rpm, 2 spikes`
	rows[4].Operator = "=cmd|' /C calc'!A0"
	rows[5].Operator = "Zoë Ångström"
	lines, data := func() ([]string, []byte) {
		d := readFile(t, newLedger(t, rows...))
		return strings.Split(strings.TrimSuffix(string(d), "\n"), "\n"), d
	}()
	rep, err := verifyBytes(data)
	if err != nil {
		t.Fatal(err)
	}
	tampered := append([]string(nil), lines...)
	tampered[50] = bumpDigit(t, tampered[50], strconv.FormatFloat(rows[49].HeatCapacityJPerK, 'g', -1, 64))
	rehashed := append([]string(nil), lines...)
	rehashed[50] = rehash(bumpDigit(t, rehashed[50], strconv.FormatFloat(rows[49].HeatCapacityJPerK, 'g', -1, 64)))
	tests := []struct {
		name string
		data []byte
		want string // in the output
		ok   bool
	}{
		{"intact", data, fmt.Sprintf("%d rows, last hash %s", rep.Rows, rep.LastHash), true},
		{"one digit changed", joinLines(tampered), "line 51: bad hash", false},
		{"hash recomputed", joinLines(rehashed), "line 52: broken chain", false},
		{"torn tail", data[:len(data)-3], "torn tail", false},
		{"header only", []byte(headerLine + "\n"), "0 rows, last hash " + genesisHash, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			p := filepath.Join(dir, strings.ReplaceAll(tt.name, " ", "-")+".csv")
			if err := os.WriteFile(p, tt.data, 0o644); err != nil {
				t.Fatal(err)
			}
			out, err := exec.Command(python, scriptPath, p).CombinedOutput()
			if (err == nil) != tt.ok || !strings.Contains(string(out), tt.want) {
				t.Errorf("python: %v\n%s\nwant success=%v and %q", err, out, tt.ok, tt.want)
			}
		})
	}
}

// pythonRecipe extracts the indented Python block of doc.go.
func pythonRecipe(t *testing.T) string {
	t.Helper()
	src := string(readFile(t, "doc.go"))
	start := strings.Index(src, "//\timport hashlib")
	if start < 0 {
		t.Fatal("doc.go has no Python recipe")
	}
	var b strings.Builder
	for _, line := range strings.Split(src[start:], "\n") {
		code, ok := strings.CutPrefix(line, "//\t")
		if !ok {
			break
		}
		b.WriteString(code + "\n")
	}
	return b.String()
}
