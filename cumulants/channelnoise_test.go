package cumulants

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestChannelNoiseQuadMatchesDirect checks ChannelNoise.Quad (separable
// pair sums below Γ·τ = 20, products of exponentials beyond, far pairs left
// out) against v'·C·v summed directly with one kernel and one exponential
// per pair, for every basis and with the separable boundary moved into
// the decay. Tolerance 1e-10 relative: the two differ by rounding only
// (measured below 1e-12 here); v has both signs, so that the sum is not
// dominated by its diagonal.
func TestChannelNoiseQuadMatchesDirect(t *testing.T) {
	tau := multiTauGrid(0.5e-6, 8, 200)
	for _, c := range []struct {
		name  string
		gamma float64
		sigma bool
		acq   Acquisition
		basis string
	}{
		{"model", 2000, false, Acquisition{DurationS: 10, CountRateHz: 2e5}, BasisModel},
		{"tail", 2000, false, Acquisition{}, BasisTail},
		{"sigma", 2000, true, Acquisition{DurationS: 10, CountRateHz: 2e5}, BasisSigma},
		{"fast decay", 4e4, false, Acquisition{DurationS: 100, CountRateHz: 3e5}, BasisModel},
	} {
		t.Run(c.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(9, 9))
			y := make([]float64, len(tau))
			var sigma []float64
			if c.sigma {
				sigma = make([]float64, len(tau))
			}
			for i, x := range tau {
				g := math.Exp(-c.gamma * x)
				y[i] = 1 + 0.9*g*g + 1e-3*rng.NormFloat64()
				if sigma != nil {
					sigma[i] = 1e-3 * (1 + float64(i%7)/10)
				}
			}
			r, err := Fit(tau, y, sigma, G2, nil)
			if err != nil {
				t.Fatal(err)
			}
			const from = 3
			cn, err := r.ChannelNoise(tau, G2, c.acq, from)
			if err != nil {
				t.Fatal(err)
			}
			if cn.Basis != c.basis {
				t.Fatalf("basis %q, want %q", cn.Basis, c.basis)
			}
			v := make([]float64, len(tau)-from)
			for i := range v {
				v[i] = rng.NormFloat64()
			}
			// Direct: C_ij = f_i f_j R̃_ij with R̃ the kernel (kd on the
			// diagonal).
			m := len(v)
			want := 0.0
			for i := range m {
				for j := range m {
					k := cn.kd[i]
					if i != j {
						a, b := &cn.ch[min(i, j)], &cn.ch[max(i, j)]
						k = cn.kc.kernel(a, b, math.Exp(-cn.sp.gamma*(b.tau-a.tau)))
					}
					want += v[i] * cn.f[i] * k * cn.f[j] * v[j]
				}
			}
			// The default boundaries; a separable part that ends inside
			// the decay, so that the pairs up to Γτ = 40 are summed one by
			// one; and no recurrence (every pair one by one beyond the
			// separable part). The recurrence must cover channels here.
			if cn.deep >= len(v)-10 {
				t.Fatalf("recurrence from channel %d of %d: the test does not reach it", cn.deep, len(v))
			}
			defer func(a, b float64) { quadSepGammaTau, deepGammaTau = a, b }(quadSepGammaTau, deepGammaTau)
			for _, bd := range []struct{ sep, deep float64 }{{40, 40}, {1, 40}, {0.05, 40}, {1, math.Inf(1)}} {
				quadSepGammaTau, deepGammaTau = bd.sep, bd.deep
				cb, err := r.ChannelNoise(tau, G2, c.acq, from)
				if err != nil {
					t.Fatal(err)
				}
				got := cb.Quad(v)
				if !(math.Abs(got-want) <= 1e-10*math.Abs(want)) || !(want > 0) {
					t.Errorf("separable to Γτ = %g, recurrence from Γτ = %g: v'Cv = %.15g, direct %.15g", bd.sep, bd.deep, got, want)
				}
			}
		})
	}
}
