package batch

import (
	"math"
	"strconv"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/qc"
	"dlsbatch/dls/sim"
)

// TestQCFlagsOnSimulatedCases runs the whole pipeline on correlograms from
// the simulator, each made to show one fault, and checks that the fault's
// flag fires, and that a clean measurement raises none. Conditions: water,
// 25 °C, 632.8 nm, 173°, β 0.92, 300 kcps, 100 s, polystyrene (Mie).
func TestQCFlagsOnSimulatedCases(t *testing.T) {
	const tK, eta, n, lambda = 298.15, 0.890022e-3, 1.33162, 632.8e-9
	optics := dls.Optics{WavelengthM: lambda, AngleRad: 173 * math.Pi / 180, RefractiveIndex: n}
	scatter := func(dM float64) float64 {
		v, _ := mie.Intensity(dM, lambda, n, complex(1.58753, 0), optics.AngleRad, mie.Vertical)
		return v
	}
	cases := []struct {
		name, pop string
		want      qc.Code
		before    func(c *sim.Config)
		after     func(m *dls.Measurement, out *sim.Output)
	}{
		{name: "clean", pop: "lognormal(100nm,0.05,number)"},
		{name: "dust", pop: "lognormal(100nm,0.05,number)", want: qc.Dust,
			before: func(c *sim.Config) { c.Dust = &sim.Dust{DiameterM: 3e-6, Bursts: 2, Brightness: 3} }},
		{name: "low count rate", pop: "lognormal(100nm,0.05,number)", want: qc.LowCountRate,
			before: func(c *sim.Config) { c.CountRateHz = 5e3 }},
		{name: "two populations", pop: "70%lognormal(30nm,0.1,intensity)+30%lognormal(300nm,0.1,intensity)@intensity", want: qc.Multimodal},
		{name: "broad", pop: "lognormal(100nm,0.8,intensity)", want: qc.HighPDI},
		{name: "low intercept", pop: "lognormal(100nm,0.05,number)", want: qc.LowIntercept,
			before: func(c *sim.Config) { c.Beta = 0.05 }},
		{name: "high intercept", pop: "lognormal(100nm,0.05,number)", want: qc.HighIntercept,
			// Afterpulsing-like excess: g2 − 1 scaled by 1.15.
			after: func(m *dls.Measurement, _ *sim.Output) {
				for i := range m.Corr {
					m.Corr[i] = 1 + 1.15*(m.Corr[i]-1)
				}
			}},
		{name: "baseline offset", pop: "lognormal(100nm,0.05,number)", want: qc.BaselineOffset,
			before: func(c *sim.Config) { c.Baseline = 1.01 }},
		{name: "poor fit", pop: "lognormal(100nm,0.05,number)", want: qc.PoorFit,
			// σ given but three times too small.
			after: func(m *dls.Measurement, out *sim.Output) {
				m.Sigma = make([]float64, len(out.Runs[0].Sigma))
				for i, s := range out.Runs[0].Sigma {
					m.Sigma[i] = s / 3
				}
			}},
		{name: "decay too fast for the window", pop: "lognormal(1nm,0.05,number)", want: qc.OutsideWindow,
			// A correlator whose first lag is 1 µs: 1 nm decays in 2.9 µs.
			before: func(c *sim.Config) {
				g, err := sim.NewGrid(sim.GridSpec{DtS: 1e-6, M: 8, Channels: 150})
				if err != nil {
					panic(err)
				}
				c.Grid = g
			}},
		{name: "distribution against cumulants", pop: "lognormal(100nm,0.05,number)", want: qc.DistMismatch,
			// The same cut window: the cumulant fit floats its baseline
			// into the undecayed tail, the inversion does not.
			after: func(m *dls.Measurement, _ *sim.Output) {
				k := 0
				for k < len(m.TauS) && m.TauS[k] < 3e-4 {
					k++
				}
				m.TauS, m.Corr = m.TauS[:k], m.Corr[:k]
			}},
		{name: "no correlation at all", pop: "lognormal(100nm,0.05,number)", want: qc.Failed,
			// Coherence factor 1e-4: the correlation drowns in the noise and
			// the measurement cannot be analysed.
			before: func(c *sim.Config) { c.Beta = 1e-4 }},
		{name: "no baseline", pop: "lognormal(100nm,0.05,number)", want: qc.NoBaseline,
			// The lag window cut at 0.3 ms, before the decay ends.
			after: func(m *dls.Measurement, _ *sim.Output) {
				k := 0
				for k < len(m.TauS) && m.TauS[k] < 3e-4 {
					k++
				}
				m.TauS, m.Corr = m.TauS[:k], m.Corr[:k]
			}},
	}
	grid, err := sim.NewGrid(sim.DefaultGridSpec())
	if err != nil {
		t.Fatal(err)
	}
	s := DefaultSettings()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			pop, err := sim.ParsePopulation(c.pop)
			if err != nil {
				t.Fatal(err)
			}
			model, err := sim.NewModel(pop, sim.Conditions{TemperatureK: tK, ViscosityPaS: eta, Optics: optics}, scatter)
			if err != nil {
				t.Fatal(err)
			}
			cfg := sim.Config{Grid: grid, Beta: 0.92, Baseline: 1, CountRateHz: 3e5, DurationS: 100, Runs: 1, Seed: 5}
			if c.before != nil {
				c.before(&cfg)
			}
			out, err := sim.Simulate(model, &cfg)
			if err != nil {
				t.Fatal(err)
			}
			m := &dls.Measurement{File: c.name + ".csv", Kind: dls.KindG2, TauS: out.TauS, Corr: out.Runs[0].G2}
			if c.after != nil {
				c.after(m, out)
			}
			for k, v := range map[string]string{"temperature_c": "25", "wavelength_nm": "632.8", "angle_deg": "173", "solvent": "water",
				"particle_ri": "1.58753+0i", "count_rate_kcps": formatKcps(cfg.CountRateHz)} {
				m.Meta.Set(dls.Param{Key: k, Value: v, Origin: dls.OriginFile, Where: m.File})
			}
			r := Analyze(m, &s)
			codes := map[qc.Code]bool{}
			for _, f := range r.Flags {
				codes[f.Code] = true
			}
			if c.want == "" {
				if len(r.Flags) != 0 {
					t.Errorf("clean measurement raises %v", r.Flags)
				}
				return
			}
			if !codes[c.want] {
				t.Errorf("%s did not fire; flags %v, message %q", c.want, r.Flags, r.Message)
			}
		})
	}
}

