package main

import (
	"bytes"
	"fmt"
	"io"
	"path/filepath"
	"sort"
	"strings"
	"text/tabwriter"
	"time"

	"calred/calorimeter"
	"calred/calorimeter/ledger"
	"calred/units"
)

const calibrateAbout = `Reduce calibration runs to the calorimeter's heat capacity ε (J/K) with its uncertainty:
  electrical   --heater-power and --heater-time, or --heater-voltage, --heater-current and
               --heater-time, or a heater-power column in the log (integrated over time)
  standard     --standard NAME with --sample-mass (and --solvent-mass for the molality), or
               --reference-enthalpy VALUE±u with --formula and --sample-mass
  mixing       --cold-mass, --hot-mass and --hot-temperature (cold and final temperatures
               come from the drift lines of the log)
--contents-mass splits off the vessel's own heat capacity so it can be reused with other
fills. Several LOGs are combined as a weighted mean; -o writes the calibration file that
"calred reduce --cal FILE" reads. A heater-power column that shows the heater on more
than once (calibrations before and after a sample) gives one run per heating period,
each reduced on its own part of the log; consecutive periods are compared (warn beyond
2, fail beyond 3 combined standard uncertainties) and all are combined.

Caution: heaters and mains-powered supplies need your lab's electrical safety rules; hot
water scalds. Follow your lab's local rules and licensed practice.`

func runCalibrate(a *app, args []string) error {
	fs := newFlags(a, "calibrate", "LOG... [flags]", calibrateAbout)
	addFieldFlags(fs, 'c')
	output := fs.StringP("output", "o", "", "write the calibration file (JSON) to FILE")
	out := addOutFlags(fs, false)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() == 0 {
		return withHint(usagef("calibrate: no LOG given"), "e.g. `calred calibrate heater1.csv --heater-power 1.000W --heater-time 300s -o cal.json`")
	}
	flags := newSpec()
	flags.fromFlags(fs)
	if err := a.checkOutFlags(fs, out, fs.Args()...); err != nil {
		return err
	}
	if *output != "" {
		if err := checkOutPath("-o", *output); err != nil {
			return err
		}
		if err := checkNotInput("-o", *output, fs.Args()...); err != nil {
			return err
		}
	}
	if fs.NArg() > 1 && flags.has("run-id") {
		return withHint(usagef("--run-id names one run, but %d logs are given", fs.NArg()),
			"each log takes its run id from its file name or a `# run-id:` line")
	}
	var runs []*calibrationResult
	seen := map[string]string{} // sha256 → file
	for _, path := range fs.Args() {
		crs, err := calibrateLog(a, path, flags, out.limits)
		if err != nil {
			return err
		}
		in := crs[0].in
		if first, dup := seen[in.sha256]; dup {
			return withHint(usagef("%s: the same readings as %s (sha256 %.12s…): a run counted twice would shrink the uncertainty of the mean", in.name, first, in.sha256),
				"give each calibration log once")
		}
		seen[in.sha256] = in.name
		runs = append(runs, crs...)
	}
	crs := make([]*calorimeter.CalibrationRun, len(runs))
	ids := map[string]string{} // run id → log path
	for i, r := range runs {
		crs[i] = r.run
		if first, dup := ids[r.run.RunID]; dup && first != r.in.path {
			return withHint(usagef("run id %q is both %s and %s", r.run.RunID, first, r.in.path),
				"give one of them a `# run-id:` line, or a file name of its own")
		}
		ids[r.run.RunID] = r.in.path
	}
	cal, err := calorimeter.Combine(crs, time.Now(), version)
	if err != nil {
		return dataErr(err)
	}
	// Everything that can fail is done before the ledger is touched: the
	// report is rendered, the files are staged.
	var report bytes.Buffer
	if *out.json {
		err = writeJSON(&report, calibrationJSON(cal, runs))
	} else {
		err = writeCalibrationText(&report, cal, runs)
	}
	if err != nil {
		return err
	}
	var outs outputs
	defer outs.discard()
	if *output != "" {
		if err := outs.stage("-o", *output, func(w io.Writer) error { return calorimeter.WriteCalibration(w, cal) }); err != nil {
			return err
		}
	}
	if *out.plot != "" {
		for _, r := range runs {
			name := *out.plot
			if len(runs) > 1 {
				ext := filepath.Ext(name)
				name = strings.TrimSuffix(name, ext) + "-" + fileNamePart(r.run.RunID) + ext
			}
			th := thermogram(fmt.Sprintf("%s — ε = %.1f ± %.1f J/K", r.run.RunID, r.run.HeatCapacity, r.run.UHeatCapacity),
				r.t, r.theta, r.run.Rise)
			if err := stagePlot(&outs, name, func(w io.Writer, format string) error { return plotThermogram(w, format, th) }); err != nil {
				return err
			}
		}
	}
	if *out.ledger != "" {
		rows := make([]ledger.Row, len(runs))
		for i, r := range runs {
			rows[i] = r.record()
		}
		if len(rows) > 0 {
			rows[0].Supersedes = *out.supersede
		}
		if err := appendLedger(*out.ledger, rows...); err != nil {
			return err
		}
	}
	if err := outs.commit(); err != nil {
		if *out.ledger != "" {
			return fmt.Errorf("%w (the ledger row is recorded)", err)
		}
		return err
	}
	if _, err := a.stdout.Write(report.Bytes()); err != nil {
		return err
	}
	if cal.Status == calorimeter.Fail {
		return errCheckFailed
	}
	return nil
}

