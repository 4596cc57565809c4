package multiangle

import (
	"encoding/json"
	"testing"
)

// FuzzAnalyze: arbitrary numbers never panic, and every result marshals to
// JSON (no NaN or infinity in the output).
func FuzzAnalyze(f *testing.F) {
	f.Add(1e7, 2e7, 3e7, 490.0, 1960.0, 4410.0, 5.0, 298.15, 0.89e-3)
	f.Add(1e7, 1e7, 3e7, 490.0, 490.0, 4410.0, 1e-300, 298.15, 0.89e-3)
	f.Fuzz(func(t *testing.T, q1, q2, q3, g1, g2, g3, se, tK, eta float64) {
		in := []Angle{
			{AngleRad: 0.5, QPerM: q1, GammaPerS: g1, GammaSEPerS: se},
			{AngleRad: 1, QPerM: q2, GammaPerS: g2, GammaSEPerS: se * 2},
			{AngleRad: 1.5, QPerM: q3, GammaPerS: g3, GammaSEPerS: se * 3},
		}
		r, err := Analyze(in, tK, eta, nil)
		if err != nil {
			return
		}
		if _, err := json.Marshal(r); err != nil {
			t.Fatalf("%v for %+v", err, in)
		}
	})
}
