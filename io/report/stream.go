package report

import (
	"bufio"
	"dlsbatch/io/jsonenc"
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
// arrives, in input order, with its results.csv row (or, added with
// AddEncodedAt, is read back from the file that already holds it: the
// run's journal), and only a brief
// (dls.Brief) stays in memory
// for the per-sample statistics, verdicts, tables and the report's index.
// Records of measurements in a group stay whole in memory, because the
// group analyses annotate them after the fact. WriteSet then writes
// results.json from the scratch file and the report's pages from records
// read back one sample at a time, so memory grows with the number of
// measurements only by the briefs.
type Stream struct {
	f      *os.File
	w      *bufio.Writer
	off    int64
	spans  []span // of each result's JSON record, then its CSV row
	briefs []*dls.Brief
	full   map[int]*dls.Result
	field  []byte // scratch for a field run's encoding
	// records holds the JSON records of the results added by
	// AddEncodedAt (a run's journal), nil until then.
	records io.ReaderAt
}

// span locates a result: its JSON record at recOff (n bytes), in the
// scratch file or (ext) in records; in the scratch file at off its CSV row
// (csvN bytes), then its field run (fieldN, 0 for none).
type span struct {
	recOff, n         int64
	ext               bool
	off, csvN, fieldN int64
}

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
	enc := make([]Encoded, len(results))
	recs := make([][]byte, len(results))
	for i, r := range results {
		var err error
		if enc[i], err = Encode(r); err != nil {
			return nil, err
		}
		recs[i] = enc[i].Record
	}
	return recs, s.AddEncoded(results, enc)
}

// Encoded is a result encoded for the stream: its JSON record (as
// results.json holds it) and its results.csv row.
type Encoded struct {
	Record, Row []byte
}

// Encode encodes a result for the stream; a result holding NaN or Inf is
// refused. It may run in parallel, ahead of AddEncoded, which takes
// results one file at a time.
func Encode(r *dls.Result) (Encoded, error) {
	var e Encoded
	if err := checkFinite(r); err != nil {
		return e, fmt.Errorf("results json: %s: %w", r.File, err)
	}
	var err error
	if e.Record, err = jsonenc.Marshal(r); err != nil {
		return e, fmt.Errorf("results json: %s: %w", r.File, err)
	}
	if e.Row, err = csvRow(r); err != nil {
		return e, fmt.Errorf("results csv: %s: %w", r.File, err)
	}
	return e, nil
}

// AddEncoded records the results of one file with their encodings from
// Encode.
func (s *Stream) AddEncoded(results []*dls.Result, enc []Encoded) error {
	return s.add(results, enc, nil, nil)
}

// AddEncodedAt is AddEncoded for records that are already written, each
// enc[i].Record at offset at[i] of records (the run's journal, which must
// hold them unchanged until the stream is closed), so that the scratch
// file need not hold them a second time: 40 MB fewer written for 1,000
// runs. Every call must name the same records.
func (s *Stream) AddEncodedAt(results []*dls.Result, enc []Encoded, records io.ReaderAt, at []int64) error {
	if len(at) != len(enc) || records == nil || (s.records != nil && s.records != records) {
		return fmt.Errorf("results: %d record offsets for %d records", len(at), len(enc))
	}
	s.records = records
	return s.add(results, enc, records, at)
}

func (s *Stream) add(results []*dls.Result, enc []Encoded, records io.ReaderAt, at []int64) error {
	for i, r := range results {
		if r.Group != "" {
			s.full[len(s.briefs)] = r
			s.spans = append(s.spans, span{recOff: -1})
			s.briefs = append(s.briefs, briefOf(r))
			continue
		}
		e := enc[i]
		s.field = appendFieldRun(s.field[:0], dls.FieldRunOf(r))
		sp := span{recOff: s.off, n: int64(len(e.Record)), csvN: int64(len(e.Row)), fieldN: int64(len(s.field))}
		parts := [][]byte{e.Record, e.Row, s.field}
		if records != nil {
			sp.recOff, sp.ext, parts = at[i], true, parts[1:]
		}
		for _, part := range parts {
			if _, err := s.w.Write(part); err != nil {
				return fmt.Errorf("results: %w", err)
			}
			s.off += int64(len(part))
		}
		sp.off = s.off - sp.csvN - sp.fieldN
		s.spans = append(s.spans, sp)
		s.briefs = append(s.briefs, briefOf(r))
	}
	return nil
}

// Results are the briefs of the results in input order; the i-th has
// index i in samples' run lists.
func (s *Stream) Results() []*dls.Brief { return s.briefs }

// Members returns, at the indices of Results, the results of the
// measurements in a group, whole and held in memory, and nil for the rest:
// what batch.Groups reads and annotates. Call Rebrief after annotating.
func (s *Stream) Members() []*dls.Result {
	out := make([]*dls.Result, len(s.briefs))
	for i, r := range s.full {
		out[i] = r
	}
	return out
}

// Rebrief takes the briefs of the group members afresh from their
// results, after the group analyses changed them.
func (s *Stream) Rebrief() {
	for i, r := range s.full {
		s.briefs[i] = briefOf(r)
	}
}

// briefOf is r's brief. Texts that repeat from measurement to measurement
// (sample, lot, product, group) are interned: a batch of thousands of runs
// of a few samples holds each once.
func briefOf(r *dls.Result) *dls.Brief {
	b := r.Brief()
	for _, p := range []*string{&b.Sample, &b.Lot, &b.Product, &b.Group} {
		*p = intern(*p)
	}
	return b
}

// intern returns the one copy of s the process keeps.
func intern(s string) string {
	if s == "" {
		return s
	}
	return unique.Make(s).Value()
}

// Full returns result i whole, read back from the scratch file (JSON
// carries every field of a result, so the record comes back as it was).
func (s *Stream) Full(i int) (*dls.Result, error) {
	if r, ok := s.full[i]; ok {
		return r, nil
	}
	b, err := s.appendRaw(i, nil)
	if err != nil {
		return nil, err
	}
	var r dls.Result
	if err := json.Unmarshal(b, &r); err != nil {
		return nil, fmt.Errorf("results: reading back %s: %w", s.briefs[i].File, err)
	}
	return &r, nil
}

// Field returns the field run of result i (dls.FieldRunOf), nil when it
// has none: what a joint inversion of the sample's runs takes. After
// Flush, Field may be called from several goroutines.
func (s *Stream) Field(i int) (*dls.FieldRun, error) {
	if r, ok := s.full[i]; ok {
		return dls.FieldRunOf(r), nil
	}
	sp := s.spans[i]
	if sp.fieldN == 0 {
		return nil, nil
	}
	b := make([]byte, sp.fieldN)
	if _, err := s.f.ReadAt(b, sp.off+sp.csvN); err != nil && err != io.EOF {
		return nil, fmt.Errorf("results: reading back %s: %w", s.briefs[i].File, err)
	}
	f, err := readFieldRun(b)
	if err != nil {
		return nil, fmt.Errorf("results: reading back %s: %w", s.briefs[i].File, err)
	}
	return f, nil
}

// Message returns result i's message, from its record.
func (s *Stream) Message(i int) (string, error) {
	r, err := s.Full(i)
	if err != nil {
		return "", err
	}
	return r.Message, nil
}

// Flush writes out what the scratch file's buffer holds; after it, and
// until another Add, the stream may be read from several goroutines.
func (s *Stream) Flush() error { return s.w.Flush() }

// Close removes the scratch file.
func (s *Stream) Close() error {
	name := s.f.Name()
	s.f.Close()
	return os.Remove(name)
}