type calibrationResult struct {
	in        *runInput
	run       *calorimeter.CalibrationRun
	t, theta  []float64 // the readings the run was reduced from (the whole log, or a pulse's window)
	lines     []int     // their lines in the log
	pulse     *calorimeter.Pulse
	window    calorimeter.Period
	of, total int // heating period of a log with several: 1-based number and count
}

// calibrateLog reduces one calibration log: one run, or one run per
// heating period when the log's heater-power column shows more than one
// (calibrations before and after a sample, DOMAIN §3).
func calibrateLog(a *app, path string, over *spec, lf limitFlags) ([]*calibrationResult, error) {
	ri, err := loadRun(a, path, over)
	if err != nil {
		return nil, err
	}
	setup, pulses, err := calibrationSetup(ri)
	if err != nil {
		return nil, err
	}
	if len(pulses) > 1 {
		return calibratePulses(ri, setup, pulses, lf)
	}
	rise, err := analyse(ri, lf)
	if err != nil {
		return nil, err
	}
	run, err := calorimeter.CalibrateRun(rise, setup)
	if err != nil {
		return nil, dataf("%s: %w", ri.name, err)
	}
	return []*calibrationResult{{in: ri, run: run, t: ri.log.Time, theta: ri.log.Temperature, lines: ri.log.Line}}, nil
}

// calibratePulses reduces a log with several heating periods, one run each.
func calibratePulses(ri *runInput, setup calorimeter.CalibrationSetup, pulses []calorimeter.Pulse, lf limitFlags) ([]*calibrationResult, error) {
	for _, name := range []string{"mix-time", "pre", "post"} {
		if ri.spec.has(name) {
			return nil, withHint(usagef("%s: --%s applies to a log with one process, but the heater is on %d times", ri.name, name, len(pulses)),
				"leave the periods to detection, or cut the log into one file per heating period")
		}
	}
	opt, err := riseOptions(ri.spec, lf)
	if err != nil {
		return nil, err
	}
	if err := checkIncreasing(ri); err != nil {
		return nil, err
	}
	if err := checkLiquidRange(ri); err != nil {
		return nil, err
	}
	pc, err := calorimeter.CalibratePulses(ri.log.Time, ri.log.Temperature, pulses, setup, opt)
	if err != nil {
		return nil, withHint(dataf("%s: %w", ri.name, err), "look at the log with `calred inspect`; each heating period needs fore and after periods of its own")
	}
	out := make([]*calibrationResult, len(pc.Runs))
	for i, run := range pc.Runs {
		w := pc.Windows[i]
		lo := sort.SearchFloat64s(ri.log.Time, w.Start)
		hi := sort.SearchFloat64s(ri.log.Time, w.End) + 1
		out[i] = &calibrationResult{in: ri, run: run, t: ri.log.Time[lo:hi], theta: ri.log.Temperature[lo:hi], lines: ri.log.Line[lo:hi],
			pulse: &pulses[i], window: w, of: i + 1, total: len(pulses)}
	}
	return out, nil
}

