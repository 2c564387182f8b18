package main

import (
	"crypto/sha256"
	"encoding/hex"
	"io"
	"path/filepath"
	"strconv"
	"strings"

	flag "github.com/spf13/pflag"

	"calred/calorimeter/logfile"
)

// logFlags are the flags that steer the log reader; inspect has them alone,
// reduce and calibrate get them through the field table.
type logFlags struct {
	timeColumn, tempColumn, timeUnit, tempUnit, delimiter, decimal *string
}

func addLogFlags(fs *flag.FlagSet) *logFlags {
	get := func(name string) *string {
		f, _ := fieldByName(name)
		return fs.String(name, "", f.help)
	}
	return &logFlags{
		timeColumn: get("time-column"),
		tempColumn: get("temperature-column"),
		timeUnit:   get("time-unit"),
		tempUnit:   get("temperature-unit"),
		delimiter:  get("delimiter"),
		decimal:    get("decimal"),
	}
}

func (l *logFlags) options() (logfile.Options, error) {
	s := newSpec()
	for name, p := range map[string]*string{
		"time-column": l.timeColumn, "temperature-column": l.tempColumn,
		"time-unit": l.timeUnit, "temperature-unit": l.tempUnit,
		"delimiter": l.delimiter, "decimal": l.decimal,
	} {
		if *p != "" {
			s.set(name, *p, "flag --"+name)
		}
	}
	return logOptions(s)
}

// logOptions turns the log-reading fields of a spec into reader options.
func logOptions(s *spec) (logfile.Options, error) {
	opt := logfile.Options{
		TimeColumn:        s.text("time-column"),
		TemperatureColumn: s.text("temperature-column"),
		TimeUnit:          s.text("time-unit"),
		TemperatureUnit:   s.text("temperature-unit"),
	}
	if err := (logfile.Options{TimeUnit: opt.TimeUnit}).Validate(); err != nil {
		return opt, s.fail("time-unit", err)
	}
	for _, name := range []string{"time-column", "temperature-column"} {
		if n, err := strconv.Atoi(s.text(name)); err == nil && n < 1 {
			return opt, s.failf(name, "column %d: columns are numbered from 1", n)
		}
	}
	switch u := strings.TrimPrefix(strings.ToUpper(opt.TemperatureUnit), "°"); u {
	case "", "C", "K", "F":
		opt.TemperatureUnit = u
	case "DEGC", "CELSIUS", "DEG C":
		opt.TemperatureUnit = "C"
	case "DEGF", "FAHRENHEIT", "DEG F":
		opt.TemperatureUnit = "F"
	case "KELVIN":
		opt.TemperatureUnit = "K"
	default:
		return opt, s.failf("temperature-unit", "unknown temperature unit %q (use C, K or F)", opt.TemperatureUnit)
	}
	switch d := strings.ToLower(s.text("delimiter")); d {
	case "":
	case "comma", ",":
		opt.Delimiter = ','
	case "semicolon", ";":
		opt.Delimiter = ';'
	case "tab", `\t`, "\t":
		opt.Delimiter = '\t'
	case "space", "spaces", " ":
		opt.Delimiter = ' '
	case "pipe", "|":
		opt.Delimiter = '|'
	default:
		return opt, s.failf("delimiter", "unknown delimiter %q (use comma, semicolon, tab, pipe or space)", d)
	}
	switch d := strings.ToLower(s.text("decimal")); d {
	case "":
	case "point", ".":
		opt.Decimal = '.'
	case "comma", ",":
		opt.Decimal = ','
	default:
		return opt, s.failf("decimal", "unknown decimal mark %q (use point or comma)", d)
	}
	return opt, nil
}

// readLog reads a log file and returns it with the SHA-256 of its bytes.
// A missing file or a parse error is a data error naming the file.
func readLog(path string, opt logfile.Options) (*logfile.Log, string, error) {
	f, err := openInput(path)
	if err != nil {
		return nil, "", err
	}
	defer f.Close()
	h := sha256.New()
	opt.Name = filepath.Base(path)
	log, err := logfile.Read(io.TeeReader(f, h), opt)
	if err != nil {
		return nil, "", dataErr(err)
	}
	// Hash whatever the reader did not consume (it may stop at the last line).
	if _, err := io.Copy(h, f); err != nil {
		return nil, "", dataf("%s: %v", opt.Name, err)
	}
	return log, hex.EncodeToString(h.Sum(nil)), nil
}
