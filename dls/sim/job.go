package sim

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
	"dlsbatch/dls/mie"
)

// Job is one simulated measurement file: one sample under one set of
// conditions, with one or more runs. Zero ViscosityMPaS and RefractiveIndex
// mean "from the solvent table at the job's temperature and wavelength".
type Job struct {
	File       string // plain file name, for the truth record
	Sample     string // sample name written into the file
	Population string // population text, see ParsePopulation
	Solvent    string // solvent of the solvent table
	Material   string // particle material of the Mie table (Mie weights), or ""
	ParticleRI string // particle complex index n+ki (Mie weights; overrides Material), or ""

	TemperatureC    float64 // sample temperature, °C
	WavelengthNm    float64 // laser vacuum wavelength, nm
	AngleDeg        float64 // scattering angle, degrees
	ViscosityMPaS   float64 // medium viscosity, mPa·s (0: solvent table)
	RefractiveIndex float64 // medium index (0: solvent table)
	CountRateKcps   float64 // mean detected count rate, kcps
	DurationS       float64 // duration of one run, s
	Beta            float64 // coherence factor β
	Baseline        float64 // baseline B of g2 = B·(1 + β·g1²)

	Runs       int    // runs per file
	DustBursts int    // dust bursts per run
	Seed       uint64 // random seed
	Sigma      bool   // write the noise model's σ beside each run
	// Noise is the noise model, see ParseNoise ("" is NoiseGaussian).
	Noise string
}

// Noise models of a Job.
const (
	// NoiseGaussian: Simulate, independent Gaussian noise per channel (the
	// fast model).
	NoiseGaussian = "gaussian"
	// NoiseCorrelated: SimulateCorrelated, the same noise correlated along
	// the lags.
	NoiseCorrelated = "correlated"
	// NoisePhoton: Photon, photon by photon with a software correlator;
	// each run of the file is one sub-run of duration DurationS, and σ is
	// the standard deviation over the runs.
	NoisePhoton = "photon"
)

// PhotonMinDtS is the shortest first sample time a photon-level job takes:
// the cost grows as 1/Δt (about 40 ns of computing per base bin).
const PhotonMinDtS = 100e-9

// ParseNoise returns the noise model named s (case-insensitive; "" is
// NoiseGaussian).
func ParseNoise(s string) (string, error) {
	switch v := strings.ToLower(strings.TrimSpace(s)); v {
	case "", NoiseGaussian:
		return NoiseGaussian, nil
	case NoiseCorrelated, NoisePhoton:
		return v, nil
	}
	return "", fmt.Errorf("noise model %q: want %s, %s or %s", s, NoiseGaussian, NoiseCorrelated, NoisePhoton)
}

// JobOptions are the settings shared by every job of a simulation.
type JobOptions struct {
	NoNoise      bool             // write the exact curves
	Extrapolate  bool             // allow solvent correlations outside their range
	Polarization mie.Polarization // laser polarisation for the Mie weights
}

// FieldError is an error about one field of a Job, named by its plan
// column (e.g. "population"); Field is empty for the job as a whole. It
// prints as its wrapped error, so a caller that knows where the field was
// written adds the position.
type FieldError struct {
	Field string
	Err   error
}

func (e *FieldError) Error() string { return e.Err.Error() }
func (e *FieldError) Unwrap() error { return e.Err }

// JobRun is one simulated run of a job's file.
type JobRun struct {
	Label string    // column label: "" for a single run, else r1, r2, …
	G2    []float64 // g2 at each lag
	Sigma []float64 // σ of each value, nil unless Job.Sigma
}

// JobResult is one simulated file: its metadata lines, lag grid and runs,
// and the ground truth of the population.
type JobResult struct {
	Meta     []dls.Param // metadata in the order written
	TauS     []float64   // lag times, s
	Runs     []JobRun
	Truth    TruthRecord
	Warnings []string // e.g. a correlation used outside its range
}

// TruthRecord is one measurement's entry in truth.json: the exact
// cumulants of the simulated population and the conditions used. Numbers
// are written with 7 significant digits.
type TruthRecord struct {
	File           string      `json:"file"`
	Sample         string      `json:"sample"`
	Runs           []string    `json:"runs"`
	Population     string      `json:"population"`
	ZAvgNm         json.Number `json:"z_avg_nm"`
	PDI            json.Number `json:"pdi"`
	GammaMeanPerS  json.Number `json:"gamma_mean_per_s"`
	DiffusionM2PS  json.Number `json:"diffusion_m2_per_s"`
	TemperatureC   json.Number `json:"temperature_c"`
	Solvent        string      `json:"solvent"`
	ViscosityMPaS  json.Number `json:"viscosity_mpas"`
	RefractiveIdx  json.Number `json:"refractive_index"`
	WavelengthNm   json.Number `json:"wavelength_nm"`
	AngleDeg       json.Number `json:"angle_deg"`
	Weighting      string      `json:"weighting"`
	ParticleRI     string      `json:"particle_ri,omitempty"`
	CountRateKcps  json.Number `json:"count_rate_kcps"`
	DurationS      json.Number `json:"duration_s"`
	Beta           json.Number `json:"beta"`
	Baseline       json.Number `json:"baseline"`
	DustBursts     int         `json:"dust_bursts"`
	Noise          string      `json:"noise,omitempty"` // empty for the fast Gaussian model
	Seed           uint64      `json:"seed"`
	ViscositySrc   string      `json:"viscosity_source"`
	RefractiveISrc string      `json:"refractive_index_source"`
}

