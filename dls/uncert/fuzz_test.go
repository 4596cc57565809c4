package uncert

import (
	"encoding/json"
	"testing"
)

// FuzzZAverage: arbitrary numbers never panic, and every budget marshals
// to JSON (no NaN or infinity in the output).
func FuzzZAverage(f *testing.F) {
	f.Add(3418.78, 10.0, 100.0, 298.15, 1.33162, 3.0194, 632.8e-9, 0.1, 0.01)
	f.Add(1e-300, 1e300, 0.0, 1e300, 1.0, 1e-9, 1e-300, 0.0, 0.0)
	f.Fuzz(func(t *testing.T, g, se, dof, tK, n, th, lam, uT, uEta float64) {
		in := &Inputs{GammaPerS: g, GammaSEPerS: se, GammaDOF: dof, TemperatureK: tK, Viscosity: andrade,
			RefractiveIndex: n, AngleRad: th, WavelengthM: lam,
			U: Uncertainties{TemperatureK: uT, ViscosityRel: uEta, RefractiveIndex: 1e-4, AngleRad: 1e-3}}
		b, err := ZAverage(in)
		if err != nil {
			return
		}
		if _, err := json.Marshal(b); err != nil {
			t.Fatalf("%v for %+v", err, in)
		}
	})
}
