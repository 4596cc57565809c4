package cumulants_test

import (
	"fmt"
	"math"
	"testing"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/sim"
)

// TestRecoveryRealisticNoise fits correlograms from the project's simulator
// (multi-tau grid, photon-statistics noise of a symmetrically normalised
// correlator, Mie intensity weights) and compares with the exact
// intensity-weighted cumulants of the simulated population, which the
// simulator computes by quadrature. Conditions: polystyrene latex in water
// at 25 °C, 632.8 nm, 200 kcps, 100 s (common practice for a size
// measurement: ten or more sub-runs of 10 s), β = 0.9.
//
// Criteria: over 10 repeat measurements of each population (different
// noise seeds), the mean z-average within 1 % and the mean PDI within 0.02
// of the truth, as a laboratory reports the mean of its repeats; and no
// bias beyond noise: each mean error within 4 standard errors of the mean
// (plus 0.1 % or 0.002 for the quadrature and rounding of the truth).
// Populations: narrow lognormals (geometric width 0.05–0.10) of 10–500 nm
// at 90° and 173°. Single-measurement scatter here is 0.2–0.7 % in z and
// 0.004–0.018 in PDI (largest for 500 nm, which decays slowest), so the
// 1 %/0.02 limits on the means sit at 5 or more standard errors.
func TestRecoveryRealisticNoise(t *testing.T) {
	if testing.Short() {
		t.Skip("simulates 48 correlograms")
	}
	grid, err := sim.NewGrid(sim.DefaultGridSpec())
	if err != nil {
		t.Fatal(err)
	}
	const (
		tK      = 298.15
		etaPaS  = 0.890022e-3 // IAPWS 2008 at 25 °C, 0.1 MPa
		nWater  = 1.33162     // IAPWS R9-97 at 25 °C, 632.8 nm
		lambdaM = 632.8e-9
	)
	mPS := complex(1.58753, 0) // polystyrene at 632.8 nm, Sultanova et al. 2009
	for _, angle := range []float64{90, 173} {
		for _, c := range []struct {
			dNm, width float64
		}{{10, 0.1}, {30, 0.1}, {100, 0.05}, {200, 0.08}, {500, 0.05}, {500, 0.1}} {
			name := fmt.Sprintf("%gnm-w%.2f-%g°", c.dNm, c.width, angle)
			t.Run(name, func(t *testing.T) {
				optics := dls.Optics{WavelengthM: lambdaM, AngleRad: angle * math.Pi / 180, RefractiveIndex: nWater}
				pop, err := sim.ParsePopulation(fmt.Sprintf("lognormal(%gnm,%g,number)", c.dNm, c.width))
				if err != nil {
					t.Fatal(err)
				}
				scatter := func(dM float64) float64 {
					v, err := mie.Intensity(dM, lambdaM, nWater, mPS, optics.AngleRad, mie.Vertical)
					if err != nil {
						panic(err)
					}
					return v
				}
				model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: tK, ViscosityPaS: etaPaS, Optics: optics}, scatter)
				if err != nil {
					t.Fatal(err)
				}
				truthZ := model.Truth.ZAvgM * 1e9
				var zs, ps []float64
				for seed := uint64(1); seed <= 10; seed++ {
					out, err := sim.Simulate(model, &sim.Config{Grid: grid, Beta: 0.9, Baseline: 1, CountRateHz: 2e5, DurationS: 100, Runs: 1, Seed: seed})
					if err != nil {
						t.Fatal(err)
					}
					r, err := cumulants.Fit(out.TauS, out.Runs[0].G2, nil, cumulants.G2, nil)
					if err != nil {
						t.Fatal(err)
					}
					z := dls.DiameterFromDiffusion(tK, etaPaS, dls.DiffusionFromRate(r.GammaPerS, optics.Q())) * 1e9
					zs = append(zs, z/truthZ-1)
					ps = append(ps, r.PDI-model.Truth.PDI)
				}
				zb, zse := meanOf(zs), stddev(zs)/math.Sqrt(float64(len(zs)))
				pb, pse := meanOf(ps), stddev(ps)/math.Sqrt(float64(len(ps)))
				if math.Abs(zb) > 0.01 || math.Abs(zb) > 4*zse+0.001 {
					t.Errorf("mean z-average off by %.3f %% (standard error %.3f %%)", 100*zb, 100*zse)
				}
				if math.Abs(pb) > 0.02 || math.Abs(pb) > 4*pse+0.002 {
					t.Errorf("mean PDI off by %.4f (standard error %.4f)", pb, pse)
				}
			})
		}
	}
}

func TestStandardErrorHonestOnMultiTauNoise(t *testing.T) {
	// Without a σ column the weights are estimated from residuals; the
	// sandwich covariance must still give standard errors that match the
	// observed scatter of Γ̄ over repeated simulated measurements (100 nm,
	// 173°, 200 kcps, 10 s). With 200 repeats the observed SD is known to
	// about 1/√400 = 5 %; the ratio must lie within 0.85–1.15. With the
	// simulator's σ given, the same must hold.
	if testing.Short() {
		t.Skip("400 fits")
	}
	grid, err := sim.NewGrid(sim.DefaultGridSpec())
	if err != nil {
		t.Fatal(err)
	}
	optics := dls.Optics{WavelengthM: 632.8e-9, AngleRad: 173 * math.Pi / 180, RefractiveIndex: 1.33162}
	pop, _ := sim.ParsePopulation("lognormal(100nm,0.05,number)")
	model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: 298.15, ViscosityPaS: 0.890022e-3, Optics: optics}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, given := range []bool{false, true} {
		var gs, ses []float64
		for seed := uint64(1); seed <= 200; seed++ {
			out, err := sim.Simulate(model, &sim.Config{Grid: grid, Beta: 0.9, Baseline: 1, CountRateHz: 2e5, DurationS: 10, Runs: 1, Seed: seed})
			if err != nil {
				t.Fatal(err)
			}
			var sigma []float64
			if given {
				sigma = out.Runs[0].Sigma
			}
			r, err := cumulants.Fit(out.TauS, out.Runs[0].G2, sigma, cumulants.G2, nil)
			if err != nil {
				t.Fatal(err)
			}
			gs = append(gs, r.GammaPerS)
			ses = append(ses, r.GammaSEPerS)
		}
		if ratio := meanOf(ses) / stddev(gs); ratio < 0.85 || ratio > 1.15 {
			t.Errorf("σ given %v: mean SE / observed SD = %.3f, want 0.85–1.15", given, ratio)
		}
	}
}
