package report

import (
	"bufio"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"runtime/trace"
	"slices"

	"dlsbatch/dls"
	"dlsbatch/io/atomicfile"
	"dlsbatch/io/csvdata"
	"dlsbatch/io/htmlreport"
	"dlsbatch/io/jsonenc"
)

// Set is everything one run writes into its output folder.
type Set struct {
	Doc *Document // results.json's content; its results and samples fill the tables
	// HTMLReport writes the offline report into DIR/report.
	HTMLReport bool
	// Root is the input root (see csvdata.Root); Inputs are the
	// correlogram files found, in analysis order, and Tables the sample
	// sheet, specification, solvent and thresholds files given, as paths
	// the process can open. The manifest records them relative to Root;
	// for an incomplete document, only the inputs with results.
	Root           string
	Inputs, Tables []string
	// Stream, when set, holds the run's results (Doc.Results is then
	// unused); see Stream.
	Stream *Stream
	// Progress, when set, hears of report pages and hashed inputs.
	Progress func(phase string, done, total int)
	// TableHashes, where set, give the tables' hashes as the run read
	// them (by path); a table without one is hashed here.
	TableHashes map[string]FileHash
	// Hashes, where set, give inputs' digests already taken (by path), so
	// that a file is read once for them; an input without one was not read
	// (its result says why) and the manifest leaves it out. Without
	// Hashes the inputs are hashed here, a missing one left out.
	Hashes map[string]Digest
	// Problems are the measurements the summary lists (see Problems);
	// nil: WriteSet finds them.
	Problems []Problem
	// Shard is recorded in the manifest of one shard's set.
	Shard *ShardInfo
	// Staged says that dir is a staging folder that the caller flushes to
	// disk before publishing it (io/resultset): the files are then written
	// in place, without a temporary name and an fsync each. Otherwise each
	// file is replaced atomically.
	Staged bool
	// Workers is the number of report pages rendered at once (run's -j);
	// 0 means GOMAXPROCS.
	Workers int
	// ReportProgress, when set, is called after each report page with
	// the pages done and the pages in all (see htmlreport.Report.Progress).
	ReportProgress func(done, total int)
}

// Names of the files of a result set.
const (
	ResultsCSV   = "results.csv"
	SamplesCSV   = "samples.csv"
	ResultsJSON  = "results.json"
	ManifestJSON = "manifest.json"
	SummaryTxt   = "summary.txt"
	ReportDir    = "report"
)

