package main

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"sync"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/pflag"

	"dlsbatch/contin"
	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/batch"
	"dlsbatch/dls/medium"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/qc"
	"dlsbatch/dls/spec"
	"dlsbatch/dls/uncert"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/report"
	"dlsbatch/io/sheet"
	"dlsbatch/io/solventfile"
	"dlsbatch/io/specfile"
)

// runOptions are the flags of `dlsbatch run`.
type runOptions struct {
	out      string
	jobs     int
	quiet    bool
	force    bool
	set      paramsFlag
	defaults paramsFlag

	tauCol, tauUnit, sigmaCol string
	corrCols                  []string
	corrKind                  *enumFlag

	method      *enumFlag
	order       int
	cutoff      float64
	minLagS     float64
	extrapolate bool
	implausible bool
	noCurves    bool
	solventFile string
	sheetFile   string
	specFile    string
	exclude     bool
	noReport    bool
	uTempK      float64
	uViscRel    float64
	uIndex      float64
	uAngleDeg   float64

	noDist     bool
	criterion  *enumFlag
	lambda     float64
	target     float64
	gridPoints int
	particleRI string
}

func newRunOptions() *runOptions {
	d := cumulants.DefaultSettings()
	return &runOptions{
		set:      paramsFlag{flag: "set", origin: dls.OriginFlag},
		defaults: paramsFlag{flag: "default", origin: dls.OriginDefault},
		corrKind: newEnum("", "g2", "g2m1", "g1"),
		method:   newEnum(d.Method.String(), "nonlinear", "linear"),
		criterion: newEnum(contin.ProbReject.String(), contin.ProbReject.String(), contin.GCV.String(),
			contin.LCurve.String(), contin.Fixed.String()),
		order:  d.Order,
		cutoff: d.Cutoff,
	}
}

func (o *runOptions) addFlags(fs *pflag.FlagSet) {
	fs.StringVarP(&o.out, "out", "o", "", "folder for results.csv and results.json (required; must not lie inside an input folder)")
	fs.IntVarP(&o.jobs, "jobs", "j", runtime.NumCPU(), "files analysed in parallel; output is the same for any value")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "print no summary and no progress")
	fs.BoolVar(&o.force, "force", false, "replace results already in the --out folder")
	fs.Var(&o.set, "set", "metadata for every measurement, over file and sheet values (repeatable), e.g. --set temperature_c=25")
	fs.Var(&o.defaults, "default", "metadata used where no file or sheet gives it (repeatable), e.g. --default angle_deg=173")
	fs.StringVar(&o.tauCol, "lag-column", "", "name of the lag column in a foreign CSV")
	fs.StringVar(&o.tauUnit, "lag-unit", "", "unit of the lag column: s, ms or us")
	fs.StringSliceVar(&o.corrCols, "corr-column", nil, "correlation column(s) to read in a foreign CSV, each one run (comma-separated or repeated)")
	fs.Var(o.corrKind, "corr-kind", "kind of the --corr-column values: g2 (baseline ≈ 1), g2m1 (g2 − 1) or g1")
	fs.StringVar(&o.sigmaCol, "sigma-column", "", "column with the standard uncertainty of each correlation value")
	fs.Var(o.method, "cumulant-method", "cumulant fit: nonlinear (free baseline, default) or linear (fixed far-channel baseline)")
	fs.IntVar(&o.order, "cumulant-order", o.order, "cumulant order, 2 or 3")
	fs.Float64Var(&o.cutoff, "g1-cutoff", o.cutoff, "end the fit where the estimated g1 falls below this amplitude")
	fs.Float64Var(&o.minLagS, "min-lag-s", 0, "ignore channels below this lag in s (afterpulsing, dead time)")
	fs.BoolVar(&o.extrapolate, "extrapolate", false, "allow solvent correlations outside their valid range (every result touched is a warning)")
	fs.BoolVar(&o.implausible, "allow-implausible", false, "analyse metadata values outside their physically plausible range (each such result is a warning, not an error)")
	fs.BoolVar(&o.noCurves, "no-curves", false, "leave fitted curves and residuals out of results.json")
	fs.StringVar(&o.solventFile, "solvent-file", "", "CSV of extra or replacement solvents (see 'dlsbatch solvents --help')")
	fs.StringVar(&o.sheetFile, "sheet", "", "sample sheet (CSV): per-file sample, lot, product, role and conditions")
	fs.StringVar(&o.specFile, "spec", "", "specification (CSV): limits per product; verdicts and system suitability")
	fs.BoolVar(&o.exclude, "exclude-outliers", false, "leave outlier runs out of each sample's statistics (they are flagged either way)")
	fs.BoolVar(&o.noReport, "no-report", false, "do not write the HTML report (DIR/report/)")
	fs.BoolVar(&o.noDist, "no-distribution", false, "cumulants only: skip the size distributions")
	fs.Var(o.criterion, "alpha-criterion", "choice of the regularisation strength: probability to reject (Provencher), gcv, l-curve, or fixed (with --alpha-lambda)")
	fs.Float64Var(&o.lambda, "alpha-lambda", 0, "dimensionless strength λ (α² = λ·tr(A'WA)/tr(L'L)) for --alpha-criterion fixed")
	fs.Float64Var(&o.target, "prob-reject-target", contin.DefaultTargetProbReject, "target probability to reject for the default criterion")
	fs.IntVar(&o.gridPoints, "grid-points", contin.DefaultNGamma, "points of the log-spaced decay-rate grid of the inversion")
	fs.StringVar(&o.particleRI, "default-particle-ri", "1.59+0i", "particle refractive index (complex, e.g. 1.59+0i) where a measurement gives none; only the volume and number weightings use it")
	fs.Float64Var(&o.uTempK, "u-temperature-k", uncert.DefaultTemperatureUncertaintyK, "standard uncertainty of the sample temperature, K (GUM budget)")
	fs.Float64Var(&o.uViscRel, "u-viscosity-rel", 0, "relative standard uncertainty of the viscosity (0: from the correlation, 1 % for IAPWS water, 3 % for DIPPR-101)")
	fs.Float64Var(&o.uIndex, "u-refractive-index", uncert.DefaultIndexUncertainty, "standard uncertainty of the medium's refractive index")
	fs.Float64Var(&o.uAngleDeg, "u-angle-deg", uncert.DefaultAngleUncertaintyRad*180/math.Pi, "standard uncertainty of the scattering angle, degrees")
}