// calibrationSetup reads the kind of calibration from a run's description.
// When the log has a heater-power column that shows more than one heating
// period, it returns them, each with the energy the column gives or with
// the heater power (voltage, current) and time of the description, and a
// setup without a kind.
func calibrationSetup(ri *runInput) (calorimeter.CalibrationSetup, []calorimeter.Pulse, error) {
	s := ri.spec
	st := calorimeter.CalibrationSetup{RunID: ri.runID, File: ri.name, SHA256: ri.sha256}
	um, err := uMass(s)
	if err != nil {
		return st, nil, err
	}
	st.UMass = um
	q := func(name string) (units.Quantity, bool, error) { return s.quantity(name) }
	get := func(names ...string) (map[string]units.Quantity, error) {
		m := map[string]units.Quantity{}
		for _, n := range names {
			v, ok, err := q(n)
			if err != nil {
				return nil, err
			}
			if ok {
				m[n] = v
			}
		}
		return m, nil
	}
	v, err := get("heater-power", "heater-time", "heater-voltage", "heater-current", "sample-mass", "solvent-mass",
		"reference-enthalpy", "amount", "cold-mass", "hot-mass", "hot-temperature", "contents-mass")
	if err != nil {
		return st, nil, err
	}
	has := func(n string) bool { _, ok := v[n]; return ok }
	kinds := []string{}
	switch {
	case has("heater-power") || has("heater-voltage") || has("heater-current") || has("heater-time"):
		kinds = append(kinds, "electrical")
		e := &calorimeter.Electrical{}
		t, okT := v["heater-time"]
		switch {
		case has("heater-power") && okT:
			e.Power, e.UPower, e.Time, e.UTime = v["heater-power"].Value, v["heater-power"].U, t.Value, t.U
		case has("heater-voltage") && has("heater-current") && okT:
			e.Voltage, e.UVoltage = v["heater-voltage"].Value, v["heater-voltage"].U
			e.Current, e.UCurrent = v["heater-current"].Value, v["heater-current"].U
			e.Time, e.UTime = t.Value, t.U
		default:
			return st, nil, withHint(usagef("electrical calibration: give --heater-power with --heater-time, or --heater-voltage, --heater-current and --heater-time"), "")
		}
		st.Electrical = e
	}
	if s.has("standard") || has("reference-enthalpy") {
		kinds = append(kinds, "standard")
		ms, okM := v["sample-mass"]
		n, okN := v["amount"]
		if !okM && !okN {
			return st, nil, usagef("chemical calibration: give --sample-mass, the mass of the standard (g), or --amount (mol) for a standard that is not weighed")
		}
		ch := &calorimeter.ChemicalCalibration{Mass: ms.Value, UMass: ms.U, Amount: n.Value, UAmount: n.U}
		if sm, ok := v["solvent-mass"]; ok {
			ch.SolventMass = sm.Value
		}
		if s.has("standard") {
			std, err := calorimeter.LookupStandard(s.text("standard"))
			if err != nil {
				return st, nil, s.fail("standard", err)
			}
			ch.Standard = std
		} else {
			f := s.text("formula")
			if f == "" {
				return st, nil, usagef("--reference-enthalpy needs --formula for the molar mass")
			}
			m, _, err := calorimeter.MolarMass(f)
			if err != nil {
				return st, nil, withHint(s.fail("formula", err), formulaHint(f))
			}
			h := v["reference-enthalpy"]
			ch.Standard = calorimeter.Standard{Name: f, Formula: f, MolarMass: m, Weighed: true, Enthalpy: h.Value, UEnthalpy: h.U,
				RefTemperature: 298.15, TMin: calorimeter.WaterTMin, TMax: calorimeter.WaterTMax,
				Source: "given with --reference-enthalpy", Conditions: "as given by the user, no temperature correction"}
		}
		st.Chemical = ch
	}
	if has("cold-mass") || has("hot-mass") || has("hot-temperature") {
		kinds = append(kinds, "mixing")
		c, ok1 := v["cold-mass"]
		h, ok2 := v["hot-mass"]
		th, ok3 := v["hot-temperature"]
		if !ok1 || !ok2 || !ok3 {
			return st, nil, usagef("mixing calibration: give --cold-mass, --hot-mass and --hot-temperature")
		}
		st.Mixing = &calorimeter.Mixing{ColdMass: c.Value, UColdMass: c.U, HotMass: h.Value, UHotMass: h.U,
			HotTemperature: th.Value, UHotTemperature: th.U}
	}
	var pulses []calorimeter.Pulse
	if col := heaterColumn(ri); col != "" && (len(kinds) == 0 || (len(kinds) == 1 && st.Electrical != nil)) {
		hps, err := calorimeter.HeaterPulses(ri.log.Time, ri.log.Extra[col])
		if err != nil && len(kinds) == 0 {
			return st, nil, dataf("%s: column %q: %w", ri.name, col, err)
		}
		for _, hp := range hps {
			p := calorimeter.PulseOf(hp)
			if st.Electrical != nil {
				p.Electrical = *st.Electrical // the description's heater settings, for each period
			}
			pulses = append(pulses, p)
		}
		switch {
		case len(pulses) > 1:
			st.Electrical = nil
			if !(st.UMass > 0) {
				st.UMass = calorimeter.DefaultUMass
			}
			if c, ok := v["contents-mass"]; ok {
				st.ContentsMass, st.UContentsMass = c.Value, c.U
			}
			return st, pulses, nil
		case len(pulses) == 1 && len(kinds) == 0:
			st.Electrical = &pulses[0].Electrical
			kinds = append(kinds, "electrical")
		}
	}
	switch len(kinds) {
	case 0:
		return st, nil, withHint(usagef("%s: no calibration described", ri.name), "give --heater-power/--heater-time, --standard with --sample-mass, or --cold-mass/--hot-mass/--hot-temperature")
	case 1:
	default:
		return st, nil, usagef("%s: the description mixes %s calibrations; give one kind", ri.name, strings.Join(kinds, " and "))
	}
	if c, ok := v["contents-mass"]; ok {
		st.ContentsMass, st.UContentsMass = c.Value, c.U
	}
	if !(st.UMass > 0) {
		st.UMass = calorimeter.DefaultUMass
	}
	return st, nil, nil
}

