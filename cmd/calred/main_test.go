package main

import (
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/rogpeppe/go-internal/testscript"
)

// TestMain lets the testscript files run `calred` as a real command
// (the test binary re-executed), with its real exit codes.
func TestMain(m *testing.M) {
	testscript.Main(m, map[string]func(){
		"calred": func() { os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)) },
	})
}

// TestScripts runs the CLI behaviour described in testdata/script/*.txtar.
func TestScripts(t *testing.T) {
	testscript.Run(t, testscript.Params{
		Dir: "testdata/script",
		Setup: func(env *testscript.Env) error {
			// The repository's shared test data and examples, for scripts that need real logs.
			env.Setenv("TESTDATA", mustAbs(t, "../../testdata"))
			env.Setenv("EXAMPLES", mustAbs(t, "../../examples"))
			return nil
		},
		Cmds: map[string]func(ts *testscript.TestScript, neg bool, args []string){
			// replace-in-line FILE LINE OLD NEW: change the first OLD on one line of FILE.
			"replace-in-line": func(ts *testscript.TestScript, neg bool, args []string) {
				if neg || len(args) != 4 {
					ts.Fatalf("usage: replace-in-line FILE LINE OLD NEW")
				}
				name := ts.MkAbs(args[0])
				b, err := os.ReadFile(name)
				ts.Check(err)
				lines := strings.SplitAfter(string(b), "\n")
				n, err := strconv.Atoi(args[1])
				ts.Check(err)
				if n < 1 || n > len(lines) || !strings.Contains(lines[n-1], args[2]) {
					ts.Fatalf("line %d of %s has no %q", n, args[0], args[2])
				}
				lines[n-1] = strings.Replace(lines[n-1], args[2], args[3], 1)
				ts.Check(os.WriteFile(name, []byte(strings.Join(lines, "")), 0o644))
			},
		},
	})
}
