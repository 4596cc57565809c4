package batchrun

import (
	"bytes"
	"context"
	"dlsbatch/contin"
	"dlsbatch/cumulants"
	"dlsbatch/dls/batch"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"sort"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/report"
	"dlsbatch/io/resultset"
	"dlsbatch/io/sheet"
	"dlsbatch/io/specfile"
)

// ErrShards marks result sets that cannot be merged into one batch.
var ErrShards = fmt.Errorf("%w: the shards do not make one batch", ErrUsage)

// MergeConfig is a merge of the sets of a batch's shards.
type MergeConfig struct {
	Dirs       []string // the shards' result folders
	Out        string
	Force      bool
	HTMLReport bool
	// Workers bounds the parallel work (joint analyses, report pages);
	// 0: one per CPU. The output is the same for any value.
	Workers int
	// Progress, when set, is told the progress of each phase, as Config's.
	Progress func(phase string, done, total int)
}

// Merge writes into cfg.Out the result set that one run over the whole
// batch would have written: it checks that the shards share tool version,
// settings and input root, are complete, disjoint, of one split and cover
// it, then rebuilds samples, groups, verdicts and system suitability over
// all measurements and writes every output.
func Merge(ctx context.Context, cfg *MergeConfig) (*Outcome, error) {
	if len(cfg.Dirs) == 0 {
		return nil, fmt.Errorf("%w: name the shards' result folders", ErrUsage)
	}
	var mans []*report.Manifest
	for _, d := range cfg.Dirs {
		m, err := readManifest(d)
		if err != nil {
			return nil, fmt.Errorf("%w: %w", ErrUsage, err)
		}
		mans = append(mans, m)
	}
	if err := checkShards(cfg.Dirs, mans); err != nil {
		return nil, err
	}
	first := mans[0]
	root := first.Root
	abs := func(rel string) string { return filepath.Join(root, filepath.FromSlash(rel)) }
	out, err := resultset.Open(cfg.Out, append([]string{root}, cfg.Dirs...), cfg.Force)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrUsage, err)
	}
	defer out.Abort()

	// Every measurement, grouped by input file; each file lies in one shard.
	byFile := map[string][]*dls.Result{}
	for _, d := range cfg.Dirs {
		if err := readResults(filepath.Join(d, report.ResultsJSON), func(r *dls.Result) {
			byFile[r.File] = append(byFile[r.File], r)
		}); err != nil {
			return nil, err
		}
	}
	if len(byFile) != first.Shard.BatchInputs {
		return nil, fmt.Errorf("%w: the shards hold %d input files, the batch has %d", ErrShards, len(byFile), first.Shard.BatchInputs)
	}
	names := make([]string, 0, len(byFile))
	for f := range byFile {
		names = append(names, f)
	}
	sort.Strings(names)
	stream, err := report.NewStream(out.Staging)
	if err != nil {
		return nil, err
	}
	var measuredAt []string
	for _, f := range names {
		measuredAt = append(measuredAt, measuredAtOf(byFile[f])...)
		if err := stream.Add(byFile[f]); err != nil {
			return nil, err
		}
	}

	rec := first.Settings
	run := &Config{HTMLReport: cfg.HTMLReport, ExcludeOutliers: rec.ExcludeOutliers, Workers: cfg.Workers, Progress: cfg.Progress,
		Record: func(string) *report.Settings { return rec }, Settings: batch.DefaultSettings()}
	run.Settings.QC = rec.QCThresholds
	if run.Settings.Distribution, err = distributionOf(rec); err != nil {
		return nil, fmt.Errorf("%w: %s: %w", ErrUsage, cfg.Dirs[0], err)
	}
	if run.Settings.Cumulants, err = cumulantsOf(rec); err != nil {
		return nil, fmt.Errorf("%w: %s: %w", ErrUsage, cfg.Dirs[0], err)
	}
	run.Settings.AllowImplausible, run.Settings.Extrapolate = rec.AllowImplausible, rec.Extrapolate
	// The inputs are recorded with the hashes the shards took when they
	// analysed them: what the merged set attests is what was analysed,
	// and no input is read again.
	var inputs []string
	known := map[string]report.Digest{}
	for k, m := range mans {
		for _, h := range m.Inputs {
			d, err := report.DigestOf(h)
			if err != nil {
				return nil, fmt.Errorf("%w: %s: %w", ErrUsage, cfg.Dirs[k], err)
			}
			inputs = append(inputs, abs(h.Path))
			known[abs(h.Path)] = d
		}
	}
	sort.Slice(inputs, func(a, b int) bool { return inputs[a] < inputs[b] })
	for _, t := range []struct {
		rel string
		dst *string
	}{{rec.Sheet, &run.SheetFile}, {rec.Spec, &run.SpecFile}, {rec.SolventFile, &run.SolventFile}, {rec.QCThresholdsFile, &run.QCFile}} {
		if t.rel != "" {
			*t.dst = abs(t.rel)
		}
	}
	var match *sheet.MatchReport
	if run.SheetFile != "" {
		if run.Sheet, err = sheet.ReadFile(run.SheetFile); err != nil {
			return nil, fmt.Errorf("%w: sample sheet: %w", ErrUsage, err)
		}
		rels := map[string]string{}
		nm := csvdata.NewNamer(root)
		for _, f := range inputs {
			rels[f] = nm.Rel(f)
		}
		match = run.Sheet.Check(rec.Sheet, inputs, rels)
		for i, f := range match.UnmatchedFiles {
			match.UnmatchedFiles[i] = nm.Rel(f)
		}
	}
	if run.SpecFile != "" {
		if run.Spec, err = specfile.ReadFile(run.SpecFile); err != nil {
			return nil, fmt.Errorf("%w: specification: %w", ErrUsage, err)
		}
	}
	return publish(ctx, run, out, &publishing{root: root, inputs: inputs, match: match, stream: stream, complete: true, measuredAt: measuredAt,
		hashes: known})
}

