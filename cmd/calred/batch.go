package main

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/vbauerster/mpb/v8"
	"github.com/vbauerster/mpb/v8/decor"

	"calred/calorimeter"
	"calred/calorimeter/ledger"
	"calred/calorimeter/plot"
	"calred/calorimeter/report"
	"calred/units"
)

const batchAbout = `Reduce every row of a manifest CSV: calibrations first, then the sample runs that use them.
Manifest columns are the flag names of reduce and calibrate with '-' written '_' (sample_mass,
formula, solvent_mass, heat_capacity, heater_power, cold_mass …), plus
  log       the log file, relative to the manifest
  kind      sample (default) or calibration
  cal       run_id of a calibration row (several joined with '+' are combined), or a calibration file
  accepted  reference value for grading, e.g. 34.89±0.10 kJ/mol
Each sample with an accepted value is graded: error %, z (with --sigma-pt), ζ, En, a verdict
(ISO 13528 limits) and feedback naming the classic mistakes. A run that cannot be reduced is
reported and the others go on (exit 3); a failed check gives exit 4.`

func runBatch(a *app, args []string) error {
	fs := newFlags(a, "batch", "MANIFEST.csv [flags]", batchAbout)
	output := fs.StringP("output", "o", "", "write the results CSV to FILE")
	reportFile := fs.String("report", "", "write one HTML report of all runs to FILE.html")
	title := fs.String("title", "", "title of the HTML report (default: the manifest's name)")
	sigmaPT := fs.String("sigma-pt", "", "standard deviation for proficiency assessment for z scores, kJ/mol or % of the accepted value (e.g. 5%)")
	ledgerFile := fs.String("ledger", "", "append every run to this ledger CSV")
	lf := addLimitFlags(fs)
	quiet := fs.Bool("quiet", false, "print only the summary table")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return withHint(usagef("batch: want exactly one MANIFEST.csv, got %d arguments", fs.NArg()), "e.g. `calred batch class.csv -o results.csv --report report.html`")
	}
	sigma, sigmaRel, err := parseSigmaPT(*sigmaPT)
	if err != nil {
		return err
	}
	mpath := fs.Arg(0)
	rows, err := readManifest(mpath)
	if err != nil {
		return err
	}
	dir := filepath.Dir(mpath)
	mname := filepath.Base(mpath)
	for _, r := range rows {
		warnUnusedCells(a, mname, r)
	}
	inputs := []string{mpath}
	for _, r := range rows {
		inputs = append(inputs, filepath.Join(dir, r.log))
	}
	for _, o := range []struct{ flag, name string }{{"-o", *output}, {"--report", *reportFile}, {"--ledger", *ledgerFile}} {
		if o.name == "" {
			continue
		}
		if err := checkOutPath(o.flag, o.name); err != nil {
			return err
		}
		if err := checkNotInput(o.flag, o.name, inputs...); err != nil {
			return err
		}
	}

	var bar *mpb.Bar
	var progress *mpb.Progress
	if f, ok := a.stderr.(*os.File); ok && isTerminal(f) && !*quiet {
		progress = mpb.New(mpb.WithOutput(f), mpb.WithWidth(40))
		bar = progress.AddBar(int64(len(rows)), mpb.PrependDecorators(decor.Name("reducing "), decor.CountersNoUnit("%d/%d")))
	}
	done := func() {
		if bar != nil {
			bar.Increment()
		}
	}

	// Calibrations first, in manifest order, then samples.
	order := make([]int, 0, len(rows))
	for i, r := range rows {
		if r.kind == "calibration" {
			order = append(order, i)
		}
	}
	for i, r := range rows {
		if r.kind != "calibration" {
			order = append(order, i)
		}
	}
	calRuns := map[string][]*calorimeter.CalibrationRun{}
	results := make([]*batchResult, len(rows))
	var ledgerRows []ledger.Row
	idLine := map[string]int{}    // run id of a reduced row → its manifest line
	failedCal := map[string]int{} // run id of a calibration row not reduced → its manifest line
	// taken reports a run id already used by another row (a log's own
	// `# run-id:` line can repeat one the manifest does not show).
	taken := func(id string, line int) error {
		if first, dup := idLine[id]; dup {
			return withHint(dataf("run id %q is already used by the row on line %d", id, first), "give the row a run_id cell of its own")
		}
		idLine[id] = line
		return nil
	}
	for _, i := range order {
		mr := rows[i]
		res := &batchResult{row: mr, runID: mr.spec.text("run-id")}
		results[i] = res
		logPath := filepath.Join(dir, mr.log)
		if res.runID == "" {
			res.runID = strings.TrimSuffix(filepath.Base(mr.log), filepath.Ext(mr.log))
		}
		var rowLedger []ledger.Row
		switch mr.kind {
		case "calibration":
			crs, err := calibrateLog(a, logPath, mr.spec, lf)
			if err != nil {
				res.err = err
				break
			}
			res.runID = crs[0].in.runID
			if res.err = taken(res.runID, mr.line); res.err != nil {
				break
			}
			var runs []*calorimeter.CalibrationRun
			for _, cr := range crs {
				runs = append(runs, cr.run)
				rowLedger = append(rowLedger, cr.record())
			}
			if len(crs) > 1 {
				// A log with several heating periods: the row stands for their combination.
				comb, err := calorimeter.Combine(runs, time.Now(), version)
				if err != nil {
					res.err = dataErr(err)
					break
				}
				res.calComb = comb
			}
			res.cal = crs[0]
			calRuns[res.runID] = runs
			for _, cr := range crs {
				if cr.run.RunID != res.runID {
					calRuns[cr.run.RunID] = []*calorimeter.CalibrationRun{cr.run}
				}
			}
		default:
			cals, err := batchCalibrations(mr, calRuns, failedCal)
			if err != nil {
				res.err = err
				break
			}
			sr, err := reduceSample(a, logPath, mr.spec, dir, cals, lf)
			if err != nil {
				res.err = err
				break
			}
			res.runID = sr.in.runID
			if res.err = taken(res.runID, mr.line); res.err != nil {
				break
			}
			res.sample = sr
			rowLedger = append(rowLedger, sr.record())
		}
		if res.err == nil {
			ledgerRows = append(ledgerRows, rowLedger...)
		} else if mr.kind == "calibration" {
			if _, ok := calRuns[res.runID]; !ok {
				failedCal[res.runID] = mr.line
			}
		}
		if res.err != nil {
			where := fmt.Sprintf("%s:%d", mname, mr.line)
			msg, _ := splitHint(oneLine(res.err.Error()))
			a.warnf("%s: %s: %s", where, res.runID, manifestTerms(strings.TrimPrefix(msg, where+": ")))
		}
		done()
	}
	if progress != nil {
		progress.Wait()
	}
	gradeBatch(results, sigma, sigmaRel)
	badAccepted := 0
	for _, r := range results {
		if r.gradeErr != nil {
			badAccepted++
			where := fmt.Sprintf("%s:%d", mname, r.row.line)
			a.warnf("%s: %s: %s; not graded", where, r.runID, strings.TrimPrefix(oneLine(r.gradeErr.Error()), where+": "))
		}
	}

	// The files are staged, the ledger rows appended, and only then the
	// files renamed into place: a refused ledger leaves no new file.
	var outs outputs
	defer outs.discard()
	if *output != "" {
		if err := outs.stage("-o", *output, func(w io.Writer) error { return writeResultsCSV(w, results) }); err != nil {
			return err
		}
	}
	if *reportFile != "" {
		t := *title
		if t == "" {
			t = "calred report — " + mname
		}
		if err := outs.stage("--report", *reportFile, func(w io.Writer) error { return writeReport(w, t, mname, results) }); err != nil {
			return err
		}
	}
	if *ledgerFile != "" && len(ledgerRows) > 0 {
		if err := appendLedger(*ledgerFile, ledgerRows...); err != nil {
			return err
		}
	}
	if err := outs.commit(); err != nil {
		if *ledgerFile != "" && len(ledgerRows) > 0 {
			return fmt.Errorf("%w (the ledger row is recorded)", err)
		}
		return err
	}
	writeBatchSummary(a.stdout, results, *quiet)

	var failed, broken int
	for _, r := range results {
		switch {
		case r.err != nil:
			broken++
		case r.status() == calorimeter.Fail:
			failed++
		}
	}
	if broken == 1 && len(results) == 1 {
		return dataf("%s: its one run could not be reduced", mname)
	}
	if broken == len(results) {
		return dataf("%s: none of the %d runs could be reduced", mname, broken)
	}
	if broken > 0 {
		return dataf("%s: %d of %d runs could not be reduced (the others are written)", mname, broken, len(results))
	}
	if badAccepted > 0 {
		return dataf("%s: %d accepted value(s) could not be read; those runs are reduced but not graded", mname, badAccepted)
	}
	if failed > 0 {
		return errCheckFailed
	}
	return nil
}

