package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"strings"
	"time"

	flag "github.com/spf13/pflag"

	"calred/calorimeter"
	"calred/calorimeter/ledger"
	"calred/calorimeter/plot"
)

// finishRun prints a result, draws its plot and appends its ledger row.
// The report is rendered first and the plot staged (see staged); then the
// ledger row is appended, whole or not at all, and only then the plot is
// renamed into place and the report printed. A failure at any step leaves
// no new file, no row and nothing on stdout.
func (a *app) finishRun(row ledger.Row, out *outFlags, th *plot.Thermogram, report func(io.Writer) error) error {
	var buf bytes.Buffer
	if err := report(&buf); err != nil {
		return err
	}
	var outs outputs
	defer outs.discard()
	if *out.plot != "" && th != nil {
		if err := stagePlot(&outs, *out.plot, func(w io.Writer, format string) error { return plotThermogram(w, format, th) }); err != nil {
			return err
		}
	}
	if *out.ledger != "" {
		row.Supersedes = *out.supersede
		if err := appendLedger(*out.ledger, row); err != nil {
			return err
		}
	}
	if err := outs.commit(); err != nil {
		if *out.ledger != "" {
			return fmt.Errorf("%w (the ledger row is recorded)", err)
		}
		return err
	}
	_, err := a.stdout.Write(buf.Bytes())
	return err
}

// checkOutFlags looks at the output and record-keeping flags before any
// work: the files they name, --supersede without --ledger, and --seed
// without --monte-carlo (warned about: it changes nothing). inputs are the
// run's input files, which no output may overwrite.
func (a *app) checkOutFlags(fs *flag.FlagSet, out *outFlags, inputs ...string) error {
	if *out.supersede != "" && *out.ledger == "" {
		return withHint(usagef("--supersede needs --ledger: it names the ledger row this result replaces"), "add --ledger LEDGER.csv, the ledger that holds the row")
	}
	if fs.Changed("seed") && (out.monteCarlo == nil || *out.monteCarlo == "") {
		a.warnf("--seed has no effect without --monte-carlo")
	}
	if *out.plot != "" {
		if _, err := plot.FormatFromName(*out.plot); err != nil {
			return usagef("--plot %s: %w", *out.plot, err)
		}
		if err := checkOutPath("--plot", *out.plot); err != nil {
			return err
		}
		if err := checkNotInput("--plot", *out.plot, inputs...); err != nil {
			return err
		}
	}
	if *out.ledger != "" {
		if err := checkOutPath("--ledger", *out.ledger); err != nil {
			return err
		}
		if err := checkNotInput("--ledger", *out.ledger, inputs...); err != nil {
			return err
		}
	}
	return nil
}

func appendLedger(path string, rows ...ledger.Row) error {
	for i := range rows {
		rows[i].ProgramVersion = version
	}
	// The ledger's errors name its path.
	if _, err := ledger.Append(path, rows...); err != nil {
		var re *ledger.RowError
		switch {
		case errors.As(err, &re) && re.Reason == ledger.ReasonDuplicateRunID:
			return withHint(usagef("%w", err), fmt.Sprintf("a corrected result takes --supersede %s; a new run takes its own --run-id", re.RunID))
		case errors.As(err, &re):
			return usagef("%w", err)
		case errors.Is(err, fs.ErrPermission):
			return withHint(err, "the ledger and its directory must be writable: the lock file LEDGER.csv.lock is made beside it")
		}
		return dataErr(err)
	}
	return nil
}

// stagePlot stages a figure (format from the file's extension).
func stagePlot(outs *outputs, name string, draw func(w io.Writer, format string) error) error {
	format, err := plot.FormatFromName(name)
	if err != nil {
		return usagef("--plot %s: %w", name, err)
	}
	return outs.stage("--plot", name, func(w io.Writer) error { return draw(w, format) })
}

// checksSummary is the compact form of the checks kept in the ledger.
func checksSummary(checks []calorimeter.Check) string {
	var parts []string
	for _, c := range checks {
		if c.Status != calorimeter.Pass {
			parts = append(parts, c.Name+":"+string(c.Status))
		}
	}
	if len(parts) == 0 {
		return fmt.Sprintf("all %d pass", len(checks))
	}
	return strings.Join(parts, "; ")
}

func (r *sampleResult) record() ledger.Row {
	red, rise := r.red, r.red.Rise
	s := r.in.spec
	row := ledger.NewRow()
	row.RecordedAt, row.RunID, row.Kind = time.Now().UTC(), r.in.runID, "sample"
	row.MeasuredAt = r.in.measuredAt(0)
	row.SampleID, row.Operator, row.Formula = s.text("sample-id"), s.text("operator"), red.Sample.Formula
	row.Method, row.DeltaTK, row.UDeltaTK = rise.Method, rise.DeltaT, rise.UDeltaT
	row.HeatCapacityJPerK, row.UHeatCapacityJPerK = red.HeatCapacity, red.UHeatCapacity
	row.MolarEnthalpyKJPerMol, row.UMolarEnthalpyKJPerMol = red.MolarEnthalpy, red.UMolarEnthalpy
	row.ExpandedUncertaintyKJPerMol, row.CoverageFactor = red.Expanded, red.CoverageFactor
	row.MolalityMolPerKg, row.Status, row.Checks = red.Molality, string(red.Status), checksSummary(red.Checks)
	row.InputFile, row.InputSHA256, row.Calibration, row.Note = r.in.name, r.in.sha256, r.hc.Source, s.text("note")
	return row
}

// measuredAt is when a run's readings began, elapsed seconds after the
// log's first reading, for the ledger's measured_at_utc: zero (not known)
// when the log gives no date, as with elapsed seconds or clock times.
// A timestamp without a UTC offset is taken as UTC (logfile.Log.Start).
func (ri *runInput) measuredAt(elapsed float64) time.Time {
	start := ri.log.Start
	if start.IsZero() || start.Year() <= 1 {
		return time.Time{}
	}
	return start.Add(time.Duration(math.Round(elapsed * float64(time.Second)))).UTC()
}

// thermogram turns an analysis into the plot's data.
func thermogram(title string, t, theta []float64, rise *calorimeter.Rise) *plot.Thermogram {
	p := rise.Periods
	return &plot.Thermogram{
		Title: title, Time: t, Temperature: theta,
		Pre: [2]float64{p.Pre.Start, p.Pre.End}, Main: [2]float64{p.Main.Start, p.Main.End}, Post: [2]float64{p.Post.Start, p.Post.End},
		PreLine:  plot.Line{Slope: rise.PreDrift.Slope, Intercept: rise.PreDrift.Intercept},
		PostLine: plot.Line{Slope: rise.PostDrift.Slope, Intercept: rise.PostDrift.Intercept},
		MixTime:  rise.MixTime, Tx: nanIfZero(rise.Tx), DeltaT: rise.DeltaT, UDeltaT: rise.UDeltaT,
		Method: rise.Method, Excluded: rise.Excluded, Residuals: rise.Residuals,
	}
}

func nanIfZero(v float64) float64 {
	if v == 0 {
		return math.NaN()
	}
	return v
}

func (r *sampleResult) plotData() *plot.Thermogram {
	return thermogram(fmt.Sprintf("%s — ΔsolH = %.2f ± %.2f kJ/mol", r.in.runID, r.red.MolarEnthalpy, r.red.Expanded),
		r.in.log.Time, r.in.log.Temperature, r.red.Rise)
}

func plotThermogram(w io.Writer, format string, th *plot.Thermogram) error {
	return plot.WriteThermogram(w, format, *th, plot.Options{})
}
