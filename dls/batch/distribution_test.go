package batch

import (
	"fmt"
	"math"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/sim"
)

// simulated returns a measurement from the project's simulator: polystyrene
// in water at 25 °C, 632.8 nm, 173°, 300 kcps, 100 s, β = 0.92, with Mie
// intensity weights, and metadata giving the same conditions and index.
func simulated(t *testing.T, population string, seed uint64) *dls.Measurement {
	return simulatedFor(t, population, seed, 100)
}

// simulatedFor is simulated with a measurement duration of durS seconds.
func simulatedFor(t *testing.T, population string, seed uint64, durS float64) *dls.Measurement {
	t.Helper()
	const (
		tK, eta, n, lambda = 298.15, 0.890022e-3, 1.33162, 632.8e-9
	)
	mPS := complex(1.58753, 0) // polystyrene at 632.8 nm (Sultanova et al. 2009)
	optics := dls.Optics{WavelengthM: lambda, AngleRad: 173 * math.Pi / 180, RefractiveIndex: n}
	pop, err := sim.ParsePopulation(population)
	if err != nil {
		t.Fatal(err)
	}
	model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: tK, ViscosityPaS: eta, Optics: optics}, func(dM float64) float64 {
		v, err := mie.Intensity(dM, lambda, n, mPS, optics.AngleRad, mie.Vertical)
		if err != nil {
			t.Fatal(err)
		}
		return v
	})
	if err != nil {
		t.Fatal(err)
	}
	grid, err := sim.NewGrid(sim.DefaultGridSpec())
	if err != nil {
		t.Fatal(err)
	}
	out, err := sim.Simulate(model, &sim.Config{Grid: grid, Beta: 0.92, Baseline: 1, CountRateHz: 3e5, DurationS: durS, Runs: 1, Seed: seed})
	if err != nil {
		t.Fatal(err)
	}
	m := &dls.Measurement{File: fmt.Sprintf("%s-%d.csv", population, seed), Kind: dls.KindG2, TauS: out.TauS, Corr: out.Runs[0].G2}
	for k, v := range map[string]string{"temperature_c": "25", "wavelength_nm": "632.8", "angle_deg": "173", "solvent": "water",
		"viscosity_mpas": "0.890022", "refractive_index": "1.33162", "particle_ri": "1.58753+0i", "sample": population} {
		m.Meta.Set(dls.Param{Key: k, Value: v, Origin: dls.OriginFile, Where: m.File})
	}
	return m
}

func TestDistributionMonomodal(t *testing.T) {
	// An intensity-weighted lognormal of median 100 nm is, per log bin, a
	// Gaussian in ln d with its maximum at the median: the intensity peak's
	// mode must be 100 nm within 5 %, and there must be one peak. The
	// distribution's mean rate Σx_jΓ_j/Σx_j over its peaks estimates the
	// same intensity mean rate as the first cumulant: within 2 %.
	s := DefaultSettings()
	for seed := uint64(1); seed <= 3; seed++ {
		r := Analyze(simulated(t, "lognormal(100nm,0.15,intensity)", seed), &s)
		if !r.HasDistribution {
			t.Fatalf("no distribution: %s", r.Message)
		}
		if len(r.Intensity.Peaks) != 1 {
			t.Errorf("seed %d: %d intensity peaks %+v, want 1", seed, len(r.Intensity.Peaks), r.Intensity.Peaks)
			continue
		}
		if mode := r.Intensity.Peaks[0].ModeNm; math.Abs(mode/100-1) > 0.05 {
			t.Errorf("seed %d: mode %.2f nm, want 100 ± 5 %%", seed, mode)
		}
		if rel := r.DistMeanRatePerS/r.GammaMeanPerS - 1; math.Abs(rel) > 0.02 {
			t.Errorf("seed %d: distribution mean rate %.1f vs cumulant %.1f 1/s (%.2f %%)", seed, r.DistMeanRatePerS, r.GammaMeanPerS, 100*rel)
		}
		for _, w := range []*dls.WeightSummary{r.Intensity, r.Volume, r.Number} {
			if !(w.D10Nm < w.D50Nm && w.D50Nm < w.D90Nm) {
				t.Errorf("seed %d: percentiles not ordered: %+v", seed, w)
			}
		}
	}
}