func isTerminal(f *os.File) bool {
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

// parseSigmaPT reads "0.8", "0.8 kJ/mol" or "5%".
func parseSigmaPT(s string) (abs, rel float64, err error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, 0, nil
	}
	if p, ok := strings.CutSuffix(s, "%"); ok {
		v, err := units.ParseNumber(strings.TrimSpace(p))
		if err != nil || !(v > 0) {
			return 0, 0, usagef("flag --sigma-pt: %q is not a positive percentage", s)
		}
		return 0, v / 100, nil
	}
	q, err := units.Parse(s, units.MolarEnthalpy, "kJ/mol")
	if err != nil || !(q.Value > 0) {
		return 0, 0, usagef("flag --sigma-pt: %q is not a positive molar enthalpy (kJ/mol) or percentage", s)
	}
	return q.Value / 1000, 0, nil
}

type manifestRow struct {
	line     int
	log      string
	kind     string
	cal      string
	accepted string
	spec     *spec
}

// readManifest reads the manifest; an unknown or repeated column, a row
// without a log and a run_id used twice are errors naming the manifest
// line. The file may start with a byte-order mark and `#` comment lines;
// its delimiter (comma, semicolon or tab) is taken from the header line.
func readManifest(path string) ([]manifestRow, error) {
	f, err := openInput(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	name := filepath.Base(path)
	b, err := io.ReadAll(f)
	if err != nil {
		return nil, dataf("%s: %s", name, pathErrText(err))
	}
	b = bytes.TrimPrefix(b, []byte("\ufeff"))
	r := csv.NewReader(bytes.NewReader(b))
	r.Comma = manifestDelimiter(b)
	r.FieldsPerRecord = -1
	r.Comment = '#'
	r.TrimLeadingSpace = true
	csvErr := func(err error) error {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return dataf("%s:%d: %v", name, pe.Line, pe.Err)
		}
		return dataf("%s: %v", name, err)
	}
	header, err := r.Read()
	if errors.Is(err, io.EOF) {
		return nil, withHint(dataf("%s: no header line: the manifest is empty", name), "the first line names the columns, e.g. log,kind,formula,sample_mass,cal")
	}
	if err != nil {
		return nil, csvErr(err)
	}
	hline, _ := r.FieldPos(0)
	cols := make([]string, len(header))
	where := map[string]int{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(h))
		key := strings.Join(strings.FieldsFunc(h, func(c rune) bool { return c == '_' || c == ' ' || c == '-' }), "-")
		switch key {
		case "", "log", "kind", "cal":
		default:
			if _, ok := fieldByName(key); !ok {
				return nil, dataf("%s:%d: unknown column %q (columns are flag names with '_' for '-', plus log, kind, cal, accepted)", name, hline, h)
			}
		}
		if j, dup := where[key]; dup && key != "" {
			return nil, dataf("%s:%d: column %q is given twice (columns %d and %d)", name, hline, h, j+1, i+1)
		}
		where[key] = i
		cols[i] = key
	}
	if _, ok := where["log"]; !ok {
		return nil, withHint(dataf("%s:%d: no log column: each row names its log file there", name, hline),
			"the header names the columns, e.g. log,kind,formula,sample_mass,cal")
	}
	var rows []manifestRow
	ids := map[string]int{} // run_id → manifest line
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, csvErr(err)
		}
		line, _ := r.FieldPos(0)
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue
		}
		if len(rec) > len(cols) {
			return nil, dataf("%s:%d: %d cells but the header has %d columns", name, line, len(rec), len(cols))
		}
		mr := manifestRow{line: line, kind: "sample", spec: newSpec()}
		origin := fmt.Sprintf("%s:%d", name, line)
		for i, v := range rec {
			v = strings.TrimSpace(v)
			if v == "" {
				continue
			}
			switch cols[i] {
			case "":
				return nil, dataf("%s:%d: %q in column %d, which has no name in the header", name, line, v, i+1)
			case "log":
				mr.log = v
			case "kind":
				mr.kind = strings.ToLower(v)
			case "cal":
				mr.cal = v
				mr.spec.set("cal", v, origin)
			case "accepted":
				mr.accepted = v
				mr.spec.set("accepted", v, origin)
			default:
				mr.spec.set(cols[i], v, origin)
				mr.spec.label[cols[i]] = strings.ReplaceAll(cols[i], "-", "_")
			}
		}
		if mr.log == "" {
			return nil, dataf("%s:%d: no log file given", name, line)
		}
		if mr.kind != "sample" && mr.kind != "calibration" {
			return nil, dataf("%s:%d: kind %q is not sample or calibration", name, line, mr.kind)
		}
		id := mr.spec.text("run-id")
		if id == "" {
			id = strings.TrimSuffix(filepath.Base(mr.log), filepath.Ext(mr.log))
		}
		if first, dup := ids[id]; dup {
			return nil, withHint(dataf("%s:%d: run_id %q is already used on line %d", name, line, id, first),
				"give each row its own run_id (a run's ledger row and its calibration are found by it)")
		}
		ids[id] = line
		rows = append(rows, mr)
	}
	if len(rows) == 0 {
		return nil, dataf("%s: no runs listed", name)
	}
	return rows, nil
}

