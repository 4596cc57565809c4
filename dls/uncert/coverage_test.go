package uncert_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/medium"
	"dlsbatch/dls/sim"
	"dlsbatch/dls/uncert"
)

// TestCoverage checks that the k = 2 interval of the budget covers the true
// z-average about 95 % of the time when the budget's inputs really are
// uncertain by the stated amounts (the GUM's claim for a normal output,
// JCGM 100:2008 6.2 and G.1).
//
// For each of 500 simulated measurements per configuration, the "true"
// temperature, viscosity, index, angle and wavelength are drawn from
// normal distributions about the nominal values with the stated standard
// uncertainties (the true viscosity is IAPWS water at the true
// temperature times 1 + δ, δ ~ N(0, u_rel)); the simulator produces the
// correlogram under the true conditions (narrow 100 nm lognormal, Rayleigh
// weights, 200 kcps, β = 0.9, noise of the simulator's model, σ passed to
// the fit); the analysis uses the nominal values and the fit's Γ̄ and
// standard error. The true z-average is the simulator's exact harmonic
// intensity mean, independent of the conditions under Rayleigh weighting.
//
// Two configurations: the defaults at 173° with 10 s runs (the viscosity
// and the fit's Γ̄ dominate the variance), and a 90° case in which every
// input weighs (mean variance shares from 4 to 34 %, printed in the log),
// and the first again with σ left out of the files, as in most exports, so
// that the fit estimates its weights and standard error from the data.
// Expected coverage 95.45 % (normal, k = 2); tolerance ±3 %, which is 3.2
// binomial standard deviations at n = 500 (√(0.95·0.05/500) ≈ 0.97 %).
//
// The simulator here is the fast one, whose channel noise is independent,
// and the Type A is the fit's own standard error (cumulants.Fit), which is
// right for such noise. Real correlator noise is correlated along the lags;
// the pipeline's Type A for it (cumulants.FitCorrelated) is checked on the
// photon-level simulator in coverage_photon_test.go.
func TestCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("simulates and fits 1000 correlograms (about 2 s)")
	}
	water, err := medium.Lookup("water")
	if err != nil {
		t.Fatal(err)
	}
	pop, err := sim.ParsePopulation("lognormal(100nm,0.05,number)")
	if err != nil {
		t.Fatal(err)
	}
	grid, err := sim.NewGrid(sim.DefaultGridSpec())
	if err != nil {
		t.Fatal(err)
	}
	const (
		tNom   = 298.15
		nNom   = 1.33162  // IAPWS R9-97, 25 °C, 632.8 nm
		lamNom = 632.8e-9 // m
		trials = 500
		want   = 0.9545 // P(|Z| ≤ 2), normal
		tol    = 0.03
	)
	cases := []struct {
		name     string
		angleDeg float64
		durS     float64
		u        uncert.Uncertainties
		noSigma  bool // fit without the simulator's σ: weights and SE estimated from the data
	}{
		{"defaults 173°", 173, 10, uncert.DefaultUncertainties(), false},
		{"every input 90°", 90, 30, uncert.Uncertainties{TemperatureK: 0.3, ViscosityRel: 0.005, RefractiveIndex: 2e-3, AngleRad: 0.5 * math.Pi / 180, WavelengthM: 1e-9}, false},
		{"defaults 173°, σ estimated", 173, 10, uncert.DefaultUncertainties(), true},
	}
	for ci, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			thNom := c.angleDeg * math.Pi / 180
			covered := 0
			var shares [6]float64
			for k := 0; k < trials; k++ {
				seed := uint64(1000*ci + k + 1)
				rng := rand.New(rand.NewPCG(seed, 99))
				tTrue := tNom + c.u.TemperatureK*rng.NormFloat64()
				etaTrue := water.Viscosity.ViscosityPaS(tTrue) * (1 + c.u.ViscosityRel*rng.NormFloat64())
				optTrue := dls.Optics{
					WavelengthM:     lamNom + c.u.WavelengthM*rng.NormFloat64(),
					AngleRad:        thNom + c.u.AngleRad*rng.NormFloat64(),
					RefractiveIndex: nNom + c.u.RefractiveIndex*rng.NormFloat64(),
				}
				model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: tTrue, ViscosityPaS: etaTrue, Optics: optTrue}, nil)
				if err != nil {
					t.Fatal(err)
				}
				out, err := sim.Simulate(model, &sim.Config{Grid: grid, Beta: 0.9, Baseline: 1, CountRateHz: 2e5, DurationS: c.durS, Runs: 1, Seed: seed})
				if err != nil {
					t.Fatal(err)
				}
				sigma := out.Runs[0].Sigma
				if c.noSigma {
					sigma = nil
				}
				fit, err := cumulants.Fit(out.TauS, out.Runs[0].G2, sigma, cumulants.G2, nil)
				if err != nil {
					t.Fatal(err)
				}
				b, err := uncert.ZAverage(&uncert.Inputs{
					GammaPerS: fit.GammaPerS, GammaSEPerS: fit.GammaSEPerS, GammaDOF: float64(fit.PointsUsed - 4),
					TemperatureK: tNom, Viscosity: water.Viscosity.ViscosityPaS,
					RefractiveIndex: nNom, AngleRad: thNom, WavelengthM: lamNom, U: c.u,
				})
				if err != nil {
					t.Fatal(err)
				}
				if math.Abs(b.ZAvgNm-model.Truth.ZAvgM*1e9) <= b.ExpandedUNm {
					covered++
				}
				for i, comp := range b.Components {
					shares[i] += comp.VarianceSharePct / trials
				}
			}
			got := float64(covered) / trials
			t.Logf("coverage of d ± U (k = 2): %d/%d = %.1f %% (expected %.2f %%); mean variance shares %%: Γ̄ %.1f, T %.1f, η %.1f, n %.1f, θ %.1f, λ0 %.1f",
				covered, trials, 100*got, 100*want, shares[0], shares[1], shares[2], shares[3], shares[4], shares[5])
			if math.Abs(got-want) > tol {
				t.Errorf("coverage %.1f %%, want %.2f ± %.0f %%", 100*got, 100*want, 100*tol)
			}
		})
	}
}
