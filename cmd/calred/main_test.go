package main

import (
	"encoding/json"
	"fmt"
	"io"
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
			// json FILE [PATH...]: FILE (stdout for the last command's output)
			// holds exactly one JSON value, and each dotted PATH
			// (drift.pre.n) names a member of it, null allowed.
			"json": func(ts *testscript.TestScript, neg bool, args []string) {
				if len(args) < 1 {
					ts.Fatalf("usage: json FILE [PATH...]")
				}
				err := jsonHas(ts.ReadFile(args[0]), args[1:])
				if neg {
					if err == nil {
						ts.Fatalf("%s: want invalid JSON or a missing member", args[0])
					}
					return
				}
				ts.Check(err)
			},
			// shift-time SRC DST: copy a log of "time,temperature" lines with 60 s
			// added to every time, as a timer started a minute early writes it.
			"shift-time": func(ts *testscript.TestScript, neg bool, args []string) {
				if neg || len(args) != 2 {
					ts.Fatalf("usage: shift-time SRC DST")
				}
				var out strings.Builder
				for _, line := range strings.SplitAfter(ts.ReadFile(args[0]), "\n") {
					tv, rest, ok := strings.Cut(line, ",")
					if v, err := strconv.ParseFloat(tv, 64); ok && err == nil {
						line = strconv.FormatFloat(v+60, 'f', 1, 64) + "," + rest
					}
					out.WriteString(line)
				}
				ts.Check(os.WriteFile(ts.MkAbs(args[1]), []byte(out.String()), 0o644))
			},
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

// jsonHas checks that text is one JSON value with every dotted path in it.
func jsonHas(text string, paths []string) error {
	dec := json.NewDecoder(strings.NewReader(text))
	var v any
	if err := dec.Decode(&v); err != nil {
		return fmt.Errorf("not JSON: %w", err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return fmt.Errorf("more than one JSON value")
	}
	for _, p := range paths {
		cur := v
		for _, k := range strings.Split(p, ".") {
			obj, ok := cur.(map[string]any)
			if !ok {
				return fmt.Errorf("%s: %q is not inside an object", p, k)
			}
			if cur, ok = obj[k]; !ok {
				return fmt.Errorf("%s: no member %q", p, k)
			}
		}
	}
	return nil
}
