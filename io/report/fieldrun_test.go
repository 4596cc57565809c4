package report

import (
	"math"
	"reflect"
	"testing"

	"dlsbatch/dls"
)

// TestFieldRunRoundTrip: the scratch file's binary form gives back every
// bit, including values that decimal text would round (the smallest
// subnormal, a negative zero) and texts with multi-byte characters, with
// and without lags; a form cut short is an error.
func TestFieldRunRoundTrip(t *testing.T) {
	for _, lags := range [][]float64{nil, {2.5e-8, 5e-8}} {
		f := &dls.FieldRun{TemperatureC: 25.000000000000004, ViscosityMPaS: 0.8900220000000001, RefractiveIndex: 1.33162,
			WavelengthNm: 632.8, AngleDeg: 173, QPerM: 2.6377e7, DurationS: math.Copysign(0, -1), CountRateKcps: 300,
			HasCountRate: true, ParticleRI: "1.5874+0i (polystyrene: Sultanova et al. 2009, λ in µm)", Kind: "g2",
			TauS: lags}
		if lags != nil {
			f.Data = []float64{1.9, 5e-324}
		}
		b := appendFieldRun(nil, f)
		back, err := readFieldRun(b)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(back, f) || !math.Signbit(back.DurationS) {
			t.Errorf("round trip: %+v, want %+v", back, f)
		}
		for n := range len(b) {
			if _, err := readFieldRun(b[:n]); err == nil {
				t.Fatalf("a field run cut to %d of %d bytes was read without an error", n, len(b))
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
	f.Add(appendFieldRun(nil, &dls.FieldRun{TauS: []float64{1e-6}, Data: []float64{1.9}, ParticleRI: "1.59+0i", Kind: "g2"}))
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
