package main

import (
	"fmt"
	"io"
	"math"
	"runtime"
	"strconv"
	"strings"
	"text/tabwriter"

	"calred/calorimeter"
	"calred/calorimeter/logfile"
	"calred/units"
)

const reduceAbout = `Reduce one sample run: find the fore, main and after periods, fit the drifts, correct
the heat exchange (every method side by side), apply the calorimeter's heat capacity and
report the molar enthalpy of solution with its uncertainty budget and checks.

Quantities may carry units and a standard uncertainty: 2.503g, 2503 mg, 452±0.8 J/K,
17.584(17) kJ/mol, 25.0C. A bare number takes the unit named below. Lines such as
"# sample-mass: 2.503 g" at the top of the log describe the run too; flags override them.

Caution: dissolving NaOH, KOH, CaCl2 or acids heats the solution fast and can spatter.
Wear eye protection, follow the safety data sheet and your lab's local rules.`

func runReduce(a *app, args []string) error {
	fs := newFlags(a, "reduce", "LOG [flags]", reduceAbout)
	addFieldFlags(fs, 'r')
	out := addOutFlags(fs, true)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return withHint(usagef("reduce: want exactly one LOG, got %d arguments", fs.NArg()), "e.g. `calred reduce run7.csv --sample-mass 2.503g --formula KNO3 --heat-capacity 452J/K`")
	}
	flags := newSpec()
	flags.fromFlags(fs)
	mc, err := monteCarloTrials(out)
	if err != nil {
		return err
	}
	if err := a.checkOutFlags(fs, out, fs.Arg(0)); err != nil {
		return err
	}
	if _, _, err := flags.quantity("accepted"); err != nil {
		return err
	}
	res, err := reduceSample(a, fs.Arg(0), flags, "", nil, out.limits)
	if err != nil {
		return err
	}
	if q, ok, err := res.in.spec.quantity("accepted"); err != nil {
		return err
	} else if ok {
		red := res.red
		g := calorimeter.GradeResult(red.MolarEnthalpy, red.UMolarEnthalpy, red.Expanded, q.Value/1000, q.U/1000, 0)
		g.Feedback = calorimeter.Diagnose(red.MolarEnthalpy, q.Value/1000, red.Sample.MolarMass, nil)
		res.grade = &g
	}
	if mc >= 0 {
		m, err := res.red.MonteCarlo(mc, *out.seed, runtime.NumCPU())
		if err != nil {
			return err // the package's errors start with "monte carlo:"
		}
		res.mc = m
	}
	if err := a.finishRun(res.record(), out, res.plotData(), func(w io.Writer) error {
		if *out.json {
			return writeJSON(w, res.json())
		}
		return res.writeText(w)
	}); err != nil {
		return err
	}
	if res.red.Status == calorimeter.Fail {
		return errCheckFailed
	}
	return nil
}

// The trial counts calorimeter.Reduction.MonteCarlo accepts: at least
// 100/(1 − p) = 2000 for a 95 % interval (JCGM 101:2008 7.9.4 b) and at
// most 1e7 (the memory bound of the package).
const (
	mcMinTrials = 2000
	mcMaxTrials = 10_000_000
)

// monteCarloTrials reads --monte-carlo: -1 none, 0 adaptive, else N.
func monteCarloTrials(o *outFlags) (int, error) {
	if o.monteCarlo == nil || *o.monteCarlo == "" {
		return -1, nil
	}
	if strings.EqualFold(*o.monteCarlo, "auto") {
		return 0, nil
	}
	n, err := strconv.ParseFloat(strings.TrimSpace(*o.monteCarlo), 64)
	if err != nil || n < mcMinTrials || n > mcMaxTrials || n != math.Trunc(n) {
		return 0, withHint(usagef("flag --monte-carlo: %q is not auto or a whole number of trials from %d to %g", *o.monteCarlo, mcMinTrials, float64(mcMaxTrials)),
			"--monte-carlo auto picks the number of trials by itself (JCGM 101 7.9)")
	}
	return int(n), nil
}

// sampleResult is one reduced sample run.
type sampleResult struct {
	in    *runInput
	red   *calorimeter.Reduction
	hc    calorimeter.HeatCapacity
	mc    *calorimeter.MonteCarloResult
	grade *calorimeter.Grade
}