// warnUnusedCells warns about the cells of a row that its kind does not
// read (a heater power on a sample row, an accepted value on a
// calibration): most often the kind is wrong.
func warnUnusedCells(a *app, mname string, r manifestRow) {
	use := byte('r')
	if r.kind == "calibration" {
		use = 'c'
	}
	var unused []string
	for _, f := range fields {
		if r.spec.has(f.name) && strings.IndexByte(f.use, use) < 0 {
			unused = append(unused, strings.ReplaceAll(f.name, "-", "_"))
		}
	}
	if len(unused) > 0 {
		a.warnf("%s:%d: a %s row does not use %s; is its kind right?", mname, r.line, r.kind, strings.Join(unused, ", "))
	}
}

// flagName matches a flag name in a message.
var flagName = regexp.MustCompile(`--([a-z][a-z-]*[a-z])`)

// manifestTerms writes the flags a message names as the manifest columns
// they are in a batch: "give --cold-mass" becomes "give cold_mass".
func manifestTerms(msg string) string {
	return flagName.ReplaceAllStringFunc(msg, func(m string) string {
		if _, ok := fieldByName(m[2:]); ok {
			return strings.ReplaceAll(m[2:], "-", "_")
		}
		return m
	})
}

// manifestDelimiter is the delimiter of the header line (the first line
// that is neither blank nor a comment): the most frequent of comma,
// semicolon and tab outside quotes, comma when there is none.
func manifestDelimiter(b []byte) rune {
	for _, line := range strings.Split(string(b), "\n") {
		line = strings.TrimSpace(line)
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		count := map[rune]int{}
		quoted := false
		for _, c := range line {
			switch {
			case c == '"':
				quoted = !quoted
			case !quoted && (c == ',' || c == ';' || c == '\t'):
				count[c]++
			}
		}
		best := ','
		for _, c := range []rune{';', '\t'} {
			if count[c] > count[best] {
				best = c
			}
		}
		return best
	}
	return ','
}

