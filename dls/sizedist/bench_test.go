package sizedist

import (
	"math"
	"testing"
)

// BenchmarkNew maps a 100-rate spectrum (20–2e5 1/s) to size distributions
// at the worked-example optics, with Mie weights computed ("uncached") and
// from a WeightCache that already holds them ("cached", a batch sharing
// its grid and optics).
func BenchmarkNew(b *testing.B) {
	gam := logGrid(20, 2e5, 100)
	amp := make([]float64, len(gam))
	for i := range amp {
		amp[i] = math.Exp(-math.Pow(math.Log(gam[i]/3000), 2))
	}
	for _, cached := range []bool{false, true} {
		in := Input{GammaPerS: gam, Amplitude: amp, TempK: 298.15, ViscosityPaS: 0.890022e-3,
			Optics: workedOptics, ParticleIndex: complex(1.5875, 0)}
		name := "uncached"
		if cached {
			in.Cache, name = &WeightCache{}, "cached"
		}
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := New(in); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
