package cumulants

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
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

// TestNewChannelNoiseRebuilds: ChannelSD gives the Parameters of the
// fit's ChannelNoise, and a ChannelNoise built by NewChannelNoise from
// them gives the same quadratic form bit for bit
// (the same arithmetic on the same inputs) for every basis; scaling the
// standard deviations by s scales the form by s² (to 1e-14 relative, the
// rounding of the products); and the constructor refuses parameters that
// are out of range instead of building a model from them.
func TestNewChannelNoiseRebuilds(t *testing.T) {
	tau := multiTauGrid(0.5e-6, 8, 200)
	rng := rand.New(rand.NewPCG(4, 4))
	y := make([]float64, len(tau))
	for i, x := range tau {
		g := math.Exp(-2000 * x)
		y[i] = 1 + 0.9*g*g + 1e-3*rng.NormFloat64()
	}
	r, err := Fit(tau, y, nil, G2, nil)
	if err != nil {
		t.Fatal(err)
	}
	const from = 5
	for _, acq := range []Acquisition{{DurationS: 10, CountRateHz: 2e5}, {}} {
		cn, err := r.ChannelNoise(tau, G2, acq, from)
		if err != nil {
			t.Fatal(err)
		}
		gamma, beta, rate, sd := cn.Parameters()
		g2, b2, r2, sd2, basis, err := r.ChannelSD(tau, G2, acq, from)
		if err != nil || basis != cn.Basis || g2 != gamma || b2 != beta || r2 != rate || !slices.Equal(sd2, sd) {
			t.Fatalf("basis %s: ChannelSD gives other parameters than ChannelNoise (%v)", cn.Basis, err)
		}
		re, err := NewChannelNoise(tau, from, gamma, beta, rate, sd)
		if err != nil {
			t.Fatal(err)
		}
		scaled := make([]float64, len(sd))
		for i, v := range sd {
			scaled[i] = 3 * v
		}
		re3, err := NewChannelNoise(tau, from, gamma, beta, rate, scaled)
		if err != nil {
			t.Fatal(err)
		}
		for trial := range 5 {
			v := make([]float64, len(tau)-from)
			for i := range v {
				v[i] = rng.NormFloat64()
			}
			a, b, c := cn.Quad(v), re.Quad(v), re3.Quad(v)
			if math.Float64bits(a) != math.Float64bits(b) {
				t.Fatalf("basis %s, vector %d: rebuilt %v, fit's %v", cn.Basis, trial, b, a)
			}
			if math.Abs(c-9*a) > 1e-14*9*math.Abs(a) {
				t.Fatalf("basis %s, vector %d: D×3 gives %v, want 9×%v", cn.Basis, trial, c, a)
			}
		}
	}
	sd := make([]float64, len(tau)-from)
	for i := range sd {
		sd[i] = 1e-3
	}
	for _, c := range []struct {
		name                  string
		from                  int
		gamma, beta, rate, s0 float64
	}{
		{"channels", from + 1, 2000, 0.9, 0, 1e-3},
		{"rate", from, 0, 0.9, 0, 1e-3},
		{"beta", from, 2000, 1.2, 0, 1e-3},
		{"count rate", from, 2000, 0.9, -1, 1e-3},
		{"sd", from, 2000, 0.9, 0, math.NaN()},
	} {
		s := append([]float64(nil), sd...)
		s[0] = c.s0
		if _, err := NewChannelNoise(tau, c.from, c.gamma, c.beta, c.rate, s); !errors.Is(err, ErrNoCorrelated) {
			t.Errorf("%s: error %v, want ErrNoCorrelated", c.name, err)
		}
	}
}