// batchCalibrations resolves a sample's cal cell: run ids of calibration
// rows (joined with '+') become one combined calibration, held under the
// cell's text; anything else is left for heatCapacityOf to read as a file.
//
// failed holds the run ids of calibration rows that could not be reduced,
// with their manifest lines.
func batchCalibrations(mr manifestRow, calRuns map[string][]*calorimeter.CalibrationRun, failed map[string]int) (map[string]*calorimeter.Calibration, error) {
	if mr.cal == "" {
		return nil, nil
	}
	ids := strings.Split(mr.cal, "+")
	var runs []*calorimeter.CalibrationRun
	// A run is its log (sha256) and its process in it (a log with several
	// heating periods holds several runs): key → the id that brought it.
	seen := map[string]string{}
	for _, id := range ids {
		id = strings.TrimSpace(id)
		if line, bad := failed[id]; bad {
			return nil, dataf("calibration %q could not be reduced (manifest line %d)", id, line)
		}
		if r, ok := calRuns[id]; ok {
			for _, run := range r {
				key := fmt.Sprintf("%s@%.6g", run.SHA256, run.MixTime)
				if first, dup := seen[key]; dup {
					return nil, dataf("calibration %q: run %s (%s) is already in it through %q; a run counted twice would shrink the uncertainty of the mean", mr.cal, run.RunID, run.File, first)
				}
				seen[key] = id
			}
			runs = append(runs, r...)
		} else if len(ids) > 1 {
			return nil, dataf("calibration %q is not the run_id of a calibration row", id)
		}
	}
	if len(runs) == 0 {
		if strings.HasSuffix(strings.ToLower(mr.cal), ".json") {
			return nil, nil // a calibration file
		}
		return nil, dataf("calibration %q is neither a calibration row's run_id nor a .json calibration file", mr.cal)
	}
	cal, err := calorimeter.Combine(runs, time.Now(), version)
	if err != nil {
		return nil, dataErr(err)
	}
	cal.SHA256 = mr.cal
	return map[string]*calorimeter.Calibration{mr.cal: cal}, nil
}

