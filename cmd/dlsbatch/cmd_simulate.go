package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/gocarina/gocsv"
	"github.com/spf13/pflag"

	"dlsbatch/dls"
	"dlsbatch/dls/medium"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/sim"
	"dlsbatch/io/csvdata"
)

// simJob is one output file of `dlsbatch simulate`: one sample under one
// set of conditions, with one or more runs.
type simJob struct {
	file, sample, population, solvent, material, particleRI string

	tempC, lambdaNm, angleDeg, viscMPaS, mediumRI float64
	rateKcps, durS, beta, baseline                float64

	runs, dust int
	seed       uint64
	sigma      bool
}

// simOptions are the flags of `dlsbatch simulate`. In plan mode they are
// the defaults of every empty plan cell.
type simOptions struct {
	job simJob

	plan, out, output, truth string
	force, noNoise, extrap   bool
	pol                      *enumFlag

	dtNs               float64
	perStage, channels int
	tauMaxS            float64
}

func newSimOptions() *simOptions {
	d := sim.DefaultConfig()
	g := sim.DefaultGridSpec()
	return &simOptions{
		job: simJob{
			sample: "simulated", population: "mono(100nm)", solvent: "water",
			tempC: 25, lambdaNm: 632.8, angleDeg: 173,
			rateKcps: d.CountRateHz / 1e3, durS: d.DurationS, beta: d.Beta, baseline: 1,
			runs: 1, seed: d.Seed,
		},
		pol:      newEnum("vertical", "vertical", "unpolarized"),
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
	fs.StringVar(&j.sample, "sample", j.sample, "sample name written into the file")
	fs.StringVar(&j.population, "population", j.population,
		"particle population: mono(SIZE), lognormal(SIZE,WIDTH,number|intensity), or a mixture "+
			"such as 70%mono(30nm)+30%mono(300nm)@intensity (WIDTH is the standard deviation of ln d; SIZE in nm or um)")
	fs.StringVar(&j.solvent, "solvent", j.solvent, "solvent from the solvent table (viscosity and index at the temperature and wavelength)")
	fs.Float64Var(&j.tempC, "temperature-c", j.tempC, "sample temperature in °C")
	fs.Float64Var(&j.lambdaNm, "wavelength-nm", j.lambdaNm, "laser vacuum wavelength in nm")
	fs.Float64Var(&j.angleDeg, "angle-deg", j.angleDeg, "scattering angle in degrees")
	fs.Float64Var(&j.viscMPaS, "viscosity-mpas", 0, "medium viscosity in mPa·s instead of the solvent table's (written into the file)")
	fs.Float64Var(&j.mediumRI, "refractive-index", 0, "medium refractive index instead of the solvent table's (written into the file)")
	fs.StringVar(&j.material, "material", "", "particle material for Mie weighting, index taken from the material table at the wavelength (e.g. polystyrene, Au, SiO2_fused)")
	fs.StringVar(&j.particleRI, "particle-ri", "", "particle complex index n+ki for Mie weighting, e.g. 1.59+0i (overrides --material); without either, Rayleigh d⁶ weighting")
	fs.Var(o.pol, "polarization", "laser polarisation for the Mie weights: vertical (|S1|²) or unpolarized")
	fs.Float64Var(&j.rateKcps, "count-rate-kcps", j.rateKcps, "mean detected count rate of the sample in kcps")
	fs.Float64Var(&j.durS, "duration-s", j.durS, "duration of one run in s")
	fs.Float64Var(&j.beta, "beta", j.beta, "coherence factor β (intercept of g2 − 1), in (0, 1]")
	fs.Float64Var(&j.baseline, "baseline", j.baseline, "baseline B of g2 = B·(1 + β·g1²); 1.002 simulates a 0.2 % baseline error")
	fs.Uint64Var(&j.seed, "seed", j.seed, "random seed; in a plan, rows without a seed use this plus their row number")
	fs.IntVar(&j.runs, "runs", j.runs, "runs per file (columns g2_r1, g2_r2, …)")
	fs.IntVar(&j.dust, "dust-bursts", 0, "dust bursts per run (0: no dust)")
	fs.BoolVar(&j.sigma, "sigma", false, "write the noise model's standard deviation as sigma columns")
	fs.BoolVar(&o.noNoise, "no-noise", false, "write the exact curves (sigma columns still hold the model's noise level)")
	fs.BoolVar(&o.extrap, "extrapolate", false, "allow solvent correlations outside their valid range")
	fs.Float64Var(&o.dtNs, "dt-ns", o.dtNs, "lag grid: sample time of the first stage in ns")
	fs.IntVar(&o.perStage, "per-stage", o.perStage, "lag grid: channels per stage (the first stage has twice as many)")
	fs.IntVar(&o.channels, "channels", o.channels, "lag grid: number of channels (ignored when --tau-max-s is set)")
	fs.Float64Var(&o.tauMaxS, "tau-max-s", 0, "lag grid: longest lag in s (0: use --channels)")
}

const simulateUsage = `Usage: dlsbatch simulate [flags] [-o FILE]
       dlsbatch simulate --plan PLAN.csv --out DIR [flags]

Writes synthetic correlograms (g2 on a multi-tau lag grid, photon-statistics
noise from a Gaussian model) of a stated particle population, in the
correlogram CSV format that 'dlsbatch run' reads, together with the exact
z-average, PDI and mean decay rate of the population (the ground truth).

With --plan, every row of the plan CSV is one output file in DIR, and
DIR/truth.json lists the ground truth of every file. Plan columns (empty
cells take the value of the corresponding flag):
  file (required; a plain name ending in .csv), sample, runs, population,
  solvent, temperature_c, wavelength_nm, angle_deg, viscosity_mpas,
  refractive_index, material, particle_ri, count_rate_kcps, duration_s, beta,
  baseline, seed, dust_bursts, sigma (yes or no).
Lines starting with '#' are comments; quote a population that holds commas,
e.g. "lognormal(120nm,0.31,intensity)". Input files are never overwritten.

Flags:
`

func runSimulate(ctx context.Context, e env, args []string) int {
	o := newSimOptions()
	fs := pflag.NewFlagSet("simulate", pflag.ContinueOnError)
	o.addFlags(fs)
	if code, done := parseFlags(fs, e, "simulate", simulateUsage, args); done {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(e.stderr, "dlsbatch simulate: unexpected argument %q\n", fs.Arg(0))
		return exitUsage
	}
	grid, err := sim.NewGrid(o.gridSpec())
	if err != nil {
		fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
		return exitUsage
	}
	if o.plan == "" {
		if o.out != "" {
			fmt.Fprintln(e.stderr, "dlsbatch simulate: --out needs --plan; use --output for a single file")
			return exitUsage
		}
		return o.runSingle(ctx, e, grid)
	}
	if o.out == "" {
		fmt.Fprintln(e.stderr, "dlsbatch simulate: --plan needs --out DIR")
		return exitUsage
	}
	if o.output != "" || o.truth != "" {
		fmt.Fprintln(e.stderr, "dlsbatch simulate: --output and --truth are for a single file; with --plan everything goes to --out")
		return exitUsage
	}
	return o.runPlan(ctx, e, grid)
}

func (o *simOptions) gridSpec() sim.GridSpec {
	s := sim.GridSpec{DtS: o.dtNs * 1e-9, M: o.perStage, Channels: o.channels, TauMaxS: o.tauMaxS}
	if s.DtS == 0 {
		s.DtS = math.NaN() // zero would silently mean the default
	}
	return s
}

func (o *simOptions) runSingle(ctx context.Context, e env, grid *sim.Grid) int {
	for _, p := range []string{o.output, o.truth} {
		if p == "" || o.force {
			continue
		}
		if _, err := os.Stat(p); err == nil {
			fmt.Fprintf(e.stderr, "dlsbatch simulate: %s exists; use --force to replace it\n", p)
			return exitUsage
		}
	}
	if o.output != "" && o.output == o.truth {
		fmt.Fprintln(e.stderr, "dlsbatch simulate: --output and --truth name the same file")
		return exitUsage
	}
	j := o.job
	j.file = filepath.Base(o.output)
	if o.output == "" {
		j.file = "-"
	}
	res, err := o.simulate(&j, grid, func(_ string, err error) error { return err })
	if err != nil {
		fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
		return exitUsage
	}
	for _, w := range res.warnings {
		fmt.Fprintln(e.stderr, "dlsbatch simulate: warning:", w)
	}
	if o.output == "" {
		if _, err := e.stdout.Write(res.data); err != nil {
			fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
			return exitFatal
		}
	} else if err := os.WriteFile(o.output, res.data, 0o644); err != nil {
		fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
		return exitFatal
	}
	if o.truth != "" {
		if err := os.WriteFile(o.truth, truthJSON([]truthRecord{res.truth}), 0o644); err != nil {
			fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
			return exitFatal
		}
	}
	return exitOK
}

func (o *simOptions) runPlan(ctx context.Context, e env, grid *sim.Grid) int {
	jobs, err := o.readPlan()
	if err != nil {
		fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
		return exitUsage
	}
	if err := checkOutDir(o.out, o.plan, o.force); err != nil {
		fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
		return exitUsage
	}
	results := make([]*simResult, len(jobs))
	for i := range jobs {
		if ctx.Err() != nil {
			fmt.Fprintln(e.stderr, "dlsbatch simulate: interrupted; nothing written")
			return exitInterrupted
		}
		res, err := o.simulate(&jobs[i].job, grid, jobs[i].at)
		if err != nil {
			fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
			return exitUsage
		}
		for _, w := range res.warnings {
			fmt.Fprintf(e.stderr, "dlsbatch simulate: warning: %s:%d: %s\n", o.plan, jobs[i].line, w)
		}
		results[i] = res
	}
	if err := os.MkdirAll(o.out, 0o755); err != nil {
		fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
		return exitFatal
	}
	truths := make([]truthRecord, len(results))
	for i, r := range results {
		if err := os.WriteFile(filepath.Join(o.out, jobs[i].job.file), r.data, 0o644); err != nil {
			fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
			return exitFatal
		}
		truths[i] = r.truth
	}
	sort.Slice(truths, func(a, b int) bool { return truths[a].File < truths[b].File })
	if err := os.WriteFile(filepath.Join(o.out, "truth.json"), truthJSON(truths), 0o644); err != nil {
		fmt.Fprintln(e.stderr, "dlsbatch simulate:", err)
		return exitFatal
	}
	fmt.Fprintf(e.stderr, "dlsbatch simulate: wrote %d files and truth.json to %s\n", len(results), o.out)
	return exitOK
}

// checkOutDir refuses an output folder that exists and holds anything,
// unless force, and one that holds the plan itself.
func checkOutDir(dir, plan string, force bool) error {
	absDir, err := filepath.Abs(dir)
	if err != nil {
		return err
	}
	absPlan, err := filepath.Abs(plan)
	if err != nil {
		return err
	}
	if filepath.Dir(absPlan) == absDir {
		return fmt.Errorf("--out %s holds the plan %s; choose another folder", dir, plan)
	}
	entries, err := os.ReadDir(dir)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return nil
	case err != nil:
		return fmt.Errorf("--out %s: %w", dir, err)
	case len(entries) > 0 && !force:
		return fmt.Errorf("--out %s exists and is not empty; use --force to write into it", dir)
	}
	return nil
}

