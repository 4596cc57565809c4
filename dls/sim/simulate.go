package sim

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"

	"dlsbatch/dls"
)

// Dust describes the dust artefact: a few bright, slowly diffusing
// particles that cross the beam during a run. Zero fields take the
// defaults in brackets.
type Dust struct {
	DiameterM  float64 // diameter of the dust particles [3 µm]
	Bursts     int     // bursts per run [1]
	Brightness float64 // mean intensity during a burst relative to the sample's [2]
}

// Burst is one realised dust burst.
type Burst struct {
	StartS, LengthS float64 // when it starts and how long it lasts, s
	Brightness      float64 // dust intensity during the burst relative to the sample's
}

// Config holds the settings of one simulated measurement. Start from
// DefaultConfig.
type Config struct {
	Grid *Grid // lag grid; nil means NewGrid(DefaultGridSpec())
	// Beta is the coherence factor β, in (0, 1].
	Beta float64
	// Baseline is the baseline B of g2 = B·(1 + β·g1²) (1 for a perfectly
	// normalised correlator; set it to 1 + offset for a baseline error).
	// Zero means 1.
	Baseline float64
	// CountRateHz is the mean detected count rate of the sample, counts/s.
	CountRateHz float64
	// DurationS is the duration of one run, s; it must exceed the longest
	// lag.
	DurationS float64
	// Runs is the number of independent runs; zero means 1.
	Runs int
	// NoNoise returns the exact curves (Sigma is still filled in).
	NoNoise bool
	// Dust, when not nil, adds dust bursts to every run.
	Dust *Dust
	// Seed seeds the PCG generators; run r uses rand.NewPCG(Seed, r).
	Seed uint64
}

// DefaultConfig is β = 0.9, B = 1, 200 kcps, 10 s, one run, seed 1.
func DefaultConfig() Config {
	return Config{Beta: 0.9, Baseline: 1, CountRateHz: 2e5, DurationS: 10, Runs: 1, Seed: 1}
}

// Run is one simulated run.
type Run struct {
	G2    []float64 // simulated g2, one value per lag
	Sigma []float64 // standard deviation of each value from the noise model
	Exact []float64 // g2 without noise (with this run's dust, if any)
	Dust  []Burst   // the dust bursts of this run
}

// Output is the result of Simulate.
type Output struct {
	TauS  []float64 // lag times, s
	Runs  []Run
	Truth Truth // exact cumulants of the population (dust excluded)
}

// Validate reports settings that cannot be simulated.
func (c *Config) Validate(g *Grid) error {
	switch {
	case !(c.Beta > 0 && c.Beta <= 1):
		return fmt.Errorf("coherence factor %g is outside (0, 1]", c.Beta)
	case c.Baseline < 0 || math.IsNaN(c.Baseline) || math.IsInf(c.Baseline, 0):
		return fmt.Errorf("baseline %g is not a positive number", c.Baseline)
	case !(c.CountRateHz > 0) || math.IsInf(c.CountRateHz, 0):
		return fmt.Errorf("count rate %g /s is not a positive number", c.CountRateHz)
	case !(c.DurationS > 0) || math.IsInf(c.DurationS, 0):
		return fmt.Errorf("duration %g s is not a positive number", c.DurationS)
	case c.Runs < 0 || c.Runs > 1000:
		return fmt.Errorf("run count %d is outside 1…1000", c.Runs)
	case g.TauS[len(g.TauS)-1] >= c.DurationS:
		return fmt.Errorf("longest lag %.4g s is not shorter than the duration %.4g s", g.TauS[len(g.TauS)-1], c.DurationS)
	}
	if d := c.Dust; d != nil {
		switch {
		case d.DiameterM < 0 || math.IsNaN(d.DiameterM) || d.DiameterM > 1e-4:
			return fmt.Errorf("dust diameter %g m is outside 0 … 100 µm", d.DiameterM)
		case d.Bursts < 0 || d.Bursts > 20:
			return fmt.Errorf("dust burst count %d is outside 1…20", d.Bursts)
		case d.Brightness < 0 || math.IsNaN(d.Brightness) || d.Brightness > 1e3:
			return fmt.Errorf("dust brightness %g is outside 0 … 1000", d.Brightness)
		}
	}
	return nil
}

