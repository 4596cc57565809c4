package sim

import (
	"errors"
	"math"
	"math/rand/v2"
)

// Correlated noise for the fast model (optional; Simulate is unchanged).
//
// A real correlator's errors are strongly correlated along the lag axis:
// neighbouring lags much closer than the coherence time see the same
// intensity fluctuations. SimulateCorrelated draws the noise of each run as
// a first-order autoregressive sequence along the channels,
//
//	e_0 = ξ_0,  e_i = ρ_i·e_(i−1) + √(1 − ρ_i²)·ξ_i,  g2_i = exact_i + σ_i·e_i
//
// (ξ independent standard normal), so every channel keeps the variance σ_i²
// of Simulate and neighbouring channels correlate with ρ_i. The
// coefficient is derived from the same lattice description as σ (see
// doc.go and noise.go), for channel i of a stage with sample time Δt_s:
//
//	ρ_i = [Σ_d γ(d)²·γ(d−1)² / Σ_d γ(d)⁴] · (1 − s_i)
//
// The bracket is the correlation of the speckle noise of two lags one
// sample apart at the baseline (the fluctuations of the products
// Σ_j δI_j·δI_(j+k), paired as Gaussian moments); it tends to 1 for
// Γ·Δt_s → 0 and falls off once the sample time exceeds the coherence time.
// s_i is the share of the pure shot-noise term (1 + βγ_k²)/ν² in the
// channel's variance, which is independent from lag to lag; the mixed
// speckle–shot terms are counted as correlated. Across a stage boundary the
// later channel's stage is used. The form was checked against the
// photon-level simulator (Photon; see the calibration test): neighbour
// correlations within about 0.05–0.1 of the photon-level ones from the
// decay to the far baseline, where both fall towards 0.

// NeighbourCorrelation returns ρ_i, the correlation of channel i with
// channel i−1 that SimulateCorrelated uses, for a measurement with
// coherence factor beta, count rate rateHz and duration durS; ρ_0 = 0.
// Channels at lags beyond the duration get 0.
func (m *Model) NeighbourCorrelation(g *Grid, beta, rateHz, durS float64) []float64 {
	return neighbourCorr(m.noise, g, beta, rateHz, durS)
}

func neighbourCorr(comps []rateWeight, g *Grid, beta, rateHz, durS float64) []float64 {
	if len(comps) > maxNoiseRates {
		comps = mergeByPairs(comps)
	}
	out := make([]float64, g.Len())
	stages := map[int]*stageSums{}
	lat1 := map[int]float64{}
	for i, tau := range g.TauS {
		if i == 0 {
			continue
		}
		dt := g.SampleS[i]
		st := stages[g.Stage[i]]
		if st == nil {
			st = newStageSums(comps, dt)
			stages[g.Stage[i]] = st
			lat1[g.Stage[i]] = st.lat.sumProd([]int{0, 0, 1, 1}) / st.s2
		}
		products := (durS - tau) / dt
		if !(products >= 1) {
			continue
		}
		nu := rateHz * dt
		v := st.variance(g.Index[i], beta, nu, products)
		gk := st.lat.gamma(g.Index[i])
		shot := (1 + beta*gk*gk) / (nu * nu) / products
		s := 0.0
		if v > 0 {
			s = math.Min(1, shot/v)
		}
		out[i] = math.Max(0, math.Min(1, lat1[g.Stage[i]])) * (1 - s)
	}
	return out
}

// SimulateCorrelated is Simulate with the noise of each run correlated
// along the lag axis as described above. The exact curves, σ and dust
// bursts are Simulate's for the same config and seed (Simulate is run with
// NoNoise); the noise is drawn from a separate stream, rand.NewPCG(Seed ^
// 0x5ca1ab1e, r) for run r, so it differs from Simulate's. With dust, ρ is
// that of the sample without dust. It panics on a nil model or config.
func SimulateCorrelated(m *Model, c *Config) (*Output, error) {
	if m == nil || c == nil {
		panic("sim: SimulateCorrelated needs a model and a config")
	}
	quiet := *c
	quiet.NoNoise = true
	out, err := Simulate(m, &quiet)
	if err != nil {
		return nil, err
	}
	if c.NoNoise {
		return out, nil
	}
	g := c.Grid
	if g == nil {
		if g, err = NewGrid(DefaultGridSpec()); err != nil {
			return nil, err
		}
	}
	if g.Len() != len(out.TauS) {
		return nil, errors.New("lag grid changed during the simulation")
	}
	rho := m.NeighbourCorrelation(g, c.Beta, c.CountRateHz, c.DurationS)
	for r := range out.Runs {
		run := &out.Runs[r]
		rng := rand.New(rand.NewPCG(c.Seed^0x5ca1ab1e, uint64(r)))
		e := 0.0
		for i := range run.G2 {
			x := rng.NormFloat64()
			if i == 0 {
				e = x
			} else {
				e = rho[i]*e + math.Sqrt(1-rho[i]*rho[i])*x
			}
			run.G2[i] = run.Exact[i] + run.Sigma[i]*e
		}
	}
	return out, nil
}
