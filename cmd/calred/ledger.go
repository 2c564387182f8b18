package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"calred/calorimeter"
	"calred/calorimeter/ledger"
	"calred/calorimeter/plot"
	"calred/units"
)

const ledgerAbout = `Work with a results ledger (an append-only, hash-chained CSV):
  verify LEDGER.csv             check the header, every row and the hash chain; exit 0 only when intact
  show LEDGER.csv [filters]     print the rows as a table (--json for JSON lines)
  chart LEDGER.csv -o FILE      control chart of a recorded quantity (heat capacity by default)`

func runLedger(a *app, args []string) error {
	if len(args) == 0 || args[0] == "--help" || args[0] == "-h" {
		fs := newFlags(a, "ledger", "verify|show|chart LEDGER.csv [flags]", ledgerAbout)
		if len(args) == 0 {
			return withHint(usagef("ledger: want verify, show or chart"), "e.g. `calred ledger verify results.csv`")
		}
		fs.Usage()
		return nil
	}
	switch args[0] {
	case "verify":
		return runLedgerVerify(a, args[1:])
	case "show":
		return runLedgerShow(a, args[1:])
	case "chart":
		return runLedgerChart(a, args[1:])
	}
	return withHint(usagef("ledger: unknown action %q (use verify, show or chart)", args[0]), "`calred ledger --help` lists them")
}

func oneLedger(a *app, fsName string, fs interface {
	NArg() int
	Arg(int) string
}) (string, error) {
	if fs.NArg() != 1 {
		return "", usagef("ledger %s: want exactly one LEDGER.csv, got %d arguments", fsName, fs.NArg())
	}
	return fs.Arg(0), nil
}

func runLedgerVerify(a *app, args []string) error {
	fs := newFlags(a, "ledger verify", "LEDGER.csv", "Check the header, every row and the hash chain of a ledger. Exit 0 only when intact;\notherwise name the first bad line and why.")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	path, err := oneLedger(a, "verify", fs)
	if err != nil {
		return err
	}
	f, err := openInput(path)
	if err != nil {
		return err
	}
	defer f.Close()
	rep, err := ledger.Verify(f, filepath.Base(path))
	if err != nil {
		var ve *ledger.VerifyError
		if errors.As(err, &ve) {
			return dataErr(err)
		}
		return dataf("%s: %w", filepath.Base(path), err)
	}
	fmt.Fprintf(a.stdout, "%s: intact — %d rows, hash chain unbroken, last hash %s\n", filepath.Base(path), rep.Rows, rep.LastHash)
	if n := len(rep.Superseded); n > 0 {
		fmt.Fprintf(a.stdout, "%d row(s) replaced by later corrections\n", n)
	}
	return nil
}

func readLedger(path string) ([]ledger.Row, map[string]string, error) {
	f, err := openInput(path)
	if err != nil {
		return nil, nil, err
	}
	defer f.Close()
	rows, err := ledger.Read(f, filepath.Base(path))
	if err != nil {
		return nil, nil, dataErr(err)
	}
	return rows, ledger.Superseded(rows), nil
}

func runLedgerShow(a *app, args []string) error {
	fs := newFlags(a, "ledger show", "LEDGER.csv [filters]", "Print ledger rows as an aligned table, oldest first.")
	kind := fs.String("kind", "", "only rows of this kind: sample or calibration")
	sampleID := fs.String("sample-id", "", "only rows with this sample id")
	status := fs.String("status", "", "only rows with this status: pass, warn or fail")
	since := fs.String("since", "", "only rows recorded at or after this UTC date or time (2026-03-04 or RFC 3339)")
	asJSON := fs.Bool("json", false, "print JSON lines, one object per row")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	path, err := oneLedger(a, "show", fs)
	if err != nil {
		return err
	}
	*kind, *status = strings.ToLower(strings.TrimSpace(*kind)), strings.ToLower(strings.TrimSpace(*status))
	flt := ledger.Filter{Kind: *kind, SampleID: *sampleID, Status: *status}
	if *since != "" {
		t, err := parseSince(*since)
		if err != nil {
			return usagef("flag --since: %w", err)
		}
		flt.Since = t
	}
	switch *kind {
	case "", "sample", "calibration":
	default:
		return usagef("flag --kind: %q is not sample or calibration", *kind)
	}
	switch *status {
	case "", "pass", "warn", "fail":
	default:
		return usagef("flag --status: %q is not pass, warn or fail", *status)
	}
	rows, sup, err := readLedger(path)
	if err != nil {
		return err
	}
	var keep []ledger.Row
	for _, r := range rows {
		if flt.Match(r) {
			keep = append(keep, r)
		}
	}
	if *asJSON {
		return ledger.WriteJSONLines(a.stdout, keep, sup)
	}
	return ledger.WriteTable(a.stdout, keep, sup)
}

func parseSince(s string) (time.Time, error) {
	for _, layout := range []string{time.RFC3339Nano, "2006-01-02T15:04:05", "2006-01-02 15:04", "2006-01-02"} {
		if t, err := time.Parse(layout, s); err == nil {
			return t.UTC(), nil
		}
	}
	return time.Time{}, fmt.Errorf("%q is not a date (2026-03-04) or an RFC 3339 time", s)
}

