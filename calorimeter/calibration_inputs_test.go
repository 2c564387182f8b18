package calorimeter

import (
	"bytes"
	"encoding/json"
	"errors"
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
