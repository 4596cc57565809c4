package contin

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSignificant: the rule share ≥ MinZ·u, its default of 4, a negative
// MinZ turning it off, and an uncertainty that cannot be judged leaving
// the peak standing. Exact comparisons: the rule is a single inequality.
func TestSignificant(t *testing.T) {
	for _, tc := range []struct {
		name     string
		fraction float64
		u        float64
		s        *PeakSettings
		want     bool
	}{
		{"default, 4.1 u", 0.041, 0.01, nil, true},
		{"default, exactly 4 u", 0.04, 0.01, nil, true},
		{"default, 3.9 u", 0.039, 0.01, nil, false},
		{"MinZ 2, 2.5 u", 0.025, 0.01, &PeakSettings{MinZ: 2}, true},
		{"MinZ 2, 1.5 u", 0.015, 0.01, &PeakSettings{MinZ: 2}, false},
		{"off", 0.001, 0.01, &PeakSettings{MinZ: -1}, true},
		{"u zero", 0.02, 0, nil, true},
		{"u NaN", 0.02, math.NaN(), nil, true},
		{"u Inf", 0.02, math.Inf(1), nil, true},
	} {
		if got := Significant(tc.fraction, tc.u, tc.s); got != tc.want {
			t.Errorf("%s: Significant(%g, %g) = %v, want %v", tc.name, tc.fraction, tc.u, got, tc.want)
		}
	}
}

// TestBartlettWindows: the running-window form equals the Bartlett-kernel
// double sum Σ_i Σ_k (1 − |i−k|/b)₊ v_i v_k of Newey and West (1987),
// to rounding (1e-12 relative: sums of 60 terms of order one).
func TestBartlettWindows(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	v := make([]float64, 60)
	for i := range v {
		v[i] = r.NormFloat64()
	}
	for _, b := range []int{1, 2, 7, 30, 60, 90} {
		var want float64
		for i := range v {
			for k := range v {
				if d := math.Abs(float64(i - k)); d < float64(b) {
					want += (1 - d/float64(b)) * v[i] * v[k]
				}
			}
		}
		if got := bartlett(v, b); math.Abs(got-want) > 1e-12*math.Max(1, math.Abs(want)) {
			t.Errorf("b = %d: windows give %.15g, double sum %.15g", b, got, want)
		}
	}
}

// TestBlockLength: the AR(1) plug-in of Andrews (1991) for the Bartlett
// kernel, L = 1.1447·(4ρ²/((1−ρ)²(1+ρ)²)·m)^(1/3), on residuals with a
// known lag-one autocorrelation: white noise gives b = 1, a constant
// sign-alternating series (ρ ≤ 0) b = 1, and an AR(1) series of ρ = 0.8
// with m = 4000 b within 15 % of the formula's 1 + 1.1447·(4·0.64/
// (0.04·3.24)·4000)^(1/3) = 50.3 (the standard error of ρ̂ at m = 4000 is
// about 0.01, which moves L by about 8 %).
func TestBlockLength(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	const m = 4000
	w := make([]float64, m)
	white, alt, ar := make([]float64, m), make([]float64, m), make([]float64, m)
	prev := 0.0
	for i := range w {
		w[i] = 1
		white[i] = r.NormFloat64()
		alt[i] = float64(1 - 2*(i%2))
		prev = 0.8*prev + math.Sqrt(1-0.64)*r.NormFloat64()
		ar[i] = prev
	}
	// The lag-one autocorrelation it returns: within 3 standard errors
	// (1/√m = 0.016) of 0 for white noise and of 0.8 for the AR(1) series
	// (its standard error √((1−ρ²)/m) = 0.0095), −1 for the alternating one.
	if b, rho := blockLength(white, w); b > 3 || math.Abs(rho) > 0.05 {
		t.Errorf("white noise: block %d, ρ %.3f; want about 1 and 0", b, rho)
	}
	if b, rho := blockLength(alt, w); b != 1 || math.Abs(rho+1) > 1e-3 {
		t.Errorf("alternating series: block %d, ρ %.4f; want 1 and −1", b, rho)
	}
	want := 1 + 1.1447*math.Cbrt(4*0.64/(0.04*3.24)*m)
	b, rho := blockLength(ar, w)
	if math.Abs(float64(b)/want-1) > 0.15 || math.Abs(rho-0.8) > 0.03 {
		t.Errorf("AR(1) 0.8: block %d, ρ %.3f; want %.1f ± 15 %% and 0.8 ± 0.03", b, rho, want)
	}
}