func runLedgerChart(a *app, args []string) error {
	fs := newFlags(a, "ledger chart", "LEDGER.csv -o FILE [flags]",
		"Draw an individuals control chart of a recorded quantity in time order (by the date\n"+
			"measured when every run has one, else by the date recorded): centre line,\n"+
			"±2σ and ±3σ limits with σ from the average moving range / 1.128 (NIST/SEMATECH\n"+
			"e-Handbook of Statistical Methods, §6.3.2), points that break a run rule marked and listed.")
	output := fs.StringP("output", "o", "", "write the chart to FILE.svg, FILE.png or FILE.pdf")
	quantity := fs.String("quantity", "heat-capacity", "what to chart: heat-capacity (J/K) or molar-enthalpy (kJ/mol)")
	kind := fs.String("kind", "", "only rows of this kind (default: calibration for heat-capacity, sample for molar-enthalpy)")
	sampleID := fs.String("sample-id", "", "only rows with this sample id")
	formula := fs.String("formula", "", "only rows with this formula")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	path, err := oneLedger(a, "chart", fs)
	if err != nil {
		return err
	}
	if *output == "" {
		return withHint(usagef("ledger chart: give the output file with -o FILE.svg or -o FILE.png"), "")
	}
	if _, err := plot.FormatFromName(*output); err != nil {
		return usagef("-o %s: %w", *output, err)
	}
	if err := checkOutPath("-o", *output); err != nil {
		return err
	}
	if err := checkNotInput("-o", *output, path); err != nil {
		return err
	}
	var pick func(r ledger.Row) float64
	unit := ""
	switch *quantity {
	case "heat-capacity":
		pick, unit = func(r ledger.Row) float64 { return r.HeatCapacityJPerK }, "J/K"
		if *kind == "" {
			*kind = "calibration"
		}
	case "molar-enthalpy":
		pick, unit = func(r ledger.Row) float64 { return r.MolarEnthalpyKJPerMol }, "kJ/mol"
		if *kind == "" {
			*kind = "sample"
		}
	default:
		return usagef("flag --quantity: %q is not heat-capacity or molar-enthalpy", *quantity)
	}
	rows, sup, err := readLedger(path)
	if err != nil {
		return err
	}
	var picked []ledger.Row
	for _, r := range rows {
		if _, replaced := sup[r.Hash]; replaced {
			continue
		}
		if r.Kind != *kind || (*sampleID != "" && r.SampleID != *sampleID) || (*formula != "" && r.Formula != *formula) {
			continue
		}
		if !math.IsNaN(pick(r)) {
			picked = append(picked, r)
		}
	}
	if len(picked) < 2 {
		return dataf("%s: %d %s row(s) with a %s value; a control chart needs at least 2", filepath.Base(path), len(picked), *kind, *quantity)
	}
	axis := chartAxis(picked)
	vals := make([]float64, len(picked))
	labels := make([]string, len(picked))
	pts := make([]plot.ChartPoint, len(picked))
	for i, r := range picked {
		vals[i], labels[i] = pick(r), r.RunID
		pts[i] = plot.ChartPoint{Value: vals[i], Label: r.RunID}
		switch axis {
		case axisMeasured:
			pts[i].Time = r.MeasuredAt
		case axisRecorded:
			pts[i].Time = r.RecordedAt
		}
	}
	chart, err := calorimeter.IndividualsChart(vals)
	if err != nil {
		return dataErr(err)
	}
	name := strings.ReplaceAll(*quantity, "-", " ")
	format, _ := plot.FormatFromName(*output)
	var outs outputs
	defer outs.discard()
	if err := outs.stage("-o", *output, func(w io.Writer) error {
		return plot.WriteControlChart(w, format, chart, pts, name, unit, plot.Options{})
	}); err != nil {
		return err
	}
	if err := outs.commit(); err != nil {
		return err
	}
	fmt.Fprintf(a.stdout, "Control chart of %s (%s), %d runs of kind %s %s → %s\n", name, unit, len(vals), *kind, axis, *output)
	fmt.Fprintf(a.stdout, "  centre %s, σ = %s %s (moving range / 1.128)\n", units.Format(chart.Centre, chart.Sigma, unit), uText(chart.Sigma), unit)
	return chart.Summary(a.stdout, labels)
}

// The time axes of a control chart, as the summary line names them.
const (
	axisMeasured = "by date measured"
	axisRecorded = "by date recorded"
	axisRunOrder = "in run order"
)

// chartAxis chooses the time axis of a control chart of rows and, for
// the date measured, sorts rows by it (stable, so that a run's rows keep
// their file order). The date measured is used when every row has one and
// they are not all the same instant, since a laboratory often reduces
// runs measured over weeks in one batch; otherwise the date recorded, when
// it never goes back and spans an hour or more; otherwise the run order in
// the file (rows recorded within the hour are one batch, and a time axis
// would show nothing).
func chartAxis(rows []ledger.Row) string {
	measured := true
	for _, r := range rows {
		measured = measured && !r.MeasuredAt.IsZero()
	}
	if measured {
		sort.SliceStable(rows, func(i, j int) bool { return rows[i].MeasuredAt.Before(rows[j].MeasuredAt) })
		if rows[len(rows)-1].MeasuredAt.After(rows[0].MeasuredAt) {
			return axisMeasured
		}
	}
	for i := 1; i < len(rows); i++ {
		if rows[i].RecordedAt.Before(rows[i-1].RecordedAt) {
			return axisRunOrder
		}
	}
	if rows[len(rows)-1].RecordedAt.Sub(rows[0].RecordedAt) < time.Hour {
		return axisRunOrder
	}
	return axisRecorded
}