func readManifest(dir string) (*report.Manifest, error) {
	b, err := os.ReadFile(filepath.Join(dir, report.ManifestJSON))
	if err != nil {
		return nil, fmt.Errorf("%s: no result set: %w", dir, err)
	}
	var m report.Manifest
	if err := json.Unmarshal(b, &m); err != nil {
		return nil, fmt.Errorf("%s: %w", filepath.Join(dir, report.ManifestJSON), err)
	}
	return &m, nil
}

// checkShards says why the sets are not the complete, disjoint shards of
// one split of one batch, if they are not.
func checkShards(dirs []string, mans []*report.Manifest) error {
	first := mans[0]
	want, _ := json.Marshal(first.Settings)
	seen := map[int]string{}
	files := map[string]string{}
	for i, m := range mans {
		d := dirs[i]
		switch {
		case m.Shard == nil:
			return fmt.Errorf("%w: %s is not the set of a shard (run with --shard)", ErrShards, d)
		case !m.Complete:
			return fmt.Errorf("%w: %s is incomplete (its run was interrupted)", ErrShards, d)
		case m.Version != first.Version:
			return fmt.Errorf("%w: %s was written by version %s, %s by %s", ErrShards, d, m.Version, dirs[0], first.Version)
		case m.Root != first.Root:
			return fmt.Errorf("%w: %s has input root %s, %s has %s", ErrShards, d, m.Root, dirs[0], first.Root)
		case m.Shard.Count != first.Shard.Count || m.Shard.BatchSHA256 != first.Shard.BatchSHA256:
			return fmt.Errorf("%w: %s is part of another split or another batch than %s", ErrShards, d, dirs[0])
		}
		if got, _ := json.Marshal(m.Settings); !bytes.Equal(got, want) {
			return fmt.Errorf("%w: %s was run with other settings than %s", ErrShards, d, dirs[0])
		}
		if prev, dup := seen[m.Shard.Index]; dup {
			return fmt.Errorf("%w: %s and %s are both shard %d", ErrShards, prev, d, m.Shard.Index)
		}
		seen[m.Shard.Index] = d
		for _, h := range m.Inputs {
			if prev, dup := files[h.Path]; dup {
				return fmt.Errorf("%w: %s is in %s and %s", ErrShards, h.Path, prev, d)
			}
			files[h.Path] = d
		}
	}
	if len(seen) != first.Shard.Count {
		var missing []int
		for k := range first.Shard.Count {
			if _, ok := seen[k]; !ok {
				missing = append(missing, k)
			}
		}
		return fmt.Errorf("%w: %d of %d shards given; missing %v", ErrShards, len(seen), first.Shard.Count, missing)
	}
	return nil
}

// readResults calls add for every record of a results.json, one at a time.
func readResults(path string, add func(*dls.Result)) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	dec := json.NewDecoder(f)
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return fmt.Errorf("%s: not a results.json", path)
	}
	for dec.More() {
		key, err := dec.Token()
		if err != nil {
			return fmt.Errorf("%s: %w", path, err)
		}
		if key != "results" {
			var skip json.RawMessage
			if err := dec.Decode(&skip); err != nil {
				return fmt.Errorf("%s: %w", path, err)
			}
			continue
		}
		if _, err := dec.Token(); err != nil { // [
			return fmt.Errorf("%s: %w", path, err)
		}
		for dec.More() {
			var r dls.Result
			if err := dec.Decode(&r); err != nil {
				return fmt.Errorf("%s: %w", path, err)
			}
			add(&r)
		}
		return nil
	}
	return fmt.Errorf("%s: no results", path)
}

// cumulantsOf rebuilds the cumulant settings a run recorded, for the
// joint analyses of the merged samples, which fit the mean correlogram as
// the shards fitted each run.
func cumulantsOf(rec *report.Settings) (cumulants.Settings, error) {
	c := cumulants.DefaultSettings()
	m, err := cumulants.ParseMethod(rec.CumulantMethod)
	if err != nil {
		return c, fmt.Errorf("settings record: %w", err)
	}
	c.Method, c.Order, c.Cutoff, c.MinTauS, c.MinPoints, c.RangeCheck = m, rec.CumulantOrder, rec.G1Cutoff, rec.MinLagS, rec.MinPoints, rec.RangeCheck
	return c, nil
}

// distributionOf rebuilds the inversion settings a run recorded, for the
// joint inversions of the merged samples (batch.JointDistributions): the
// same criterion, target, strength and grid as the shards' own inversions.
func distributionOf(rec *report.Settings) (batch.DistributionSettings, error) {
	d := batch.DefaultDistributionSettings()
	crit, err := contin.ParseCriterion(rec.AlphaCriterion)
	if err != nil {
		return d, fmt.Errorf("settings record: %w", err)
	}
	d.Enabled = rec.Distribution
	d.Contin.Criterion, d.Contin.TargetProbReject, d.Contin.FullScan = crit, rec.ProbRejectTarget, rec.FullAlphaScan
	// A set made before the joint target existed has none in its record
	// (0): its joint analyses used the runs' target, and so does this.
	d.JointTargetProbReject = rec.JointTarget
	if d.PeakNoise, err = batch.ParsePeakNoise(rec.PeakUncertainty); err != nil {
		return d, fmt.Errorf("settings record: %w", err)
	}
	if crit == contin.Fixed {
		d.Contin.Lambda = rec.AlphaLambda
	}
	d.Grid.NGamma = rec.GridPoints
	return d, nil
}
