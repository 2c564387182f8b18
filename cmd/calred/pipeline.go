package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"unicode"

	flag "github.com/spf13/pflag"

	"calred/calorimeter"
	"calred/calorimeter/logfile"
	"calred/units"
)

// outFlags are the output and record-keeping flags shared by reduce and
// calibrate.
type outFlags struct {
	json       *bool
	plot       *string
	monteCarlo *string
	seed       *uint64
	ledger     *string
	supersede  *string
	limits     limitFlags
}

type limitFlags struct {
	minFore, minAfter *string
	minPoints         *int
	spikeZ            *float64
}

func addOutFlags(fs *flag.FlagSet, mc bool) *outFlags {
	o := &outFlags{}
	o.json = fs.Bool("json", false, "print one JSON object instead of the report")
	o.plot = fs.String("plot", "", "draw the thermogram with its fits to FILE.svg, FILE.png or FILE.pdf")
	if mc {
		o.monteCarlo = fs.String("monte-carlo", "", "also propagate by Monte Carlo (JCGM 101): N trials, or auto for the adaptive procedure")
		o.seed = fs.Uint64("seed", 1, "seed of the Monte Carlo random stream (same seed, same result)")
	}
	o.ledger = fs.String("ledger", "", "append the result to this ledger CSV (created when absent)")
	o.supersede = fs.String("supersede", "", "the result corrects the ledger row of this RUN_ID (a new row; nothing is rewritten)")
	o.limits = addLimitFlags(fs)
	return o
}

// addLimitFlags registers the check-limit flags, with the defaults of the analysis.
func addLimitFlags(fs *flag.FlagSet) limitFlags {
	d := calorimeter.DefaultCheckLimits()
	return limitFlags{
		minFore:   fs.String("min-fore", "", fmt.Sprintf("shortest fore period accepted, s (default %g s)", d.MinForeS)),
		minAfter:  fs.String("min-after", "", fmt.Sprintf("shortest after period accepted, s (default %g s)", d.MinAfterS)),
		minPoints: fs.Int("min-points", 0, fmt.Sprintf("fewest readings in a fore or after period (default %d)", d.MinPoints)),
		spikeZ:    fs.Float64("spike-z", 0, fmt.Sprintf("robust z beyond which a reading is a spike (default %g)", d.SpikeZ)),
	}
}

// runInput is one log with its description, ready to analyse.
type runInput struct {
	path   string
	name   string // base name
	log    *logfile.Log
	sha256 string
	spec   *spec
	runID  string
}

// loadRun reads the log at path and merges its metadata with the
// description in over (flags or manifest cells), which wins.
func loadRun(a *app, path string, over *spec) (*runInput, error) {
	opt, err := logOptions(over)
	if err != nil {
		return nil, err
	}
	log, sum, err := readLog(path, opt)
	if err != nil {
		return nil, err
	}
	ri := &runInput{path: path, name: filepath.Base(path), log: log, sha256: sum, spec: newSpec()}
	for _, k := range ri.spec.fromMeta(ri.name, log.Meta, log.MetaLine) {
		if f := nearField(k); f != "" {
			a.warnf("%s:%d: %q is not a field name and is ignored; did you mean %s?", ri.name, log.MetaLine[k], k, f)
		}
	}
	for k := range over.values {
		ri.spec.setFrom(over, k)
	}
	for _, w := range log.Warnings {
		a.warnf("%s", w)
	}
	ri.runID = ri.spec.text("run-id")
	if ri.runID == "" {
		ri.runID = strings.TrimSuffix(ri.name, filepath.Ext(ri.name))
	}
	return ri, nil
}