// reduceSample loads, analyses and reduces one sample log. dir resolves a
// relative calibration file (batch); cals holds calibrations by run id.
func reduceSample(a *app, path string, over *spec, dir string, cals map[string]*calorimeter.Calibration, lf limitFlags) (*sampleResult, error) {
	ri, err := loadRun(a, path, over)
	if err != nil {
		return nil, err
	}
	smp, err := sampleOf(ri.spec)
	if err != nil {
		return nil, err
	}
	hc, err := heatCapacityOf(ri.spec, dir, cals)
	if err != nil {
		return nil, err
	}
	rise, err := analyse(ri, lf)
	if err != nil {
		return nil, err
	}
	red, err := calorimeter.ReduceSample(rise, smp, hc, calorimeter.ReduceOptions{})
	if err != nil {
		return nil, dataf("%s: %w", ri.name, err)
	}
	return &sampleResult{in: ri, red: red, hc: hc}, nil
}

// JSON of reduce (CONTRACT.md).
type periodsJSON struct {
	Pre  [2]float64 `json:"pre"`
	Main [2]float64 `json:"main"`
	Post [2]float64 `json:"post"`
}

type inputJSON struct {
	File   string `json:"file"`
	SHA256 string `json:"sha256"`
	Points int    `json:"points"`
}

type monteCarloJSON struct {
	Trials    int        `json:"trials"`
	Mean      float64    `json:"mean_kj_per_mol"`
	U         float64    `json:"standard_uncertainty_kj_per_mol"`
	Interval  [2]float64 `json:"interval_kj_per_mol"`
	Validated bool       `json:"gum_validated"`
	DLow      float64    `json:"d_low_kj_per_mol"`
	DHigh     float64    `json:"d_high_kj_per_mol"`
	Delta     float64    `json:"tolerance_kj_per_mol"`
	Adaptive  bool       `json:"adaptive"`
	Seed      uint64     `json:"seed"`
}

func periodsOf(r *calorimeter.Rise) periodsJSON {
	p := r.Periods
	return periodsJSON{
		Pre:  [2]float64{p.Pre.Start, p.Pre.End},
		Main: [2]float64{p.Main.Start, p.Main.End},
		Post: [2]float64{p.Post.Start, p.Post.End},
	}
}

func (r *sampleResult) json() map[string]any {
	red, rise := r.red, r.red.Rise
	m := map[string]any{
		"run_id":                          r.in.runID,
		"kind":                            "sample",
		"input":                           inputJSON{r.in.name, r.in.sha256, rise.Points},
		"mix_time_s":                      rise.MixTime,
		"mix_time_detected":               rise.MixDetected,
		"u_mix_time_s":                    rise.MixTimeU,
		"periods":                         periodsOf(rise),
		"drift":                           map[string]calorimeter.Drift{"pre": rise.PreDrift, "post": rise.PostDrift},
		"method":                          rise.Method,
		"method_reason":                   rise.MethodReason,
		"delta_t_k":                       rise.DeltaT,
		"u_delta_t_k":                     rise.UDeltaT,
		"methods":                         rise.Methods,
		"equal_area_time_s":               rise.Tx,
		"time_60_percent_s":               rise.T60,
		"mean_temperature_k":              rise.MeanTemperature,
		"heat_capacity_j_per_k":           red.HeatCapacity,
		"u_heat_capacity_j_per_k":         red.UHeatCapacity,
		"heat_capacity_basis":             red.HeatCapacityBasis,
		"calibration":                     r.hc.Source,
		"heat_released_j":                 red.HeatReleased,
		"u_heat_released_j":               red.UHeatReleased,
		"sample_mass_g":                   red.Sample.Mass,
		"u_sample_mass_g":                 red.Sample.UMass,
		"formula":                         red.Sample.Formula,
		"molar_mass_g_per_mol":            red.Sample.MolarMass,
		"amount_mol":                      red.Amount,
		"molality_mol_per_kg":             red.Molality,
		"water_to_solute_ratio":           red.WaterRatio,
		"molar_enthalpy_kj_per_mol":       red.MolarEnthalpy,
		"u_molar_enthalpy_kj_per_mol":     red.UMolarEnthalpy,
		"expanded_uncertainty_kj_per_mol": red.Expanded,
		"coverage_factor":                 red.CoverageFactor,
		"effective_degrees_of_freedom":    red.DoF,
		"budget":                          budgetJSON(red.Budget),
		"checks":                          red.Checks,
		"status":                          red.Status,
		"sign_convention":                 red.Convention,
	}
	riseExtras(m, rise, r.in.log.Time, r.in.log.Line)
	if r.mc != nil {
		m["monte_carlo"] = monteCarloJSON{Trials: r.mc.Trials, Mean: r.mc.Mean, U: r.mc.U,
			Interval: [2]float64{r.mc.Low, r.mc.High}, Validated: r.mc.GUMValidated,
			DLow: r.mc.DLow, DHigh: r.mc.DHigh, Delta: r.mc.Delta, Adaptive: r.mc.Adaptive, Seed: r.mc.Seed}
	}
	if c := calorimeter.Caution(red.Sample.Formula); c != "" {
		m["caution"] = c
	}
	if g := r.grade; g != nil {
		m["grade"] = map[string]any{
			"accepted_kj_per_mol": g.Accepted, "u_accepted_kj_per_mol": g.UAccepted,
			"error_percent": g.ErrorPercent, "zeta_score": g.Zeta, "en_number": g.En,
			"verdict": g.Verdict, "basis": g.Basis, "feedback": g.Feedback,
		}
	}
	return m
}