// WriteSet writes the whole result set into dir (created when missing;
// normally a staging folder, see io/resultset): results.csv, samples.csv,
// results.json, the HTML report when asked for, and last manifest.json
// with the SHA-256 of every input, table and output. It stops with ctx's
// error soon after ctx is done.
func WriteSet(ctx context.Context, dir string, s *Set) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("output folder: %w", err)
	}
	d := s.Doc
	briefs := dls.Briefs(d.Results)
	if s.Stream != nil {
		briefs = s.Stream.Results()
	}
	inputs := s.Inputs
	if !d.Complete {
		inputs = analysed(s.Root, s.Inputs, briefs)
	}
	problems := s.Problems
	if problems == nil {
		var err error
		if problems, err = s.problems(); err != nil {
			return err
		}
	}
	m := &Manifest{Tool: d.Tool, Version: d.Version, Complete: d.Complete, Root: s.Root, Shard: s.Shard, Settings: d.Settings,
		Files: FileCounts{Found: len(s.Inputs), Analysed: len(inputs)}, Inputs: []FileHash{}, Tables: []FileHash{}}
	result := func(i int, dst []byte) ([]byte, error) {
		return jsonenc.Append(dst, d.Results[i])
	}
	row := func(i int, dst []byte) ([]byte, error) {
		b, err := csvRow(d.Results[i])
		return append(dst, b...), err
	}
	var record func(int, []byte) ([]byte, error)
	if s.Stream != nil {
		result, row, record = s.Stream.appendRaw, s.Stream.appendRow, s.Stream.appendRaw
	} else {
		for _, r := range d.Results {
			if err := checkFinite(r); err != nil {
				return fmt.Errorf("results json: %s: %w", r.File, err)
			}
		}
	}
	if s.Stream != nil {
		// From here the scratch file is only read, from several
		// goroutines at once.
		if err := s.Stream.Flush(); err != nil {
			return fmt.Errorf("results: %w", err)
		}
	}
	tables := func() ([]FileHash, error) {
		var out []FileHash
		for _, f := range []struct {
			name  string
			write func(w io.Writer) error
		}{
			{SummaryTxt, func(w io.Writer) error { return writeSummaryFile(w, d, briefs, problems) }},
			{ResultsCSV, func(w io.Writer) error { return writeCSV(w, len(briefs), row) }},
			{SamplesCSV, func(w io.Writer) error { return WriteSamplesCSV(w, d.Samples, briefs) }},
			{ResultsJSON, func(w io.Writer) error { return writeJSON(w, d, briefs, result) }},
		} {
			h, err := writeHashed(filepath.Join(dir, f.name), s.Staged, f.write)
			if err != nil {
				return nil, err
			}
			h.Path = f.name
			out = append(out, h)
		}
		return out, nil
	}
	// With more than one worker the tables are written while the report
	// is drawn (their bytes, results.json's above all, are mostly
	// copying); with one, one after the other.
	type written struct {
		files []FileHash
		err   error
	}
	tablesDone := make(chan written, 1)
	parallel := s.Workers > 1 || (s.Workers <= 0 && runtime.GOMAXPROCS(0) > 1)
	writeTables := func() {
		defer trace.StartRegion(ctx, "tables").End()
		files, err := tables()
		tablesDone <- written{files, err}
	}
	// With a report, its workers write the tables beside its pages
	// (htmlreport.Report.Beside): a goroutine of their own beside as many
	// page workers as cores left one core with two things to do at the
	// end (on 1,000 demo files at -j 2: tables 121 ms against the pages'
	// 95 ms, 58 ms alone).
	beside := parallel && s.HTMLReport
	coming := !beside // whether tablesDone will receive the tables
	switch {
	case beside:
	case parallel:
		go writeTables()
	default:
		r := trace.StartRegion(ctx, "tables")
		files, err := tables()
		r.End()
		if err != nil {
			return err
		}
		tablesDone <- written{files, nil}
	}
	// waitTables is called once on every path out: the goroutine reads
	// the stream, which Close removes.
	waited := false
	waitTables := func() error {
		if waited {
			return nil
		}
		waited = true
		if !coming {
			return nil // an error before the report began: no tables
		}
		t := <-tablesDone
		m.Outputs = append(t.files, m.Outputs...)
		return t.err
	}
	defer waitTables()
	// The inputs' digests are held as 32 bytes each and written out in
	// hex only as the manifest is written.
	// An input that was not read (removed during the run, say) is left
	// out: its result, an error, says why; the others are attested.
	digests := make([]Digest, 0, len(inputs))
	read := inputs[:0:0]
	for i, f := range inputs {
		if err := ctx.Err(); err != nil {
			return err
		}
		if s.Progress != nil {
			s.Progress("hashing", i+1, len(inputs))
		}
		d, ok := s.Hashes[f]
		switch {
		case ok:
		case s.Hashes != nil:
			continue // not read by the run (its result says why): nothing to attest
		default:
			var err error
			if d, err = DigestFile(f); errors.Is(err, fs.ErrNotExist) {
				continue
			} else if err != nil {
				return err
			}
		}
		digests, read = append(digests, d), append(read, f)
	}
	inputs = read
	m.Files.Analysed = len(inputs)
	for _, f := range s.Tables {
		h, ok := s.TableHashes[f]
		if !ok {
			var err error
			if h, err = HashFile(f); err != nil {
				return err
			}
		}
		h.Path = csvdata.Rel(s.Root, f)
		m.Tables = append(m.Tables, h)
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if s.HTMLReport {
		ran := false
		run := htmlreport.Run{Tool: d.Tool, Version: d.Version, Caution: d.Caution,
			Settings: d.Settings, Results: d.Results, Briefs: briefs, Samples: d.Samples, Batch: d.Batch, LoadRecord: record,
			Workers: s.Workers, Progress: reportProgress(s), Staged: s.Staged, InputRoot: s.Root, Tables: tableFiles(d.Settings, m.Tables)}
		if beside {
			run.Beside = func() { ran = true; writeTables() }
		}
		region := trace.StartRegion(ctx, "report")
		pages, err := htmlreport.WriteFiles(ctx, filepath.Join(dir, ReportDir), htmlreport.FromRun(run))
		region.End()
		if beside && !ran {
			tablesDone <- written{nil, fmt.Errorf("report: %w", err)} // the report failed before the tables were begun
		}
		coming = true
		if err != nil {
			return fmt.Errorf("report: %w", err)
		}
		for _, p := range pages {
			m.Outputs = append(m.Outputs, FileHash{Path: ReportDir + "/" + p.Name, Bytes: p.Bytes, SHA256: p.SHA256})
		}
	}
	if err := waitTables(); err != nil {
		return err
	}
	if s.Stream != nil {
		if err := s.Stream.Close(); err != nil {
			return fmt.Errorf("results: %w", err)
		}
	}
	nm := csvdata.NewNamer(s.Root)
	input := func(i int) FileHash {
		return FileHash{Path: nm.Rel(inputs[i]), Bytes: digests[i].Bytes, SHA256: digests[i].Hex()}
	}
	manifest := func(w io.Writer) error { return writeManifest(w, m, len(inputs), input) }
	if s.Staged {
		return writeInPlace(filepath.Join(dir, ManifestJSON), manifest)
	}
	return atomicfile.WriteFrom(filepath.Join(dir, ManifestJSON), manifest)
}

// appendRaw appends the stored JSON record of result i to dst, for the
// report's pages, which read every record once: into a buffer of their
// own, so that reading them back allocates nothing. Safe for concurrent
// use once every record is added (the scratch file is then flushed and
// only read).
func (s *Stream) appendRaw(i int, dst []byte) ([]byte, error) {
	if r, ok := s.full[i]; ok {
		b, err := json.Marshal(r)
		return append(dst, b...), err
	}
	return s.appendRecord(dst, s.spans[i])
}

