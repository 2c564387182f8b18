// Package demo makes the demo scenario's files: logs written the way two
// invented labs' instruments would export them, and the manifests.
package demo

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"calred/calorimeter"
)

// Files returns every demo file by its path under examples/.
func Files() (map[string][]byte, error) {
	out := map[string][]byte{}
	if err := harbourStreet(out); err != nil {
		return nil, err
	}
	if err := kestrel(out); err != nil {
		return nil, err
	}
	return out, nil
}

const kelvin = 273.15

// ---------------------------------------------------------------- teaching lab

// cup is the class's coffee-cup calorimeter: two nested polystyrene cups,
// lid, stirrer and probe. Its own heat capacity is what the mixing
// calibration has to find (DOMAIN §1: cup + probe 10–40 J/K).
const cupHeatCapacity = 24.0 // J/K

type student struct {
	runID, name, formula, label string
	mass, water                 float64 // g
	start                       float64 // s of logging before the salt goes in
	g                           float64 // 1/s
	lambda                      float64 // 1/s dissolution rate
	spike                       bool
	seed                        uint64
	note                        string
}

func harbourStreet(out map[string][]byte) error {
	dir := "harbour-street/"
	room := 22.4 + kelvin
	// Class calibration by hot/cold mixing: 50 g cold tap water in the cup,
	// 50 g of water from the kettle, both weighed.
	type mix struct {
		id     string
		mc, mh float64
		tc, th float64 // K
		g      float64
		seed   uint64
	}
	mixes := []mix{
		{"cal-mix-1", 50.12, 49.87, 19.62 + kelvin, 44.8 + kelvin, 2.1e-4, 11},
		{"cal-mix-2", 50.05, 50.31, 19.88 + kelvin, 46.1 + kelvin, 2.3e-4, 12},
	}
	var manifest bytes.Buffer
	manifest.WriteString("# Harbour Street College, CHEM 121 section B, thermochemistry practical, week 7\n")
	manifest.WriteString("# instructor: Dr. Ines Halvorsen; accepted values are ΔsolH at infinite dilution, 298.15 K (NBS tables, DOMAIN §5; KNO3 from memory)\n")
	manifest.WriteString("log,kind,run_id,operator,sample_id,formula,sample_mass,solvent_mass,cold_mass,hot_mass,hot_temperature,cal,accepted,note\n")
	for _, m := range mixes {
		tf := mixFinal(m.mc, m.mh, m.tc, m.th)
		eps := cupHeatCapacity + (m.mc+m.mh)*calorimeter.WaterCp(tf)
		s := calorimeter.Simulation{
			Duration: 600, Interval: 2, MixTime: 180,
			StartTemperature: m.tc, ConvergenceTemperature: room, CoolingConstant: m.g,
			HeatCapacity: eps, Heat: eps * (tf - m.tc), ReleaseRate: 0.25, ProbeLag: 4,
			Noise: 0.012, Quantum: 0.01, Seed: m.seed,
		}
		// The fore period is the cold water in the cup, drifting towards the room.
		t, theta, _ := s.Run()
		if t == nil {
			return fmt.Errorf("%s: %w", m.id, s.Validate())
		}
		meta := []string{"# run: " + m.id, "# operator: I. Halvorsen", "# instrument: TempStick TS-2 probe, 0.01 °C resolution",
			"# hot water poured at about 3 min; hot water temperature read just before pouring (±0.1 °C)"}
		out[dir+m.id+".csv"] = classLog(meta, t, theta)
		fmt.Fprintf(&manifest, "%s.csv,calibration,%s,I. Halvorsen,,,,,%.2f g,%.2f g,%.1f±0.1 °C,,,class calibration by water mixing\n",
			m.id, m.id, m.mc, m.mh, m.th-kelvin)
	}
	// Accepted values (DOMAIN §5, NBS tables / Parker 1965; KNO3 from memory, high confidence).
	acc := map[string]string{"KNO3": "34.89±0.10 kJ/mol", "NH4NO3": "25.69±0.10 kJ/mol", "NH4Cl": "14.78±0.10 kJ/mol"}
	h := map[string]float64{"KNO3": 34.6e3, "NH4NO3": 25.4e3, "NH4Cl": 14.9e3}
	students := []student{
		{runID: "s01-mbeki", name: "A. Mbeki", formula: "KNO3", mass: 5.012, water: 100.04, start: 180, g: 2.0e-4, lambda: 0.035, seed: 21},
		{runID: "s02-ferreira", name: "J. Ferreira", formula: "KNO3", mass: 4.987, water: 99.81, start: 200, g: 2.2e-4, lambda: 0.03, seed: 22},
		{runID: "s03-nakamura", name: "L. Nakamura", formula: "NH4NO3", mass: 4.503, water: 100.22, start: 50, g: 2.0e-4, lambda: 0.05, seed: 23,
			note: "started logging just before adding the salt"},
		{runID: "s04-kowalczyk", name: "S. Kowalczyk", formula: "NH4NO3", mass: 4.498, water: 100.10, start: 180, g: 1.9e-4, lambda: 0.045, seed: 24},
		{runID: "s05-adeyemi", name: "R. Adeyemi", formula: "NH4Cl", mass: 3.521, water: 100.31, start: 180, g: 2.1e-4, lambda: 0.04, seed: 25, spike: true,
			note: "probe knocked against the cup once"},
		{runID: "s06-lindqvist", name: "T. Lindqvist", formula: "NH4NO3", label: "NH4Cl", mass: 4.012, water: 99.95, start: 180, g: 2.0e-4, lambda: 0.05, seed: 26,
			note: "bottle label read as ammonium chloride"},
		{runID: "s07-suarez", name: "P. Suarez", formula: "KNO3", mass: 5.033, water: 100.18, start: 180, g: 6.5e-4, lambda: 0.012, seed: 27,
			note: "lid left off, stirred only now and then"},
		{runID: "s08-oduya", name: "K. Oduya", formula: "NH4Cl", mass: 3.498, water: 99.89, start: 180, g: 2.0e-4, lambda: 0.04, seed: 28},
	}
	for i, st := range students {
		m, _, err := calorimeter.MolarMass(st.formula)
		if err != nil {
			return err
		}
		t0 := 21.0 + 0.15*float64(i%4) + kelvin
		eps := cupHeatCapacity + st.water*calorimeter.WaterCp(t0)
		q := -st.mass / m * h[st.formula]
		s := calorimeter.Simulation{
			Duration: st.start + 540, Interval: 2, MixTime: st.start,
			StartTemperature: t0, ConvergenceTemperature: room, CoolingConstant: st.g,
			HeatCapacity: eps, Heat: q, ReleaseRate: st.lambda, ProbeLag: 5,
			Noise: 0.012, Quantum: 0.01, Seed: st.seed,
		}
		if st.spike {
			s.Spikes, s.SpikeAdd = []float64{st.start + 330}, 0.9
		}
		t, theta, _ := s.Run()
		if t == nil {
			return fmt.Errorf("%s: %w", st.runID, s.Validate())
		}
		label := st.formula
		if st.label != "" {
			label = st.label
		}
		meta := []string{"# run: " + st.runID, "# operator: " + st.name, "# instrument: TempStick TS-2 probe, 0.01 °C resolution"}
		out[dir+st.runID+".csv"] = classLog(meta, t, theta)
		fmt.Fprintf(&manifest, "%s.csv,sample,%s,%s,CHEM121-B,%s,%.3f g,%.2f g,,,,cal-mix-1+cal-mix-2,%s,%s\n",
			st.runID, st.runID, st.name, label, st.mass, st.water, acc[label], csvCell(st.note))
	}
	out[dir+"manifest.csv"] = manifest.Bytes()
	return nil
}