// riseExtras adds what the text report shows of an analysis beyond the
// contract's keys: u(ΔT) of every method and its parts, the temperatures
// at the mixing time, the cooling constant and the readings excluded as
// spikes (t and lines hold the times and log lines of the readings the
// analysis was given).
func riseExtras(m map[string]any, rise *calorimeter.Rise, t []float64, lines []int) {
	parts := make([]map[string]any, 0, len(rise.UParts))
	for _, p := range rise.UParts {
		parts = append(parts, map[string]any{"name": p.Name, "u_k": p.U})
	}
	m["u_methods_k"] = rise.MethodU
	m["u_delta_t_parts"] = parts
	m["delta_t_dof"] = rise.DoF
	m["initial_temperature_k"] = rise.InitialTemperature
	m["final_temperature_k"] = rise.FinalTemperature
	m["cooling_constant_per_s"] = rise.G
	m["convergence_temperature_k"] = rise.ThetaInf
	m["reading_noise_k"] = rise.Noise
	m["excluded_readings"] = excludedReadings(rise, t, lines)
}

// excludedReading is a reading the analysis left out as a spike.
type excludedReading struct {
	Line  int     `json:"line"`
	TimeS float64 `json:"time_s"`
}

func excludedReadings(rise *calorimeter.Rise, t []float64, lines []int) []excludedReading {
	out := make([]excludedReading, 0, len(rise.Excluded))
	for _, i := range rise.Excluded {
		if i >= 0 && i < len(t) && i < len(lines) {
			out = append(out, excludedReading{lines[i], t[i]})
		}
	}
	return out
}

// writeTimeZeroText says where the times of the report start when the
// log's own time axis does not start at 0.
func writeTimeZeroText(w io.Writer, in *runInput) {
	fmt.Fprint(w, timeZeroNote(in.log))
}

// timeZeroNote is "" when the log's own times start at 0, else a line
// (with its line end) saying what the first reading's time is in the log.
func timeZeroNote(log *logfile.Log) string {
	z := log.TimeZero
	switch {
	case !log.Start.IsZero():
		return fmt.Sprintf("  times count from the first reading, at %s\n", log.Start.Format("2006-01-02 15:04:05 MST"))
	case log.Dialect.TimeBase == "clock":
		h, m, sec := int(z/3600), int(math.Mod(z, 3600)/60), math.Mod(z, 60)
		return fmt.Sprintf("  times count from the first reading, at %02d:%02d:%02g on the log's clock\n", h, m, sec)
	case z != 0:
		return fmt.Sprintf("  times count from the first reading, which the log writes as %g s\n", z)
	}
	return ""
}

// writeExcludedText names the readings left out as spikes by log line.
func writeExcludedText(w io.Writer, rise *calorimeter.Rise, t []float64, lines []int) {
	ex := excludedReadings(rise, t, lines)
	if len(ex) == 0 {
		return
	}
	parts := make([]string, 0, len(ex))
	for i, e := range ex {
		if i == 10 {
			parts = append(parts, fmt.Sprintf("and %d more", len(ex)-10))
			break
		}
		parts = append(parts, fmt.Sprintf("line %d (%g s)", e.Line, e.TimeS))
	}
	fmt.Fprintf(w, "Readings left out as spikes: %s\n\n", strings.Join(parts, ", "))
}