// TruthNote describes how the numbers of a TruthRecord were computed.
const TruthNote = "exact cumulants of each simulated population (dust excluded), by quadrature over the intensity weights: " +
	"gamma_mean_per_s = Σ w Γ, pdi = μ2/Γ̄², z_avg_nm = k_B·T·q²/(3π·η·Γ̄)"

func num(v float64) json.Number { return json.Number(strconv.FormatFloat(v, 'g', 7, 64)) }

// fmtNum writes a metadata number in its shortest exact form.
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func fieldErr(field string, err error) error { return &FieldError{Field: field, Err: err} }

// Run simulates the job on grid. Errors are *FieldError naming the job
// field at fault.
func (j *Job) Run(grid *Grid, o JobOptions) (*JobResult, error) {
	res := &JobResult{}
	pop, err := ParsePopulation(j.Population)
	if err != nil {
		return nil, fieldErr("population", err)
	}
	sv, err := medium.Lookup(j.Solvent)
	if err != nil {
		return nil, fieldErr("solvent", err)
	}
	tK := dls.KelvinFromCelsius(j.TemperatureC)
	lambda := j.WavelengthNm * 1e-9
	props, err := sv.Props(tK, lambda, o.Extrapolate)
	if err != nil {
		return nil, fieldErr("temperature_c", err)
	}
	res.Warnings = append(res.Warnings, props.Warnings...)
	eta, n := props.ViscosityPaS, props.RefractiveIndex
	etaSrc, nSrc := props.ViscositySource, props.IndexSource
	if j.ViscosityMPaS != 0 {
		eta, etaSrc = j.ViscosityMPaS*1e-3, "given"
	}
	if j.RefractiveIndex != 0 {
		n, nSrc = j.RefractiveIndex, "given"
	}
	cond := Conditions{
		TemperatureK: tK,
		ViscosityPaS: eta,
		Optics:       dls.Optics{WavelengthM: lambda, AngleRad: j.AngleDeg * math.Pi / 180, RefractiveIndex: n},
	}
	if err := cond.Validate(); err != nil {
		return nil, fieldErr("", err)
	}
	var scatter func(float64) float64
	var scatterErr error
	weighting, riText := "rayleigh d^6", ""
	if j.ParticleRI != "" || j.Material != "" {
		var m complex128
		if j.ParticleRI != "" {
			if m, err = mie.ParseComplexIndex(j.ParticleRI); err != nil {
				return nil, fieldErr("particle_ri", err)
			}
			weighting = "mie, particle index given"
		} else {
			var src string
			if m, src, err = mie.MaterialIndex(j.Material, lambda); err != nil {
				return nil, fieldErr("material", err)
			}
			weighting = "mie, " + j.Material + " index: " + src
		}
		riText = mie.FormatComplexIndex(m)
		scatter = func(d float64) float64 {
			v, err := mie.Intensity(d, lambda, n, m, cond.Optics.AngleRad, o.Polarization)
			if err != nil && scatterErr == nil {
				scatterErr = err
			}
			return v
		}
	}
	model, err := NewModel(pop, cond, scatter)
	if err != nil {
		if scatterErr != nil {
			err = scatterErr
		}
		return nil, fieldErr("population", err)
	}
	cfg := Config{
		Grid: grid, Beta: j.Beta, Baseline: j.Baseline, CountRateHz: j.CountRateKcps * 1e3,
		DurationS: j.DurationS, Runs: j.Runs, NoNoise: o.NoNoise, Seed: j.Seed,
	}
	if j.Runs < 1 {
		return nil, fieldErr("runs", fmt.Errorf("run count %d is below 1", j.Runs))
	}
	if j.Baseline <= 0 {
		return nil, fieldErr("baseline", fmt.Errorf("baseline %g is not positive", j.Baseline))
	}
	if j.DustBursts < 0 {
		return nil, fieldErr("dust_bursts", fmt.Errorf("dust burst count %d is negative", j.DustBursts))
	}
	if j.DustBursts > 0 {
		cfg.Dust = &Dust{Bursts: j.DustBursts}
	}
	noise, err := ParseNoise(j.Noise)
	if err != nil {
		return nil, fieldErr("noise", err)
	}
	out, err := j.simulate(model, &cfg, noise)
	if err != nil {
		return nil, err
	}
	labels := make([]string, len(out.Runs))
	res.Runs = make([]JobRun, len(out.Runs))
	for i, r := range out.Runs {
		if len(out.Runs) > 1 {
			labels[i] = "r" + strconv.Itoa(i+1)
		}
		res.Runs[i] = JobRun{Label: labels[i], G2: r.G2}
		if j.Sigma {
			res.Runs[i].Sigma = r.Sigma
		}
	}
	res.TauS = out.TauS
	res.Meta = []dls.Param{
		{Key: dls.KeySample, Value: j.Sample},
		{Key: dls.KeyTemperatureC, Value: fmtNum(j.TemperatureC)},
		{Key: dls.KeyWavelengthNm, Value: fmtNum(j.WavelengthNm)},
		{Key: dls.KeyAngleDeg, Value: fmtNum(j.AngleDeg)},
		{Key: dls.KeySolvent, Value: sv.Name},
	}
	if j.ViscosityMPaS != 0 {
		res.Meta = append(res.Meta, dls.Param{Key: dls.KeyViscosityMPaS, Value: fmtNum(j.ViscosityMPaS)})
	}
	if j.RefractiveIndex != 0 {
		res.Meta = append(res.Meta, dls.Param{Key: dls.KeyRefractiveIndex, Value: fmtNum(j.RefractiveIndex)})
	}
	if riText != "" {
		res.Meta = append(res.Meta, dls.Param{Key: dls.KeyParticleRI, Value: riText})
	}
	res.Meta = append(res.Meta,
		dls.Param{Key: dls.KeyCountRateKcps, Value: fmtNum(j.CountRateKcps)},
		dls.Param{Key: dls.KeyDurationS, Value: fmtNum(j.DurationS)})
	if len(out.Runs) == 1 {
		labels = []string{""}
	}
	tr := out.Truth
	res.Truth = TruthRecord{
		File: j.File, Sample: j.Sample, Runs: labels, Population: pop.String(),
		ZAvgNm: num(tr.ZAvgM * 1e9), PDI: num(tr.PDI), GammaMeanPerS: num(tr.GammaMeanPerS),
		DiffusionM2PS: num(tr.DiffusionM2PerS), TemperatureC: num(j.TemperatureC), Solvent: sv.Name,
		ViscosityMPaS: num(eta * 1e3), RefractiveIdx: num(n), WavelengthNm: num(j.WavelengthNm),
		AngleDeg: num(j.AngleDeg), Weighting: weighting, ParticleRI: riText,
		CountRateKcps: num(j.CountRateKcps), DurationS: num(j.DurationS), Beta: num(j.Beta), Baseline: num(j.Baseline),
		DustBursts: j.DustBursts, Seed: j.Seed, ViscositySrc: etaSrc, RefractiveISrc: nSrc,
	}
	if noise != NoiseGaussian {
		res.Truth.Noise = noise
	}
	return res, nil
}