type batchResult struct {
	row      manifestRow
	runID    string
	sample   *sampleResult
	cal      *calibrationResult       // the (first) calibration run of the row
	calComb  *calorimeter.Calibration // the row's runs combined, when its log has several heating periods
	err      error
	grade    *calorimeter.Grade
	gradeErr error // the accepted value could not be read
}

// heatCapacity is a calibration row's result.
func (r *batchResult) heatCapacity() (eps, u float64) {
	if r.calComb != nil {
		return r.calComb.HeatCapacity, r.calComb.UHeatCapacity
	}
	return r.cal.run.HeatCapacity, r.cal.run.UHeatCapacity
}

func (r *batchResult) status() calorimeter.Status {
	switch {
	case r.err != nil:
		return "error"
	case r.sample != nil:
		return r.sample.red.Status
	case r.calComb != nil:
		return r.calComb.Status
	case r.cal != nil:
		return r.cal.run.Status
	}
	return "error"
}

func gradeBatch(results []*batchResult, sigma, sigmaRel float64) {
	for _, r := range results {
		if r.row.accepted == "" {
			continue
		}
		q, _, err := r.row.spec.quantity("accepted")
		if err != nil {
			g := calorimeter.Grade{Accepted: math.NaN(), UAccepted: math.NaN(), ErrorPercent: math.NaN(), Z: math.NaN(), Zeta: math.NaN(), En: math.NaN(),
				Verdict: "not graded", Feedback: []string{fmt.Sprintf("accepted value not read: %s", strings.TrimPrefix(err.Error(), r.row.spec.origin["accepted"]+": accepted: "))}}
			r.grade = &g
			r.gradeErr = err
			continue
		}
		acc, uacc := q.Value/1000, q.U/1000
		if r.sample == nil {
			g := calorimeter.Grade{Accepted: acc, UAccepted: uacc, ErrorPercent: math.NaN(), Z: math.NaN(), Zeta: math.NaN(), En: math.NaN(), Verdict: "not graded"}
			if r.err != nil {
				g.Feedback = []string{"the run could not be reduced: " + oneLine(r.err.Error())}
			}
			r.grade = &g
			continue
		}
		red := r.sample.red
		s := sigma
		if sigmaRel > 0 {
			s = sigmaRel * math.Abs(acc)
		}
		g := calorimeter.GradeResult(red.MolarEnthalpy, red.UMolarEnthalpy, red.Expanded, acc, uacc, s)
		g.Feedback = calorimeter.Diagnose(red.MolarEnthalpy, acc, red.Sample.MolarMass, red.Checks)
		r.grade = &g
	}
}

