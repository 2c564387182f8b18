package main

import (
	"bytes"
	"path/filepath"
	"testing"
)

func mustAbs(t *testing.T, p string) string {
	t.Helper()
	a, err := filepath.Abs(p)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// runCLI calls run directly and returns the exit code and both streams.
func runCLI(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var o, e bytes.Buffer
	code = run(args, bytes.NewReader(nil), &o, &e)
	return code, o.String(), e.String()
}
