// Package batchrun runs one batch from input paths to a published result
// set: it locks and stages the output folder (io/resultset), discovers and
// reads the inputs (io/csvdata, io/sheet), analyses them in parallel
// (dls/batch) while streaming full records out of memory (io/report),
// aggregates samples and groups (dls/qc, dls/batch), judges them against
// the specification (dls/spec), writes every output and swaps the set in.
// The command only turns flags into a Config and the Outcome into an exit
// code.
package batchrun

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"path/filepath"
	"runtime/trace"
	"sort"
	"sync"

	"dlsbatch/dls"
	"dlsbatch/dls/batch"
	"dlsbatch/dls/mie"
	"dlsbatch/dls/qc"
	"dlsbatch/dls/spec"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/report"
	"dlsbatch/io/resultset"
	"dlsbatch/io/sheet"
)

// Config is one run.
type Config struct {
	Paths []string // input files and folders, as named
	Out   string   // output folder
	Force bool     // replace an existing result set
	// Resume takes, from the journal of an earlier run into Out that did
	// not finish, the results of every file unchanged since, with the same
	// settings and tool version (see journal.go).
	Resume bool
	// TableHashes, when set, are the tables' hashes taken when they were
	// read (a watch reads them once for all its runs); nil: the run hashes
	// them as it starts.
	TableHashes map[string]report.FileHash
	// Lock, when set, is the output folder's lock held by the caller
	// across runs (a watch): the run writes under it and leaves it held.
	Lock *resultset.Lock
	// KeepJournal keeps the journal after a complete run (a watch adds
	// files to the same batch again and again).
	KeepJournal bool
	// Accept, when set, keeps only the files found for which it is true
	// (a watch leaves out files still being written).
	Accept func(path string) bool

	Settings batch.Settings
	Read     *csvdata.Options
	Sheet    *sheet.Sheet // nil: none
	Spec     *spec.Spec   // nil: none
	// Tables are the files Sheet, Spec and the solvent and thresholds
	// files came from (empty when not given): hashed into the manifest and
	// named, relative to the input root, in the settings record.
	SheetFile, SpecFile, SolventFile, QCFile string
	ExcludeOutliers                          bool
	// Include and Exclude select the files found (see Select); Shard
	// analyses one part of them (see ShardOf).
	Include, Exclude []string
	Shard            Shard
	HTMLReport       bool
	Workers          int
	// UAngleDeg is the standard uncertainty of the angle as given, in
	// degrees, recorded as given (Settings hold it in radians).
	UAngleDeg float64
	// Record, when set, builds the settings record for the input root
	// (a merge hands over the shards'); nil builds it from the Config.
	Record func(root string) *report.Settings
	// Progress, when set, is told how many items of a phase ("analysing"
	// files, "report" pages, "hashing" files) are done of how many, from any
	// goroutine (it must be safe for concurrent use).
	Progress func(phase string, done, total int)
	// Warn receives the messages a person should see (input problems,
	// sample-sheet mismatches); nil drops them.
	Warn func(msg string)
}

// Outcome is what a finished (or interrupted) run produced.
type Outcome struct {
	Results []*dls.Brief // in input order
	// Problems are the measurements the summary lists (the first
	// report.SummaryProblems that are not ok).
	Problems []report.Problem
	Samples  []*dls.Sample
	Batch    spec.Batch
	Counts   dls.Counts
	Complete bool // false: interrupted, the set holds what finished
}

// ErrUsage marks a problem with the run's settings or folders found before
// any analysis (the command's usage-error exit); ErrNoInput a run that
// found nothing to read.
var (
	ErrUsage   = errors.New("usage")
	ErrNoInput = errors.New("no correlogram files (*.csv) found")
)

// ErrWriteInterrupted reports a signal while the outputs were being
// written: the previous set of the folder is kept.
var ErrWriteInterrupted = errors.New("interrupted while writing; the output folder is as it was")