var resultsHeader = []string{"run_id", "kind", "status", "log", "formula", "method", "delta_t_k", "u_delta_t_k",
	"molar_enthalpy_kj_per_mol", "u_molar_enthalpy_kj_per_mol", "expanded_uncertainty_kj_per_mol", "coverage_factor",
	"heat_capacity_j_per_k", "u_heat_capacity_j_per_k", "molality_mol_per_kg", "accepted_kj_per_mol",
	"error_percent", "z_score", "zeta_score", "en_number", "verdict", "feedback"}

func num(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

func writeResultsCSV(w io.Writer, results []*batchResult) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(resultsHeader); err != nil {
		return err
	}
	for _, r := range results {
		rec := make([]string, len(resultsHeader))
		rec[0], rec[1], rec[2], rec[3] = r.runID, r.row.kind, string(r.status()), r.row.log
		switch {
		case r.sample != nil:
			red := r.sample.red
			rec[4], rec[5] = red.Sample.Formula, red.Rise.Method
			rec[6], rec[7] = num(red.Rise.DeltaT), num(red.Rise.UDeltaT)
			rec[8], rec[9], rec[10], rec[11] = num(red.MolarEnthalpy), num(red.UMolarEnthalpy), num(red.Expanded), num(red.CoverageFactor)
			rec[12], rec[13], rec[14] = num(red.HeatCapacity), num(red.UHeatCapacity), num(red.Molality)
		case r.cal != nil:
			run := r.cal.run
			eps, u := r.heatCapacity()
			rec[5], rec[6], rec[7] = run.CorrectionMethod, num(run.DeltaT), num(run.UDeltaT)
			rec[12], rec[13] = num(eps), num(u)
		}
		var fb []string
		if r.err != nil {
			msg, _ := splitHint(oneLine(r.err.Error()))
			fb = append(fb, "not reduced: "+manifestTerms(msg))
		}
		if g := r.grade; g != nil {
			rec[15], rec[16], rec[17], rec[18], rec[19], rec[20] = num(g.Accepted), num(g.ErrorPercent), num(g.Z), num(g.Zeta), num(g.En), g.Verdict
			fb = append(fb, g.Feedback...)
		}
		rec[21] = strings.Join(fb, " | ")
		for i := range rec {
			rec[i] = ledger.SafeCell(rec[i])
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

func writeBatchSummary(w io.Writer, results []*batchResult, quiet bool) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "run\tkind\tstatus\tresult\tgrade")
	byFormula := map[string][]float64{}
	for _, r := range results {
		res, grade := "—", ""
		switch {
		case r.err != nil:
			res = "not reduced"
		case r.sample != nil:
			red := r.sample.red
			res = fmt.Sprintf("ΔsolH = %s", units.Format(red.MolarEnthalpy, red.Expanded, "kJ/mol"))
			if red.Sample.Formula != "" {
				byFormula[red.Sample.Formula] = append(byFormula[red.Sample.Formula], red.MolarEnthalpy)
			}
		case r.cal != nil:
			eps, u := r.heatCapacity()
			res = fmt.Sprintf("ε = %s", units.Format(eps, u, "J/K"))
			if r.calComb != nil {
				res += fmt.Sprintf(" (%d heating periods)", len(r.calComb.Runs))
			}
		}
		if g := r.grade; g != nil {
			grade = g.Verdict
			if !math.IsNaN(g.ErrorPercent) {
				grade = fmt.Sprintf("%s (%+.1f %%, En %.2f)", g.Verdict, g.ErrorPercent, g.En)
			}
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", r.runID, r.row.kind, r.status(), res, grade)
	}
	tw.Flush()
	formulas := make([]string, 0, len(byFormula))
	for f := range byFormula {
		formulas = append(formulas, f)
	}
	sort.Strings(formulas)
	for _, f := range formulas {
		if c, err := calorimeter.AlgorithmA(byFormula[f]); err == nil {
			fmt.Fprintf(w, "\n%s: robust class mean %.3f kJ/mol, s* = %.3f kJ/mol, u(x*) = %.3f kJ/mol over %d runs (ISO 13528 Algorithm A)\n",
				f, c.Mean, c.SD, c.U, c.N)
		}
	}
	if quiet {
		return
	}
	for _, r := range results {
		if r.grade != nil && len(r.grade.Feedback) > 0 {
			fmt.Fprintf(w, "\n%s:\n", r.runID)
			for _, fb := range r.grade.Feedback {
				fmt.Fprintf(w, "  - %s\n", fb)
			}
		}
	}
}

// writeReport renders the HTML report with one thermogram per run.
func writeReport(w io.Writer, title, manifest string, results []*batchResult) error {
	rep := report.Report{Title: title, Manifest: manifest, Generated: time.Now().UTC(), Version: version}
	for _, r := range results {
		e := report.Entry{RunID: r.runID, Kind: r.row.kind, Status: string(r.status()), Log: r.row.log}
		var th *plot.Thermogram
		switch {
		case r.err != nil:
			msg, _ := splitHint(oneLine(r.err.Error()))
			e.Error = manifestTerms(msg)
		case r.sample != nil:
			red := r.sample.red
			e.Result = "ΔsolH = " + units.Format(red.MolarEnthalpy, red.Expanded, "kJ/mol")
			e.Detail = fmt.Sprintf("ΔT = %s (%s); ε = %s; %.4g g %s", units.Format(red.Rise.DeltaT, red.Rise.UDeltaT, "K"), red.Rise.Method,
				units.Format(red.HeatCapacity, red.UHeatCapacity, "J/K"), red.Sample.Mass, red.Sample.Formula)
			e.Checks = red.Checks
			th = r.sample.plotData()
			if c := calorimeter.Caution(red.Sample.Formula); c != "" {
				e.Caution = c
			}
		case r.cal != nil:
			run := r.cal.run
			eps, u := r.heatCapacity()
			e.Result = "ε = " + units.Format(eps, u, "J/K")
			e.Detail = fmt.Sprintf("ΔT = %s (%s), %s calibration", units.Format(run.DeltaT, run.UDeltaT, "K"), run.CorrectionMethod, run.Method)
			e.Checks = run.Checks
			if r.calComb != nil {
				e.Detail = fmt.Sprintf("%d heating periods combined; the first: %s", len(r.calComb.Runs), e.Detail)
				e.Checks = r.calComb.Checks
			}
			th = thermogram(r.runID, r.cal.t, r.cal.theta, run.Rise)
		}
		if g := r.grade; g != nil {
			e.Grade = g
		}
		if th != nil {
			var buf bytes.Buffer
			if err := plot.WriteThermogram(&buf, "svg", *th, plot.Options{MaxPoints: reportMaxPoints}); err == nil {
				e.SVG = buf.String()
			}
		}
		rep.Entries = append(rep.Entries, e)
	}
	return report.Write(w, rep)
}

// reportMaxPoints thins each figure of the HTML report (min/max per bucket,
// package plot) so that a report of hundreds of runs stays a few MB.
const reportMaxPoints = 800
