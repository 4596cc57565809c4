package sim

import (
	"math"
	"testing"
)

// TestNeighbourCorrelationAgainstPhotons compares ρ_i of the correlated
// fast model with the correlation of neighbouring channels over the 160
// sub-runs of the photon-level reference ensemble, pair by pair. Tolerance:
// 4 sampling standard errors of a correlation coefficient, (1 − ρ²)/√R
// (Fisher 1921; from memory), plus 0.05 for the model's approximations (the
// mixed speckle–shot terms counted as correlated, the later stage used
// across stage boundaries).
func TestNeighbourCorrelationAgainstPhotons(t *testing.T) {
	m, cfg, res := reference(t)
	T := cfg.DurationS / float64(cfg.SubRuns)
	rho := m.NeighbourCorrelation(cfg.Grid, cfg.Beta, cfg.CountRateHz, T)
	R := float64(len(res.SubRuns))
	sum := 0.0
	for i := 1; i < len(res.TauS); i++ {
		c := channelCorr(res.SubRuns, i-1, i)
		sum += math.Abs(c - rho[i])
		if tol := 4*(1-rho[i]*rho[i])/math.Sqrt(R) + 0.05; math.Abs(c-rho[i]) > tol {
			t.Errorf("τ=%.4g s: photon neighbour correlation %.3f, model %.3f ± %.3f", res.TauS[i], c, rho[i], tol)
		}
	}
	t.Logf("mean |ρ_photon − ρ_model| over %d pairs: %.3f", len(res.TauS)-1, sum/float64(len(res.TauS)-1))
}

// TestSimulateCorrelated checks the construction of the correlated mode on
// 400 runs of the default config: each channel keeps Simulate's variance
// σ² (the stationary variance of the AR(1) recursion with unit innovations
// scaled by √(1 − ρ²) is 1; Box & Jenkins, Time Series Analysis, 1970),
// neighbours correlate with ρ_i, the exact curves, σ and dust bursts are
// Simulate's, and NoNoise gives the exact curves. Tolerances: the variance
// ratio within 5·√(2/(R−1)) per channel (as in TestNoiseMatchesSigma), the
// correlation within 5·(1 − ρ²)/√R (sampling error of a correlation).
func TestSimulateCorrelated(t *testing.T) {
	p, _ := ParsePopulation("mono(100nm)")
	m, err := NewModel(p, waterConditions(173), nil)
	if err != nil {
		t.Fatal(err)
	}
	cfg := DefaultConfig()
	cfg.Runs = 400
	cfg.Seed = 8
	out, err := SimulateCorrelated(m, &cfg)
	if err != nil {
		t.Fatal(err)
	}
	ref, err := Simulate(m, &cfg)
	if err != nil {
		t.Fatal(err)
	}
	g, _ := NewGrid(DefaultGridSpec())
	rho := m.NeighbourCorrelation(g, cfg.Beta, cfg.CountRateHz, cfg.DurationS)
	R := float64(cfg.Runs)
	dev := func(r Run, i int) float64 { return (r.G2[i] - r.Exact[i]) / r.Sigma[i] }
	for i := range out.TauS {
		if out.Runs[0].Exact[i] != ref.Runs[0].Exact[i] || out.Runs[0].Sigma[i] != ref.Runs[0].Sigma[i] {
			t.Fatalf("channel %d: exact or σ differ from Simulate's", i)
		}
		var s2, p2, c float64
		for _, r := range out.Runs {
			d := dev(r, i)
			s2 += d * d
			if i > 0 {
				e := dev(r, i-1)
				p2 += e * e
				c += d * e
			}
		}
		if v := s2 / R; math.Abs(v-1) > 5*math.Sqrt(2/(R-1)) {
			t.Errorf("channel %d: variance ratio %.3f", i, v)
		}
		if i > 0 {
			if c /= math.Sqrt(s2 * p2); math.Abs(c-rho[i]) > 5*(1-rho[i]*rho[i])/math.Sqrt(R)+1e-3 {
				t.Errorf("channel %d: neighbour correlation %.3f, want %.3f", i, c, rho[i])
			}
		}
	}
	if rho[0] != 0 {
		t.Errorf("ρ_0 = %g, want 0", rho[0])
	}
	cfg.Runs, cfg.Dust = 2, &Dust{}
	a, err := SimulateCorrelated(m, &cfg)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Simulate(m, &cfg)
	if a.Runs[1].Dust[0] != b.Runs[1].Dust[0] {
		t.Error("dust bursts differ from Simulate's")
	}
	cfg.NoNoise = true
	q, _ := SimulateCorrelated(m, &cfg)
	for i, v := range q.Runs[0].G2 {
		if v != q.Runs[0].Exact[i] {
			t.Fatalf("NoNoise: channel %d differs from the exact curve", i)
		}
	}
}