// csvCell quotes a manifest cell that holds a comma or a quote (RFC 4180).
func csvCell(s string) string {
	if strings.ContainsAny(s, ",\"") {
		return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
	}
	return s
}

// mixFinal solves the energy balance of a mixing run for the final
// temperature: m_h[h(T_h) − h(T_f)] = m_c[h(T_f) − h(T_c)] + C_cup(T_f − T_c).
func mixFinal(mc, mh, tc, th float64) float64 {
	lo, hi := tc, th
	for range 100 {
		tf := (lo + hi) / 2
		f := mh*calorimeter.WaterEnthalpyChange(tf, th) - mc*calorimeter.WaterEnthalpyChange(tc, tf) - cupHeatCapacity*(tf-tc)
		if f > 0 {
			lo = tf
		} else {
			hi = tf
		}
	}
	return (lo + hi) / 2
}

// classLog writes a teaching-lab logger export: metadata comments, a header
// with units, time in seconds, temperature in °C to 0.01 °C.
func classLog(meta []string, t, theta []float64) []byte {
	var b bytes.Buffer
	for _, m := range meta {
		b.WriteString(m + "\n")
	}
	b.WriteString("Time (s),Temperature (°C)\n")
	for i := range t {
		fmt.Fprintf(&b, "%.1f,%.2f\n", t[i], theta[i]-kelvin)
	}
	return b.Bytes()
}

// --------------------------------------------------------------------- QC lab

// kestrelVessel is the QC lab's isoperibol cell: 100 mL of water in a glass
// Dewar with heater, stirrer and thermistor.
const kestrelVessel = 94.0 // J/K, the vessel's own heat capacity