// simulate draws the job's runs with the noise model. Errors are
// *FieldError.
func (j *Job) simulate(model *Model, cfg *Config, noise string) (*Output, error) {
	if cfg.NoNoise || noise == NoiseGaussian {
		out, err := Simulate(model, cfg)
		if err != nil {
			return nil, fieldErr("", err)
		}
		return out, nil
	}
	if noise == NoiseCorrelated {
		out, err := SimulateCorrelated(model, cfg)
		if err != nil {
			return nil, fieldErr("", err)
		}
		return out, nil
	}
	switch g := cfg.Grid; {
	case g != nil && g.DtS < PhotonMinDtS:
		return nil, fieldErr("noise", fmt.Errorf("photon-level noise needs a first sample time of at least %g ns (the lag grid has %g ns; set --dt-ns)", PhotonMinDtS*1e9, g.DtS*1e9))
	case j.DustBursts > 0:
		return nil, fieldErr("dust_bursts", errors.New("dust is not simulated at photon level; use the gaussian or correlated noise model"))
	case j.Sigma && j.Runs < 2:
		return nil, fieldErr("sigma", errors.New("with photon-level noise σ is the scatter of the runs: it needs at least 2 runs"))
	}
	pr, err := Photon(model, &PhotonConfig{Grid: cfg.Grid, Beta: cfg.Beta, CountRateHz: cfg.CountRateHz,
		DurationS: cfg.DurationS * float64(j.Runs), SubRuns: j.Runs, Seed: cfg.Seed})
	if err != nil {
		return nil, fieldErr("", err)
	}
	out := pr.Output()
	// The photon correlator's g2 has baseline 1; the job's baseline scales
	// it as in Simulate (g2 = B·(1 + β·g1²)).
	if b := cfg.Baseline; b != 1 {
		for i := range out.Runs {
			for _, v := range [][]float64{out.Runs[i].G2, out.Runs[i].Sigma, out.Runs[i].Exact} {
				for k := range v {
					v[k] *= b
				}
			}
		}
	}
	return out, nil
}
