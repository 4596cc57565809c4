package main

import (
	"context"
	"errors"
	"fmt"
	"math"

	"github.com/spf13/pflag"

	"dlsbatch/dls"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/sim"
	"dlsbatch/io/simplan"
)

// simOptions are the flags of `dlsbatch simulate`. In plan mode they are
// the defaults of every empty plan cell.
type simOptions struct {
	job sim.Job

	plan, out, output, truth string
	force, noNoise, extrap   bool
	pol, noise               *enumFlag

	dtNs               float64
	perStage, channels int
	tauMaxS            float64
}

func newSimOptions() *simOptions {
	d := sim.DefaultConfig()
	g := sim.DefaultGridSpec()
	return &simOptions{
		job: sim.Job{
			Sample: "simulated", Population: "mono(100nm)", Solvent: "water",
			TemperatureC: 25, WavelengthNm: 632.8, AngleDeg: 173,
			CountRateKcps: d.CountRateHz / 1e3, DurationS: d.DurationS, Beta: d.Beta, Baseline: 1,
			Runs: 1, Seed: d.Seed,
		},
		pol:      newEnum("vertical", "vertical", "unpolarized"),
		noise:    newEnum(sim.NoiseGaussian, sim.NoiseGaussian, sim.NoiseCorrelated, sim.NoisePhoton),
		dtNs:     g.DtS * 1e9,
		perStage: g.M,
		channels: g.Channels,
	}
}

func (o *simOptions) addFlags(fs *pflag.FlagSet) {
	j := &o.job
	fs.StringVar(&o.plan, "plan", "", "CSV plan, one row per output file (columns below); needs --out")
	fs.StringVar(&o.out, "out", "", "folder for the plan's files and truth.json; refused if it exists and is not empty, unless --force")
	fs.StringVarP(&o.output, "output", "o", "", "file for a single simulated correlogram (default: standard output)")
	fs.StringVar(&o.truth, "truth", "", "file for the ground truth (JSON) of a single correlogram")
	fs.BoolVar(&o.force, "force", false, "write into a non-empty --out folder, or over an existing --output/--truth file")
	fs.StringVar(&j.Sample, "sample", j.Sample, "sample name written into the file")
	fs.StringVar(&j.Population, "population", j.Population,
		"particle population: mono(SIZE), lognormal(SIZE,WIDTH,number|intensity), or a mixture "+
			"such as 70%mono(30nm)+30%mono(300nm)@intensity (WIDTH is the standard deviation of ln d; SIZE in nm or um)")
	fs.StringVar(&j.Solvent, "solvent", j.Solvent, "solvent from the solvent table (viscosity and index at the temperature and wavelength)")
	fs.Float64Var(&j.TemperatureC, "temperature-c", j.TemperatureC, "sample temperature in °C")
	fs.Float64Var(&j.WavelengthNm, "wavelength-nm", j.WavelengthNm, "laser vacuum wavelength in nm")
	fs.Float64Var(&j.AngleDeg, "angle-deg", j.AngleDeg, "scattering angle in degrees")
	fs.Float64Var(&j.ViscosityMPaS, "viscosity-mpas", 0, "medium viscosity in mPa·s instead of the solvent table's (written into the file)")
	fs.Float64Var(&j.RefractiveIndex, "refractive-index", 0, "medium refractive index instead of the solvent table's (written into the file)")
	fs.StringVar(&j.Material, "material", "", "particle material for Mie weighting, index taken from the material table at the wavelength (e.g. polystyrene, Au, SiO2_fused)")
	fs.StringVar(&j.ParticleRI, "particle-ri", "", "particle complex index n+ki for Mie weighting, e.g. 1.59+0i (overrides --material); without either, Rayleigh d⁶ weighting")
	fs.Var(o.pol, "polarization", "laser polarisation for the Mie weights: vertical (|S1|²) or unpolarized")
	fs.Float64Var(&j.CountRateKcps, "count-rate-kcps", j.CountRateKcps, "mean detected count rate of the sample in kcps")
	fs.Float64Var(&j.DurationS, "duration-s", j.DurationS, "duration of one run in s")
	fs.Float64Var(&j.Beta, "beta", j.Beta, "coherence factor β (intercept of g2 − 1), in (0, 1]")
	fs.Float64Var(&j.Baseline, "baseline", j.Baseline, "baseline B of g2 = B·(1 + β·g1²); 1.002 simulates a 0.2 % baseline error")
	fs.Uint64Var(&j.Seed, "seed", j.Seed, "random seed; in a plan, rows without a seed use this plus their row number")
	fs.IntVar(&j.Runs, "runs", j.Runs, "runs per file (columns g2_r1, g2_r2, …)")
	fs.IntVar(&j.DustBursts, "dust-bursts", 0, "dust bursts per run (0: no dust)")
	fs.BoolVar(&j.Sigma, "sigma", false, "write the noise model's standard deviation as sigma columns")
	fs.Var(o.noise, "noise", "noise model: gaussian (fast, independent channels), correlated (fast, correlated along the lags) or photon (photon counts through a software correlator, one sub-run per run; needs --dt-ns 100 or more)")
	fs.BoolVar(&o.noNoise, "no-noise", false, "write the exact curves (sigma columns still hold the model's noise level)")
	fs.BoolVar(&o.extrap, "extrapolate", false, "allow solvent correlations outside their valid range")
	fs.Float64Var(&o.dtNs, "dt-ns", o.dtNs, "lag grid: sample time of the first stage in ns")
	fs.IntVar(&o.perStage, "per-stage", o.perStage, "lag grid: channels per stage (the first stage has twice as many)")
	fs.IntVar(&o.channels, "channels", o.channels, "lag grid: number of channels (ignored when --tau-max-s is set)")
	fs.Float64Var(&o.tauMaxS, "tau-max-s", 0, "lag grid: longest lag in s (0: use --channels)")
}