const runUsage = `Usage: dlsbatch run [flags] PATH... --out DIR

Reads every correlogram CSV named, or found below a named folder (*.csv,
recursively), and for each measurement fits cumulants (z-average, PDI),
inverts it into intensity, volume and number size distributions, and
states the z-average's uncertainty. Writes to DIR:
  results.csv    one row per measurement
  samples.csv    one row per sample: statistics, QC flags, verdict
  results.json   the same with curves, distributions, budgets, provenance
  report/        an offline HTML report (index.html)
  manifest.json  SHA-256 of every input and output, and the settings
Input files are only ever read.

Metadata precedence, highest first: --set, sample sheet, the file's
'# key: value' lines, --default, built-in default (solvent water).

Flags:
`

func runRun(ctx context.Context, e env, args []string) int {
	o := newRunOptions()
	fs := pflag.NewFlagSet("run", pflag.ContinueOnError)
	o.addFlags(fs)
	if code, done := parseFlags(fs, e, "run", runUsage, args); done {
		return code
	}
	say := func(msg any) { fmt.Fprintln(e.stderr, "dlsbatch run:", msg) }
	fail := func(code int, msg any) int { say(msg); return code }
	paths := fs.Args()
	switch {
	case len(paths) == 0:
		return fail(exitUsage, "name at least one file or folder")
	case o.out == "":
		return fail(exitUsage, "--out DIR is required")
	}
	settings, readOpts, err := o.settings()
	if err != nil {
		return fail(exitUsage, err)
	}
	if err := csvdata.CheckOutside(o.out, paths); err != nil {
		return fail(exitUsage, err)
	}
	if !o.force {
		for _, name := range []string{report.ResultsCSV, report.SamplesCSV, report.ResultsJSON, report.ManifestJSON} {
			if _, err := os.Stat(filepath.Join(o.out, name)); err == nil {
				return fail(exitUsage, filepath.Join(o.out, name)+" already exists; use --force to replace it")
			}
		}
	}
	var sh *sheet.Sheet
	if o.sheetFile != "" {
		if sh, err = sheet.ReadFile(o.sheetFile); err != nil {
			return fail(exitUsage, fmt.Errorf("sample sheet: %w", err))
		}
	}
	var sp *spec.Spec
	if o.specFile != "" {
		if sp, err = specfile.ReadFile(o.specFile); err != nil {
			return fail(exitUsage, fmt.Errorf("specification: %w", err))
		}
	}

	files, derrs := csvdata.Discover(paths)
	for _, err := range derrs {
		say(err)
	}
	if len(files) == 0 {
		return fail(exitFatal, "no correlogram files (*.csv) found")
	}
	rels := csvdata.RelativePaths(files, paths)
	var match *sheet.MatchReport
	if sh != nil {
		match = sh.Check(o.sheetFile, files, rels)
		for _, f := range match.UnmatchedFiles {
			say(f + ": no row of the sample sheet matches this file")
		}
		for _, msg := range match.UnusedRows {
			say(msg)
		}
	}

	rn := &batch.Runner{
		Read: func(path string) []batch.Input {
			in := csvdata.ReadFile(path, readOpts)
			for _, x := range in {
				if sh != nil && x.M != nil {
					sh.Apply(x.M, rels[path])
				}
			}
			return in
		},
		Settings: settings,
		Workers:  o.jobs,
	}
	if e.stderrIsTerminal && !o.quiet {
		bar := progressbar.NewOptions(len(files),
			progressbar.OptionSetWriter(e.stderr),
			progressbar.OptionSetDescription("analysing"),
			progressbar.OptionShowCount(),
			progressbar.OptionClearOnFinish())
		var mu sync.Mutex
		rn.Progress = func(string) {
			mu.Lock()
			bar.Add(1)
			mu.Unlock()
		}
		defer bar.Finish()
	}
	results, runErr := rn.Run(ctx, files)
	groups := batch.Groups(results)
	samples := qc.Aggregate(results, qc.Options{Thresholds: settings.QC, ExcludeOutliers: o.exclude})
	outcome := spec.Evaluate(sp, samples, results)
	doc := &report.Document{
		Tool: "dlsbatch", Version: version, Caution: report.Caution, Settings: o.record(settings),
		Counts: dls.CountResults(results), Batch: outcome, Sheet: match, Groups: &groups,
		Samples: samples, Results: results,
	}
	set := &report.Set{Doc: doc, HTMLReport: !o.noReport, Inputs: files}
	for _, t := range []string{o.sheetFile, o.specFile, o.solventFile} {
		if t != "" {
			set.Tables = append(set.Tables, t)
		}
	}
	if err := report.WriteSet(o.out, set); err != nil {
		return fail(exitFatal, err)
	}
	if !o.quiet {
		if err := report.WriteSummary(e.stdout, results, samples, outcome, 10); err != nil {
			say(err)
		}
		what := "results.csv, samples.csv, results.json, manifest.json"
		if !o.noReport {
			what += ", report/index.html"
		}
		fmt.Fprintf(e.stdout, "results: %s (%s)\n%s\n", o.out, what, report.Caution)
	}
	if runErr != nil {
		return fail(exitInterrupted, fmt.Sprintf("interrupted; the %d results finished are written", len(results)))
	}
	return exitCode(doc.Counts, outcome)
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
	d.Enabled, d.Contin.Criterion, d.Contin.TargetProbReject = !o.noDist, crit, o.target
	if crit == contin.Fixed {
		d.Contin.Lambda = o.lambda
	}
	d.Grid.NGamma, d.DefaultParticleRI = o.gridPoints, ri
	if err := s.Validate(); err != nil {
		return s, nil, err
	}
	if o.solventFile != "" {
		s.Solvents = medium.NewDefaultTable()
		if err := solventfile.Load(o.solventFile, s.Solvents); err != nil {
			return s, nil, err
		}
	}
	ro := &csvdata.Options{TauColumn: o.tauCol, TauUnit: o.tauUnit, CorrColumns: o.corrCols, SigmaColumn: o.sigmaCol}
	if o.corrKind.value != "" {
		k, err := dls.ParseCorrKind(o.corrKind.value)
		if err != nil {
			return s, nil, err
		}
		ro.CorrKind = k
	}
	return s, ro, nil
}