func TestDistributionBimodal(t *testing.T) {
	// Two populations, each an intensity lognormal of width 0.1, at the
	// default settings, 8 noise seeds each: two intensity peaks, modes
	// within 10 % of the populations' medians (for an intensity lognormal
	// the maximum per log bin sits at the median), intensity shares within
	// 10 percentage points.
	//
	//   - diameter ratio 10: 30 and 300 nm, 70/30, 100 s;
	//   - diameter ratio 4: 50 and 200 nm, 50/50, 600 s (a longer
	//     measurement, as a laboratory makes when it suspects two
	//     populations; at 100 s a ratio-4 pair is split in only 5 of 8 runs,
	//     consistent with the resolution limit of about 2–2.5 in size at
	//     low noise, Bertero, Boccacci & Pike 1982).
	//
	// Measured: noise-free, the modes are exact; with noise the slow mode
	// of the ratio-10 pair comes out +2.8 % on average and +7.8 % at most
	// with the model-based weights of the second pass (+5.6 %, +11 % with
	// weights from the data), and the ratio-4 pair within 5.5 %.
	cases := []struct {
		name, pop        string
		durS             float64
		modes, fractions [2]float64
	}{
		{"ratio 10", "70%lognormal(30nm,0.1,intensity)+30%lognormal(300nm,0.1,intensity)@intensity", 100, [2]float64{30, 300}, [2]float64{70, 30}},
		{"ratio 4", "50%lognormal(50nm,0.1,intensity)+50%lognormal(200nm,0.1,intensity)@intensity", 600, [2]float64{50, 200}, [2]float64{50, 50}},
	}
	s := DefaultSettings()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for seed := uint64(1); seed <= 8; seed++ {
				r := Analyze(simulatedFor(t, c.pop, seed, c.durS), &s)
				if !r.HasDistribution {
					t.Fatalf("no distribution: %s", r.Message)
				}
				ps := r.Intensity.Peaks
				if len(ps) != 2 {
					t.Errorf("seed %d: %d peaks %+v, want 2", seed, len(ps), ps)
					continue
				}
				small, large := ps[0], ps[1]
				if small.ModeNm > large.ModeNm {
					small, large = large, small
				}
				for k, p := range []dls.Peak{small, large} {
					if math.Abs(p.ModeNm/c.modes[k]-1) > 0.10 {
						t.Errorf("seed %d: mode %.1f nm, want %g ± 10 %%", seed, p.ModeNm, c.modes[k])
					}
					if math.Abs(p.AreaPct-c.fractions[k]) > 10 {
						t.Errorf("seed %d: peak at %.0f nm holds %.1f %%, want %g ± 10", seed, p.ModeNm, p.AreaPct, c.fractions[k])
					}
				}
			}
		})
	}
}

// TestDistributionNoNaN: whatever the data, the inversion and the weight
// conversions themselves give finite numbers, checked before the pipeline's
// last guard (which would drop a non-finite distribution and hide the
// fault). Hostile cases: a small, broad population at the grid's edge,
// ripple added to the data, a far baseline offset, a flat stretch, a
// spike. The test fails when none of them yields a distribution, since it
// would then check nothing.
func TestDistributionNoNaN(t *testing.T) {
	s := DefaultSettings()
	s.skipFiniteGuard = true
	hostile := []struct {
		name string
		pop  string
		seed uint64
		mod  func(g2 []float64)
	}{
		{"ripple", "lognormal(8nm,0.1,number)", 9, func(g []float64) {
			for i := range g {
				g[i] += 0.02 * math.Sin(float64(i))
			}
		}},
		{"baseline offset", "mono(300nm)", 3, func(g []float64) {
			for i := range g {
				g[i] += 0.05
			}
		}},
		{"flat tail", "mono(60nm)", 4, func(g []float64) {
			for i := len(g) / 2; i < len(g); i++ {
				g[i] = g[len(g)/2]
			}
		}},
		{"spike", "lognormal(120nm,0.3,intensity)", 5, func(g []float64) { g[len(g)/3] += 0.5 }},
		{"huge population", "mono(5um)", 6, func([]float64) {}},
	}
	computed := 0
	for _, h := range hostile {
		m := simulated(t, h.pop, h.seed)
		h.mod(m.Corr)
		r := Analyze(m, &s)
		if r.Distribution == nil {
			continue
		}
		computed++
		if _, dOK := r.Finite(); !dOK {
			t.Errorf("%s: the distribution holds a non-finite number", h.name)
		}
	}
	t.Logf("%d of %d hostile cases gave a distribution", computed, len(hostile))
	if computed == 0 {
		t.Fatal("no hostile case gave a distribution: the test checks nothing")
	}
}

func TestParticleIndex(t *testing.T) {
	var md dls.Metadata
	def := complex(1.59, 0)
	if m, _, assumed, err := particleIndex(md, 632.8e-9, def); err != nil || m != def || assumed == "" {
		t.Errorf("absent: %v %q %v; want the default, named as an assumption", m, assumed, err)
	}
	md.Set(dls.Param{Key: dls.KeyParticleRI, Value: "1.45+0.001i", Origin: dls.OriginFile, Where: "f.csv:3"})
	if m, _, assumed, err := particleIndex(md, 632.8e-9, def); err != nil || m != complex(1.45, 0.001) || assumed != "" {
		t.Errorf("complex: %v %q %v", m, assumed, err)
	}
	// A material name is evaluated at the wavelength: polystyrene at
	// 632.8 nm is 1.58753 (Sultanova et al. 2009, formula; 1e-4 covers the
	// table's 4 decimals).
	md.Set(dls.Param{Key: dls.KeyParticleRI, Value: "polystyrene", Origin: dls.OriginFile, Where: "f.csv:3"})
	if m, _, _, err := particleIndex(md, 632.8e-9, def); err != nil || math.Abs(real(m)-1.58753) > 1e-4 {
		t.Errorf("material: %v %v", m, err)
	}
	md.Set(dls.Param{Key: dls.KeyParticleRI, Value: "unobtainium", Origin: dls.OriginFile, Where: "f.csv:3"})
	if _, _, _, err := particleIndex(md, 632.8e-9, def); err == nil {
		t.Error("unknown material accepted")
	}
}
