package batch

import (
	"fmt"
	"math"
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