// Run runs the batch. An interrupted analysis returns an Outcome with
// Complete false and the set written (what finished, no verdicts); errors
// wrap ErrUsage, ErrNoInput or ErrWriteInterrupted where those apply.
func Run(ctx context.Context, cfg *Config) (*Outcome, error) {
	warn := func(msg string) {
		if cfg.Warn != nil {
			cfg.Warn(msg)
		}
	}
	root, err := csvdata.Root(cfg.Paths)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrUsage, err)
	}
	// Every --out problem is a usage error before any analysis; from here
	// the folder is locked and the run writes into a staging folder.
	var out *resultset.Set
	if cfg.Lock != nil {
		out, err = cfg.Lock.Open(cfg.Paths, cfg.Force)
	} else {
		out, err = resultset.Open(cfg.Out, cfg.Paths, cfg.Force)
	}
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrUsage, err)
	}
	defer out.Abort()

	found := csvdata.Discover(cfg.Paths)
	nm := csvdata.NewNamer(root)
	relative(found.Problems, nm)
	for _, p := range found.Problems {
		warn(p.Err.Error()) // and an error row each: the runner gets them as failed inputs
	}
	for _, d := range found.ResultSets {
		warn(nm.Rel(d) + ": left out: a dlsbatch result set, not correlograms")
	}
	// The run's own tables are no correlograms where they lie among the
	// data (a sheet kept beside the night's files), and neither is what
	// Accept refuses.
	tableAt := map[string]string{} // base name → the table's path, resolved
	for _, t := range cfg.tableFiles() {
		tableAt[filepath.Base(t)] = absPath(t)
	}
	isTable := func(f string) bool {
		t, ok := tableAt[filepath.Base(f)] // a path resolved only when its name is a table's
		return ok && absPath(f) == t
	}
	if cfg.Accept != nil || len(tableAt) > 0 {
		kept := found.Files[:0:0]
		for _, f := range found.Files {
			if !isTable(f) && (cfg.Accept == nil || cfg.Accept(f)) {
				kept = append(kept, f)
			}
		}
		found.Files = kept
	}
	all := Select(found, root, cfg.Include, cfg.Exclude)
	found = cfg.Shard.Part(all, root)
	// The run's order is that of the inputs' paths relative to the root,
	// whatever the shard or the way the paths were typed.
	paths := found.Paths()
	// relName holds each path's name relative to the root, taken once.
	relName := make(map[string]string, len(paths))
	for _, p := range paths {
		if _, problem := found.Failed(p); problem {
			relName[p] = p // named relative to the root already
		} else {
			relName[p] = nm.Rel(p)
		}
	}
	sort.SliceStable(paths, func(a, b int) bool { return relName[paths[a]] < relName[paths[b]] })
	if len(paths) == 0 && cfg.Shard.Count <= 1 {
		return nil, ErrNoInput
	}
	files := found.Files
	rels := csvdata.RelativePaths(files, cfg.Paths)
	var match *sheet.MatchReport
	if cfg.Sheet != nil {
		cfg.Sheet.Rename(csvdata.Rel(root, cfg.SheetFile))
		match = cfg.Sheet.Check(csvdata.Rel(root, cfg.SheetFile), files, rels)
		for i, f := range match.UnmatchedFiles {
			match.UnmatchedFiles[i] = nm.Rel(f)
			warn(match.UnmatchedFiles[i] + ": no row of the sample sheet matches this file")
		}
		for _, msg := range match.UnusedRows {
			warn(msg)
		}
	}
	stream, err := report.NewStream(out.Staging)
	if err != nil {
		return nil, err
	}
	tables := cfg.TableHashes
	if tables == nil {
		if tables, err = tableHashes(cfg); err != nil {
			return nil, err
		}
	}
	key, err := settingsKey(cfg, root, tables)
	if err != nil {
		return nil, err
	}
	jr, err := openJournal(journalPath(out.Dir), key, cfg.Resume)
	if err != nil {
		return nil, err
	}
	published := false
	defer func() { jr.close(published) }()
	hashed := map[string]report.Digest{} // input path → its digest, taken at analysis
	var hashedMu sync.Mutex
	var encodings sync.Map // a file's first result → its records, encoded
	// contents holds an input's bytes from its hashing (Cached) to its
	// reading (Read): each input is opened and read once.
	var contents sync.Map
	readOpts := cfg.Read
	if readOpts == nil {
		readOpts = &csvdata.Options{}
	}
	maxBytes, _, _ := readOpts.Limits()
	var measuredAt []string // of each result, in input order
	sheetRel := map[string]string{}
	for _, f := range files {
		sheetRel[relName[f]] = rels[f]
	}
	rn := &batch.Runner{
		Cached: func(path string) ([]*dls.Result, bool) {
			if _, problem := found.Failed(path); problem {
				return nil, false
			}
			d, content, err := report.ReadDigest(path, maxBytes)
			if err != nil {
				return nil, false
			}
			hashedMu.Lock()
			hashed[path] = d // the manifest takes it from here: each input is read for its hash once
			hashedMu.Unlock()
			res, ok := jr.cached(relName[path], d.Hex())
			if !ok && content != nil {
				contents.Store(path, content) // for Read, next in the same worker
			}
			return res, ok
		},
		Read: func(path string) []batch.Input {
			if in, failed := found.Failed(path); failed {
				return in
			}
			var in []csvdata.Entry
			if b, ok := contents.LoadAndDelete(path); ok {
				in = csvdata.ReadBytesAs(b.([]byte), relName[path], cfg.Read)
			} else {
				in = csvdata.ReadFileAs(path, relName[path], cfg.Read)
			}
			for _, x := range in {
				if cfg.Sheet != nil && x.M != nil {
					cfg.Sheet.Apply(x.M, rels[path])
				}
			}
			return in
		},
		Settings: cfg.Settings,
		Workers:  cfg.Workers,
		// Records are encoded in the workers, in parallel; Emit only
		// appends them, in input order.
		Prepare: func(_ string, res []*dls.Result) {
			if len(res) == 0 {
				return
			}
			e := encoded{enc: make([]report.Encoded, len(res))}
			for i, r := range res {
				if e.enc[i], e.err = report.Encode(r); e.err != nil {
					break
				}
			}
			encodings.Store(res[0], e)
		},
		Emit: func(res []*dls.Result) error {
			measuredAt = append(measuredAt, measuredAtOf(res)...)
			if len(res) == 0 {
				return nil
			}
			v, ok := encodings.LoadAndDelete(res[0])
			if !ok { // not prepared (cannot happen with the Runner): encode here
				recs, err := stream.AddRecords(res)
				if err != nil {
					return err
				}
				_, err = jr.add(res, recs)
				return err
			}
			e := v.(encoded)
			if e.err != nil {
				return e.err
			}
			recs := make([][]byte, len(e.enc))
			for i := range e.enc {
				recs[i] = e.enc[i].Record
			}
			// The records are written once, to the journal, and the
			// stream reads them back from there.
			at, err := jr.add(res, recs)
			if err != nil {
				return err
			}
			return stream.AddEncodedAt(res, e.enc, jr.records(), at)
		},
	}
	if cfg.Progress != nil {
		var mu sync.Mutex
		n := 0
		rn.Progress = func(string) {
			mu.Lock()
			n++
			cfg.Progress("analysing", n, len(paths))
			mu.Unlock()
		}
	}
	region := trace.StartRegion(ctx, "analyse")
	_, runErr := rn.Run(ctx, paths)
	region.End()
	if cfg.Resume {
		warn(fmt.Sprintf("resumed: %d files taken from the journal, %d of its entries ignored (other settings, tool version or file content)",
			jr.reused, jr.ignored))
	}
	if runErr != nil && ctx.Err() == nil {
		return nil, resumable(runErr) // results could not be kept (e.g. a full disk)
	}
	var shard *report.ShardInfo
	if cfg.Shard.Count > 1 {
		shard = cfg.Shard.Info(all, root)
	}
	for _, msg := range tableChanges(cfg, tables) {
		warn(msg)
	}
	o, err := publish(ctx, cfg, out, &publishing{root: root, inputs: files, match: match, stream: stream,
		complete: runErr == nil, shard: shard, hashes: hashed, tables: tables, measuredAt: measuredAt, sheetRel: sheetRel, journal: true})
	published = err == nil && o.Complete && !cfg.KeepJournal
	return o, err
}

