package mie

import (
	"math"
	"testing"
)

// FuzzParseComplexIndex: no input panics; whatever parses is finite with
// n > 0 and k ≥ 0, and formats back to a string that parses to the same
// value.
func FuzzParseComplexIndex(f *testing.F) {
	for _, s := range []string{"1.59+0.0i", "1.59", "0.2+3.1i", "1.59-0.01i", "", "(1.5+0.1i)", "NaN", "1e400",
		" 1.33 + 0.001i ", "3.1i", "0x1p0+0x1p-4i", "+1.5+-0i", "1.5e-3+2E2i"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		m, err := ParseComplexIndex(s)
		if err != nil {
			return
		}
		n, k := real(m), imag(m)
		if math.IsNaN(n) || math.IsInf(n, 0) || math.IsNaN(k) || math.IsInf(k, 0) || n <= 0 || k < 0 || math.Signbit(k) {
			t.Fatalf("%q parsed to invalid %v", s, m)
		}
		back, err := ParseComplexIndex(FormatComplexIndex(m))
		if err != nil || back != m {
			t.Fatalf("%q → %v → %q → %v, %v", s, m, FormatComplexIndex(m), back, err)
		}
	})
}
