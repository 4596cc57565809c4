package main

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"runtime"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"dlsbatch/contin"
	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/batch"
	"dlsbatch/dls/medium"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/spec"
	"dlsbatch/dls/uncert"
	"dlsbatch/io/batchrun"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/profile"
	"dlsbatch/io/progress"
	"dlsbatch/io/qcfile"
	"dlsbatch/io/report"
	"dlsbatch/io/safetext"
	"dlsbatch/io/sheet"
	"dlsbatch/io/solventfile"
	"dlsbatch/io/specfile"
)

// runOptions are the flags of `dlsbatch run`.
type runOptions struct {
	set, defaults paramsFlag
	read          csvdata.Options // foreign columns, decimal comma, lines to skip, limits

	prof                                                     profile.Files
	out, particleRI                                          string // output folder; default particle index
	solventFile, sheetFile, specFile, qcFile                 string // tables
	includeGlobs, excludeGlobs                               []string
	shard                                                    string
	corrKind, method, criterion, progress, peakNoise         *enumFlag
	jobs, order, gridPoints, maxFileMB                       int
	cutoff, minLagS, lambda, target, jointTarget             float64
	uTempK, uViscRel, uIndex, uAngleDeg                      float64 // Type B uncertainties
	quiet, force, resume, extrapolate, noCurves, implausible bool
	exclude, noReport, noDist, fullScan                      bool
}

func newRunOptions() *runOptions {
	d := cumulants.DefaultSettings()
	return &runOptions{
		set:       paramsFlag{flag: "set", origin: dls.OriginFlag},
		defaults:  paramsFlag{flag: "default", origin: dls.OriginDefault},
		corrKind:  newEnum("", "g2", "g2m1", "g1"),
		progress:  newEnum(progress.Auto, progress.Modes()...),
		method:    newEnum(d.Method.String(), "nonlinear", "linear"),
		peakNoise: newEnum(batch.PeakNoiseAuto.String(), batch.PeakNoiseChoices()...),
		criterion: newEnum(contin.ProbReject.String(), contin.Criteria()...),
		order:     d.Order,
		cutoff:    d.Cutoff,
	}
}