// heaterColumn names a log column that records heater power, if any.
func heaterColumn(ri *runInput) string {
	for _, c := range ri.log.Columns {
		n := strings.ToLower(c.Name)
		if c.Role == "extra" && (strings.Contains(n, "power") || strings.Contains(n, "heater")) && (c.Unit == "" || strings.EqualFold(c.Unit, "W")) {
			return c.Name
		}
	}
	return ""
}

func (r *calibrationResult) record() ledger.Row {
	s := r.in.spec
	run := r.run
	row := ledger.NewRow()
	row.RecordedAt, row.RunID, row.Kind = time.Now().UTC(), run.RunID, "calibration"
	if len(r.t) > 0 {
		row.MeasuredAt = r.in.measuredAt(r.t[0]) // a heating period's window starts after the log does
	}
	row.SampleID, row.Operator, row.Formula = s.text("sample-id"), s.text("operator"), s.text("formula")
	row.Method, row.DeltaTK, row.UDeltaTK = run.CorrectionMethod, run.DeltaT, run.UDeltaT
	row.HeatCapacityJPerK, row.UHeatCapacityJPerK, row.CoverageFactor = run.HeatCapacity, run.UHeatCapacity, run.Budget.K
	row.Status, row.Checks = string(run.Status), checksSummary(run.Checks)
	row.InputFile, row.InputSHA256, row.Note = r.in.name, r.in.sha256, s.text("note")
	row.Calibration = run.Method + " calibration"
	if run.StandardName != "" {
		row.Calibration = run.Method + " calibration with " + run.StandardName
	}
	if r.total > 1 {
		row.Calibration += fmt.Sprintf(", heating period %d of %d", r.of, r.total)
	}
	return row
}

