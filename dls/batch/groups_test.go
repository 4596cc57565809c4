package batch

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/sim"
)

func TestGroupsMultiAngle(t *testing.T) {
	// A narrow 100 nm population (Rayleigh weights, so D_app does not
	// depend on q) simulated at 7 angles, 30–150°, 300 kcps, 100 s:
	// D from the slope of Γ̄ against q² within 1 % of the truth
	// D = k_B·T/(3π·η·d_z) of the simulated population.
	const tK, eta, n, lambda = 298.15, 0.890022e-3, 1.33162, 632.8e-9
	pop, _ := sim.ParsePopulation("lognormal(100nm,0.05,number)")
	grid, _ := sim.NewGrid(sim.DefaultGridSpec())
	s := DefaultSettings()
	s.Distribution.Enabled = false
	var results []*dls.Result
	var truthD float64
	for i, deg := range []float64{30, 50, 70, 90, 110, 130, 150} {
		optics := dls.Optics{WavelengthM: lambda, AngleRad: deg * math.Pi / 180, RefractiveIndex: n}
		model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: tK, ViscosityPaS: eta, Optics: optics}, nil)
		if err != nil {
			t.Fatal(err)
		}
		truthD = model.Truth.DiffusionM2PerS
		out, err := sim.Simulate(model, &sim.Config{Grid: grid, Beta: 0.9, Baseline: 1, CountRateHz: 3e5, DurationS: 100, Runs: 1, Seed: uint64(i + 1)})
		if err != nil {
			t.Fatal(err)
		}
		m := &dls.Measurement{File: fmt.Sprintf("a%03.0f.csv", deg), Kind: dls.KindG2, TauS: out.TauS, Corr: out.Runs[0].G2}
		for k, v := range map[string]string{"temperature_c": "25", "wavelength_nm": "632.8", "angle_deg": fmt.Sprint(deg), "solvent": "water",
			"viscosity_mpas": "0.890022", "refractive_index": "1.33162", "group": "ma1", "sample": "latex"} {
			m.Meta.Set(dls.Param{Key: k, Value: v, Origin: dls.OriginFile, Where: m.File})
		}
		results = append(results, Analyze(m, &s))
	}
	rep := Groups(results)
	if len(rep.MultiAngle) != 1 || rep.MultiAngle[0].Result == nil {
		t.Fatalf("multi-angle report %+v", rep.MultiAngle)
	}
	res := rep.MultiAngle[0].Result
	if math.Abs(res.DiffusionM2PerS/truthD-1) > 0.01 {
		t.Errorf("D = %.5e, truth %.5e (%.2f %%)", res.DiffusionM2PerS, truthD, 100*(res.DiffusionM2PerS/truthD-1))
	}
	if res.InterceptFlagged {
		t.Errorf("a diffusive sample's intercept was flagged: %+v", res)
	}
	if len(res.PerAngle) != 7 {
		t.Errorf("%d per-angle rows", len(res.PerAngle))
	}
}

func TestGroupsDilutionAndBadGroups(t *testing.T) {
	// An exact series D = D0·(1 + k_D·c) with D0 = 4.9e-12 m²/s and
	// k_D = 0.01 mL/mg at 1, 2, 4, 8 mg/mL (|k_D·c| ≤ 0.08, inside the
	// first-order range): D0 and k_D back to 1e-9.
	mk := func(group string, c, angle float64) *dls.Result {
		d := 4.9e-12 * (1 + 0.01*c)
		return &dls.Result{Identity: dls.Identity{File: fmt.Sprintf("%s-%g-%g.csv", group, c, angle), Sample: "protein", Group: group, Status: dls.StatusOK}, Conditions: dls.Conditions{HasConditions: true, TemperatureC: 25, ViscosityMPaS: 0.890022, AngleDeg: angle, WavelengthNm: 632.8, RefractiveIndex: 1.33162}, Cumulants: dls.Cumulants{HasCumulants: true, DiffusionM2PerS: d, GammaMeanPerS: 1000, GammaSEPerS: 1, PDI: 0.05, PDISE: 0.01, Intercept: 0.9}, Corrections: dls.Corrections{Correction: "none"}, Params: []dls.Param{{Key: dls.KeyConcentration, Value: fmt.Sprint(c)}}}
	}
	var rs []*dls.Result
	for _, c := range []float64{1, 2, 4, 8} {
		rs = append(rs, mk("dil", c, 173))
	}
	two := []*dls.Result{mk("two", 1, 173), mk("two", 2, 173)}
	ang := []*dls.Result{mk("ang", 1, 90), mk("ang", 1, 173)}
	all := append(append(rs, two...), ang...)
	rep := Groups(all)
	if len(rep.Dilution) != 2 {
		t.Fatalf("dilution groups %+v", rep.Dilution)
	}
	s := rep.Dilution[0].Result
	if s == nil || math.Abs(s.D0M2PerS/4.9e-12-1) > 1e-9 || math.Abs(s.KD/0.01-1) > 1e-9 {
		t.Errorf("series %+v", s)
	}
	// Two concentrations and two angles are too few: an error in the
	// report and a warning on each result of the group.
	if rep.Dilution[1].Error == "" || len(rep.MultiAngle) != 1 || rep.MultiAngle[0].Error == "" {
		t.Errorf("too-few groups: %+v %+v", rep.Dilution[1], rep.MultiAngle)
	}
	for _, r := range append(two, ang...) {
		if r.Status != dls.StatusWarn || !strings.Contains(r.Message, r.Group) {
			t.Errorf("%s: status %s, message %q", r.File, r.Status, r.Message)
		}
	}
	for _, r := range rs {
		if r.Status != dls.StatusOK || r.Correction != "dilution-series" {
			t.Errorf("%s of the good series: status %s (%s), correction %q", r.File, r.Status, r.Message, r.Correction)
		}
	}
}