func (o *runOptions) addFlags(fs *pflag.FlagSet) {
	fs.StringVarP(&o.out, "out", "o", "", "folder for results.csv and results.json (required; must not lie inside an input folder)")
	fs.IntVarP(&o.jobs, "jobs", "j", runtime.NumCPU(), "files analysed in parallel; output is the same for any value")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "print no summary and no progress")
	fs.Var(o.progress, "progress", "progress on stderr: auto (a bar on a terminal, else a line every 10 % or 10 s), bar, lines or none")
	fs.BoolVar(&o.force, "force", false, "replace results already in the --out folder")
	fs.BoolVar(&o.resume, "resume", false, "after a run into --out was killed or interrupted, analyse only the files it had not finished (implies --force)")
	fs.Var(&o.set, "set", "metadata for every measurement, over file and sheet values (repeatable), e.g. --set temperature_c=25")
	fs.Var(&o.defaults, "default", "metadata used where no file or sheet gives it (repeatable), e.g. --default angle_deg=173")
	fs.StringVar(&o.read.TauColumn, "lag-column", "", "name of the lag column in a foreign CSV")
	fs.StringVar(&o.read.TauUnit, "lag-unit", "", "unit of the lag column: s, ms or us (a unit in the column's name must agree)")
	fs.BoolVar(&o.read.DecimalComma, "decimal-comma", false, "read ',' in numbers as the decimal mark also in ','-delimited files (';' and tab files always)")
	fs.IntVar(&o.read.SkipLines, "skip-lines", 0, "skip this many lines at the start of every input file (an instrument's preamble)")
	fs.StringSliceVar(&o.read.CorrColumns, "corr-column", nil, "correlation column(s) to read in a foreign CSV, each one run (comma-separated or repeated)")
	fs.Var(o.corrKind, "corr-kind", "kind of the --corr-column values: g2 (baseline ≈ 1), g2m1 (g2 − 1) or g1")
	fs.IntVar(&o.maxFileMB, "max-file-mb", csvdata.DefaultMaxBytes>>20, "refuse an input file larger than this many MiB")
	fs.IntVar(&o.read.MaxRows, "max-rows", csvdata.DefaultMaxRows, "refuse an input file with more data rows (lag channels)")
	fs.IntVar(&o.read.MaxColumns, "max-columns", csvdata.DefaultMaxColumns, "refuse an input file with more columns")
	fs.StringVar(&o.read.SigmaColumn, "sigma-column", "", "column with the standard uncertainty of each correlation value")
	fs.Var(o.method, "cumulant-method", "cumulant fit: nonlinear (free baseline, default) or linear (fixed far-channel baseline)")
	fs.IntVar(&o.order, "cumulant-order", o.order, "cumulant order, 2 or 3")
	fs.Float64Var(&o.cutoff, "g1-cutoff", o.cutoff, "end the fit where the estimated g1 falls below this amplitude")
	fs.Float64Var(&o.minLagS, "min-lag-s", 0, "ignore channels below this lag in s (afterpulsing, dead time)")
	fs.BoolVar(&o.extrapolate, "extrapolate", false, "allow solvent correlations outside their valid range (every result touched is a warning)")
	fs.StringArrayVar(&o.includeGlobs, "include", nil, "analyse only files matching this glob (name, or path below the input root if it has a '/'; repeatable)")
	fs.StringArrayVar(&o.excludeGlobs, "exclude", nil, "leave out files matching this glob (repeatable)")
	fs.StringVar(&o.shard, "shard", "", "analyse part K of the batch split N ways (K/N, K = 0…N−1; auto: from Slurm's or Kubernetes' array index; merge the parts with 'dlsbatch merge')")
	o.prof.AddFlags(fs, "run")
	fs.BoolVar(&o.implausible, "allow-implausible", false, "analyse metadata values outside their physically plausible range (each such result is a warning, not an error)")
	fs.BoolVar(&o.noCurves, "no-curves", false, "leave fitted curves and residuals out of results.json")
	fs.StringVar(&o.solventFile, "solvent-file", "", "CSV of extra or replacement solvents (see 'dlsbatch solvents --help')")
	fs.StringVar(&o.sheetFile, "sheet", "", "sample sheet (CSV): per-file sample, lot, product, role and conditions")
	fs.StringVar(&o.specFile, "spec", "", "specification (CSV): limits per product; verdicts and system suitability")
	fs.StringVar(&o.qcFile, "qc-thresholds", "", "site QC thresholds (CSV key,value): replace the defaults of the keys listed (format: 'dlsbatch flags --help')")
	fs.BoolVar(&o.exclude, "exclude-outliers", false, "leave outlier runs out of each sample's statistics (they are flagged either way)")
	fs.BoolVar(&o.noReport, "no-report", false, "do not write the HTML report (DIR/report/)")
	fs.BoolVar(&o.noDist, "no-distribution", false, "cumulants only: skip the size distributions")
	fs.BoolVar(&o.fullScan, "full-alpha-scan", false, "solve and record every regularisation strength of the lattice (audit), not only those the search needs")
	fs.Var(o.criterion, "alpha-criterion", "choice of the regularisation strength: probability to reject (Provencher), gcv, l-curve, or fixed (with --alpha-lambda)")
	fs.Float64Var(&o.lambda, "alpha-lambda", 0, "dimensionless strength λ (α² = λ·tr(A'WA)/tr(L'L)) for --alpha-criterion fixed")
	fs.Float64Var(&o.target, "prob-reject-target", contin.DefaultTargetProbReject, "target probability to reject for the default criterion")
	fs.Float64Var(&o.jointTarget, "joint-prob-reject-target", batch.DefaultJointTargetProbReject, "target probability to reject of each sample's joint analysis of its runs, with the default criterion (weaker than a run's: see DEVELOPERS.md; 0: the runs' target)")
	fs.Var(o.peakNoise, "peak-uncertainty", "noise of the peaks' uncertainties: auto (the correlator model when the residuals are correlated from lag to lag), correlator-model (data from a correlator), residuals (noise independent from lag to lag)")
	fs.IntVar(&o.gridPoints, "grid-points", contin.DefaultNGamma, "points of the log-spaced decay-rate grid of the inversion")
	fs.StringVar(&o.particleRI, "default-particle-ri", "1.59+0i", "particle refractive index (complex, e.g. 1.59+0i) where a measurement gives none; only the volume and number weightings use it")
	fs.Float64Var(&o.uTempK, "u-temperature-k", uncert.DefaultTemperatureUncertaintyK, "standard uncertainty of the sample temperature, K (GUM budget)")
	fs.Float64Var(&o.uViscRel, "u-viscosity-rel", 0, "relative standard uncertainty of the viscosity (0: from the correlation, 1 % for IAPWS water, 3 % for DIPPR-101)")
	fs.Float64Var(&o.uIndex, "u-refractive-index", uncert.DefaultIndexUncertainty, "standard uncertainty of the medium's refractive index")
	fs.Float64Var(&o.uAngleDeg, "u-angle-deg", uncert.DefaultAngleUncertaintyRad*180/math.Pi, "standard uncertainty of the scattering angle, degrees")
}