// simResult is one simulated file, ready to write.
type simResult struct {
	data     []byte
	truth    truthRecord
	warnings []string
}

// truthRecord is one measurement's entry in truth.json.
type truthRecord struct {
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
	Seed           uint64      `json:"seed"`
	ViscositySrc   string      `json:"viscosity_source"`
	RefractiveISrc string      `json:"refractive_index_source"`
}

func num(v float64) json.Number { return json.Number(strconv.FormatFloat(v, 'g', 7, 64)) }

func truthJSON(recs []truthRecord) []byte {
	doc := struct {
		Generator    string        `json:"generator"`
		Note         string        `json:"note"`
		Measurements []truthRecord `json:"measurements"`
	}{
		Generator: "dlsbatch simulate " + version,
		Note: "exact cumulants of each simulated population (dust excluded), by quadrature over the intensity weights: " +
			"gamma_mean_per_s = Σ w Γ, pdi = μ2/Γ̄², z_avg_nm = k_B·T·q²/(3π·η·Γ̄)",
		Measurements: recs,
	}
	b, err := json.MarshalIndent(doc, "", "  ")
	if err != nil {
		panic("dlsbatch: truth.json: " + err.Error())
	}
	return append(b, '\n')
}

// fmtNum writes a metadata number in its shortest exact form.
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// simulate runs one job. at attaches a plan position to an error about a
// plan column.
func (o *simOptions) simulate(j *simJob, grid *sim.Grid, at func(col string, err error) error) (*simResult, error) {
	res := &simResult{}
	pop, err := sim.ParsePopulation(j.population)
	if err != nil {
		return nil, at("population", err)
	}
	sv, err := medium.Lookup(j.solvent)
	if err != nil {
		return nil, at("solvent", err)
	}
	tK := dls.KelvinFromCelsius(j.tempC)
	lambda := j.lambdaNm * 1e-9
	props, err := sv.Props(tK, lambda, o.extrap)
	if err != nil {
		return nil, at("temperature_c", err)
	}
	res.warnings = append(res.warnings, props.Warnings...)
	eta, n := props.ViscosityPaS, props.RefractiveIndex
	etaSrc, nSrc := props.ViscositySource, props.IndexSource
	if j.viscMPaS != 0 {
		eta, etaSrc = j.viscMPaS*1e-3, "given"
	}
	if j.mediumRI != 0 {
		n, nSrc = j.mediumRI, "given"
	}
	cond := sim.Conditions{
		TemperatureK: tK,
		ViscosityPaS: eta,
		Optics:       dls.Optics{WavelengthM: lambda, AngleRad: j.angleDeg * math.Pi / 180, RefractiveIndex: n},
	}
	if err := cond.Validate(); err != nil {
		return nil, at("", err)
	}
	var scatter func(float64) float64
	var scatterErr error
	weighting, riText := "rayleigh d^6", ""
	if j.particleRI != "" || j.material != "" {
		var m complex128
		if j.particleRI != "" {
			if m, err = mie.ParseComplexIndex(j.particleRI); err != nil {
				return nil, at("particle_ri", err)
			}
			weighting = "mie, particle index given"
		} else {
			var src string
			if m, src, err = mie.MaterialIndex(j.material, lambda); err != nil {
				return nil, at("material", err)
			}
			weighting = "mie, " + j.material + " index: " + src
		}
		riText = mie.FormatComplexIndex(m)
		pol := mie.Vertical
		if o.pol.String() == "unpolarized" {
			pol = mie.Unpolarized
		}
		scatter = func(d float64) float64 {
			v, err := mie.Intensity(d, lambda, n, m, cond.Optics.AngleRad, pol)
			if err != nil && scatterErr == nil {
				scatterErr = err
			}
			return v
		}
	}
	model, err := sim.NewModel(pop, cond, scatter)
	if err != nil {
		if scatterErr != nil {
			err = scatterErr
		}
		return nil, at("population", err)
	}
	cfg := sim.Config{
		Grid: grid, Beta: j.beta, Baseline: j.baseline, CountRateHz: j.rateKcps * 1e3,
		DurationS: j.durS, Runs: j.runs, NoNoise: o.noNoise, Seed: j.seed,
	}
	if j.runs < 1 {
		return nil, at("runs", fmt.Errorf("run count %d is below 1", j.runs))
	}
	if j.baseline <= 0 {
		return nil, at("baseline", fmt.Errorf("baseline %g is not positive", j.baseline))
	}
	if j.dust < 0 {
		return nil, at("dust_bursts", fmt.Errorf("dust burst count %d is negative", j.dust))
	}
	if j.dust > 0 {
		cfg.Dust = &sim.Dust{Bursts: j.dust}
	}
	out, err := sim.Simulate(model, &cfg)
	if err != nil {
		return nil, at("", err)
	}
	cols := make([]csvdata.Column, len(out.Runs))
	labels := make([]string, len(out.Runs))
	for i, r := range out.Runs {
		if len(out.Runs) > 1 {
			labels[i] = "r" + strconv.Itoa(i+1)
		}
		cols[i] = csvdata.Column{Label: labels[i], Values: r.G2}
		if j.sigma {
			cols[i].Sigma = r.Sigma
		}
	}
	meta := []dls.Param{
		{Key: dls.KeySample, Value: j.sample},
		{Key: dls.KeyTemperatureC, Value: fmtNum(j.tempC)},
		{Key: dls.KeyWavelengthNm, Value: fmtNum(j.lambdaNm)},
		{Key: dls.KeyAngleDeg, Value: fmtNum(j.angleDeg)},
		{Key: dls.KeySolvent, Value: sv.Name},
	}
	if j.viscMPaS != 0 {
		meta = append(meta, dls.Param{Key: dls.KeyViscosityMPaS, Value: fmtNum(j.viscMPaS)})
	}
	if j.mediumRI != 0 {
		meta = append(meta, dls.Param{Key: dls.KeyRefractiveIndex, Value: fmtNum(j.mediumRI)})
	}
	if riText != "" {
		meta = append(meta, dls.Param{Key: dls.KeyParticleRI, Value: riText})
	}
	meta = append(meta,
		dls.Param{Key: dls.KeyCountRateKcps, Value: fmtNum(j.rateKcps)},
		dls.Param{Key: dls.KeyDurationS, Value: fmtNum(j.durS)})
	var buf bytes.Buffer
	if err := csvdata.Write(&buf, meta, out.TauS, "s", dls.KindG2, cols); err != nil {
		return nil, at("", err)
	}
	res.data = buf.Bytes()
	if len(out.Runs) == 1 {
		labels = []string{""}
	}
	tr := out.Truth
	res.truth = truthRecord{
		File: j.file, Sample: j.sample, Runs: labels, Population: pop.String(),
		ZAvgNm: num(tr.ZAvgM * 1e9), PDI: num(tr.PDI), GammaMeanPerS: num(tr.GammaMeanPerS),
		DiffusionM2PS: num(tr.DiffusionM2PerS), TemperatureC: num(j.tempC), Solvent: sv.Name,
		ViscosityMPaS: num(eta * 1e3), RefractiveIdx: num(n), WavelengthNm: num(j.lambdaNm),
		AngleDeg: num(j.angleDeg), Weighting: weighting, ParticleRI: riText,
		CountRateKcps: num(j.rateKcps), DurationS: num(j.durS), Beta: num(j.beta), Baseline: num(j.baseline),
		DustBursts: j.dust, Seed: j.seed, ViscositySrc: etaSrc, RefractiveISrc: nSrc,
	}
	return res, nil
}

