package batch

import (
	"errors"
	"math"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/sim"
)

// simulatedG2 is a narrow 100 nm population (lognormal, σ_g 0.05) in water
// at 25 °C, 173°, 632.8 nm, β = 0.9, 300 kcps for 100 s on the multi-tau
// grid spec, scaled by scale (1 for a normalised g2), with σ given. It
// returns the measurement and the truth's z-average in nm.
func simulatedG2(t *testing.T, spec sim.GridSpec, scale float64) (*dls.Measurement, float64) {
	t.Helper()
	const tK, eta, n, lambda = 298.15, 0.890022e-3, 1.33162, 632.8e-9
	pop, _ := sim.ParsePopulation("lognormal(100nm,0.05,number)")
	grid, err := sim.NewGrid(spec)
	if err != nil {
		t.Fatal(err)
	}
	optics := dls.Optics{WavelengthM: lambda, AngleRad: 173 * math.Pi / 180, RefractiveIndex: n}
	model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: tK, ViscosityPaS: eta, Optics: optics}, nil)
	if err != nil {
		t.Fatal(err)
	}
	out, err := sim.Simulate(model, &sim.Config{Grid: grid, Beta: 0.9, Baseline: 1, CountRateHz: 3e5, DurationS: 100, Runs: 1, Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	m := &dls.Measurement{File: "raw.csv", Kind: dls.KindG2, TauS: out.TauS, HeaderLine: 6}
	for i, v := range out.Runs[0].G2 {
		m.Corr = append(m.Corr, v*scale)
		m.Sigma = append(m.Sigma, out.Runs[0].Sigma[i]*scale)
	}
	for k, v := range map[string]string{"temperature_c": "25", "wavelength_nm": "632.8", "angle_deg": "173", "solvent": "water",
		"viscosity_mpas": "0.890022", "refractive_index": "1.33162"} {
		m.Meta.Set(dls.Param{Key: k, Value: v, Origin: dls.OriginFile, Where: "raw.csv"})
	}
	return m, model.Truth.ZAvgM * 1e9
}

// TestUnnormalisedG2: a g2 exported as raw G2 = B·(1 + β·g1²) with
// B = 1.0213e8 (counts² scale) and a clear baseline plateau is divided by
// its far-channel mean, with a warning: the z-average is that of the same
// data given normalised to 1e-6 (the fit floats baseline and amplitude, so
// a common scale leaves Γ̄ unchanged; 1e-6 is the fit's convergence), and
// within 1 % of the simulated truth (the data's noise: Γ̄ to about 0.3 %).
// Cut off at 0.2 ms, where g1² is still 0.26, the same raw data have no
// plateau and are refused with a message that says what is wrong and how
// to fix it; a normalised g2 is left as it is.
func TestUnnormalisedG2(t *testing.T) {
	s := DefaultSettings()
	s.Distribution.Enabled = false
	raw, truth := simulatedG2(t, sim.DefaultGridSpec(), 1.0213e8)
	norm, _ := simulatedG2(t, sim.DefaultGridSpec(), 1)
	r := Analyze(raw, &s)
	want := Analyze(norm, &s)
	if r.Status == dls.StatusError || want.Status == dls.StatusError {
		t.Fatalf("raw: %s (%s); normalised: %s (%s)", r.Status, r.Message, want.Status, want.Message)
	}
	if math.Abs(r.ZAvgNm/want.ZAvgNm-1) > 1e-6 || math.Abs(r.ZAvgNm/truth-1) > 0.01 {
		t.Errorf("z-average %.6f nm; normalised data %.6f, truth %.3f", r.ZAvgNm, want.ZAvgNm, truth)
	}
	if !someContainsAll(r.Warnings, []string{"unnormalised (baseline 1.021", "e+08)", "divided by the mean of its last 20 channels"}) {
		t.Errorf("warnings %q lack the normalisation note", r.Warnings)
	}
	if math.Abs(r.Baseline-1) > 1e-3 || r.Curves == nil || math.Abs(r.Curves.Data[len(r.Curves.Data)-1]-1) > 0.01 {
		t.Errorf("baseline %g, curves not normalised", r.Baseline)
	}
	if m, note, err := normaliseG2(norm); m != norm || note != "" || err != nil {
		t.Errorf("a normalised g2 was changed: %q %v", note, err)
	}

	spec := sim.DefaultGridSpec()
	spec.Channels, spec.TauMaxS = 0, 2e-4
	cut, _ := simulatedG2(t, spec, 1.0213e8)
	if _, _, err := normaliseG2(cut); !errors.Is(err, dls.ErrUnnormalised) {
		t.Errorf("no plateau: err %v, want ErrUnnormalised", err)
	}
	r = Analyze(cut, &s)
	for _, w := range []string{"raw.csv:6:", "unnormalised", "no clear baseline plateau", "decay has not ended", "divide the column by its baseline"} {
		if r.Status != dls.StatusError || !strings.Contains(r.Message, w) {
			t.Errorf("status %s, message %q lacks %q", r.Status, r.Message, w)
		}
	}
}