// settingsKey is what a journal entry must match besides the input: the
// settings record and the content of every table (a sheet changes the
// metadata of the measurements), as tableHashes took it.
func settingsKey(cfg *Config, root string, tables map[string]report.FileHash) ([]byte, error) {
	b, err := json.Marshal(cfg.record(root))
	if err != nil {
		return nil, err
	}
	for _, t := range cfg.tableFiles() {
		b = append(b, "\n"+tables[t].SHA256...)
	}
	return b, nil
}

// absPath is path made absolute, with its links resolved where it can be.
func absPath(path string) string {
	if p, err := filepath.EvalSymlinks(path); err == nil {
		path = p
	}
	if p, err := filepath.Abs(path); err == nil {
		return p
	}
	return path
}

// tableFiles lists the tables a run was given (sheet, specification,
// solvents, thresholds), in that order.
func (cfg *Config) tableFiles() []string {
	var out []string
	for _, t := range []string{cfg.SheetFile, cfg.SpecFile, cfg.SolventFile, cfg.QCFile} {
		if t != "" {
			out = append(out, t)
		}
	}
	return out
}

// tableHashes hashes the tables as the run starts, just after they were
// read: the manifest attests these bytes, those the run used, even when
// a table is edited while the run goes on (tableChanges says so).
func tableHashes(cfg *Config) (map[string]report.FileHash, error) {
	out := map[string]report.FileHash{}
	for _, t := range cfg.tableFiles() {
		h, err := report.HashFile(t)
		if err != nil {
			return nil, fmt.Errorf("%w: %w", ErrUsage, err)
		}
		out[t] = h
	}
	return out, nil
}

