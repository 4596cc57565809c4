package uncert

import "testing"

// BenchmarkZAverage times one budget: the hand-worked inputs (ν_eff ≈
// 18,000, as in nearly every measurement: t from its series), and the same
// with a Type A standard error of 80 /s, which dominates (ν_eff ≈ 110: t
// from one Newton step on the series; below ν = 30 from gonum's inverse
// incomplete beta function).
func BenchmarkZAverage(b *testing.B) {
	for _, c := range []struct {
		name string
		se   float64
	}{{"nu=18000", 10}, {"nu=110", 80}} {
		in := handInputs()
		in.GammaSEPerS = c.se
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := ZAverage(in); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
