package mie

import (
	"fmt"
	"math"
	"testing"
)

// BenchmarkIntensityGrid: the weights of a DLS size grid, 100 sizes
// log-spaced 1 nm–10 µm, polystyrene in water at 633 nm, 173°.
func BenchmarkIntensityGrid(b *testing.B) {
	for _, n := range []int{100} {
		d := logGrid(n, 1e-9, 10e-6)
		for _, pol := range []Polarization{Vertical, Unpolarized} {
			b.Run(fmt.Sprintf("sizes=%d/%v", n, pol), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					if _, err := IntensityGrid(d, 633e-9, testNWater, complex(testNPS, 0), 173*math.Pi/180, pol); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// BenchmarkCompute: efficiencies across size parameters; the cost grows
// with the number of terms (≈ x) and, for large |m|·x, with the start of
// the logarithmic-derivative recurrence above |m|·x.
func BenchmarkCompute(b *testing.B) {
	for _, c := range []struct {
		x float64
		m complex128
	}{{1, 1.19}, {66, 1.19}, {1000, 1.5}, {10000, 1.33 + 1e-5i}, {10000, 10 + 10i}} {
		b.Run(fmt.Sprintf("x=%g/m=%v", c.x, c.m), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Compute(c.x, c.m); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
