package main

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"testing"

	"calred/calorimeter/ledger"
)

// TestLedgerManyProcesses builds the real binary and runs eight processes
// at once, each appending 25 reduced runs to one ledger, one `calred reduce`
// per run: 200 whole rows must come out, the chain intact (issue: the
// results ledger; CONTRACT "Ledger": appends are serialised by a file lock).
func TestLedgerManyProcesses(t *testing.T) {
	if testing.Short() {
		t.Skip("spawns 200 processes")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "calred")
	build := exec.Command("go", "build", "-o", bin, ".")
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	logPath := mustAbs(t, "../../examples/harbour-street/s01-mbeki.csv")
	led := filepath.Join(dir, "ledger.csv")
	const procs, runs = 8, 25
	var wg sync.WaitGroup
	errs := make(chan error, procs*runs)
	for p := range procs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for r := range runs {
				cmd := exec.Command(bin, "reduce", logPath, "--sample-mass", "5.012g", "--formula", "KNO3",
					"--heat-capacity", "442±2J/K", "--run-id", fmt.Sprintf("p%d-r%02d", p, r), "--ledger", led)
				var stderr bytes.Buffer
				cmd.Stderr = &stderr
				if err := cmd.Run(); err != nil {
					errs <- fmt.Errorf("p%d-r%02d: %v: %s", p, r, err, stderr.String())
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	f, err := os.Open(led)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rep, err := ledger.Verify(f, "ledger.csv")
	if err != nil {
		t.Fatalf("verify: %v", err)
	}
	if rep.Rows != procs*runs {
		t.Errorf("%d rows, want %d", rep.Rows, procs*runs)
	}
	b, _ := os.ReadFile(led)
	runID := slices.Index(ledger.Header(), "run_id")
	seen := map[string]bool{}
	for _, line := range strings.Split(strings.TrimSuffix(string(b), "\n"), "\n")[1:] {
		cells := strings.Split(line, ",")
		if len(cells) <= runID || seen[cells[runID]] {
			t.Errorf("line %q: run id missing or repeated", line)
		}
		seen[cells[runID]] = true
	}
}