// budgetJSON is the budget as CONTRACT's list of terms; infinite degrees of
// freedom become null.
func budgetJSON(b *calorimeter.Budget) []map[string]any {
	out := make([]map[string]any, 0, len(b.Terms))
	for _, t := range b.Terms {
		out = append(out, map[string]any{
			"quantity": t.Quantity, "symbol": t.Symbol, "value": t.Value, "unit": t.Unit,
			"standard_uncertainty": t.StandardUncertainty, "sensitivity": t.Sensitivity,
			"contribution": t.Contribution, "percent": t.Percent, "dof": t.DoF,
		})
	}
	return out
}

// writeText is the readable report of a sample run.
func (r *sampleResult) writeText(w io.Writer) error {
	red, rise := r.red, r.red.Rise
	fmt.Fprintf(w, "Sample run %s — %s\n", r.in.runID, r.in.name)
	fmt.Fprintf(w, "  %d readings, sha256 %s\n", rise.Points, r.in.sha256)
	writeTimeZeroText(w, r.in)
	fmt.Fprintln(w)
	writeRiseText(w, rise)
	writeExcludedText(w, rise, r.in.log.Time, r.in.log.Line)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "Heat capacity ε\t%s\t%s\n", units.Format(red.HeatCapacity, red.UHeatCapacity, "J/K"), red.HeatCapacityBasis)
	fmt.Fprintf(tw, "Heat to the calorimeter q = ε·ΔT\t%s\t\n", units.Format(red.HeatReleased, red.UHeatReleased, "J"))
	fmt.Fprintf(tw, "Sample\t%s g of %s, M = %.3f g/mol\t%s\n", strconv.FormatFloat(red.Sample.Mass, 'g', -1, 64), orDash(red.Sample.Formula), red.Sample.MolarMass,
		fmt.Sprintf("u(m) = %s g%s", strconv.FormatFloat(red.Sample.UMass, 'g', -1, 64), r.uMassNote()))
	fmt.Fprintf(tw, "Amount n\t%.5g mol\t\n", red.Amount)
	if !math.IsNaN(red.Molality) {
		fmt.Fprintf(tw, "Final molality\t%.4g mol/kg\t%.0f mol water per mol solute\n", red.Molality, red.WaterRatio)
	}
	tw.Flush()
	fmt.Fprintf(w, "\nMolar enthalpy of solution ΔsolH = %s (k = %.2f, %s)\n",
		units.Format(red.MolarEnthalpy, red.Expanded, "kJ/mol"), red.CoverageFactor, dofText(red.DoF))
	fmt.Fprintf(w, "  standard uncertainty u = %s kJ/mol; the interval ±U covers about 95 %%\n", uText(red.UMolarEnthalpy))
	fmt.Fprintf(w, "  %s\n", red.Convention)
	if r.mc != nil {
		writeMonteCarloText(w, r.mc)
	}
	if g := r.grade; g != nil {
		fmt.Fprintf(w, "  against the accepted %s: error %+.2f %%, ζ = %.2f, En = %.2f — %s (ISO 13528)\n",
			units.Format(g.Accepted, g.UAccepted, "kJ/mol"), g.ErrorPercent, g.Zeta, g.En, g.Verdict)
		for _, fb := range g.Feedback {
			fmt.Fprintf(w, "    %s\n", fb)
		}
	}
	fmt.Fprintln(w, "\nUncertainty budget (GUM law of propagation, JCGM 100:2008)")
	if err := calorimeter.WriteBudgetTable(w, red.Budget, "kJ/mol"); err != nil {
		return err
	}
	writeChecksText(w, red.Checks, red.Status)
	if c := calorimeter.Caution(red.Sample.Formula); c != "" {
		fmt.Fprintf(w, "\nCaution: %s\n", c)
	}
	return nil
}

// uMassNote says when the balance uncertainty is the default one.
func (r *sampleResult) uMassNote() string {
	s := r.in.spec
	if q, ok, _ := s.quantity("sample-mass"); (ok && q.HasU) || s.has("u-mass") {
		return ""
	}
	return " (default; give --u-mass for your balance)"
}

func orDash(s string) string {
	if s == "" {
		return "—"
	}
	return s
}

func dofText(v float64) string {
	if math.IsInf(v, 0) || math.IsNaN(v) || v > 1e6 {
		return "ν_eff = ∞"
	}
	return fmt.Sprintf("ν_eff = %.0f", v)
}