// decayMeasurement is a single-exponential g2 = 1 + 0.9·exp(−2Γτ) on the
// lag grid of monoMeasurement with Gaussian noise of σ = 2e-4 (stated in
// the σ column), from a fixed seed.
func decayMeasurement(file string, gamma float64, meta map[string]string, seed uint64) *dls.Measurement {
	m := monoMeasurement(meta)
	m.File = file
	rng := rand.New(rand.NewPCG(seed, 11))
	m.Sigma = make([]float64, len(m.TauS))
	for i, tau := range m.TauS {
		m.Corr[i] = 1 + 0.9*math.Exp(-2*gamma*tau) + 2e-4*rng.NormFloat64()
		m.Sigma[i] = 2e-4
	}
	return m
}

// TestDilutionSeriesAcrossTemperatures: a dilution series of hard spheres
// (d0 = 100 nm, k_D = 1.45 per volume fraction, Batchelor 1976) at
// φ = 0.005, 0.01, 0.02 measured at 25 °C and φ = 0.04 at 27 °C, in water
// from the solvent table, index given. The truth is Stokes–Einstein,
// D_i = k_B·T_i·(1 + k_D·φ_i)/(3π·η(T_i)·d0), with the IAPWS 2008 viscosity
// η(25 °C) = 0.890023 and η(27 °C) = 0.850906 mPa·s
// (testdata/water/iapws_viscosity.py: IAPWS R12-08 with the Tanaka 2001
// density, independent of dls/medium). Regressed as measured, the 27 °C
// point puts k_D at 3.1 and d0 at 101.6 nm (and Birge-scaled
// uncertainties of 0.57 and 1.2 nm); brought to 25 °C it
// gives k_D and d0 within three standard uncertainties of the series fit
// (the noise is σ = 2e-4 per channel), which must themselves be below
// 0.1 and 0.1 nm for the check to mean something.
func TestDilutionSeriesAcrossTemperatures(t *testing.T) {
	const d0, kd = 100e-9, 1.45
	q := dls.ScatteringVector(1.33162, 632.8e-9, 173*math.Pi/180)
	s := DefaultSettings()
	s.Distribution.Enabled = false
	var results []*dls.Result
	for i, p := range []struct{ phi, tC, eta float64 }{
		{0.005, 25, 0.890023e-3}, {0.01, 25, 0.890023e-3}, {0.02, 25, 0.890023e-3}, {0.04, 27, 0.850906e-3},
	} {
		d := dls.DiffusionFromDiameter(dls.KelvinFromCelsius(p.tC), p.eta, d0) * (1 + kd*p.phi)
		meta := map[string]string{"temperature_c": fmt.Sprint(p.tC), "wavelength_nm": "632.8", "angle_deg": "173", "solvent": "water",
			"refractive_index": "1.33162", "volume_fraction": fmt.Sprint(p.phi), "group": "hs", "sample": "latex"}
		results = append(results, Analyze(decayMeasurement(fmt.Sprintf("hs%d.csv", i), d*q*q, meta, uint64(i+1)), &s))
	}
	rep := Groups(results)
	if len(rep.Dilution) != 1 || rep.Dilution[0].Result == nil {
		t.Fatalf("dilution report %+v", rep.Dilution)
	}
	sr := rep.Dilution[0].Result
	if sr.KDSE > 0.1 || sr.DiameterSENm > 0.1 {
		t.Fatalf("series uncertainties too large to check anything: k_D %.4f ± %.4f, d0 %.3f ± %.3f nm", sr.KD, sr.KDSE, sr.DiameterNm, sr.DiameterSENm)
	}
	if math.Abs(sr.KD-kd) > 3*sr.KDSE || math.Abs(sr.DiameterNm-100) > 3*sr.DiameterSENm {
		t.Errorf("k_D %.4f ± %.4f (truth 1.45), d0 %.3f ± %.3f nm (truth 100)", sr.KD, sr.KDSE, sr.DiameterNm, sr.DiameterSENm)
	}
	if sr.ReferenceTemperatureK != 298.15 || len(sr.Notes) != 1 {
		t.Errorf("reference %g K, notes %q", sr.ReferenceTemperatureK, sr.Notes)
	}
	for _, r := range results {
		if r.Correction != "dilution-series" || !strings.Contains(strings.Join(r.Assumptions, ";"), "brought to 25.00 °C") {
			t.Errorf("%s: correction %q, assumptions %q", r.File, r.Correction, r.Assumptions)
		}
	}
}