// record is the settings record of results.json and the manifest.
func (o *runOptions) record(s batch.Settings) *report.Settings {
	return &report.Settings{
		AllowImplausible: s.AllowImplausible, AlphaCriterion: s.Distribution.Contin.Criterion.String(), AlphaLambda: s.Distribution.Contin.Lambda,
		BoltzmannJPerK: dls.BoltzmannJPerK, CorrColumns: o.corrCols, CorrKind: o.corrKind.value,
		CoverageFactor: s.CoverageFactor, CumulantMethod: s.Cumulants.Method.String(), CumulantOrder: s.Cumulants.Order,
		Default: dls.Assignments(s.Defaults), DefaultParticleRI: mie.FormatComplexIndex(s.Distribution.DefaultParticleRI),
		Distribution: s.Distribution.Enabled, ExcludeOutliers: o.exclude, Extrapolate: s.Extrapolate,
		G1Cutoff: s.Cumulants.Cutoff, GridPoints: s.Distribution.Grid.NGamma, LagColumn: o.tauCol, LagUnit: o.tauUnit,
		MinLagS: s.Cumulants.MinTauS, MinPoints: s.Cumulants.MinPoints,
		ProbRejectTarget: s.Distribution.Contin.TargetProbReject, QCThresholds: s.QC, RangeCheck: s.Cumulants.RangeCheck,
		Set: dls.Assignments(s.Overrides), Sheet: o.sheetFile, SigmaColumn: o.sigmaCol, SolventFile: o.solventFile, Spec: o.specFile,
		UAngleDeg: o.uAngleDeg, URefractiveIndex: s.Uncertainty.RefractiveIndex, UTemperatureK: s.Uncertainty.TemperatureK,
		UViscosityRel: o.uViscRel,
	}
}