// planRow is one plan record as gocsv maps it; every cell is text so that
// conversion errors can name their cell.
type planRow struct {
	File            string `csv:"file"`
	Sample          string `csv:"sample"`
	Runs            string `csv:"runs"`
	Population      string `csv:"population"`
	Solvent         string `csv:"solvent"`
	TemperatureC    string `csv:"temperature_c"`
	WavelengthNm    string `csv:"wavelength_nm"`
	AngleDeg        string `csv:"angle_deg"`
	ViscosityMPaS   string `csv:"viscosity_mpas"`
	RefractiveIndex string `csv:"refractive_index"`
	Material        string `csv:"material"`
	ParticleRI      string `csv:"particle_ri"`
	CountRateKcps   string `csv:"count_rate_kcps"`
	DurationS       string `csv:"duration_s"`
	Beta            string `csv:"beta"`
	Baseline        string `csv:"baseline"`
	Seed            string `csv:"seed"`
	DustBursts      string `csv:"dust_bursts"`
	Sigma           string `csv:"sigma"`
}

// planColumns lists the plan columns that planRow maps.
var planColumns = []string{"file", "sample", "runs", "population", "solvent", "temperature_c", "wavelength_nm",
	"angle_deg", "viscosity_mpas", "refractive_index", "material", "particle_ri", "count_rate_kcps", "duration_s",
	"beta", "baseline", "seed", "dust_bursts", "sigma"}