// Simulate draws c.Runs correlograms of the model's population. The same
// model, config and seed give the same numbers on every platform.
func Simulate(m *Model, c *Config) (*Output, error) {
	if m == nil || c == nil {
		panic("sim: Simulate needs a model and a config")
	}
	g := c.Grid
	if g == nil {
		var err error
		if g, err = NewGrid(DefaultGridSpec()); err != nil {
			return nil, err
		}
	}
	if g.Len() == 0 {
		return nil, errors.New("lag grid has no channel")
	}
	if err := c.Validate(g); err != nil {
		return nil, err
	}
	base := c.Baseline
	if base == 0 {
		base = 1
	}
	runs := max(c.Runs, 1)
	out := &Output{TauS: append([]float64(nil), g.TauS...), Truth: m.Truth}
	g1s := make([]float64, g.Len())
	for i, tau := range g.TauS {
		g1s[i] = m.G1(tau)
	}
	cleanSigma := m.Sigma(g, c.Beta, c.CountRateHz, c.DurationS)
	var dust Dust
	var dustRate float64
	if c.Dust != nil {
		dust = *c.Dust
		if dust.DiameterM == 0 {
			dust.DiameterM = 3e-6
		}
		if dust.Bursts == 0 {
			dust.Bursts = 1
		}
		if dust.Brightness == 0 {
			dust.Brightness = 2
		}
		cd := m.Conditions
		dustRate = dls.DiffusionFromDiameter(cd.TemperatureK, cd.ViscosityPaS, dust.DiameterM) * m.Q * m.Q
	}
	for r := 0; r < runs; r++ {
		rng := rand.New(rand.NewPCG(c.Seed, uint64(r)))
		run := Run{Exact: make([]float64, g.Len()), G2: make([]float64, g.Len())}
		if c.Dust == nil {
			for i, x := range g1s {
				run.Exact[i] = base * (1 + c.Beta*x*x)
			}
			run.Sigma = scaled(cleanSigma, base)
		} else {
			run.Dust = placeBursts(rng, dust, c.DurationS)
			p := 0.0
			for _, b := range run.Dust {
				p += b.Brightness * b.LengthS / c.DurationS
			}
			for i, tau := range g.TauS {
				run.Exact[i] = base * dustyG2(tau, c.DurationS, c.Beta, g1s[i], math.Exp(-dustRate*tau), run.Dust)
			}
			comps := make([]rateWeight, 0, len(m.noise)+1)
			for _, x := range m.noise {
				comps = append(comps, rateWeight{x.rate, x.weight / (1 + p)})
			}
			comps = append(comps, rateWeight{dustRate, p / (1 + p)})
			run.Sigma = scaled(sigmaFor(comps, g, c.Beta, c.CountRateHz*(1+p), c.DurationS), base)
		}
		for i := range run.G2 {
			run.G2[i] = run.Exact[i]
			if !c.NoNoise {
				run.G2[i] += run.Sigma[i] * rng.NormFloat64()
			}
		}
		out.Runs = append(out.Runs, run)
	}
	return out, nil
}

func scaled(x []float64, f float64) []float64 {
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = v * f
	}
	return out
}

// placeBursts draws the bursts of one run: lengths uniform in 2 … 10 % of
// the run, brightness uniform in 0.5 … 1.5 times the mean, at random
// positions that do not overlap.
func placeBursts(rng *rand.Rand, d Dust, durS float64) []Burst {
	var bs []Burst
	for len(bs) < d.Bursts {
		placed := false
		for try := 0; try < 100 && !placed; try++ {
			l := durS * (0.02 + 0.08*rng.Float64())
			s := (durS - l) * rng.Float64()
			ok := true
			for _, b := range bs {
				if s < b.StartS+b.LengthS && b.StartS < s+l {
					ok = false
					break
				}
			}
			if ok {
				bs = append(bs, Burst{StartS: s, LengthS: l, Brightness: d.Brightness * (0.5 + rng.Float64())})
				placed = true
			}
		}
		if !placed {
			break
		}
	}
	return bs
}

// overlap returns the length of [a0, a1] ∩ [b0, b1] ∩ [c0, c1].
func overlap(a0, a1, b0, b1, c0, c1 float64) float64 {
	lo := math.Max(a0, math.Max(b0, c0))
	hi := math.Min(a1, math.Min(b1, c1))
	return math.Max(0, hi-lo)
}

// dustyG2 is the expected symmetrically normalised g2 (baseline 1) at lag
// tau of a run of length durS whose intensity is the sample's (1) plus dust
// bursts of the given brightness, the field being Gaussian within each
// stretch (Siegert relation piecewise):
//
//	num = ⟨Ī(t)Ī(t+τ)⟩ + β·[g1s² + Σ_i (o_ii/T')·(2R_i·g1s·g1d + R_i²·g1d²)]
//	g2  = num / (⟨Ī⟩_direct · ⟨Ī⟩_delayed)
//
// where Ī is the mean intensity (1 outside bursts, 1 + R_i in burst i), the
// averages run over t ∈ [0, T'], T' = T − τ, and o_ii is the time both t and
// t + τ fall in burst i.
func dustyG2(tau, durS, beta, g1s, g1d float64, bs []Burst) float64 {
	tp := durS - tau
	mD, mL, mean := 1.0, 1.0, 1.0
	speck := g1s * g1s
	for i, b := range bs {
		a0, a1 := b.StartS, b.StartS+b.LengthS
		uD := overlap(a0, a1, 0, tp, 0, tp) / tp
		uL := overlap(a0-tau, a1-tau, 0, tp, 0, tp) / tp
		mD += b.Brightness * uD
		mL += b.Brightness * uL
		mean += b.Brightness * (uD + uL)
		for j, c := range bs {
			o := overlap(a0, a1, c.StartS-tau, c.StartS+c.LengthS-tau, 0, tp) / tp
			mean += b.Brightness * c.Brightness * o
			if i == j {
				speck += o * (2*b.Brightness*g1s*g1d + b.Brightness*b.Brightness*g1d*g1d)
			}
		}
	}
	return (mean + beta*speck) / (mD * mL)
}