// riseOptions reads the period, method and probe fields.
func riseOptions(s *spec, lf limitFlags) (calorimeter.RiseOptions, error) {
	opt := calorimeter.RiseOptions{MixTime: math.NaN(), Method: "auto", Limits: calorimeter.DefaultCheckLimits()}
	if q, ok, err := s.quantity("mix-time"); err != nil {
		return opt, err
	} else if ok {
		opt.MixTime = q.Value
	}
	for _, name := range []string{"pre", "post"} {
		if !s.has(name) {
			continue
		}
		p, err := parsePeriod(s.text(name))
		if err != nil {
			return opt, s.fail(name, err)
		}
		if name == "pre" {
			opt.Pre = &p
		} else {
			opt.Post = &p
		}
	}
	if s.has("method") {
		m := strings.ToLower(s.text("method"))
		switch m {
		case "auto", "regnault-pfaundler", "dickinson", "extrapolation", "model":
			opt.Method = m
		default:
			return opt, s.failf("method", "unknown method %q (use auto, regnault-pfaundler, dickinson, extrapolation or model)", m)
		}
	}
	if q, ok, err := s.quantity("u-temperature"); err != nil {
		return opt, err
	} else if ok {
		opt.UTemperature = q.Value
	}
	if *lf.minFore != "" {
		q, err := units.Parse(*lf.minFore, units.Time, "s")
		if err != nil {
			return opt, usagef("flag --min-fore: %w", err)
		}
		opt.Limits.MinForeS = q.Value
	}
	if *lf.minAfter != "" {
		q, err := units.Parse(*lf.minAfter, units.Time, "s")
		if err != nil {
			return opt, usagef("flag --min-after: %w", err)
		}
		opt.Limits.MinAfterS = q.Value
	}
	if *lf.minPoints < 0 {
		return opt, usagef("flag --min-points: %d is negative", *lf.minPoints)
	} else if *lf.minPoints > 0 {
		opt.Limits.MinPoints = *lf.minPoints
	}
	if *lf.spikeZ < 0 {
		return opt, usagef("flag --spike-z: %g is negative", *lf.spikeZ)
	} else if *lf.spikeZ > 0 {
		opt.Limits.SpikeZ = *lf.spikeZ
	}
	return opt, nil
}

// parsePeriod reads START:END with optional units on each end ("0:300",
// "0s:5min", "60:4.5min"). A bare number is in seconds, counted from the
// first reading, so neither end may be negative.
func parsePeriod(text string) (calorimeter.Period, error) {
	a, b, ok := strings.Cut(text, ":")
	if !ok || strings.Contains(b, ":") || strings.TrimSpace(a) == "" || strings.TrimSpace(b) == "" {
		return calorimeter.Period{}, fmt.Errorf("%q: want START:END in s from the first reading, e.g. 0:300", text)
	}
	qa, err := units.Parse(a, units.Time, "s")
	if err != nil {
		return calorimeter.Period{}, err
	}
	qb, err := units.Parse(b, units.Time, "s")
	if err != nil {
		return calorimeter.Period{}, err
	}
	if qa.Value < 0 {
		return calorimeter.Period{}, fmt.Errorf("%q: the start %g s is before the first reading (times count from it, at 0 s)", text, qa.Value)
	}
	if !(qb.Value > qa.Value) {
		return calorimeter.Period{}, fmt.Errorf("%q: the end %g s is not after the start %g s", text, qb.Value, qa.Value)
	}
	return calorimeter.Period{Start: qa.Value, End: qb.Value}, nil
}

// checkTimes holds the mixing time and the periods a run's description
// gives against the log and against each other, so that a value the user
// typed is named as theirs (a flag, a manifest cell or a line of the log).
// Each period must start inside the log; the process starts inside the
// log, after the fore period and before the after period.
func checkTimes(ri *runInput, opt calorimeter.RiseOptions) error {
	t := ri.log.Time
	if len(t) == 0 {
		return nil
	}
	end := t[len(t)-1]
	s := ri.spec
	zero := ""
	if n := strings.TrimSpace(timeZeroNote(ri.log)); n != "" {
		zero = "; " + n
	}
	if !math.IsNaN(opt.MixTime) && !(opt.MixTime < end) {
		return s.failf("mix-time", "%g s is not inside the log, whose readings run from 0 to %g s%s", opt.MixTime, end, zero)
	}
	for _, p := range []struct {
		name string
		per  *calorimeter.Period
	}{{"pre", opt.Pre}, {"post", opt.Post}} {
		if p.per != nil && !(p.per.Start < end) {
			return s.failf(p.name, "%s starts at %g s, after the last reading at %g s%s", s.text(p.name), p.per.Start, end, zero)
		}
	}
	mix := opt.MixTime
	switch {
	case opt.Pre != nil && !math.IsNaN(mix) && opt.Pre.End > mix:
		return s.failf("pre", "the fore period %s ends after the process starts (%g s, --mix-time)", s.text("pre"), mix)
	case opt.Post != nil && !math.IsNaN(mix) && opt.Post.Start < mix:
		return s.failf("post", "the after period %s starts before the process (%g s, --mix-time)", s.text("post"), mix)
	case opt.Pre != nil && opt.Post != nil && !(opt.Pre.End < opt.Post.Start):
		return s.failf("post", "the after period %s does not start after the fore period %s ends", s.text("post"), s.text("pre"))
	}
	return nil
}