// TestSensitivityDense: StdDev against the same sandwich formed with
// gonum's dense matrices on the passive set, H = A_P'WA_P + α²R_PP (the
// constant column included), t = H⁻¹c, v = W·A_P·t·e and the Bartlett
// sum: an independent evaluation of the documented formula, agreeing to
// 1e-8 relative (two different orders of summation of the same terms and
// a Cholesky against a dense LU solve of a matrix of condition up to
// about 1e6).
func TestSensitivityDense(t *testing.T) {
	tau, _ := multiTau(1e-6, 8, 120)
	g, err := NewGrid(tau, &GridSettings{NGamma: 40, GammaMinPerS: 10, GammaMaxPerS: 1e6})
	if err != nil {
		t.Fatal(err)
	}
	y, sigma := noisy(g1Of([]population{{3000, 0.15, 0.7}, {300, 0.1, 0.3}}, tau), 2e-3, 11)
	s := DefaultSettings()
	res, err := Invert(g, y, sigma, s)
	if err != nil {
		t.Fatal(err)
	}
	sv, err := NewSensitivity(g, res, sigma, s)
	if err != nil {
		t.Fatal(err)
	}
	A := g.Kernel()
	R := g.Regulariser()
	m, n := g.NLags(), g.NGamma()
	var pas []int
	for j, x := range res.Amplitude {
		if x > 0 {
			pas = append(pas, j)
		}
	}
	p := len(pas) + 1 // and the baseline column
	col := func(a, i int) float64 {
		if a == len(pas) {
			return 1
		}
		return A.At(i, pas[a])
	}
	var trG float64
	for j := 0; j < n; j++ {
		for i := 0; i < m; i++ {
			trG += A.At(i, j) * A.At(i, j) / (sigma[i] * sigma[i])
		}
	}
	var trR float64
	for j := 0; j < n; j++ {
		trR += R.At(j, j)
	}
	a2 := res.Lambda * trG / trR
	H := mat.NewDense(p, p, nil)
	for a := 0; a < p; a++ {
		for b := 0; b < p; b++ {
			var v float64
			for i := 0; i < m; i++ {
				v += col(a, i) * col(b, i) / (sigma[i] * sigma[i])
			}
			if a < len(pas) && b < len(pas) {
				v += a2 * R.At(pas[a], pas[b])
			}
			H.Set(a, b, v)
		}
	}
	r := rand.New(rand.NewPCG(7, 8))
	for trial := 0; trial < 3; trial++ {
		c := make([]float64, n)
		cp := mat.NewVecDense(p, nil)
		for a, j := range pas {
			c[j] = r.NormFloat64()
			cp.SetVec(a, c[j])
		}
		var tv mat.VecDense
		if err := tv.SolveVec(H, cp); err != nil {
			t.Fatal(err)
		}
		v := make([]float64, m)
		for i := 0; i < m; i++ {
			var s float64
			for a := 0; a < p; a++ {
				s += col(a, i) * tv.AtVec(a)
			}
			v[i] = s * res.Residuals[i] / (sigma[i] * sigma[i])
		}
		b := sv.BlockLength()
		var want float64
		for i := range v {
			for k := range v {
				if d := math.Abs(float64(i - k)); d < float64(b) {
					want += (1 - d/float64(b)) * v[i] * v[k]
				}
			}
		}
		want = math.Sqrt(want)
		if got := sv.StdDev(c); !(math.Abs(got/want-1) < 1e-8) {
			t.Errorf("trial %d: StdDev %.12g, dense sandwich %.12g (block %d)", trial, got, want, b)
		}
	}
}

// BenchmarkSensitivity times what the peak rule costs per correlogram on
// top of the inversion: the sensitivity of the chosen solution of
// BenchmarkInvert's m=152 problem and four standard uncertainties (share
// and mean of two peaks), the most a typical measurement asks for.
func BenchmarkSensitivity(b *testing.B) {
	tau, y, sigma := benchProblem(152)
	g, err := NewGrid(tau, nil)
	if err != nil {
		b.Fatal(err)
	}
	s := DefaultSettings()
	res, err := Invert(g, y, sigma, s)
	if err != nil {
		b.Fatal(err)
	}
	c := make([]float64, g.NGamma())
	for j, x := range res.Amplitude {
		if x > 0 {
			c[j] = 1
		}
	}
	b.ReportAllocs()
	for b.Loop() {
		sv, err := NewSensitivity(g, res, sigma, s)
		if err != nil {
			b.Fatal(err)
		}
		for range 4 {
			sv.StdDev(c)
		}
	}
}
