package calorimeter

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"
)

// TestCalibrationFileUnknownInput: a stored input the model does not read
// (here the vessel split's liquid mass under an older symbol) is refused
// rather than silently dropped, which would quietly lose the vessel part.
func TestCalibrationFileUnknownInput(t *testing.T) {
	cal := chainCalibration(t, true)
	if cal.Vessel == nil {
		t.Fatal("split calibration has no vessel part")
	}
	var buf bytes.Buffer
	if err := WriteCalibration(&buf, cal); err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(buf.Bytes(), &m); err != nil {
		t.Fatal(err)
	}
	renamed := false
	for _, in := range m["runs"].([]any)[0].(map[string]any)["inputs"].([]any) {
		in := in.(map[string]any)
		if in["symbol"] == "m_w,cal" {
			in["symbol"] = "m_w"
			renamed = true
		}
	}
	if !renamed {
		t.Fatal("no m_w,cal input to rename")
	}
	b, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	_, err = ReadCalibration(bytes.NewReader(b))
	if err == nil || !errors.Is(err, ErrCalibrationEdited) || !strings.Contains(err.Error(), `input "m_w" (liquid mass during calibration) is not part of the electrical model`) {
		t.Errorf("err = %v, want the unused input named", err)
	}
}

// TestCombineMeterCorrelated: two electrical runs read with one power meter
// share its calibration uncertainty, so combining them must not shrink it.
// With r = 1 the power's contribution is |c1 + c2|·u_P, and since
// ε = Σ w_i·P_i·t_i/ΔT_i, c_i = w_i·ε_i/P, so the sum is ε·u_P/P (analytic).
func TestCombineMeterCorrelated(t *testing.T) {
	cal := chainCalibration(t, false)
	var c chain
	cm, err := cal.model(&c)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Propagate(c.inputs, c.correlation(), cm.eps, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	var sum, uP float64
	n := 0
	for _, term := range b.Terms {
		if strings.HasPrefix(term.Symbol, "P[") {
			sum += term.Sensitivity
			uP = term.StandardUncertainty
			n++
		}
	}
	if n != 2 {
		t.Fatalf("%d power inputs, want 2", n)
	}
	want := b.Value * uP / chainPower
	if got := sum * uP; math.Abs(got-want) > 1e-6*want {
		t.Errorf("power contribution %g J/K, want ε·u_P/P = %g J/K", got, want)
	}
	if b.U < want {
		t.Errorf("u(ε) = %g J/K is below the power meter's own share %g J/K", b.U, want)
	}
	if b.CorrelationShare <= 0 {
		t.Errorf("correlation share %g %%, want > 0", b.CorrelationShare)
	}
}