// analyse runs the corrected-temperature analysis on a loaded run.
func analyse(ri *runInput, lf limitFlags) (*calorimeter.Rise, error) {
	opt, err := riseOptions(ri.spec, lf)
	if err != nil {
		return nil, err
	}
	if err := checkTimes(ri, opt); err != nil {
		return nil, err
	}
	if err := checkIncreasing(ri); err != nil {
		return nil, err
	}
	if err := checkLiquidRange(ri); err != nil {
		return nil, err
	}
	rise, err := calorimeter.AnalyseRise(ri.log.Time, ri.log.Temperature, opt)
	if err != nil {
		return nil, withHint(dataf("%s: %w", ri.name, err), riseHint(ri.spec, err))
	}
	return rise, nil
}

// checkIncreasing names the first reading whose time does not follow the
// one before (a repeated time the reader let through with a warning), by
// its line: the analysis would only give its index.
func checkIncreasing(ri *runInput) error {
	t, lines := ri.log.Time, ri.log.Line
	for i := 1; i < len(t) && i < len(lines); i++ {
		if !(t[i] > t[i-1]) {
			what := fmt.Sprintf("the time repeats that of line %d", lines[i-1])
			if t[i] < t[i-1] {
				what = fmt.Sprintf("the time is %g s before that of line %d", t[i-1]-t[i], lines[i-1])
			}
			return withHint(dataf("%s:%d: %s; the analysis needs times that increase", ri.name, lines[i], what),
				"remove or correct the repeated reading; `calred inspect` lists repeated times")
		}
	}
	return nil
}

// The readings of a solution calorimeter lie where an aqueous solution is
// liquid. The bounds are wide on purpose (supercooled brines, a warm
// bath; common practice): a median outside them means the temperature unit
// is wrong, as with °C readings under a "T/K" header.
const (
	liquidMinK = 233.15 // −40 °C
	liquidMaxK = 423.15 // 150 °C
)

// checkLiquidRange refuses a log whose median reading is where no aqueous
// solution is liquid, naming the unit it was read in and where that unit
// came from (--temperature-unit, or the header).
func checkLiquidRange(ri *runInput) error {
	th := ri.log.Temperature
	if len(th) == 0 {
		return nil
	}
	sorted := append([]float64(nil), th...)
	sort.Float64s(sorted)
	med := sorted[len(sorted)/2]
	if med >= liquidMinK && med <= liquidMaxK {
		return nil
	}
	unit := "°" + ri.log.Dialect.TemperatureUnit
	if unit == "°K" {
		unit = "K"
	}
	msg := fmt.Sprintf("the readings, taken as %s, sit at %.4g °C (median), where no aqueous solution is liquid", unit, med-273.15)
	hint := "give the unit the logger wrote with --temperature-unit C, K or F"
	if ri.spec.has("temperature-unit") {
		return withHint(ri.spec.failf("temperature-unit", "%s", msg), hint)
	}
	return withHint(dataf("%s:%d: %s", ri.name, ri.log.Dialect.HeaderLine, msg), hint)
}

// riseHint is the next step after a failed analysis: the mixing time when
// the process was not found by itself, a look at the periods when they
// were given.
func riseHint(s *spec, err error) string {
	if !errors.Is(err, calorimeter.ErrNoProcess) {
		return ""
	}
	var given []string
	for _, n := range []string{"mix-time", "pre", "post"} {
		if s.has(n) {
			given = append(given, fmt.Sprintf("--%s %s", n, s.text(n)))
		}
	}
	if errors.Is(err, calorimeter.ErrNoChange) {
		return "check that this is the run's log and that the probe was in the vessel (`calred inspect` shows the temperature range)"
	}
	if len(given) == 0 {
		return "look at the log with `calred inspect`, or give the mixing time with --mix-time (s from the first reading)"
	}
	return fmt.Sprintf("no change beyond the noise was found with the times given (%s): check them against the readings; `calred inspect` gives the log's span", strings.Join(given, ", "))
}