// tableChanges names the tables whose content is no longer what the run
// read (at its start, or a watch's).
func tableChanges(cfg *Config, at map[string]report.FileHash) []string {
	var out []string
	for _, t := range cfg.tableFiles() {
		if h, err := report.HashFile(t); err != nil || h.SHA256 != at[t].SHA256 {
			out = append(out, fmt.Sprintf("%s changed while the run went on: the results and the manifest rest on the version read at the start (sha256 %s)", t, at[t].SHA256))
		}
	}
	return out
}

// publishing is what a run (or a merge) hands over to be written.
type publishing struct {
	root     string
	inputs   []string // files analysed, as paths the process can open
	match    *sheet.MatchReport
	stream   *report.Stream
	complete bool
	shard    *report.ShardInfo
	hashes   map[string]report.Digest // of inputs, by path, where already known
	// measuredAt holds each result's measured_at ("" without), sheetRel
	// each input's path as the sheet's patterns see it, by its name
	// relative to the root (nil: that name): the batch order.
	measuredAt []string
	sheetRel   map[string]string
	journal    bool                       // a journal keeps the records: a failed write can be resumed
	tables     map[string]report.FileHash // the tables' hashes as the run read them (nil: hash them now)
}

// resumable adds to the error of a run whose set could not be written
// (a full disk, say) what is left and what to do.
func resumable(err error) error {
	return fmt.Errorf("%w (the output folder is unchanged; what was analysed is kept: once this is fixed, run again with --resume)", err)
}

// publish aggregates, judges, writes and swaps in the set of p.
func publish(ctx context.Context, cfg *Config, out *resultset.Set, p *publishing) (*Outcome, error) {
	o := &Outcome{Results: p.stream.Results(), Complete: p.complete}
	// A shard leaves the group analyses to the merge: a group may span
	// shards, and its records must reach the merge as analysed.
	region := trace.StartRegion(ctx, "groups, QC and joint inversions")
	var groups batch.GroupReport
	if p.shard == nil {
		groups = batch.Groups(p.stream.Members())
		p.stream.Rebrief()
	}
	o.Samples = qc.Aggregate(o.Results, qc.Options{Thresholds: cfg.Settings.QC, ExcludeOutliers: cfg.ExcludeOutliers})
	if err := p.stream.Flush(); err != nil {
		return nil, fmt.Errorf("results: %w", err)
	}
	if err := batch.JointDistributions(o.Samples, p.stream.Field, &cfg.Settings, cfg.Workers); err != nil {
		return nil, err
	}
	region.End()
	o.Batch = spec.Batch{Specified: cfg.Spec != nil, Reason: "not evaluated: the run was interrupted"}
	if o.Complete {
		o.Batch = spec.EvaluateRun(cfg.Spec, o.Samples, spec.Run{Results: o.Results, Load: p.stream.Full,
			Order: batchOrder(cfg.Sheet, o.Results, p), QC: qc.Options{Thresholds: cfg.Settings.QC, ExcludeOutliers: cfg.ExcludeOutliers}})
	}
	o.Counts = dls.CountBriefs(o.Results)
	var err error
	if o.Problems, err = report.Problems(o.Results, report.SummaryProblems, p.stream.Message); err != nil {
		return nil, err
	}
	doc := &report.Document{
		Tool: "dlsbatch", Version: report.Version(), Caution: report.Caution, Complete: o.Complete,
		Settings: cfg.record(p.root), Counts: o.Counts, Batch: o.Batch, Sheet: p.match,
		Groups: &groups, Samples: o.Samples,
	}
	set := &report.Set{Doc: doc, HTMLReport: cfg.HTMLReport && o.Complete, Root: p.root, Inputs: p.inputs, Stream: p.stream, Problems: o.Problems, Staged: true,
		Shard: p.shard, Progress: cfg.Progress, Hashes: p.hashes, Workers: cfg.Workers}
	set.Tables, set.TableHashes = cfg.tableFiles(), p.tables
	// An interrupted analysis still writes what it finished, marked
	// incomplete and without the report, so that it is quick; a signal
	// during the writing abandons it and the previous set stays.
	writeCtx := ctx
	if !o.Complete {
		writeCtx = context.Background()
	}
	region = trace.StartRegion(ctx, "write the set")
	err = report.WriteSet(writeCtx, out.Staging, set)
	region.End()
	if err != nil {
		switch {
		case ctx.Err() != nil:
			return nil, ErrWriteInterrupted
		case p.journal:
			return nil, resumable(err)
		}
		return nil, err
	}
	region = trace.StartRegion(ctx, "flush, publish and clean up")
	err = out.Commit()
	region.End()
	if err != nil {
		return nil, err
	}
	return o, nil
}

