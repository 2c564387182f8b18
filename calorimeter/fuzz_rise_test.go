package calorimeter

import (
	"encoding/binary"
	"math"
	"testing"
)

// FuzzAnalyseRise feeds arbitrary logs to AnalyseRise: it may refuse them,
// but it must not panic, and what it returns must be finite where it
// reports a value.
func FuzzAnalyseRise(f *testing.F) {
	f.Add([]byte{}, 0.0)
	f.Add(make([]byte, 8*12), 0.0)
	_, th, _ := cupRun(1).Run()
	seed := make([]byte, 0, 8*len(th))
	for _, v := range th[:120] {
		seed = binary.LittleEndian.AppendUint64(seed, math.Float64bits(v))
	}
	f.Add(seed, 0.0)
	f.Add(seed, 300.0)
	f.Fuzz(func(t *testing.T, data []byte, mix float64) {
		n := len(data) / 8
		y := make([]float64, n)
		for k := range y {
			v := math.Float64frombits(binary.LittleEndian.Uint64(data[8*k:]))
			if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > 1e6 {
				v = 1
			}
			y[k] = 295 + math.Mod(v, 10)
		}
		times := make([]float64, n)
		for k := range times {
			times[k] = 5 * float64(k)
		}
		r, err := AnalyseRise(times, y, RiseOptions{MixTime: mix})
		if err != nil {
			return
		}
		if math.IsNaN(r.DeltaT) || math.IsNaN(r.UDeltaT) {
			t.Errorf("ΔT %v ± %v from %d readings", r.DeltaT, r.UDeltaT, n)
		}
	})
}
