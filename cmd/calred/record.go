package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"time"

	"calred/calorimeter"
	"calred/calorimeter/ledger"
	"calred/calorimeter/plot"
)

// finishRun prints a result, draws its plot and appends its ledger row.
// The report goes to stdout first; the plot is written to a temporary file
// and renamed, the ledger row is appended whole or not at all.
func (a *app) finishRun(row ledger.Row, out *outFlags, th *plot.Thermogram, report func(io.Writer) error) error {
	var buf bytes.Buffer
	if err := report(&buf); err != nil {
		return err
	}
	if *out.plot != "" && th != nil {
		if err := writePlot(*out.plot, func(w io.Writer, format string) error { return plotThermogram(w, format, th) }); err != nil {
			return err
		}
	}
	if *out.ledger != "" {
		row.Supersedes = *out.supersede
		if err := appendLedger(*out.ledger, row); err != nil {
			return err
		}
	} else if *out.supersede != "" {
		return usagef("--supersede needs --ledger: it names the ledger row this result replaces")
	}
	_, err := a.stdout.Write(buf.Bytes())
	return err
}

func appendLedger(path string, rows ...ledger.Row) error {
	for i := range rows {
		rows[i].ProgramVersion = version
	}
	if _, err := ledger.Append(path, rows...); err != nil {
		var re *ledger.RowError
		if errors.As(err, &re) {
			return usagef("%s: %w", filepath.Base(path), err)
		}
		return dataf("%s: %w", filepath.Base(path), err)
	}
	return nil
}

// writePlot writes a figure to name (format from its extension) through a
// temporary file in the same directory, renamed into place when complete.
func writePlot(name string, draw func(w io.Writer, format string) error) error {
	format, err := plot.FormatFromName(name)
	if err != nil {
		return usagef("--plot %s: %w", name, err)
	}
	return writeAtomic(name, func(w io.Writer) error { return draw(w, format) })
}

func writeAtomic(name string, write func(w io.Writer) error) error {
	f, err := os.CreateTemp(filepath.Dir(name), "."+filepath.Base(name)+".tmp*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	defer os.Remove(tmp)
	if err := write(f); err != nil {
		f.Close()
		return fmt.Errorf("%s: %w", name, err)
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return err
	}
	if err := f.Close(); err != nil {
		return err
	}
	return os.Rename(tmp, name)
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
	row.SampleID, row.Operator, row.Formula = s.text("sample-id"), s.text("operator"), red.Sample.Formula
	row.Method, row.DeltaTK, row.UDeltaTK = rise.Method, rise.DeltaT, rise.UDeltaT
	row.HeatCapacityJPerK, row.UHeatCapacityJPerK = red.HeatCapacity, red.UHeatCapacity
	row.MolarEnthalpyKJPerMol, row.UMolarEnthalpyKJPerMol = red.MolarEnthalpy, red.UMolarEnthalpy
	row.ExpandedUncertaintyKJPerMol, row.CoverageFactor = red.Expanded, red.CoverageFactor
	row.MolalityMolPerKg, row.Status, row.Checks = red.Molality, string(red.Status), checksSummary(red.Checks)
	row.InputFile, row.InputSHA256, row.Calibration, row.Note = r.in.name, r.in.sha256, r.hc.Source, s.text("note")
	return row
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
