package report

import (
	"math"
	"reflect"
	"testing"

	"dlsbatch/dls"
)

// TestFieldRunRoundTrip: the scratch file's binary form gives back every
// bit, including values that decimal text would round (the smallest
// subnormal, a negative zero) and a text with a multi-byte character,
// with and without a noise model.
func TestFieldRunRoundTrip(t *testing.T) {
	for _, noise := range []*dls.FieldNoise{nil, {GammaPerS: 1234.5, Beta: 0.93, CountRatePerS: 3e5, PrevLagS: 1e-6, G1Sigma: []float64{2e-3, 5e-324}}} {
		f := &dls.FieldRun{TemperatureC: 25.000000000000004, ViscosityMPaS: 0.8900220000000001, RefractiveIndex: 1.33162,
			WavelengthNm: 632.8, AngleDeg: 173, QPerM: 2.6377e7, GammaMeanPerS: 1234.5678901234567, PDI: math.Copysign(0, -1),
			ParticleRI: "1.5874+0i (polystyrene: Sultanova et al. 2009, λ in µm)",
			TauS:       []float64{2.5e-8, 5e-8}, G1: []float64{0.99, -1e-3}, G1Sigma: []float64{5e-324, 1e-3}, Noise: noise}
		b := appendFieldRun(nil, f)
		back, err := readFieldRun(b)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(back, f) || !math.Signbit(back.PDI) {
			t.Errorf("round trip: %+v, want %+v", back, f)
		}
		for n := range len(b) {
			if _, err := readFieldRun(b[:n]); err == nil {
				t.Fatalf("noise %v: a field run cut to %d of %d bytes was read without an error", noise != nil, n, len(b))
			}
		}
	}
	if got := appendFieldRun(nil, nil); len(got) != 0 {
		t.Errorf("nil encodes as %d bytes, want none", len(got))
	}
}

// FuzzFieldRun: any bytes are read without a panic, and whatever reads
// back encodes to the same bytes.
func FuzzFieldRun(f *testing.F) {
	f.Add(appendFieldRun(nil, &dls.FieldRun{TauS: []float64{1e-6}, G1: []float64{1}, G1Sigma: []float64{0.1}, ParticleRI: "1.59+0i"}))
	f.Add([]byte{})
	f.Fuzz(func(t *testing.T, b []byte) {
		r, err := readFieldRun(b)
		if err != nil {
			return
		}
		if again := appendFieldRun(nil, r); string(again) != string(b) {
			t.Errorf("read back and encoded again: %d bytes, want the %d read", len(again), len(b))
		}
	})
}
