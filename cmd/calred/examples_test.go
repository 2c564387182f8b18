package main

import (
	"bufio"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestReadmeCommands runs every `go run ./cmd/calred …` line of the README
// (the Quick start and the walk-through) from the repository root, so the
// README cannot rot. Outputs go to a temporary directory.
func TestReadmeCommands(t *testing.T) {
	root := mustAbs(t, "../..")
	f, err := os.Open(filepath.Join(root, "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var cmds []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if rest, ok := strings.CutPrefix(line, "go run ./cmd/calred "); ok {
			cmds = append(cmds, rest)
		}
	}
	if len(cmds) == 0 {
		t.Fatal("README has no `go run ./cmd/calred` commands")
	}
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Chdir(root); err != nil {
		t.Fatal(err)
	}
	defer os.Chdir(wd)
	out := t.TempDir()
	for _, c := range cmds {
		args := strings.Fields(c)
		for i, a := range args {
			a = strings.Trim(a, `'"`)
			// Files the README writes (bare names such as cal.json or results.csv)
			// live in the temporary directory; inputs are under examples/.
			switch filepath.Ext(a) {
			case ".html", ".svg", ".png", ".json", ".csv":
				if !strings.Contains(a, "/") {
					a = filepath.Join(out, a)
				}
			}
			args[i] = a
		}
		t.Run(c, func(t *testing.T) {
			code, _, stderr := runCLI(t, args...)
			if code != exitOK {
				t.Errorf("exit %d\n%s", code, stderr)
			}
		})
	}
}
