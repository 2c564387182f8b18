package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"regexp"
	"runtime"
	"runtime/debug"
	"strings"

	flag "github.com/spf13/pflag"
)

// Exit codes (CONTRACT.md).
const (
	exitOK        = 0
	exitOther     = 1
	exitUsage     = 2
	exitData      = 3
	exitCheckFail = 4
)

// version is set at build time with -ldflags "-X main.version=…".
var version = "0.1.0-dev"

// usageError is a bad flag, a bad flag value or a bad argument: exit 2.
type usageError struct{ err error }

func (e *usageError) Error() string { return e.err.Error() }
func (e *usageError) Unwrap() error { return e.err }

func usagef(format string, a ...any) error { return &usageError{fmt.Errorf(format, a...)} }

// dataError is input data that cannot be used: a missing or unparseable
// file, or physically impossible values: exit 3.
type dataError struct{ err error }

func (e *dataError) Error() string { return e.err.Error() }
func (e *dataError) Unwrap() error { return e.err }

func dataErr(err error) error {
	if err == nil {
		return nil
	}
	var d *dataError
	if errors.As(err, &d) {
		return err
	}
	return &dataError{err}
}

func dataf(format string, a ...any) error { return &dataError{fmt.Errorf(format, a...)} }

// errCheckFailed reports that the work was done and printed, but a check
// failed: exit 4. It prints nothing of its own.
var errCheckFailed = errors.New("a check failed")

// hintError carries a next step for the user, printed as `calred: hint: …`.
type hintError struct {
	err  error
	hint string
}

func (e *hintError) Error() string { return e.err.Error() }
func (e *hintError) Unwrap() error { return e.err }

func withHint(err error, hint string) error { return &hintError{err, hint} }

// app holds the streams of one invocation.
type app struct {
	stdin          io.Reader
	stdout, stderr io.Writer
}

func (a *app) warnf(format string, args ...any) {
	fmt.Fprintf(a.stderr, "calred: warning: "+format+"\n", args...)
}

type command struct {
	name    string
	args    string
	summary string
	run     func(a *app, args []string) error
}

func commands() []command {
	return []command{
		{"reduce", "LOG [flags]", "reduce one sample run to ΔT, heat and molar enthalpy of solution", runReduce},
		{"calibrate", "LOG... [flags]", "reduce calibration runs to the calorimeter's heat capacity", runCalibrate},
		{"batch", "MANIFEST.csv [flags]", "reduce every run of a manifest, grade, report", runBatch},
		{"ledger", "verify|show|chart LEDGER.csv", "check, list or chart the results ledger", runLedger},
		{"inspect", "LOG [--json]", "show what the reader detects in a log file", runInspect},
		{"molar-mass", "FORMULA... [--json]", "molar mass from a chemical formula", runMolarMass},
		{"version", "", "print the version", runVersion},
		{"help", "[COMMAND]", "show help", nil},
	}
}

// run is the whole program: it parses args, runs one command and turns its
// error into an exit code and one line on stderr.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	a := &app{stdin: stdin, stdout: stdout, stderr: stderr}
	if len(args) == 0 {
		writeUsage(stderr)
		return exitUsage
	}
	name, rest := args[0], args[1:]
	switch name {
	case "-h", "--help", "help":
		if len(rest) > 0 && name == "help" && rest[0] != "help" {
			return a.finish(helpFor(a, rest[0]))
		}
		writeUsage(stdout)
		return exitOK
	case "--version", "-version":
		return a.finish(runVersion(a, rest))
	}
	for _, c := range commands() {
		if c.name == name && c.run != nil {
			return a.finish(c.run(a, rest))
		}
	}
	return a.finish(withHint(usagef("unknown command %q", name), "run `calred help` for the list of commands"))
}