func runRun(ctx context.Context, e env, a []string) int   { return runBatch(ctx, e, a, "run") }
func runWatch(ctx context.Context, e env, a []string) int { return runBatch(ctx, e, a, "watch") }

// runBatch is run, or watch: the same run again after every change of the
// folder (each file analysed once, as it is complete).
func runBatch(ctx context.Context, e env, args []string, name string) int {
	o := newRunOptions()
	fs := pflag.NewFlagSet(name, pflag.ContinueOnError)
	o.addFlags(fs)
	settle := fs.Duration("settle", 2*time.Second, "watch: a file is complete when its size and time have not changed for this long")
	poll := fs.Duration("poll", 2*time.Second, "watch: look at the folder this often (network shares send no events)")
	if name == "run" { // the flags exist: MarkHidden cannot fail
		_, _ = fs.MarkHidden("settle"), fs.MarkHidden("poll")
	}
	if code, done := parseFlags(fs, e, name, help(name), help(name+".exits"), args); done {
		return code
	}
	say := func(msg any) { fmt.Fprintln(e.stderr, "dlsbatch "+name+":", safetext.Terminal(fmt.Sprint(msg))) }
	fail := func(code int, msg any) int { say(msg); return code }
	paths := fs.Args()
	switch {
	case len(paths) == 0:
		return fail(exitUsage, "name at least one file or folder")
	case o.out == "":
		return fail(exitUsage, "--out DIR is required")
	}
	cfg, err := o.config(paths, say)
	if err != nil {
		return fail(exitUsage, err)
	}
	endProfiles, err := o.prof.Begin(func(err error) { say(err) })
	if err != nil {
		return fail(exitUsage, err)
	}
	defer endProfiles()
	if mode := o.progress.value; !o.quiet && mode != progress.None {
		bars := progress.New(e.stderr, mode, e.stderrIsTerminal, "dlsbatch run: ")
		cfg.Progress = bars.Update
		defer bars.Done()
	}
	if name == "watch" {
		cfg.Progress = nil
		err := batchrun.Watch(ctx, &batchrun.WatchConfig{Run: *cfg, Settle: *settle, Poll: *poll,
			Updated: func(r *batchrun.Outcome, files int) {
				say(fmt.Sprintf("%s updated: %d files, %d measurements (%d ok, %d warn, %d error)",
					o.out, files, r.Counts.Total, r.Counts.OK, r.Counts.Warn, r.Counts.Error))
			}})
		switch {
		case errors.Is(err, batchrun.ErrUsage): // a folder in use, say
			return fail(exitUsage, strings.TrimPrefix(err.Error(), batchrun.ErrUsage.Error()+": "))
		case err != nil:
			return fail(exitFatal, err)
		}
		return exitOK
	}
	res, err := batchrun.Run(ctx, cfg)
	switch {
	case errors.Is(err, batchrun.ErrUsage):
		return fail(exitUsage, strings.TrimPrefix(err.Error(), batchrun.ErrUsage.Error()+": "))
	case errors.Is(err, batchrun.ErrWriteInterrupted):
		return fail(exitInterrupted, err)
	case err != nil:
		return fail(exitFatal, err)
	case !res.Complete:
		return fail(exitInterrupted, fmt.Sprintf("interrupted: %d measurements finished; %s holds them, marked incomplete (no verdicts)",
			len(res.Results), o.out))
	}
	if !o.quiet {
		if err := report.WriteSummary(e.stdout, res.Results, res.Samples, res.Batch, res.Problems); err != nil {
			say(err)
		}
		what := "results.csv, samples.csv, results.json, manifest.json"
		if !o.noReport {
			what += ", report/index.html"
		}
		fmt.Fprintf(e.stdout, "results: %s (%s)\n%s\n", o.out, what, report.Caution)
	}
	return exitCode(res.Counts, res.Batch)
}

