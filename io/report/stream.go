package report

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"unique"

	"dlsbatch/dls"
)

// Stream keeps a run's results out of memory: each full record (curves,
// distributions, audit) goes to a scratch file in the staging folder as it
// arrives, in input order, and only a compact copy stays in memory for the
// per-sample statistics, groups, verdicts, tables and the report's index.
// Records of measurements in a group stay whole in memory, because the
// group analyses annotate them after the fact. WriteSet then writes
// results.json from the scratch file and the report's pages from records
// read back one sample at a time, so memory grows with the number of
// measurements only by the compact copies.
type Stream struct {
	f       *os.File
	w       *bufio.Writer
	off     int64
	spans   []span // of each result's JSON record, then its CSV row
	compact []*dls.Result
	full    map[int]*dls.Result
}

type span struct{ off, n, csvN int64 }

// scratchName is the scratch file, removed before the set is published.
const scratchName = ".results.part"

// NewStream starts a stream in dir (the staging folder).
func NewStream(dir string) (*Stream, error) {
	f, err := os.OpenFile(filepath.Join(dir, scratchName), os.O_RDWR|os.O_CREATE|os.O_TRUNC, 0o600)
	if err != nil {
		return nil, fmt.Errorf("results: %w", err)
	}
	return &Stream{f: f, w: bufio.NewWriterSize(f, 1<<16), full: map[int]*dls.Result{}}, nil
}

// Add records the results of one file. A result holding NaN or Inf is
// refused, as in WriteJSON.
func (s *Stream) Add(results []*dls.Result) error {
	_, err := s.AddRecords(results)
	return err
}

// AddRecords is Add that also returns each result's JSON record as
// results.json will hold it (for a journal to reuse; not to be kept: a
// record of a group member is encoded afresh).
func (s *Stream) AddRecords(results []*dls.Result) ([][]byte, error) {
	recs := make([][]byte, len(results))
	rows := make([][]byte, len(results))
	for i, r := range results {
		var err error
		if recs[i], rows[i], err = Encode(r); err != nil {
			return nil, err
		}
	}
	return recs, s.AddEncoded(results, recs, rows)
}

// Encode is a result's JSON record (as results.json holds it) and its
// results.csv row; a result holding NaN or Inf is refused. It may run in
// parallel, ahead of AddEncoded, which takes results one file at a time.
func Encode(r *dls.Result) (record, row []byte, err error) {
	if err := checkFinite(r); err != nil {
		return nil, nil, fmt.Errorf("results json: %s: %w", r.File, err)
	}
	if record, err = json.Marshal(r); err != nil {
		return nil, nil, fmt.Errorf("results json: %s: %w", r.File, err)
	}
	if row, err = csvRow(r); err != nil {
		return nil, nil, fmt.Errorf("results csv: %s: %w", r.File, err)
	}
	return record, row, nil
}

// AddEncoded records the results of one file with their encodings from
// Encode.
func (s *Stream) AddEncoded(results []*dls.Result, recs, rows [][]byte) error {
	for i, r := range results {
		b, row := recs[i], rows[i]
		if r.Group != "" {
			s.full[len(s.compact)] = r
			s.spans = append(s.spans, span{-1, 0, 0})
			s.compact = append(s.compact, r)
			continue
		}
		for _, part := range [][]byte{b, row} {
			if _, err := s.w.Write(part); err != nil {
				return fmt.Errorf("results: %w", err)
			}
		}
		s.spans = append(s.spans, span{s.off, int64(len(b)), int64(len(row))})
		s.off += int64(len(b) + len(row))
		s.compact = append(s.compact, compactOf(r))
	}
	return nil
}

// Results are the compact results in input order; the i-th has index i in
// samples' run lists.
func (s *Stream) Results() []*dls.Result { return s.compact }

// compactOf keeps what the per-sample statistics, verdicts, summary,
// samples.csv and the report's index need: identity, flags, conditions,
// the cumulant fit and the intensity summary (peaks, percentiles). The rest
// (curves, parameters, budget, the distributions themselves, volume and
// number summaries, notes) is in the scratch file with the record's
// results.csv row; Full reads it back where it is needed.
//
// Texts that repeat from measurement to measurement (sample, lot, product,
// solvent, the sources of η and n, the particle index, the column and
// method names) are interned: a batch of thousands of runs of a few
// samples holds each once.
func compactOf(r *dls.Result) *dls.Result {
	c := *r
	c.Curves, c.Params, c.Budget, c.Volume, c.Number, c.Distribution = nil, nil, nil, nil, nil, nil
	c.Assumptions, c.Warnings, c.Medium = nil, nil, nil
	for _, p := range []*string{&c.Sample, &c.Lot, &c.Product, &c.Group, &c.Solvent, &c.ViscositySource, &c.IndexSource,
		&c.Method, &c.CorrelationColumn, &c.CorrelationKind, &c.ParticleRI, &c.AlphaCriterion, &c.Correction} {
		*p = intern(*p)
	}
	return &c
}

// intern returns the one copy of s the process keeps.
func intern(s string) string {
	if s == "" {
		return s
	}
	return unique.Make(s).Value()
}

// raw returns the stored JSON record of result i.
func (s *Stream) raw(i int) ([]byte, error) {
	if r, ok := s.full[i]; ok {
		return json.Marshal(r)
	}
	sp := s.spans[i]
	return s.read(sp.off, sp.n)
}

// row returns the results.csv row of result i.
func (s *Stream) row(i int) ([]byte, error) {
	if r, ok := s.full[i]; ok {
		return csvRow(r)
	}
	sp := s.spans[i]
	return s.read(sp.off+sp.n, sp.csvN)
}

func (s *Stream) read(off, n int64) ([]byte, error) {
	if err := s.w.Flush(); err != nil {
		return nil, err
	}
	b := make([]byte, n)
	if _, err := s.f.ReadAt(b, off); err != nil && err != io.EOF {
		return nil, err
	}
	return b, nil
}

// Full returns result i whole, read back from the scratch file (JSON
// carries every field of a result, so the record comes back as it was).
func (s *Stream) Full(i int) (*dls.Result, error) {
	if r, ok := s.full[i]; ok {
		return r, nil
	}
	b, err := s.raw(i)
	if err != nil {
		return nil, err
	}
	var r dls.Result
	if err := json.Unmarshal(b, &r); err != nil {
		return nil, fmt.Errorf("results: reading back %s: %w", s.compact[i].File, err)
	}
	return &r, nil
}

// Close removes the scratch file.
func (s *Stream) Close() error {
	name := s.f.Name()
	s.f.Close()
	return os.Remove(name)
}