// planJob is a plan row turned into a job, with what is needed to point at
// its cells.
type planJob struct {
	job  simJob
	line int
	at   func(col string, err error) error
}

// planReader reads records with encoding/csv for gocsv and keeps the line
// and column of every field.
type planReader struct {
	r   *csv.Reader
	pos [][][2]int
}

func (p *planReader) Read() ([]string, error) {
	rec, err := p.r.Read()
	if err != nil {
		return nil, err
	}
	fp := make([][2]int, len(rec))
	for i := range rec {
		l, c := p.r.FieldPos(i)
		fp[i] = [2]int{l, c}
	}
	p.pos = append(p.pos, fp)
	return rec, nil
}

func (p *planReader) ReadAll() ([][]string, error) {
	var out [][]string
	for {
		rec, err := p.Read()
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return nil, err
		}
		out = append(out, rec)
	}
}

// planRecords hands records already read to gocsv.
type planRecords struct {
	recs [][]string
	i    int
}

func (s *planRecords) Read() ([]string, error) {
	if s.i >= len(s.recs) {
		return nil, io.EOF
	}
	s.i++
	return s.recs[s.i-1], nil
}

func (s *planRecords) ReadAll() ([][]string, error) {
	out := s.recs[s.i:]
	s.i = len(s.recs)
	return out, nil
}