// config turns the flags into the run's configuration, reading the
// sample sheet, specification and thresholds file (errors are usage
// errors).
func (o *runOptions) config(paths []string, say func(any)) (*batchrun.Config, error) {
	settings, readOpts, err := o.settings()
	if err != nil {
		return nil, err
	}
	if err := batchrun.CheckPatterns(o.includeGlobs, o.excludeGlobs); err != nil {
		return nil, err
	}
	var shard batchrun.Shard
	if o.shard != "" {
		if shard, err = batchrun.ShardFromEnv(o.shard, os.Getenv); err != nil {
			return nil, err
		}
	}
	cfg := &batchrun.Config{Paths: paths, Out: o.out, Force: o.force || o.resume, Resume: o.resume, Settings: settings, Read: readOpts,
		Include: o.includeGlobs, Exclude: o.excludeGlobs, Shard: shard,
		SheetFile: o.sheetFile, SpecFile: o.specFile, SolventFile: o.solventFile, QCFile: o.qcFile,
		ExcludeOutliers: o.exclude, HTMLReport: !o.noReport, Workers: o.jobs, UAngleDeg: o.uAngleDeg,
		Warn: func(msg string) { say(msg) }}
	var errSheet, errSpec error // both reported at once
	cfg.Sheet, errSheet = sheet.Load(o.sheetFile)
	if cfg.Spec, errSpec = specfile.Load(o.specFile); errSheet != nil || errSpec != nil {
		return nil, errors.Join(errSheet, errSpec)
	}
	if o.qcFile != "" {
		if cfg.Settings.QC, err = qcfile.ReadFile(o.qcFile, settings.QC); err != nil {
			return nil, err
		}
	}
	return cfg, nil
}

// exitCode maps the outcome of a finished run to the documented codes; the
// verdicts outrank the analysis: an invalid batch, then failed samples, then
// measurements that could not be analysed.
func exitCode(c dls.Counts, b spec.Batch) int {
	switch {
	case c.Total == 0 || c.Error == c.Total:
		return exitFatal
	case b.Specified && !b.Valid:
		return exitInvalid
	case b.Fail > 0:
		return exitSpecFailed
	case c.Error > 0:
		return exitSomeFailed
	}
	return exitOK
}

// settings turns the flags into analysis and reading settings.
func (o *runOptions) settings() (batch.Settings, *csvdata.Options, error) {
	s := batch.DefaultSettings()
	m, err1 := cumulants.ParseMethod(o.method.value)
	crit, err2 := contin.ParseCriterion(o.criterion.value)
	s.Distribution.PeakNoise, _ = batch.ParsePeakNoise(o.peakNoise.value) // the enum flag allows only its names
	ri, err3 := mie.ParseComplexIndex(o.particleRI)
	if err3 != nil {
		err3 = fmt.Errorf("--default-particle-ri: %w", err3)
	}
	if err := errors.Join(err1, err2, err3); err != nil {
		return s, nil, err
	}
	c := &s.Cumulants
	c.Method, c.Order, c.Cutoff, c.MinTauS = m, o.order, o.cutoff, o.minLagS
	s.Overrides, s.Defaults = o.set.params, append(o.defaults.params, s.Defaults...)
	s.Extrapolate, s.KeepCurves = o.extrapolate, !o.noCurves
	s.AllowImplausible = o.implausible
	u := &s.Uncertainty
	u.TemperatureK, u.ViscosityRel, u.RefractiveIndex, u.AngleRad = o.uTempK, o.uViscRel, o.uIndex, o.uAngleDeg*math.Pi/180
	if o.uViscRel > 0 {
		u.ViscosityBasis = "stated with --u-viscosity-rel"
	}
	d := &s.Distribution
	d.Enabled, d.Contin.Criterion, d.Contin.TargetProbReject, d.Contin.FullScan = !o.noDist, crit, o.target, o.fullScan
	if crit == contin.Fixed {
		d.Contin.Lambda = o.lambda
	}
	d.Grid.NGamma, d.DefaultParticleRI, d.JointTargetProbReject = o.gridPoints, ri, o.jointTarget
	if err := s.Validate(); err != nil {
		return s, nil, err
	}
	if o.solventFile != "" {
		s.Solvents = medium.NewDefaultTable()
		if err := solventfile.Load(o.solventFile, s.Solvents); err != nil {
			return s, nil, err
		}
	}
	ro := &o.read
	if o.jobs < 1 || o.maxFileMB < 1 || ro.MaxRows < 1 || ro.MaxColumns < 1 || ro.SkipLines < 0 {
		return s, nil, errors.New("--jobs, --max-file-mb, --max-rows and --max-columns must be at least 1, --skip-lines at least 0")
	}
	if ro.MaxBytes = int64(o.maxFileMB) << 20; o.corrKind.value != "" {
		if ro.CorrKind, err1 = dls.ParseCorrKind(o.corrKind.value); err1 != nil {
			return s, nil, err1
		}
	}
	return s, ro, nil
}