func calibrationJSON(cal *calorimeter.Calibration, results []*calibrationResult) map[string]any {
	runs := make([]map[string]any, 0, len(cal.Runs))
	for i, r := range cal.Runs {
		m := map[string]any{
			"run_id": r.RunID, "input": inputJSON{r.File, r.SHA256, r.Points}, "calibration_method": r.Method,
			"variant": r.Variant, "method": r.CorrectionMethod, "mix_time_s": r.MixTime,
			"delta_t_k": r.DeltaT, "u_delta_t_k": r.UDeltaT, "mean_temperature_k": r.MeanTemperature,
			"heat_j": r.Heat, "u_heat_j": r.UHeat,
			"heat_capacity_j_per_k": r.HeatCapacity, "u_heat_capacity_j_per_k": r.UHeatCapacity,
			"checks": r.Checks, "status": r.Status,
		}
		if r.Rise != nil {
			m["periods"] = periodsOf(r.Rise)
			m["methods"] = r.Rise.Methods
			m["drift"] = map[string]calorimeter.Drift{"pre": r.Rise.PreDrift, "post": r.Rise.PostDrift}
			var t []float64
			var lines []int
			if i < len(results) {
				t, lines = results[i].t, results[i].lines
			}
			riseExtras(m, r.Rise, t, lines)
		}
		if r.Budget != nil {
			m["budget"] = budgetJSON(r.Budget)
			m["coverage_factor"] = r.Budget.K
			m["expanded_uncertainty_j_per_k"] = r.Budget.Expanded
		}
		if r.Vessel != nil {
			m["vessel_heat_capacity_j_per_k"], m["u_vessel_heat_capacity_j_per_k"] = *r.Vessel, *r.UVessel
			m["contents_mass_g"] = r.ContentsMass
		}
		if r.StandardName != "" {
			m["standard"], m["standard_source"] = r.StandardName, r.StandardSource
		}
		if i < len(results) && results[i].pulse != nil {
			res := results[i]
			m["heating_period"] = map[string]any{"number": res.of, "of": res.total,
				"on_s": res.pulse.On, "off_s": res.pulse.Off, "window_s": [2]float64{res.window.Start, res.window.End}}
		}
		runs = append(runs, m)
	}
	out := map[string]any{
		"kind": "calibration", "calibration_method": cal.Method,
		"heat_capacity_j_per_k": cal.HeatCapacity, "u_heat_capacity_j_per_k": cal.UHeatCapacity,
		"delta_t_k": cal.DeltaT, "mean_temperature_k": cal.MeanTemperature,
		"runs": runs, "checks": cal.Checks, "status": cal.Status, "created_utc": cal.Created,
	}
	if cal.Vessel != nil {
		out["vessel_heat_capacity_j_per_k"], out["u_vessel_heat_capacity_j_per_k"] = *cal.Vessel, *cal.UVessel
	}
	if cal.Scatter != nil {
		out["scatter"] = cal.Scatter
	}
	return out
}