// readPlan reads the plan file into jobs, filling empty cells from the
// flags. Every error is a *dls.PosError naming the plan, line and column.
func (o *simOptions) readPlan() ([]planJob, error) {
	data, err := os.ReadFile(o.plan)
	if err != nil {
		return nil, err
	}
	return parsePlan(data, o.plan, o.job)
}

func parsePlan(data []byte, file string, def simJob) ([]planJob, error) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if bytes.IndexByte(data, 0) >= 0 {
		return nil, &dls.PosError{File: file, Err: dls.ErrNotText}
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	pr := &planReader{r: cr}
	recs, err := pr.ReadAll()
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return nil, &dls.PosError{File: file, Line: pe.Line, Column: pe.Column, Err: pe.Err}
		}
		return nil, &dls.PosError{File: file, Err: err}
	}
	if len(recs) < 2 {
		return nil, &dls.PosError{File: file, Err: fmt.Errorf("no plan rows: %w", dls.ErrEmpty)}
	}
	header := recs[0]
	col := map[string]int{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(h))
		header[i] = h
		p := pr.pos[0][i]
		known := false
		for _, c := range planColumns {
			known = known || c == h
		}
		if !known {
			return nil, &dls.PosError{File: file, Line: p[0], Column: p[1],
				Err: fmt.Errorf("unknown plan column %q (known: %s): %w", h, strings.Join(planColumns, ", "), dls.ErrBadHeader)}
		}
		if _, dup := col[h]; dup {
			return nil, &dls.PosError{File: file, Line: p[0], Column: p[1], Err: fmt.Errorf("column %q given twice: %w", h, dls.ErrBadHeader)}
		}
		col[h] = i
	}
	if _, ok := col["file"]; !ok {
		return nil, &dls.PosError{File: file, Line: pr.pos[0][0][0], Err: fmt.Errorf("the plan has no file column: %w", dls.ErrBadHeader)}
	}
	for i, rec := range recs[1:] {
		if len(rec) != len(header) {
			p := pr.pos[i+1][0]
			return nil, &dls.PosError{File: file, Line: p[0], Column: p[1],
				Err: fmt.Errorf("%d fields, the header has %d: %w", len(rec), len(header), dls.ErrBadHeader)}
		}
	}
	var rows []planRow
	if err := gocsv.UnmarshalCSV(&planRecords{recs: recs}, &rows); err != nil {
		return nil, &dls.PosError{File: file, Line: pr.pos[0][0][0], Err: err}
	}
	seen := map[string]int{}
	jobs := make([]planJob, 0, len(rows))
	for i, r := range rows {
		fp := pr.pos[i+1]
		line := fp[0][0]
		at := func(name string, err error) error {
			if j, ok := col[name]; ok {
				return &dls.PosError{File: file, Line: fp[j][0], Column: fp[j][1], Err: fmt.Errorf("%s: %w", name, err)}
			}
			return &dls.PosError{File: file, Line: line, Err: err}
		}
		j := def
		j.seed = def.seed + uint64(i)
		if err := fillJob(&j, r, at); err != nil {
			return nil, err
		}
		if prev, dup := seen[strings.ToLower(j.file)]; dup {
			return nil, at("file", fmt.Errorf("%q already planned on line %d", j.file, prev))
		}
		seen[strings.ToLower(j.file)] = line
		jobs = append(jobs, planJob{job: j, line: line, at: at})
	}
	return jobs, nil
}

