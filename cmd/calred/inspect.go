package main

import (
	"path/filepath"

	"calred/calorimeter/logfile"
)

func runInspect(a *app, args []string) error {
	fs := newFlags(a, "inspect", "LOG [--json]",
		"Show what the reader detects in a log export: delimiter, decimal mark, columns and units,\n"+
			"time base, number of readings, span and sampling interval (s), temperature range (°C and K),\n"+
			"gaps, duplicated times and `# key: value` metadata. The first thing to run on a new export.")
	asJSON := fs.Bool("json", false, "print one JSON object")
	lf := addLogFlags(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return withHint(usagef("inspect: want exactly one LOG, got %d arguments", fs.NArg()), "e.g. `calred inspect run7.csv`")
	}
	opt, err := lf.options()
	if err != nil {
		return err
	}
	log, _, err := readLog(fs.Arg(0), opt)
	if err != nil {
		return err
	}
	s := logfile.Summarise(log)
	s.File = filepath.Base(fs.Arg(0))
	if *asJSON {
		return writeJSON(a.stdout, s)
	}
	return s.WriteText(a.stdout)
}