// TestDilutionSeriesRefused: series that mix solvents, or angles without a
// q-check, are refused with the reason on every result and in the report;
// a q-check at one concentration (three angles, Γ̄ = D·q² exactly, so no
// trend) lets a series over two angles be fitted. Values: the exact series
// of TestGroupsDilutionAndBadGroups.
func TestDilutionSeriesRefused(t *testing.T) {
	mk := func(group, file, solvent string, c, angle, dScale float64) *dls.Result {
		d := 4.9e-12 * (1 + 0.01*c) * dScale
		q := dls.ScatteringVector(1.33162, 632.8e-9, angle*math.Pi/180)
		return &dls.Result{Identity: dls.Identity{File: file, Sample: "protein", Group: group, Status: dls.StatusOK},
			Conditions:  dls.Conditions{HasConditions: true, TemperatureC: 25, Solvent: solvent, ViscosityMPaS: 0.890022, AngleDeg: angle, WavelengthNm: 632.8, RefractiveIndex: 1.33162},
			Cumulants:   dls.Cumulants{HasCumulants: true, DiffusionM2PerS: d, GammaMeanPerS: d * q * q, GammaSEPerS: 1e-3 * d * q * q, PDI: 0.05, PDISE: 0.01, Intercept: 0.9},
			Corrections: dls.Corrections{Correction: "none"}, Params: []dls.Param{{Key: dls.KeyConcentration, Value: fmt.Sprint(c)}}}
	}
	tests := []struct {
		name   string
		rs     func() []*dls.Result
		refuse string // "" = fitted
	}{
		{"solvents", func() []*dls.Result {
			return []*dls.Result{mk("g", "a.csv", "water", 1, 173, 1), mk("g", "b.csv", "water", 2, 173, 1), mk("g", "c.csv", "ethanol", 4, 173, 1)}
		}, "mixes solvents"},
		{"angles without a q-check", func() []*dls.Result {
			return []*dls.Result{mk("g", "a.csv", "water", 1, 90, 1), mk("g", "b.csv", "water", 1, 173, 1), mk("g", "c.csv", "water", 2, 173, 1), mk("g", "d.csv", "water", 4, 173, 1)}
		}, "without a multi-angle q-check"},
		{"angles with a failed q-check", func() []*dls.Result {
			// The apparent D at 30° is 20 % below that at 150°: a trend.
			return []*dls.Result{mk("g", "a.csv", "water", 1, 30, 0.8), mk("g", "b.csv", "water", 1, 90, 0.9), mk("g", "c.csv", "water", 1, 150, 1),
				mk("g", "d.csv", "water", 2, 173, 1), mk("g", "e.csv", "water", 4, 173, 1)}
		}, "finds D depending on q"},
		{"angles with a q-check", func() []*dls.Result {
			return []*dls.Result{mk("g", "a.csv", "water", 1, 30, 1), mk("g", "b.csv", "water", 1, 90, 1), mk("g", "c.csv", "water", 1, 150, 1),
				mk("g", "d.csv", "water", 2, 173, 1), mk("g", "e.csv", "water", 4, 173, 1), mk("g", "f.csv", "water", 8, 173, 1)}
		}, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rs := tc.rs()
			rep := Groups(rs)
			if len(rep.Dilution) != 1 {
				t.Fatalf("dilution report %+v", rep.Dilution)
			}
			dg := rep.Dilution[0]
			if tc.refuse == "" {
				// Exact data: D0 and k_D back to 1e-9 (rounding only).
				if dg.Error != "" || dg.Result == nil || math.Abs(dg.Result.D0M2PerS/4.9e-12-1) > 1e-9 || math.Abs(dg.Result.KD/0.01-1) > 1e-9 {
					t.Fatalf("series %+v, error %q", dg.Result, dg.Error)
				}
				if len(rep.MultiAngle) != 1 || rep.MultiAngle[0].Concentration == nil || *rep.MultiAngle[0].Concentration != 1 {
					t.Errorf("multi-angle report %+v: want one analysis at 1 mg/mL", rep.MultiAngle)
				}
				return
			}
			if dg.Result != nil || !strings.Contains(dg.Error, tc.refuse) {
				t.Fatalf("error %q (result %v); want %q", dg.Error, dg.Result != nil, tc.refuse)
			}
			for _, r := range rs {
				if r.Status != dls.StatusWarn || !strings.Contains(r.Message, tc.refuse) || strings.Contains(r.Correction, "dilution") {
					t.Errorf("%s: status %s, correction %q, message %q", r.File, r.Status, r.Correction, r.Message)
				}
			}
		})
	}
}