// fillJob copies the non-empty cells of a plan row into j.
func fillJob(j *simJob, r planRow, at func(string, error) error) error {
	f := strings.TrimSpace(r.File)
	switch {
	case f == "":
		return at("file", errors.New("empty file name"))
	case f != filepath.Base(f) || strings.ContainsAny(f, `/\:`) || strings.HasPrefix(f, "."):
		return at("file", fmt.Errorf("%q is not a plain file name", f))
	case !strings.HasSuffix(strings.ToLower(f), ".csv"):
		return at("file", fmt.Errorf("%q does not end in .csv", f))
	}
	j.file = f
	str := func(dst *string, v string) {
		if v = strings.TrimSpace(v); v != "" {
			*dst = v
		}
	}
	str(&j.sample, r.Sample)
	str(&j.population, r.Population)
	str(&j.solvent, r.Solvent)
	str(&j.material, r.Material)
	str(&j.particleRI, r.ParticleRI)
	floats := []struct {
		col string
		v   string
		dst *float64
	}{
		{"temperature_c", r.TemperatureC, &j.tempC}, {"wavelength_nm", r.WavelengthNm, &j.lambdaNm},
		{"angle_deg", r.AngleDeg, &j.angleDeg}, {"viscosity_mpas", r.ViscosityMPaS, &j.viscMPaS},
		{"refractive_index", r.RefractiveIndex, &j.mediumRI}, {"count_rate_kcps", r.CountRateKcps, &j.rateKcps},
		{"duration_s", r.DurationS, &j.durS}, {"beta", r.Beta, &j.beta}, {"baseline", r.Baseline, &j.baseline},
	}
	for _, x := range floats {
		v := strings.TrimSpace(x.v)
		if v == "" {
			continue
		}
		p, err := strconv.ParseFloat(v, 64)
		if err != nil || math.IsNaN(p) || math.IsInf(p, 0) {
			return at(x.col, fmt.Errorf("%q: %w", v, dls.ErrNotANumber))
		}
		*x.dst = p
	}
	ints := []struct {
		col string
		v   string
		dst *int
	}{{"runs", r.Runs, &j.runs}, {"dust_bursts", r.DustBursts, &j.dust}}
	for _, x := range ints {
		v := strings.TrimSpace(x.v)
		if v == "" {
			continue
		}
		p, err := strconv.Atoi(v)
		if err != nil {
			return at(x.col, fmt.Errorf("%q is not a whole number: %w", v, err))
		}
		*x.dst = p
	}
	if v := strings.TrimSpace(r.Seed); v != "" {
		p, err := strconv.ParseUint(v, 10, 64)
		if err != nil {
			return at("seed", fmt.Errorf("%q is not a non-negative whole number: %w", v, err))
		}
		j.seed = p
	}
	switch v := strings.ToLower(strings.TrimSpace(r.Sigma)); v {
	case "":
	case "yes", "true", "1":
		j.sigma = true
	case "no", "false", "0":
		j.sigma = false
	default:
		return at("sigma", fmt.Errorf("%q: want yes or no", v))
	}
	return nil
}
