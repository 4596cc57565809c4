package sim

import (
	"errors"
	"math"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
)

// TestJobNoise checks that a job draws its runs with the noise model it
// names: gaussian is Simulate, correlated SimulateCorrelated and photon
// Photon with one sub-run of the job's duration per run (the same config
// and seed give the same numbers, so the curves must agree to rounding,
// 1e-12: the job parses its population text), σ
// of a photon job is the standard deviation of the runs' g2 (checked
// against its definition, tolerance 1e-12 relative: rounding), and the
// truth record names a model other than the default.
func TestJobNoise(t *testing.T) {
	g, err := NewGrid(GridSpec{DtS: 2e-6, M: 8, TauMaxS: 0.02})
	if err != nil {
		t.Fatal(err)
	}
	job := Job{File: "a.csv", Sample: "s", Population: "mono(100nm)", Solvent: "water", TemperatureC: 25,
		WavelengthNm: 632.8, AngleDeg: 173, CountRateKcps: 200, DurationS: 0.2, Beta: 0.9, Baseline: 1, Runs: 3, Seed: 9, Sigma: true}
	model, err := NewModel(Population{Components: []Component{{Shape: Mono, MedianM: 100e-9, Fraction: 1}}, FractionBasis: ByIntensity},
		job.conditions(t), nil)
	if err != nil {
		t.Fatal(err)
	}
	cfg := Config{Grid: g, Beta: 0.9, Baseline: 1, CountRateHz: 2e5, DurationS: 0.2, Runs: 3, Seed: 9}
	gauss, _ := Simulate(model, &cfg)
	corr, _ := SimulateCorrelated(model, &cfg)
	phot, err := Photon(model, &PhotonConfig{Grid: g, Beta: 0.9, CountRateHz: 2e5, DurationS: 0.6, SubRuns: 3, Seed: 9})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		noise, truth string
		want         *Output
	}{{"", "", gauss}, {"Gaussian", "", gauss}, {"correlated", "correlated", corr}, {"photon", "photon", phot.Output()}} {
		j := job
		j.Noise = c.noise
		res, err := j.Run(g, JobOptions{})
		if err != nil {
			t.Fatalf("%q: %v", c.noise, err)
		}
		if res.Truth.Noise != c.truth {
			t.Errorf("%q: truth names noise %q, want %q", c.noise, res.Truth.Noise, c.truth)
		}
		for r, run := range res.Runs {
			for k, v := range run.G2 {
				if math.Abs(v-c.want.Runs[r].G2[k]) > 1e-12 {
					t.Fatalf("%q: run %d channel %d: g2 %v, want %v", c.noise, r, k, v, c.want.Runs[r].G2[k])
				}
			}
		}
	}
	j := job
	j.Noise = NoisePhoton
	res, _ := j.Run(g, JobOptions{})
	for k := range res.TauS {
		var m, ss float64
		for _, r := range res.Runs {
			m += r.G2[k] / 3
		}
		for _, r := range res.Runs {
			ss += (r.G2[k] - m) * (r.G2[k] - m)
		}
		if sd := math.Sqrt(ss / 2); math.Abs(res.Runs[0].Sigma[k]-sd) > 1e-12*sd {
			t.Fatalf("channel %d: σ %v, standard deviation of the runs %v", k, res.Runs[0].Sigma[k], sd)
		}
	}
}

// conditions are the job's conditions as Run resolves them: the solvent
// table's viscosity and index at the job's temperature and wavelength.
func (j *Job) conditions(t *testing.T) Conditions {
	t.Helper()
	sv, err := medium.Lookup(j.Solvent)
	if err != nil {
		t.Fatal(err)
	}
	tK := dls.KelvinFromCelsius(j.TemperatureC)
	p, err := sv.Props(tK, j.WavelengthNm*1e-9, false)
	if err != nil {
		t.Fatal(err)
	}
	return Conditions{TemperatureK: tK, ViscosityPaS: p.ViscosityPaS,
		Optics: dls.Optics{WavelengthM: j.WavelengthNm * 1e-9, AngleRad: j.AngleDeg * math.Pi / 180, RefractiveIndex: p.RefractiveIndex}}
}

// TestJobNoiseErrors checks the refusals of the photon model, each naming
// the plan column at fault.
func TestJobNoiseErrors(t *testing.T) {
	fine, _ := NewGrid(GridSpec{DtS: 25e-9, M: 8, TauMaxS: 0.02})
	coarse, _ := NewGrid(GridSpec{DtS: 2e-6, M: 8, TauMaxS: 0.02})
	base := Job{File: "a.csv", Sample: "s", Population: "mono(100nm)", Solvent: "water", TemperatureC: 25,
		WavelengthNm: 632.8, AngleDeg: 173, CountRateKcps: 200, DurationS: 0.2, Beta: 0.9, Baseline: 1, Runs: 2, Seed: 9, Noise: NoisePhoton}
	for _, c := range []struct {
		name, field, text string
		grid              *Grid
		edit              func(*Job)
	}{
		{"first sample time below 100 ns", "noise", "100 ns", fine, func(*Job) {}},
		{"σ from one run", "sigma", "at least 2 runs", coarse, func(j *Job) { j.Runs, j.Sigma = 1, true }},
		{"dust", "dust_bursts", "dust", coarse, func(j *Job) { j.DustBursts = 1 }},
		{"unknown model", "noise", "want gaussian", coarse, func(j *Job) { j.Noise = "pink" }},
	} {
		j := base
		c.edit(&j)
		_, err := j.Run(c.grid, JobOptions{})
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Field != c.field || !strings.Contains(err.Error(), c.text) {
			t.Errorf("%s: error %v, want a %s field error mentioning %q", c.name, err, c.field, c.text)
		}
	}
}