func runSimulate(ctx context.Context, e env, args []string) int {
	o := newSimOptions()
	fs := pflag.NewFlagSet("simulate", pflag.ContinueOnError)
	o.addFlags(fs)
	if code, done := parseFlags(fs, e, "simulate", help("simulate"), help("simulate.exits"), args); done {
		return code
	}
	fail := func(code int, err any) int { fmt.Fprintln(e.stderr, "dlsbatch simulate:", err); return code }
	if fs.NArg() > 0 {
		return fail(exitUsage, fmt.Sprintf("unexpected argument %q", fs.Arg(0)))
	}
	o.job.Noise = o.noise.String()
	grid, err := sim.NewGrid(o.gridSpec())
	if err != nil {
		return fail(exitUsage, err)
	}
	switch {
	case o.plan == "" && o.out != "":
		return fail(exitUsage, "--out needs --plan; use --output for a single file")
	case o.plan == "":
		return o.runSingle(e, grid, fail)
	case o.out == "":
		return fail(exitUsage, "--plan needs --out DIR")
	case o.output != "" || o.truth != "":
		return fail(exitUsage, "--output and --truth are for a single file; with --plan everything goes to --out")
	}
	return o.runPlan(ctx, e, grid, fail)
}

func (o *simOptions) gridSpec() sim.GridSpec {
	s := sim.GridSpec{DtS: o.dtNs * 1e-9, M: o.perStage, Channels: o.channels, TauMaxS: o.tauMaxS}
	if s.DtS == 0 {
		s.DtS = math.NaN() // zero would silently mean the default
	}
	return s
}

func (o *simOptions) jobOptions() sim.JobOptions {
	jo := sim.JobOptions{NoNoise: o.noNoise, Extrapolate: o.extrap, Polarization: mie.Vertical}
	if o.pol.String() == "unpolarized" {
		jo.Polarization = mie.Unpolarized
	}
	return jo
}

func simWarn(e env) func(string) {
	return func(msg string) { fmt.Fprintln(e.stderr, "dlsbatch simulate: warning:", msg) }
}

func (o *simOptions) runSingle(e env, grid *sim.Grid, fail func(int, any) int) int {
	if err := simplan.CheckOutFiles(o.output, o.truth, o.force); err != nil {
		return fail(exitUsage, err)
	}
	var fe *sim.FieldError
	switch err := simplan.RunSingle(o.job, grid, o.jobOptions(), o.output, o.truth, e.stdout, simWarn(e)); {
	case errors.As(err, &fe):
		return fail(exitUsage, err)
	case err != nil:
		return fail(exitFatal, err)
	}
	return exitOK
}

func (o *simOptions) runPlan(ctx context.Context, e env, grid *sim.Grid, fail func(int, any) int) int {
	entries, err := simplan.ReadFile(o.plan, o.job)
	if err == nil {
		err = simplan.CheckOutDir(o.out, o.plan, o.force)
	}
	if err != nil {
		return fail(exitUsage, err)
	}
	var pe *dls.PosError
	switch err := simplan.RunPlan(ctx, entries, grid, o.jobOptions(), o.out, simWarn(e)); {
	case errors.Is(err, context.Canceled):
		return fail(exitInterrupted, "interrupted; nothing written")
	case errors.As(err, &pe):
		return fail(exitUsage, err)
	case err != nil:
		return fail(exitFatal, err)
	}
	fmt.Fprintf(e.stderr, "dlsbatch simulate: wrote %d files and truth.json to %s\n", len(entries), o.out)
	return exitOK
}