func writeCalibrationText(w io.Writer, cal *calorimeter.Calibration, runs []*calibrationResult) error {
	for i, r := range runs {
		run := r.run
		kind := run.Method
		if run.Variant != "" {
			kind += ", " + run.Variant
		}
		fmt.Fprintf(w, "Calibration run %s (%s) — %s\n", run.RunID, kind, r.in.name)
		if r.pulse != nil {
			fmt.Fprintf(w, "  heating period %d of %d: heater on %.1f s to %.1f s; readings %.1f s to %.1f s analysed\n",
				r.of, r.total, r.pulse.On, r.pulse.Off, r.window.Start, r.window.End)
		}
		fmt.Fprintf(w, "  %d readings, sha256 %s\n", run.Points, r.in.sha256)
		writeTimeZeroText(w, r.in)
		fmt.Fprintln(w)
		writeRiseText(w, run.Rise)
		writeExcludedText(w, run.Rise, r.t, r.lines)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintf(tw, "Heat put in\t%s\t\n", units.Format(run.Heat, run.UHeat, "J"))
		if run.StandardName != "" {
			fmt.Fprintf(tw, "Standard\t%s\t%s\n", run.StandardName, run.StandardSource)
		}
		fmt.Fprintf(tw, "Heat capacity ε\t%s\t(k = %.2f: U = %s J/K)\n", units.Format(run.HeatCapacity, run.UHeatCapacity, "J/K"), run.Budget.K, uText(run.Budget.Expanded))
		if run.Vessel != nil {
			fmt.Fprintf(tw, "Vessel part\t%s\twith %.4g g of liquid\n", units.Format(*run.Vessel, *run.UVessel, "J/K"), run.ContentsMass)
		}
		tw.Flush()
		fmt.Fprintln(w, "\nUncertainty budget of ε (GUM law of propagation, JCGM 100:2008)")
		if err := calorimeter.WriteBudgetTable(w, run.Budget, "J/K"); err != nil {
			return err
		}
		writeChecksText(w, run.Checks, run.Status)
		if i < len(runs)-1 {
			fmt.Fprintln(w, "\n"+strings.Repeat("─", 72))
		}
	}
	if len(runs) > 1 {
		fmt.Fprintf(w, "\nCombined calibration of %d runs (%s)\n", len(runs), cal.Method)
	} else {
		fmt.Fprintln(w, "\nCalibration")
	}
	fmt.Fprintf(w, "  heat capacity ε = %s\n", units.Format(cal.HeatCapacity, cal.UHeatCapacity, "J/K"))
	if cal.Vessel != nil {
		fmt.Fprintf(w, "  vessel part C_v = %s (reusable with other fills)\n", units.Format(*cal.Vessel, *cal.UVessel, "J/K"))
	}
	if cal.Scatter != nil {
		fmt.Fprintf(w, "  scatter between runs: sd %.3g J/K, Birge ratio %.2f\n", cal.Scatter.SDJPerK, cal.Scatter.BirgeRatio)
	}
	for _, r := range runs {
		for _, c := range r.run.Checks {
			if c.Name == "pulse-agreement" {
				fmt.Fprintf(w, "  heating periods of %s: %s (%s)\n", r.in.name, c.Detail, c.Status)
			}
		}
	}
	writeChecksText(w, cal.Checks, cal.Status)
	return nil
}

// fileNamePart makes a run id safe inside a file name: a path separator or
// a character that shells and file systems treat specially becomes '_'.
func fileNamePart(id string) string {
	return strings.Map(func(r rune) rune {
		switch {
		case r == '/' || r == '\\' || r == ':' || r == '*' || r == '?' || r == '"' || r == '<' || r == '>' || r == '|':
			return '_'
		case r < ' ':
			return '_'
		}
		return r
	}, id)
}