func (a *app) finish(err error) int {
	if err == nil {
		return exitOK
	}
	if errors.Is(err, flag.ErrHelp) {
		return exitOK
	}
	if errors.Is(err, errCheckFailed) {
		return exitCheckFail
	}
	msg, inner := splitHint(oneLine(err.Error()))
	fmt.Fprintf(a.stderr, "calred: %s\n", msg)
	var h *hintError
	if errors.As(err, &h) && h.hint != "" {
		fmt.Fprintf(a.stderr, "calred: hint: %s\n", h.hint)
	} else if inner != "" {
		fmt.Fprintf(a.stderr, "calred: hint: %s\n", inner)
	}
	var u *usageError
	var d *dataError
	switch {
	case errors.As(err, &u):
		return exitUsage
	case errors.As(err, &d):
		return exitData
	}
	return exitOther
}

// hintInMessage is a next step that a library error carries in its text;
// it goes on the hint line, not on the error line.
var hintInMessage = regexp.MustCompile(` ?\(hint: ([^()]*)\)`)

// splitHint takes a "(hint: …)" out of an error message and returns both.
func splitHint(msg string) (rest, hint string) {
	m := hintInMessage.FindStringSubmatchIndex(msg)
	if m == nil {
		return msg, ""
	}
	return msg[:m[0]] + msg[m[1]:], msg[m[2]:m[3]]
}

func oneLine(s string) string { return strings.ReplaceAll(strings.TrimSpace(s), "\n", "; ") }

func writeUsage(w io.Writer) {
	fmt.Fprintln(w, "calred reduces solution-calorimetry temperature logs: corrected temperature change,")
	fmt.Fprintln(w, "heat capacity, molar enthalpy of solution with its uncertainty, checks and a ledger.")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Usage:")
	for _, c := range commands() {
		fmt.Fprintf(w, "  calred %-10s %-30s %s\n", c.name, c.args, c.summary)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Run `calred COMMAND --help` for the flags of a command and their units.")
	fmt.Fprintln(w, "Exit codes: 0 done, 2 usage error, 3 bad input data, 4 done but a check failed, 1 other.")
}

func helpFor(a *app, name string) error {
	for _, c := range commands() {
		if c.name == name && c.run != nil {
			return c.run(a, []string{"--help"})
		}
	}
	return usagef("no help for unknown command %q", name)
}

// newFlags makes the FlagSet of one command; --help prints to stdout.
func newFlags(a *app, name, args, about string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.SortFlags = false
	fs.Usage = func() {
		fmt.Fprintf(a.stdout, "Usage: %s\n\n%s\n\nFlags:\n", strings.TrimSpace("calred "+name+" "+args), about)
		if !fs.HasFlags() {
			fmt.Fprintln(a.stdout, "  none")
			return
		}
		fs.SetOutput(a.stdout)
		fs.PrintDefaults()
		fs.SetOutput(io.Discard)
	}
	return fs
}

// parseFlags parses args and turns pflag's errors into usage errors.
func parseFlags(fs *flag.FlagSet, args []string) error {
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return err // pflag has printed the usage
		}
		return withHint(&usageError{err}, fmt.Sprintf("run `calred %s --help` for the flags", fs.Name()))
	}
	return nil
}

func runVersion(a *app, args []string) error {
	fs := newFlags(a, "version", "", "Print the version of calred, the Go version and the commit if known.")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	commit := ""
	if bi, ok := debug.ReadBuildInfo(); ok {
		for _, s := range bi.Settings {
			if s.Key == "vcs.revision" {
				commit = s.Value
			}
		}
	}
	fmt.Fprintf(a.stdout, "calred %s (%s %s/%s", version, runtime.Version(), runtime.GOOS, runtime.GOARCH)
	if commit != "" {
		fmt.Fprintf(a.stdout, ", commit %s", commit)
	}
	fmt.Fprintln(a.stdout, ")")
	return nil
}

// openInput opens a named input file; a missing or unreadable file is a data error.
func openInput(name string) (*os.File, error) {
	f, err := os.Open(name)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			return nil, dataf("%s: %v", name, pe.Err)
		}
		return nil, dataErr(err)
	}
	if fi, err := f.Stat(); err == nil && fi.IsDir() {
		f.Close()
		return nil, dataf("%s: is a directory, not a file", name)
	}
	return f, nil
}