// encoded holds one file's results encoded by report.Encode.
type encoded struct {
	enc []report.Encoded
	err error
}

// relative names the failed entries of input problems by their path
// relative to the input root, as every other result is named.
func relative(in []dls.Input, nm csvdata.Namer) {
	for i := range in {
		in[i].File = nm.Rel(in[i].File)
		var pe *dls.PosError
		if errors.As(in[i].Err, &pe) {
			q := *pe
			q.File = in[i].File
			in[i].Err = &q
		}
	}
}

// record is the settings record of the run, for the input root.
func (cfg *Config) record(root string) *report.Settings {
	if cfg.Record != nil {
		return cfg.Record(root)
	}
	rel := func(p string) string {
		if p == "" {
			return ""
		}
		return csvdata.Rel(root, p)
	}
	s, ro := cfg.Settings, cfg.Read
	if ro == nil {
		ro = &csvdata.Options{}
	}
	maxBytes, maxRows, maxCols := ro.Limits()
	corrKind := ""
	if ro.CorrKind != 0 {
		corrKind = ro.CorrKind.String()
	}
	return &report.Settings{
		AllowImplausible: s.AllowImplausible, AlphaCriterion: s.Distribution.Contin.Criterion.String(), AlphaLambda: s.Distribution.Contin.Lambda,
		BoltzmannJPerK: dls.BoltzmannJPerK, CorrColumns: ro.CorrColumns, CorrKind: corrKind,
		CoverageFactor: s.CoverageFactor, CumulantMethod: s.Cumulants.Method.String(), CumulantOrder: s.Cumulants.Order,
		Default: dls.Assignments(s.Defaults), DefaultParticleRI: mie.FormatComplexIndex(s.Distribution.DefaultParticleRI),
		Distribution: s.Distribution.Enabled, Exclude: cfg.Exclude, ExcludeOutliers: cfg.ExcludeOutliers, Extrapolate: s.Extrapolate,
		FullAlphaScan: s.Distribution.Contin.FullScan, G1Cutoff: s.Cumulants.Cutoff, GridPoints: s.Distribution.Grid.NGamma, Include: cfg.Include, JointTarget: s.Distribution.JointTargetProbReject, LagColumn: ro.TauColumn,
		LagUnit: ro.TauUnit, MaxColumns: maxCols, MaxFileMB: int(maxBytes >> 20), MaxRows: maxRows,
		MinLagS: s.Cumulants.MinTauS, MinPoints: s.Cumulants.MinPoints, PeakUncertainty: s.Distribution.PeakNoise.String(), ProbRejectTarget: s.Distribution.Contin.TargetProbReject,
		QCThresholds: s.QC, QCThresholdsFile: rel(cfg.QCFile), RangeCheck: s.Cumulants.RangeCheck,
		Set: dls.Assignments(s.Overrides), Sheet: rel(cfg.SheetFile), SigmaColumn: ro.SigmaColumn, SolventFile: rel(cfg.SolventFile),
		Spec: rel(cfg.SpecFile), UAngleDeg: cfg.UAngleDeg, URefractiveIndex: s.Uncertainty.RefractiveIndex,
		UTemperatureK: s.Uncertainty.TemperatureK, UViscosityRel: s.Uncertainty.ViscosityRel,
	}
}

// measuredAtOf returns the measured_at metadata of each result ("" when
// absent).
func measuredAtOf(res []*dls.Result) []string {
	out := make([]string, len(res))
	for i, r := range res {
		for _, p := range r.Params {
			if p.Key == dls.KeyMeasuredAt {
				out[i] = p.Value
			}
		}
	}
	return out
}

// batchOrder is the order the measurements were taken in, as far as the
// inputs tell (spec.BatchOrder).
func batchOrder(sh *sheet.Sheet, results []*dls.Brief, p *publishing) spec.Order {
	var ranks []int
	if sh != nil {
		rels := make([]string, len(results))
		for i, r := range results {
			rels[i] = r.File
			if rel, ok := p.sheetRel[r.File]; ok {
				rels[i] = rel
			}
		}
		ranks = sh.Ranks(rels)
	}
	return spec.BatchOrder(len(results), p.measuredAt, ranks)
}
