package report

import (
	"bytes"
	"math"
	"strings"
	"testing"
	"time"

	"calred/calorimeter"
)

func TestWrite(t *testing.T) {
	// 34.89 kJ/mol: KNO3, DOMAIN §5, from memory [M-high]; only the layout of
	// the page is checked here, not the grade.
	g := calorimeter.GradeResult(34.5, 0.2, 0.4, 34.89, 0.1, 0)
	rep := Report{
		Title: "CHEM 121 <week 7>", Manifest: "class.csv", Generated: time.Date(2026, 3, 4, 10, 0, 0, 0, time.UTC), Version: "test",
		Entries: []Entry{
			{RunID: "s01", Kind: "sample", Status: "pass", Log: "s01.csv", Result: "ΔsolH = 34.50 ± 0.40 kJ/mol",
				Checks: []calorimeter.Check{{Name: "fore-period", Status: calorimeter.Pass, Detail: "ok"},
					{Name: "spikes", Status: calorimeter.Warn, Detail: "1 reading excluded"}},
				Grade: &g, SVG: `<svg xmlns="http://www.w3.org/2000/svg"><circle r="1"/></svg>`},
			{RunID: "s02", Kind: "sample", Status: "error", Log: "s02.csv", Error: `s02.csv:4: temperature "<b>x" is not a number`},
		},
	}
	var buf bytes.Buffer
	if err := Write(&buf, rep); err != nil {
		t.Fatal(err)
	}
	html := buf.String()
	for _, want := range []string{
		"CHEM 121 &lt;week 7&gt;", // titles are escaped
		`&#34;&lt;b&gt;x&#34;`,    // so are error messages
		`<svg xmlns="http://www.w3.org/2000/svg"><circle r="1"/></svg>`, // our own SVG is embedded as is
		"1 checks passed",
		"spikes",
		"Could not be reduced",
		"2026-03-04 10:00 UTC",
		"safety data sheet",
	} {
		if !strings.Contains(html, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	if strings.Contains(html, "<b>x") {
		t.Error("user text reached the page unescaped")
	}
	if reportNum(math.NaN(), 2) != "—" || reportNum(1.234, 1) != "1.2" {
		t.Error("reportNum")
	}
}