// sampleOf reads the sample description.
func sampleOf(s *spec) (calorimeter.Sample, error) {
	var smp calorimeter.Sample
	q, ok, err := s.quantity("sample-mass")
	if err != nil {
		return smp, err
	}
	if !ok {
		return smp, withHint(usagef("no sample mass: give --sample-mass (g)"), "or put a `# sample-mass: 2.503 g` line at the top of the log")
	}
	smp.Mass, smp.UMass = q.Value, q.U
	if uq, ok, err := s.quantity("u-mass"); err != nil {
		return smp, err
	} else if ok {
		if q.HasU {
			return smp, s.failf("u-mass", "the sample mass already carries its uncertainty (%s); give one or the other", s.text("sample-mass"))
		}
		smp.UMass = uq.Value
	}
	smp.Formula = s.text("formula")
	if q, ok, err := s.quantity("molar-mass"); err != nil {
		return smp, err
	} else if ok {
		smp.MolarMass, smp.UMolarMass = q.Value, q.U
	} else if smp.Formula != "" {
		m, u, err := calorimeter.MolarMass(smp.Formula)
		if err != nil {
			return smp, withHint(s.fail("formula", err), formulaHint(smp.Formula))
		}
		smp.MolarMass, smp.UMolarMass = m, u
	} else {
		return smp, withHint(usagef("no molar mass: give --formula or --molar-mass"), "e.g. --formula KNO3")
	}
	if q, ok, err := s.quantity("solvent-mass"); err != nil {
		return smp, err
	} else if ok {
		smp.SolventMass, smp.USolventMass = q.Value, q.U
	}
	if q, ok, err := s.quantity("solution-cp"); err != nil {
		return smp, err
	} else if ok {
		smp.SolutionCp, smp.USolutionCp = q.Value, q.U
	}
	return smp, nil
}

// formulaHint is the next step for a formula that does not parse: the
// capital letters, when the formula has none where a symbol starts.
func formulaHint(f string) string {
	for _, r := range f {
		if unicode.IsLetter(r) {
			if unicode.IsLower(r) {
				return "write it with capitals where symbols start, e.g. KNO3, NaCl, NH4NO3 or CuSO4·5H2O"
			}
			return ""
		}
	}
	return ""
}

// uMass is the balance uncertainty of a run (the default stated in reports).
func uMass(s *spec) (float64, error) {
	q, ok, err := s.quantity("u-mass")
	if err != nil || !ok {
		return calorimeter.DefaultUMass, err
	}
	return q.Value, nil
}

// loadCalibration reads a calibration file; its hash identifies it in the ledger.
func loadCalibration(path string) (*calorimeter.Calibration, error) {
	f, err := openInput(path)
	if err != nil {
		return nil, err
	}
	b, err := io.ReadAll(f)
	f.Close()
	if err != nil {
		return nil, dataf("%s: %v", path, err)
	}
	cal, err := calorimeter.ReadCalibration(bytes.NewReader(b))
	if err != nil {
		return nil, withHint(dataf("%s: %w", filepath.Base(path), err), "--cal takes the file `calred calibrate LOG … -o cal.json` writes")
	}
	cal.SHA256 = sha256Hex(b)
	return cal, nil
}

// heatCapacityOf reads --cal or --heat-capacity.
func heatCapacityOf(s *spec, dir string, cals map[string]*calorimeter.Calibration) (calorimeter.HeatCapacity, error) {
	var hc calorimeter.HeatCapacity
	if s.has("cal") && s.has("heat-capacity") {
		return hc, usagef("give --cal or --heat-capacity, not both")
	}
	if s.has("cal") {
		name := s.text("cal")
		if c, ok := cals[name]; ok {
			hc.Calibration, hc.Source = c, name
			return hc, nil
		}
		p := name
		if dir != "" && !filepath.IsAbs(p) {
			p = filepath.Join(dir, p)
		}
		cal, err := loadCalibration(p)
		if err != nil {
			return hc, err
		}
		hc.Calibration, hc.Source = cal, "sha256:"+cal.SHA256
		return hc, nil
	}
	q, ok, err := s.quantity("heat-capacity")
	if err != nil {
		return hc, err
	}
	if !ok {
		return hc, withHint(usagef("no heat capacity: give --cal FILE or --heat-capacity VALUE±u (J/K)"), "make a calibration file with `calred calibrate LOG --heater-power … -o cal.json`")
	}
	hc.Value, hc.U, hc.Source = q.Value, q.U, "given "+strconv.FormatFloat(q.Value, 'g', -1, 64)+" J/K"
	return hc, nil
}
