package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/pflag"

	"dlsbatch/contin"
	"dlsbatch/cumulants"
	"dlsbatch/dls"
	"dlsbatch/dls/batch"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/qc"
	"dlsbatch/dls/spec"
	"dlsbatch/dls/uncert"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/htmlreport"
	"dlsbatch/io/qcfile"
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
	noCurves    bool
	solventFile string
	sheetFile   string
	specFile    string
	qcFile      string
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
	fs.BoolVar(&o.noCurves, "no-curves", false, "leave fitted curves and residuals out of results.json")
	fs.StringVar(&o.solventFile, "solvent-file", "", "CSV of extra or replacement solvents (see 'dlsbatch solvents --help')")
	fs.StringVar(&o.sheetFile, "sheet", "", "sample sheet (CSV): per-file sample, lot, product, role and conditions")
	fs.StringVar(&o.specFile, "spec", "", "specification (CSV): limits per product; verdicts and system suitability")
	fs.StringVar(&o.qcFile, "qc-thresholds", "", "site QC thresholds (CSV key,value): replace the defaults of the keys listed (format: 'dlsbatch flags --help')")
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
	paths := fs.Args()
	if len(paths) == 0 {
		fmt.Fprintln(e.stderr, "dlsbatch run: name at least one file or folder")
		return exitUsage
	}
	if o.out == "" {
		fmt.Fprintln(e.stderr, "dlsbatch run: --out DIR is required")
		return exitUsage
	}
	settings, readOpts, err := o.settings()
	if err != nil {
		fmt.Fprintf(e.stderr, "dlsbatch run: %v\n", err)
		return exitUsage
	}
	if err := checkOutside(o.out, paths); err != nil {
		fmt.Fprintf(e.stderr, "dlsbatch run: %v\n", err)
		return exitUsage
	}
	if !o.force {
		for _, name := range []string{"results.csv", "samples.csv", "results.json", "manifest.json"} {
			if _, err := os.Stat(filepath.Join(o.out, name)); err == nil {
				fmt.Fprintf(e.stderr, "dlsbatch run: %s already exists; use --force to replace it\n", filepath.Join(o.out, name))
				return exitUsage
			}
		}
	}

	var sh *sheet.Sheet
	if o.sheetFile != "" {
		if sh, err = sheet.ReadFile(o.sheetFile); err != nil {
			fmt.Fprintf(e.stderr, "dlsbatch run: sample sheet: %v\n", err)
			return exitUsage
		}
	}
	var sp *spec.Spec
	if o.specFile != "" {
		if sp, err = specfile.ReadFile(o.specFile); err != nil {
			fmt.Fprintf(e.stderr, "dlsbatch run: specification: %v\n", err)
			return exitUsage
		}
	}
	if o.qcFile != "" {
		if settings.QC, err = qcfile.ReadFile(o.qcFile, settings.QC); err != nil {
			fmt.Fprintf(e.stderr, "dlsbatch run: %v\n", err)
			return exitUsage
		}
	}

	files, derrs := csvdata.Discover(paths)
	for _, err := range derrs {
		fmt.Fprintf(e.stderr, "dlsbatch run: %v\n", err)
	}
	if len(files) == 0 {
		fmt.Fprintln(e.stderr, "dlsbatch run: no correlogram files (*.csv) found")
		return exitFatal
	}

	rels := relativePaths(files, paths)
	var sheetReport *report.SheetReport
	if sh != nil {
		sheetReport = sheetCheck(e, sh, o.sheetFile, files, rels)
	}

	rn := &batch.Runner{
		Read: func(path string) []batch.Input {
			in := readInputs(path, readOpts)
			if sh != nil {
				for _, x := range in {
					if x.M != nil {
						sh.Apply(x.M, rels[path])
					}
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
		Tool:     "dlsbatch",
		Version:  version,
		Caution:  report.Caution,
		Settings: o.describe(settings),
		Counts:   report.CountResults(results),
		Batch:    outcome,
		Sheet:    sheetReport,
		Groups:   &groups,
		Samples:  samples,
		Results:  results,
	}
	written, err := writeOutputs(o.out, results, samples, doc)
	if err != nil {
		fmt.Fprintf(e.stderr, "dlsbatch run: %v\n", err)
		return exitFatal
	}
	if !o.noReport {
		if err := htmlreport.Write(filepath.Join(o.out, "report"), htmlReport(doc, samples, results)); err != nil {
			fmt.Fprintf(e.stderr, "dlsbatch run: report: %v\n", err)
			return exitFatal
		}
	}
	if err := writeManifest(o, doc.Settings, files, written); err != nil {
		fmt.Fprintf(e.stderr, "dlsbatch run: %v\n", err)
		return exitFatal
	}
	if !o.quiet {
		if err := report.WriteSummary(e.stdout, results, samples, outcome, 10); err != nil {
			fmt.Fprintf(e.stderr, "dlsbatch run: %v\n", err)
		}
		what := "results.csv, samples.csv, results.json, manifest.json"
		if !o.noReport {
			what += ", report/index.html"
		}
		fmt.Fprintf(e.stdout, "results: %s (%s)\n%s\n", o.out, what, report.Caution)
	}
	if runErr != nil {
		fmt.Fprintf(e.stderr, "dlsbatch run: interrupted; the %d results finished are written\n", len(results))
		return exitInterrupted
	}
	return exitCode(doc.Counts, outcome)
}

// sheetCheck reports, on stderr and in results.json, the files that no
// sample-sheet row matches and the rows that match no file.
func sheetCheck(e env, sh *sheet.Sheet, name string, files []string, rels map[string]string) *report.SheetReport {
	rep := &report.SheetReport{File: name, UnmatchedFiles: []string{}, UnusedRows: []string{}}
	all := make([]string, len(files))
	for i, f := range files {
		all[i] = rels[f]
		if !sh.Matches(rels[f]) {
			rep.UnmatchedFiles = append(rep.UnmatchedFiles, f)
			fmt.Fprintf(e.stderr, "dlsbatch run: %s: no row of the sample sheet matches this file\n", f)
		}
	}
	unused := sh.Unmatched(all)
	for _, row := range unused {
		msg := fmt.Sprintf("%s:%d: row %q matches no file", name, row.Line, row.Pattern)
		rep.UnusedRows = append(rep.UnusedRows, msg)
		fmt.Fprintf(e.stderr, "dlsbatch run: %s\n", msg)
	}
	return rep
}

// htmlReport builds the report model from the run's document.
func htmlReport(doc *report.Document, samples []*dls.Sample, results []*dls.Result) *htmlreport.Report {
	b := htmlreport.BatchStatus{Suitability: htmlreport.SuitabilityNotAssessed}
	if doc.Batch.Specified {
		b.Suitability, b.Reason = htmlreport.SuitabilityValid, "every reference standard within its limits"
		if !doc.Batch.Valid {
			b.Suitability, b.Reason = htmlreport.SuitabilityInvalid, doc.Batch.Reason
		}
		for i, smp := range samples {
			if smp.Role == "reference" && smp.Verdict != nil {
				for _, c := range smp.Verdict.Checks {
					b.Checks = append(b.Checks, htmlreport.SuitabilityCheck{Sample: i, Check: c})
				}
			}
		}
	}
	return &htmlreport.Report{Tool: doc.Tool, Version: doc.Version, Caution: doc.Caution, Settings: doc.Settings,
		Results: results, Samples: samples, Batch: b}
}

// exitCode maps the outcome of a finished run to the documented codes; the
// verdicts outrank the analysis: an invalid batch, then failed samples, then
// measurements that could not be analysed.
func exitCode(c report.Counts, b spec.Batch) int {
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

// relativePaths maps each discovered file to its path relative to the
// input argument it was found under (its base name for a file named
// directly), for matching sample-sheet patterns.
func relativePaths(files, inputs []string) map[string]string {
	out := make(map[string]string, len(files))
	for _, f := range files {
		rel := filepath.Base(f)
		for _, in := range inputs {
			if st, err := os.Stat(in); err != nil || !st.IsDir() {
				continue
			}
			if r, err := filepath.Rel(in, f); err == nil && !strings.HasPrefix(r, "..") {
				rel = r
				break
			}
		}
		out[f] = filepath.ToSlash(rel)
	}
	return out
}

// settings turns the flags into analysis and reading settings.
func (o *runOptions) settings() (batch.Settings, *csvdata.Options, error) {
	s := batch.DefaultSettings()
	m, err := cumulants.ParseMethod(o.method.value)
	if err != nil {
		return s, nil, err
	}
	s.Cumulants.Method = m
	s.Cumulants.Order = o.order
	s.Cumulants.Cutoff = o.cutoff
	s.Cumulants.MinTauS = o.minLagS
	if err := s.Cumulants.Validate(); err != nil {
		return s, nil, err
	}
	s.Overrides = o.set.params
	s.Defaults = append(o.defaults.params, s.Defaults...)
	s.Extrapolate = o.extrapolate
	s.KeepCurves = !o.noCurves
	if o.uTempK < 0 || o.uViscRel < 0 || o.uIndex < 0 || o.uAngleDeg < 0 {
		return s, nil, fmt.Errorf("uncertainties must not be negative")
	}
	s.Uncertainty.TemperatureK = o.uTempK
	s.Uncertainty.ViscosityRel = o.uViscRel
	if o.uViscRel > 0 {
		s.Uncertainty.ViscosityBasis = "stated with --u-viscosity-rel"
	}
	s.Uncertainty.RefractiveIndex = o.uIndex
	s.Uncertainty.AngleRad = o.uAngleDeg * math.Pi / 180
	s.Distribution.Enabled = !o.noDist
	crit, err := contin.ParseCriterion(o.criterion.value)
	if err != nil {
		return s, nil, err
	}
	s.Distribution.Contin.Criterion = crit
	if crit == contin.Fixed {
		if !(o.lambda > 0) {
			return s, nil, fmt.Errorf("--alpha-criterion fixed needs a positive --alpha-lambda")
		}
		s.Distribution.Contin.Lambda = o.lambda
	}
	if !(o.target > 0 && o.target < 1) {
		return s, nil, fmt.Errorf("--prob-reject-target %g: want a value between 0 and 1", o.target)
	}
	s.Distribution.Contin.TargetProbReject = o.target
	if o.gridPoints < 20 || o.gridPoints > 400 {
		return s, nil, fmt.Errorf("--grid-points %d: want 20 to 400", o.gridPoints)
	}
	s.Distribution.Grid.NGamma = o.gridPoints
	ri, err := mie.ParseComplexIndex(o.particleRI)
	if err != nil {
		return s, nil, fmt.Errorf("--default-particle-ri: %w", err)
	}
	s.Distribution.DefaultParticleRI = ri
	if o.solventFile != "" {
		s.Solvents = dls.NewDefaultSolventTable()
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

// describe records the settings in results.json.
func (o *runOptions) describe(s batch.Settings) map[string]any {
	kv := func(ps []dls.Param) []string {
		out := make([]string, len(ps))
		for i, p := range ps {
			out[i] = p.Key + "=" + p.Value
		}
		return out
	}
	m := map[string]any{
		"cumulant_method":     s.Cumulants.Method.String(),
		"cumulant_order":      s.Cumulants.Order,
		"g1_cutoff":           s.Cumulants.Cutoff,
		"min_lag_s":           s.Cumulants.MinTauS,
		"min_points":          s.Cumulants.MinPoints,
		"range_check":         s.Cumulants.RangeCheck,
		"extrapolate":         s.Extrapolate,
		"set":                 kv(s.Overrides),
		"default":             kv(s.Defaults),
		"lag_column":          o.tauCol,
		"lag_unit":            o.tauUnit,
		"corr_columns":        o.corrCols,
		"corr_kind":           o.corrKind.value,
		"sigma_column":        o.sigmaCol,
		"boltzmann_j_per_k":   dls.BoltzmannJPerK,
		"solvent_file":        o.solventFile,
		"sheet":               o.sheetFile,
		"spec":                o.specFile,
		"exclude_outliers":    o.exclude,
		"u_temperature_k":     s.Uncertainty.TemperatureK,
		"u_viscosity_rel":     o.uViscRel,
		"u_refractive_index":  s.Uncertainty.RefractiveIndex,
		"u_angle_deg":         o.uAngleDeg,
		"coverage_factor":     s.CoverageFactor,
		"distribution":        s.Distribution.Enabled,
		"alpha_criterion":     s.Distribution.Contin.Criterion.String(),
		"alpha_lambda":        s.Distribution.Contin.Lambda,
		"prob_reject_target":  s.Distribution.Contin.TargetProbReject,
		"grid_points":         s.Distribution.Grid.NGamma,
		"default_particle_ri": mie.FormatComplexIndex(s.Distribution.DefaultParticleRI),
		"qc_thresholds":       s.QC,
	}
	if o.qcFile != "" {
		m["qc_thresholds_file"] = o.qcFile
	}
	return m
}

func readInputs(path string, o *csvdata.Options) []batch.Input {
	entries := csvdata.ReadFile(path, o)
	out := make([]batch.Input, len(entries))
	for i, en := range entries {
		out[i] = batch.Input{File: en.File, Run: en.Run, Index: en.Index, M: en.M, Err: en.Err}
	}
	return out
}

// checkOutside refuses an output folder that is, or lies inside, one of the
// input folders, so that no file under the input paths is ever written.
func checkOutside(out string, inputs []string) error {
	ao, err := filepath.Abs(out)
	if err != nil {
		return fmt.Errorf("--out %s: %w", out, err)
	}
	for _, in := range inputs {
		ai, err := filepath.Abs(in)
		if err != nil {
			continue
		}
		st, err := os.Stat(in)
		if err != nil {
			continue
		}
		if !st.IsDir() {
			if ao == ai {
				return fmt.Errorf("--out %s is an input file", out)
			}
			continue
		}
		if rel, err := filepath.Rel(ai, ao); err == nil && (rel == "." || !strings.HasPrefix(rel, "..")) {
			return fmt.Errorf("--out %s lies inside the input folder %s; choose a folder outside the inputs", out, in)
		}
	}
	return nil
}

// writeOutputs writes results.csv and results.json, each through a
// temporary file renamed into place, so that a failed write never leaves a
// half file under the final name.
func writeOutputs(dir string, results []*dls.Result, samples []*dls.Sample, doc *report.Document) ([]report.FileHash, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("output folder: %w", err)
	}
	var csvBuf, smpBuf, jsonBuf bytes.Buffer
	if err := report.WriteCSV(&csvBuf, results); err != nil {
		return nil, err
	}
	if err := report.WriteSamplesCSV(&smpBuf, samples, results); err != nil {
		return nil, err
	}
	if err := report.WriteJSON(&jsonBuf, doc); err != nil {
		return nil, err
	}
	var hashes []report.FileHash
	for _, f := range []struct {
		name string
		data *bytes.Buffer
	}{{"results.csv", &csvBuf}, {"samples.csv", &smpBuf}, {"results.json", &jsonBuf}} {
		hashes = append(hashes, report.HashBytes(f.name, f.data.Bytes()))
		if err := writeAtomic(filepath.Join(dir, f.name), f.data); err != nil {
			return nil, err
		}
	}
	return hashes, nil
}

// writeManifest writes DIR/manifest.json: the tool version, the settings,
// and the SHA-256 of every input read and every output written (report
// pages included), with paths as given or relative to DIR.
func writeManifest(o *runOptions, settings map[string]any, files []string, written []report.FileHash) error {
	m := &report.Manifest{Tool: "dlsbatch", Version: version, Settings: settings, Tables: []report.FileHash{}, Outputs: written}
	for _, f := range files {
		h, err := report.HashFile(f)
		if err != nil {
			return err
		}
		m.Inputs = append(m.Inputs, h)
	}
	for _, t := range []string{o.sheetFile, o.specFile, o.solventFile, o.qcFile} {
		if t == "" {
			continue
		}
		h, err := report.HashFile(t)
		if err != nil {
			return err
		}
		m.Tables = append(m.Tables, h)
	}
	if !o.noReport {
		entries, err := os.ReadDir(filepath.Join(o.out, "report"))
		if err != nil {
			return fmt.Errorf("manifest: %w", err)
		}
		for _, en := range entries { // ReadDir sorts by name
			if en.IsDir() {
				continue
			}
			h, err := report.HashFile(filepath.Join(o.out, "report", en.Name()))
			if err != nil {
				return err
			}
			h.Path = "report/" + en.Name()
			m.Outputs = append(m.Outputs, h)
		}
	}
	var b bytes.Buffer
	if err := report.WriteManifest(&b, m); err != nil {
		return err
	}
	return writeAtomic(filepath.Join(o.out, "manifest.json"), &b)
}

func writeAtomic(path string, r io.Reader) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".tmp*")
	if err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	_, err = io.Copy(tmp, r)
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(tmp.Name(), path)
	}
	if err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("write %s: %w", path, err)
	}
	return nil
}