func writeMonteCarloText(w io.Writer, mc *calorimeter.MonteCarloResult) {
	how := fmt.Sprintf("%d trials", mc.Trials)
	if mc.Adaptive {
		how += ", adaptive (JCGM 101 7.9)"
	}
	verdict := "agrees with the GUM result (JCGM 101 §8)"
	if !mc.GUMValidated {
		verdict = fmt.Sprintf("does NOT validate the GUM result: ends differ by %.2g and %.2g kJ/mol, tolerance %.2g", mc.DLow, mc.DHigh, mc.Delta)
	}
	fmt.Fprintf(w, "  Monte Carlo (%s, seed %d): mean %s kJ/mol, u = %s, 95 %% interval [%.4f, %.4f] kJ/mol — %s\n",
		how, mc.Seed, strconv.FormatFloat(mc.Mean, 'f', 4, 64), uText(mc.U), mc.Low, mc.High, verdict)
}

// writeRiseText prints the periods, drifts and every method's ΔT.
func writeRiseText(w io.Writer, rise *calorimeter.Rise) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	p := rise.Periods
	how := "given"
	if rise.MixDetected {
		how = fmt.Sprintf("detected, ± %.2g s", rise.MixTimeU)
	}
	fmt.Fprintf(tw, "Process starts at\t%.1f s\t(%s)\n", rise.MixTime, how)
	fmt.Fprintf(tw, "Fore period\t%.1f – %.1f s\t%d readings, drift %+.4g mK/min at %.3f °C, s = %.3g mK\n",
		p.Pre.Start, p.Pre.End, rise.PreDrift.N, rise.PreDrift.Slope*6e4, rise.PreDrift.MeanTemperature-273.15, rise.PreDrift.ResidualSD*1e3)
	fmt.Fprintf(tw, "Main period\t%.1f – %.1f s\t\n", p.Main.Start, p.Main.End)
	fmt.Fprintf(tw, "After period\t%.1f – %.1f s\t%d readings, drift %+.4g mK/min at %.3f °C, s = %.3g mK\n",
		p.Post.Start, p.Post.End, rise.PostDrift.N, rise.PostDrift.Slope*6e4, rise.PostDrift.MeanTemperature-273.15, rise.PostDrift.ResidualSD*1e3)
	if rise.G != 0 && !math.IsNaN(rise.G) {
		fmt.Fprintf(tw, "Cooling constant G\t%.3g 1/s\tconvergence temperature %.3f °C\n", rise.G, rise.ThetaInf-273.15)
	}
	tw.Flush()
	fmt.Fprintln(w, "\nCorrected temperature change by method")
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, m := range []string{"regnault-pfaundler", "dickinson", "extrapolation", "model"} {
		v, ok := rise.Methods[m]
		if !ok {
			fmt.Fprintf(tw, "  %s\t—\t\n", m)
			continue
		}
		mark := ""
		if m == rise.Method {
			mark = "← reported"
		}
		u := rise.MethodU[m]
		fmt.Fprintf(tw, "  %s\t%s\t%s\n", m, units.Format(v, u, "K"), mark)
	}
	tw.Flush()
	if !math.IsNaN(rise.Tx) && rise.Tx != 0 {
		fmt.Fprintf(w, "  equal-area time %.1f s, 60 %% time %.1f s\n", rise.Tx, rise.T60)
	}
	fmt.Fprintf(w, "\nCorrected ΔT = %s by %s", units.Format(rise.DeltaT, rise.UDeltaT, "K"), rise.Method)
	if rise.MethodReason != "" {
		fmt.Fprintf(w, " (%s)", rise.MethodReason)
	}
	fmt.Fprintln(w)
	if len(rise.UParts) > 0 {
		parts := make([]string, 0, len(rise.UParts))
		for _, p := range rise.UParts {
			parts = append(parts, fmt.Sprintf("%s %.2g mK", p.Name, p.U*1e3))
		}
		fmt.Fprintf(w, "  u(ΔT) from: %s\n", strings.Join(parts, "; "))
	}
	fmt.Fprintln(w)
}

func writeChecksText(w io.Writer, checks []calorimeter.Check, status calorimeter.Status) {
	fmt.Fprintln(w, "\nChecks")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, c := range checks {
		fmt.Fprintf(tw, "  %s\t%s\t%s\n", c.Status, c.Name, c.Detail)
	}
	tw.Flush()
	fmt.Fprintf(w, "Status: %s\n", status)
}