// appendRow appends the results.csv row of result i to dst, as appendRaw
// does its record.
func (s *Stream) appendRow(i int, dst []byte) ([]byte, error) {
	if r, ok := s.full[i]; ok {
		b, err := csvRow(r)
		return append(dst, b...), err
	}
	sp := s.spans[i]
	return s.appendAt(dst, s.f, sp.off, sp.csvN)
}

// appendRecord appends the JSON record of span sp to dst, from the
// scratch file or from the records it was added with (AddEncodedAt).
func (s *Stream) appendRecord(dst []byte, sp span) ([]byte, error) {
	src := io.ReaderAt(s.f)
	if sp.ext {
		src = s.records
	}
	return s.appendAt(dst, src, sp.recOff, sp.n)
}

// appendAt appends the n bytes of src at off to dst, the scratch file's
// buffer written out first.
func (s *Stream) appendAt(dst []byte, src io.ReaderAt, off, n int64) ([]byte, error) {
	if err := s.w.Flush(); err != nil {
		return dst, err
	}
	k := len(dst)
	dst = slices.Grow(dst, int(n))[:k+int(n)]
	if _, err := src.ReadAt(dst[k:], off); err != nil && err != io.EOF {
		return dst[:k], err
	}
	return dst, nil
}

// problems finds the measurements the summary lists: in the stream's
// base records, or in the document's results.
func (s *Set) problems() ([]Problem, error) {
	if s.Stream == nil {
		return ProblemsOf(s.Doc.Results, SummaryProblems), nil
	}
	return Problems(s.Stream.Results(), SummaryProblems, s.Stream.Message)
}

// tableFiles names the tables of the manifest for the report's batch
// record by the setting that gave them.
func tableFiles(st *Settings, tables []FileHash) []htmlreport.TableFile {
	out := make([]htmlreport.TableFile, 0, len(tables))
	for _, t := range tables {
		role := "table"
		if st != nil {
			switch t.Path {
			case st.Sheet:
				role = "sample sheet"
			case st.Spec:
				role = "specification"
			case st.SolventFile:
				role = "solvent file"
			case st.QCThresholdsFile:
				role = "QC thresholds"
			}
		}
		out = append(out, htmlreport.TableFile{Role: role, Path: t.Path, SHA256: t.SHA256})
	}
	return out
}

// writeHashed writes a file through write and returns its size and
// SHA-256, computed as the bytes go out: in place when staged (see
// Set.Staged), else atomically.
func writeHashed(path string, staged bool, write func(w io.Writer) error) (FileHash, error) {
	h := sha256.New()
	var n int64
	fill := func(w io.Writer) error {
		cw := &countWriter{w: io.MultiWriter(w, h), n: &n}
		bw := bufio.NewWriterSize(cw, 1<<16)
		if err := write(bw); err != nil {
			return err
		}
		return bw.Flush()
	}
	var err error
	if staged {
		err = writeInPlace(path, fill)
	} else {
		err = atomicfile.WriteFrom(path, fill)
	}
	if err != nil {
		return FileHash{}, err
	}
	return FileHash{Path: path, Bytes: n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}

// writeInPlace creates path (0644 under the umask) and fills it.
func writeInPlace(path string, fill func(w io.Writer) error) error {
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_TRUNC, 0o644)
	if err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err := fill(f); err != nil {
		f.Close()
		return fmt.Errorf("write %s: %w", path, err)
	}
	atomicfile.StartWriteback(f, 0, 0)
	if err := f.Close(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	return nil
}

type countWriter struct {
	w io.Writer
	n *int64
}

func (c *countWriter) Write(p []byte) (int, error) {
	k, err := c.w.Write(p)
	*c.n += int64(k)
	return k, err
}

// analysed lists, in input order, the inputs of which results exist.
func analysed(root string, inputs []string, results []*dls.Brief) []string {
	done := map[string]bool{}
	for _, r := range results {
		done[r.File] = true
	}
	var out []string
	nm := csvdata.NewNamer(root)
	for _, f := range inputs {
		if done[nm.Rel(f)] {
			out = append(out, f)
		}
	}
	return out
}

// reportProgress is the report's page counter: ReportProgress, or the
// set's Progress under the phase "report".
func reportProgress(s *Set) func(done, total int) {
	if s.ReportProgress != nil || s.Progress == nil {
		return s.ReportProgress
	}
	return func(done, total int) { s.Progress("report", done, total) }
}

// writeSummaryFile writes summary.txt: the morning summary as the command
// prints it, with the caution, and a word when the set is incomplete.
func writeSummaryFile(w io.Writer, d *Document, briefs []*dls.Brief, problems []Problem) error {
	if !d.Complete {
		fmt.Fprintf(w, "INCOMPLETE: the run was interrupted; %d measurements finished, no verdicts.\n\n", len(briefs))
	}
	if err := WriteSummary(w, briefs, d.Samples, d.Batch, problems); err != nil {
		return err
	}
	_, err := fmt.Fprintln(w, Caution)
	return err
}
