package batch

import (
	"encoding/binary"
	"math"
	"testing"

	"dlsbatch/dls"
)

// FuzzAnalyze feeds the whole per-measurement pipeline arbitrary
// correlation values on a valid lag grid: it must never panic, and every
// number of a result must be finite (JSON could not carry it otherwise).
func FuzzAnalyze(f *testing.F) {
	seed := make([]byte, 8*60)
	for i := 0; i < 60; i++ {
		binary.LittleEndian.PutUint64(seed[8*i:], math.Float64bits(1+0.9*math.Exp(-float64(i)/10)))
	}
	f.Add(seed)
	f.Add(make([]byte, 8*20))
	f.Fuzz(func(t *testing.T, data []byte) {
		n := len(data) / 8
		if n < 2 || n > 400 {
			return
		}
		m := monoMeasurement(workedMeta())
		m.TauS = m.TauS[:min(n, len(m.TauS))]
		m.Corr = make([]float64, len(m.TauS))
		for i := range m.Corr {
			v := math.Float64frombits(binary.LittleEndian.Uint64(data[8*i:]))
			if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > 1e6 {
				v = 1
			}
			m.Corr[i] = v
		}
		s := DefaultSettings()
		r := Analyze(m, &s)
		if c, d := r.Finite(); !c || !d {
			t.Fatalf("non-finite result: %+v", r)
		}
		if r.Status == dls.StatusError && r.Message == "" {
			t.Fatal("error without a message")
		}
	})
}