func formatKcps(hz float64) string { return strconv.FormatFloat(hz/1e3, 'g', -1, 64) }

func TestQCFlagsDoNotDependOnCurves(t *testing.T) {
	// Leaving the curves out of results.json (--no-curves) must not change
	// which flags a measurement raises.
	m := simulated(t, "70%lognormal(30nm,0.1,intensity)+30%lognormal(300nm,0.1,intensity)@intensity", 3)
	s := DefaultSettings()
	with := Analyze(m, &s)
	s.KeepCurves = false
	without := Analyze(m, &s)
	if !hasCode(with.Flags, qc.PoorFit) || len(with.Flags) != len(without.Flags) {
		t.Fatalf("flags with curves %v, without %v", with.Flags, without.Flags)
	}
	for i := range with.Flags {
		if with.Flags[i].Code != without.Flags[i].Code {
			t.Errorf("flag %d: %s with curves, %s without", i, with.Flags[i].Code, without.Flags[i].Code)
		}
	}
}

func hasCode(f []dls.Flag, code qc.Code) bool {
	for _, x := range f {
		if x.Code == code {
			return true
		}
	}
	return false
}

func TestBaselineOffsetKnowsTheKind(t *testing.T) {
	// A g2m1 correlogram has its baseline at 0, not 1: no BASELINE-OFFSET,
	// with or without curves in the output.
	m := simulated(t, "lognormal(100nm,0.05,number)", 4)
	m.Kind = dls.KindG2m1
	for i := range m.Corr {
		m.Corr[i]--
	}
	for _, keep := range []bool{true, false} {
		s := DefaultSettings()
		s.KeepCurves = keep
		if r := Analyze(m, &s); hasCode(r.Flags, qc.BaselineOffset) {
			t.Errorf("curves kept %v: %v", keep, r.Flags)
		}
	}
}
