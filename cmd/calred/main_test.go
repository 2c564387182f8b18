package main

import (
	"os"
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
	})
}
