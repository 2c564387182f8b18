package calorimeter

import (
	"math"
	"strings"
	"testing"
)

func gradeClose(a, b, tol float64) bool { return math.Abs(a-b) <= tol*math.Max(1, math.Abs(b)) }

func TestGradeResult(t *testing.T) {
	// Scores by their definitions in ISO 13528:2015 §9 (DOMAIN §8), worked by
	// hand to 8 digits; tolerance 1e-6 relative. Verdicts: |z|, |ζ| ≤ 2
	// satisfactory, 2–3 questionable, ≥ 3 unsatisfactory (ISO 13528, DOMAIN §8).
	tests := []struct {
		name                   string
		x, u, U, acc, uacc, sd float64
		err, z, zeta, en       float64
		verdict                string
	}{
		// d = 0.5: error 0.5/25 = 2 %; ζ = 0.5/√(0.2²+0.1²) = 2.2361; En = 0.5/√(0.4²+0.2²) = 1.1180; z = 0.5/1 = 0.5.
		{"z decides", 25.5, 0.2, 0.4, 25.0, 0.1, 1.0, 2, 0.5, 2.2360680, 1.1180340, "satisfactory"},
		{"zeta decides", 25.5, 0.2, 0.4, 25.0, 0.1, 0, 2, math.NaN(), 2.2360680, 1.1180340, "questionable"},
		// d = −1.5: ζ = −1.5/√(0.3²+0.1²) = −4.7434.
		{"unsatisfactory", 23.5, 0.3, 0.6, 25.0, 0.1, 0, -6, math.NaN(), -4.7434165, -2.3717082, "unsatisfactory"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			g := GradeResult(tc.x, tc.u, tc.U, tc.acc, tc.uacc, tc.sd)
			for _, c := range []struct {
				name      string
				got, want float64
			}{{"error", g.ErrorPercent, tc.err}, {"z", g.Z, tc.z}, {"zeta", g.Zeta, tc.zeta}, {"En", g.En, tc.en}} {
				if math.IsNaN(c.want) != math.IsNaN(c.got) || (!math.IsNaN(c.want) && !gradeClose(c.got, c.want, 1e-6)) {
					t.Errorf("%s = %v, want %v", c.name, c.got, c.want)
				}
			}
			if g.Verdict != tc.verdict {
				t.Errorf("verdict %q, want %q", g.Verdict, tc.verdict)
			}
		})
	}
}

func TestDiagnose(t *testing.T) {
	// 34.89 kJ/mol for KNO3: DOMAIN §5, from memory [M-high]; the feedback
	// thresholds are the code's own, the cases lie far either side of them.
	mKNO3 := 101.102 // g/mol, DOMAIN §6 check value
	tests := []struct {
		name          string
		x, acc, molar float64
		want          string
	}{
		{"sign reversed", -34.5, 34.89, mKNO3, "wrong sign"},
		{"J for kJ", 34500, 34.89, mKNO3, "factor of 1000"},
		{"kJ for J", 0.0345, 34.89, mKNO3, "factor of 1000"},
		{"per gram", 34.89 / mKNO3, 34.89, mKNO3, "molar mass"},
		// NH4NO3 dissolved but reduced as NH4Cl: x = 25.69·M(NH4Cl)/M(NH4NO3) = 25.69·53.489/80.043 = 17.17 kJ/mol (DOMAIN §5, §6).
		{"wrong salt", 25.69 * 53.489 / 80.043, 14.78, 53.489, "molar mass of NH4NO3"},
		// 31.0/34.89 = 0.889: 11 % low, the cup's own heat capacity named
		{"low", 31.0, 34.89, mKNO3, "11 % low: heat lost to the cup and lid (the calorimeter's own heat capacity)"},
		// 36.5/34.89 = 1.046: 5 % high
		{"high", 36.5, 34.89, mKNO3, "5 % high"},
		{"fine", 34.7, 34.89, mKNO3, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			fb := Diagnose(tc.x, tc.acc, tc.molar, nil)
			got := strings.Join(fb, " | ")
			if tc.want == "" {
				if got != "" {
					t.Errorf("feedback %q, want none", got)
				}
				return
			}
			if !strings.Contains(got, tc.want) {
				t.Errorf("feedback %q does not mention %q", got, tc.want)
			}
		})
	}
	fb := Diagnose(34.7, 34.89, mKNO3, []Check{{Name: "fore-period", Status: Warn, Detail: "fore period 50 s is short"}})
	if len(fb) != 1 || !strings.Contains(fb[0], "fore-period (warn)") {
		t.Errorf("check feedback %q", fb)
	}
}

func TestAlgorithmA(t *testing.T) {
	// ISO 13528:2015 Algorithm A on a hand-checked set: the outlier 30 is clipped.
	// Start: median 10.05, MAD 0.1 → s* = 0.1483; iterate to convergence.
	vals := []float64{9.9, 10.0, 10.1, 10.0, 10.2, 9.8, 30}
	c, err := AlgorithmA(vals)
	if err != nil {
		t.Fatal(err)
	}
	// Independent recomputation of the same iteration with Python 3.11's statistics
	// module (median, stdev; δ = 1.5 s*, clip, mean, s* = 1.134·sd, stop when s* is
	// stable to 3 significant figures): x* = 10.054894419351157, s* = 0.22035942038246772
	// after 9 iterations; tolerance 1e-9 relative. The command:
	//   /usr/bin/python3 -c 'import statistics as st
	//   v=[9.9,10.0,10.1,10.0,10.2,9.8,30]
	//   x=st.median(v); s=1.483*st.median([abs(a-x) for a in v]); i=0
	//   while True:
	//     d=1.5*s; w=[min(max(a,x-d),x+d) for a in v]; x=st.mean(w); s2=1.134*st.stdev(w); i+=1
	//     done=float("%.3g"%s2)==float("%.3g"%s); s=s2
	//     if done: break
	//   print(repr(x),repr(s),i)'
	// The clip, δ = 1.5 s*, and the factors 1.483 and 1.134 are ISO 13528:2015
	// Annex C.3 (DOMAIN §8), as is u(x*) = 1.25 s*/√p.
	if !gradeClose(c.Mean, 10.054894419351157, 1e-9) || !gradeClose(c.SD, 0.22035942038246772, 1e-9) || c.Iterations != 9 {
		t.Errorf("consensus %+v", c)
	}
	if math.Abs(c.U-1.25*c.SD/math.Sqrt(7)) > 1e-12 {
		t.Errorf("u(x*) = %v, want 1.25 s*/√p", c.U)
	}
	if _, err := AlgorithmA([]float64{1, 2}); err == nil {
		t.Error("two values: want an error")
	}
}