func kestrel(out map[string][]byte) error {
	dir := "kestrel/"
	day0 := time.Date(2026, 9, 7, 8, 30, 0, 0, time.UTC)
	water := 100.00
	var manifest bytes.Buffer
	manifest.WriteString("# Kestrel Analytical, solution calorimetry bench 2: weekly electrical calibrations and a KCl check standard\n")
	manifest.WriteString("log,kind,run_id,operator,sample_id,heater_power,heater_time,contents_mass,formula,sample_mass,solvent_mass,cal,accepted,note\n")
	operators := []string{"M. Varga", "D. Achterberg"}
	for i := range 8 {
		id := fmt.Sprintf("elcal-%02d", i+1)
		t0 := 24.6 + 0.05*float64(i%3) + kelvin
		eps := kestrelVessel + water*calorimeter.WaterCp(t0+0.25) + 0.6*math.Sin(float64(i))
		power, th := 0.5012, 300.0
		s := calorimeter.Simulation{
			Duration: 1500, Interval: 5, MixTime: 500,
			StartTemperature: t0, ConvergenceTemperature: 25.0 + kelvin, CoolingConstant: 6e-4,
			HeatCapacity: eps, Heat: power * th, HeaterTime: th, ProbeLag: 3,
			Noise: 0.00015, Quantum: 0.0001, Seed: uint64(100 + i),
		}
		t, theta, _ := s.Run()
		if t == nil {
			return fmt.Errorf("%s: %w", id, s.Validate())
		}
		start := day0.Add(time.Duration(i) * 84 * time.Hour)
		op := operators[i%2]
		meta := []string{"# run-id: " + id, "# operator: " + op, "# heater-power: 0.5012±0.0005 W", "# heater-time: 300.0±0.1 s"}
		out[dir+id+".tsv"] = qcLog(meta, start, t, theta)
		fmt.Fprintf(&manifest, "%s.tsv,calibration,%s,%s,,,,%.2f g,,,,,,weekly electrical calibration\n", id, id, op, water)
	}
	// KCl check standard: SRM 1655 is certified at 0.111 mol/kg (KCl + 500 H2O); in this
	// 100 g cell 0.8281 g gives 0.8281/74.548/0.1 = 0.1111 mol/kg.
	{
		id := "kcl-check-01"
		m, _, _ := calorimeter.MolarMass("KCl")
		mass := 0.8281
		t0 := 25.05 + kelvin
		std, err := calorimeter.LookupStandard("kcl")
		if err != nil {
			return err
		}
		hm, _, err := std.EnthalpyAt(t0-0.08, (mass/m)/(water/1000))
		if err != nil {
			return err
		}
		eps := kestrelVessel + water*calorimeter.WaterCp(t0)
		s := calorimeter.Simulation{
			Duration: 1500, Interval: 5, MixTime: 500,
			StartTemperature: t0, ConvergenceTemperature: 25.0 + kelvin, CoolingConstant: 6e-4,
			HeatCapacity: eps, Heat: -mass / m * hm, ReleaseRate: 0.03, ProbeLag: 3,
			Noise: 0.00015, Quantum: 0.0001, Seed: 200,
		}
		t, theta, _ := s.Run()
		if t == nil {
			return fmt.Errorf("%s: %w", id, s.Validate())
		}
		meta := []string{"# run-id: " + id, "# operator: M. Varga", "# sample-id: SRM1655-lot-K7", "# formula: KCl",
			"# sample-mass: 0.8281 g", "# solvent-mass: 100.00 g"}
		out[dir+id+".tsv"] = qcLog(meta, day0.Add(30*24*time.Hour), t, theta)
		fmt.Fprintf(&manifest, "%s.tsv,sample,%s,M. Varga,SRM1655-lot-K7,,,,KCl,0.8281 g,100.00 g,elcal-07+elcal-08,17.584±0.017 kJ/mol,check standard (certified value from memory of the SRM 1655 certificate)\n", id, id)
	}
	out[dir+"manifest.csv"] = manifest.Bytes()
	return nil
}

// qcLog writes the QC bench's export: tab-separated, ISO 8601 timestamps,
// temperature in kelvin to 0.1 mK, after a two-line instrument preamble.
func qcLog(meta []string, start time.Time, t, theta []float64) []byte {
	var b bytes.Buffer
	b.WriteString("Kestrel bench 2 thermistor bridge export\n")
	b.WriteString("firmware 3.1.4\n")
	for _, m := range meta {
		b.WriteString(m + "\n")
	}
	b.WriteString("timestamp\tT [K]\n")
	for i := range t {
		ts := start.Add(time.Duration(math.Round(t[i]*1000)) * time.Millisecond)
		b.WriteString(ts.Format("2006-01-02T15:04:05Z"))
		b.WriteString("\t")
		b.WriteString(strconv.FormatFloat(theta[i], 'f', 4, 64))
		b.WriteString("\n")
	}
	return b.Bytes()
}
