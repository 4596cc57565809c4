package sim

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestNormalSource checks the ziggurat deviates against the standard
// normal distribution on 200000 draws: mean, variance and fourth moment
// within 4 standard errors of their sampling distributions (1/√n, √(2/n),
// √(96/n) for the fourth moment, whose variance is 105 − 9 = 96); the
// Kolmogorov–Smirnov distance within 2.0/√n (the 0.1 % point of the
// Kolmogorov distribution is 1.95; from memory) against Φ from math.Erf;
// and the share beyond the ziggurat's tail start r = 3.4426 (the base
// layer's tail method) within 4 Poisson standard deviations of
// erfc(r/√2) = 5.76e-4.
func TestNormalSource(t *testing.T) {
	const n = 200000
	z := newNormalSource(rand.NewPCG(3, 4), 7)
	x := make([]float64, 0, n)
	for len(x) < n {
		x = append(x, z.take(7)...)
	}
	x = x[:n]
	var m1, m2, m4 float64
	tail := 0
	for _, v := range x {
		m1 += v / n
		m2 += v * v / n
		m4 += v * v * v * v / n
		if math.Abs(v) > zigR {
			tail++
		}
	}
	if math.Abs(m1) > 4/math.Sqrt(n) || math.Abs(m2-1) > 4*math.Sqrt(2.0/n) || math.Abs(m4-3) > 4*math.Sqrt(96.0/n) {
		t.Errorf("moments: mean %.4g, E[x²] %.4g, E[x⁴] %.4g", m1, m2, m4)
	}
	slices.Sort(x)
	d := 0.0
	for i, v := range x {
		phi := 0.5 * (1 + math.Erf(v/math.Sqrt2))
		d = math.Max(d, math.Max(math.Abs(phi-float64(i)/n), math.Abs(phi-float64(i+1)/n)))
	}
	if d > 2.0/math.Sqrt(n) {
		t.Errorf("Kolmogorov–Smirnov distance %.4g > %.4g", d, 2.0/math.Sqrt(n))
	}
	want := n * math.Erfc(zigR/math.Sqrt2)
	if math.Abs(float64(tail)-want) > 4*math.Sqrt(want) {
		t.Errorf("%d deviates beyond %.4f, want %.1f", tail, zigR, want)
	}
	t.Logf("KS distance %.4g (bound %.4g), tail %d (want %.1f)", d, 2.0/math.Sqrt(n), tail, want)
}
