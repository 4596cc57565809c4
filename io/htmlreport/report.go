package htmlreport

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"
	"unicode/utf8"

	"dlsbatch/dls"
	"dlsbatch/io/atomicfile"
)

// ResolutionLimit states, under every sample's runs, what the intensity
// peaks can and cannot show: the measured resolution of the default
// inversion on photon-level simulated correlator noise (DEVELOPERS.md,
// "Resolution on correlator noise").
const ResolutionLimit = "Intensity peaks come from a regularised inversion: two populations closer than a factor of about 3 in diameter are often shown as one broad peak (measured on simulated correlator noise, 30 s runs), so a single peak does not prove a single population. The analysis of the sample's runs together (their mean correlogram, in the summary above) carries the noise of their mean, is regularised less firmly than one run (by default), and separates close populations more often than any one run does (three runs of 30 s: a factor of 3 in about four samples of five), but not always."

// DefaultCaution is shown when Report.Caution is empty: the report
// supports, and does not replace, qualified review.
const DefaultCaution = "Results support, and do not replace, review by qualified staff under the site's quality system and local regulations."

// DefaultMaxPlotRuns is the number of runs plotted on a sample page when
// Report.MaxPlotRuns is zero.
const DefaultMaxPlotRuns = 24

// Report is the content of an HTML report: one index page and one page per
// sample.
type Report struct {
	Title   string // page title, e.g. "dlsbatch report"; "" means "dlsbatch report"
	Tool    string // name of the program that made the results
	Version string // its version
	// Caution is shown on every page; "" means DefaultCaution.
	Caution string
	// Settings are the analysis settings: a map or a struct with json tags
	// (anything encoding/json writes as an object), shown on the index
	// sorted by key; strings as they are, other values as JSON.
	Settings any
	// Results are the measurements in results.csv order, whole or as
	// compact copies (see Load and LoadRecord); nil when Briefs are given
	// with Load or LoadRecord.
	Results []*dls.Result
	// Briefs, when set, are the briefs of the measurements in results.csv
	// order, which the index reads (nil: taken from Results). A run of
	// tens of thousands of measurements holds only these in memory.
	Briefs []*dls.Brief
	// Samples are the per-sample aggregates; Sample.Runs, Used and Outliers
	// index the measurements.
	Samples []*dls.Sample
	// Load, when set, gives result i whole for its sample's page (curves,
	// distributions, parameters), so that Results may hold compact copies
	// and memory need not hold every curve of a large batch.
	Load func(i int) (*dls.Result, error)
	// LoadRecord, when set, is used instead of Load: it appends result
	// i's JSON record (a dls.Result as results.json holds it) to dst and
	// returns the extended slice, from which the page takes what the
	// compact copy in Results lacks (curves, distributions, parameters,
	// warnings, assumptions, the medium note), or with Results nil every
	// field it shows, without decoding the rest (the inversion's audit,
	// the budgets). Each worker passes a buffer of its own; nothing is
	// kept of it.
	LoadRecord func(i int, dst []byte) ([]byte, error)
	// Workers is the number of pages rendered at once; 0 means
	// GOMAXPROCS. The bytes do not depend on it.
	Workers int
	// Beside, when set, is other work that shares the pages' workers (a
	// run's tables, say): the first worker to start does it, the others
	// begin on the pages, and each takes pages when it is free, so that no
	// core waits while the other has two things to do. WriteFiles does not
	// look at what it does; it runs once, unless WriteFiles fails first.
	Beside func()
	// Progress, when set, is called after each sample page is written
	// with the number of pages done and the number of sample pages; calls
	// come one at a time, done counting up.
	Progress func(done, total int)
	// Staged says that dir is a staging folder which the caller flushes to
	// disk before publishing it (io/resultset): pages are then written in
	// place, without a temporary name and an fsync each.
	Staged bool

	// The batch record on the index: the input root, the tables read with
	// their SHA-256, and the first and last measurement time. When
	// MeasuredFirst and MeasuredLast are empty they are taken from the
	// measured_at parameters (ISO 8601, KeyMeasuredAt) of the runs on the
	// sample pages.
	InputRoot                   string
	Tables                      []TableFile
	MeasuredFirst, MeasuredLast string
	// Batch is the batch-level outcome shown in the index banner.
	Batch BatchStatus
	// MaxPlotRuns is the largest number of runs plotted on one sample page
	// (the first ones in Sample.Runs order); every run is still listed in
	// the tables. 0 means DefaultMaxPlotRuns, a negative value no limit.
	MaxPlotRuns int
}

// Suitability outcomes of a batch.
const (
	SuitabilityValid       = "valid"   // every system suitability check passed
	SuitabilityInvalid     = "invalid" // a check failed: no verdict of the batch stands
	SuitabilityNotAssessed = ""        // no system suitability test was defined
)

// BatchStatus is the batch-level outcome: the system suitability test
// (reference materials measured in the batch against their certified or
// accepted values) and why. The counts of verdicts and statuses shown
// beside it are computed from Report.Samples and Report.Results (see
// Count), so that they cannot disagree with the tables.
type BatchStatus struct {
	// Suitability is SuitabilityValid, SuitabilityInvalid or
	// SuitabilityNotAssessed.
	Suitability string
	// Reason says why in words, e.g. which reference missed which limit.
	Reason string
	// Checks are the system suitability checks, in the order evaluated.
	Checks []SuitabilityCheck
}

// SuitabilityCheck is one system suitability limit evaluated on a sample
// of the batch (typically a reference material).
type SuitabilityCheck struct {
	// Sample indexes Report.Samples; a negative value means the check is
	// about the batch as a whole (e.g. drift between two references).
	Sample int
	dls.Check
}

// Counts are the numbers of samples by verdict and of measurements by
// status.
type Counts struct {
	Samples int // all samples
	Pass    int // verdict pass
	Fail    int // verdict fail
	Invalid int // verdict invalid
	None    int // no verdict (no specification applies)
	Results int // all measurements
	OK      int // status ok
	Warn    int // status warn
	Error   int // status error (or any other status)
}

// Count tallies samples by verdict and measurements by status.
func Count(samples []*dls.Sample, results []*dls.Brief) Counts {
	c := Counts{Samples: len(samples), Results: len(results)}
	for _, s := range samples {
		switch verdictOf(s) {
		case dls.VerdictPass:
			c.Pass++
		case dls.VerdictFail:
			c.Fail++
		case dls.VerdictInvalid:
			c.Invalid++
		default:
			c.None++
		}
	}
	rc := dls.CountBriefs(results)
	c.OK, c.Warn, c.Error = rc.OK, rc.Warn, rc.Error
	return c
}

// verdictOf returns the sample's outcome, or "" when it has none. An
// outcome outside the known three is reported as invalid, so that an
// unknown state is never shown as a pass.
func verdictOf(s *dls.Sample) dls.Outcome {
	if s == nil || s.Verdict == nil {
		return ""
	}
	switch s.Verdict.Outcome {
	case dls.VerdictPass, dls.VerdictFail, dls.VerdictInvalid:
		return s.Verdict.Outcome
	}
	return dls.VerdictInvalid
}

// SamplePageName is the file name of the page of Report.Samples[i]:
// sample-0001.html for i = 0. Names come from the index only, never from
// a sample's name.
func SamplePageName(i int) string { return fmt.Sprintf("sample-%04d.html", i+1) }

// Write renders the report into dir (created when missing): index.html and
// one SamplePageName(i) page per sample. Each file is written to a
// temporary name and renamed into place (unless Report.Staged). Other
// files in dir are left alone. The output depends only on r: the same
// report gives the same bytes. It returns the names of the files written,
// sorted, or an error when a sample indexes a result that does not exist,
// or when a file cannot be written.
func Write(dir string, r *Report) ([]string, error) {
	return WriteContext(context.Background(), dir, r)
}

// WriteContext is Write that stops, with ctx's error, soon after ctx is
// done (between pages).
func WriteContext(ctx context.Context, dir string, r *Report) ([]string, error) {
	files, err := WriteFiles(ctx, dir, r)
	if err != nil {
		return nil, err
	}
	names := make([]string, len(files))
	for i, f := range files {
		names[i] = f.Name
	}
	return names, nil
}

// PageFile is a page written: its file name in the report folder, its
// size and its SHA-256 (hex), computed from the bytes as they were
// written.
type PageFile struct {
	Name   string
	Bytes  int64
	SHA256 string
}

// WriteFiles is WriteContext that also returns the size and SHA-256 of
// every page, sorted by name, so that a manifest need not read them back.
func WriteFiles(ctx context.Context, dir string, r *Report) ([]PageFile, error) {
	if r == nil {
		return nil, fmt.Errorf("htmlreport: nil report")
	}
	r, err := prepare(r)
	if err != nil {
		return nil, fmt.Errorf("htmlreport: %w", err)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("htmlreport: %w", err)
	}

	// Sample pages are independent: render them on Workers goroutines.
	// Each page's bytes depend only on its own data, so the order of work
	// does not matter for the output; the index, written last, gathers
	// what the pages saw (the measured_at range) in page order.
	n := len(r.Samples)
	workers := r.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	first := 0 // task 0 is Beside, when set; the pages follow
	if r.Beside != nil {
		first = 1
	}
	workers = max(1, min(workers, first+n))
	errs := make([]error, n)
	ranges := make([]timeRange, n)
	files := make([]PageFile, n+1)
	var next atomic.Int64
	var mu sync.Mutex
	done := 0
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var w writer
			for {
				i := int(next.Add(1)-1) - first
				if i == -1 {
					r.Beside()
					continue
				}
				if i >= n {
					return
				}
				if errs[i] = ctx.Err(); errs[i] != nil {
					continue
				}
				var page []byte
				if page, ranges[i], errs[i] = renderSample(&w, r, i); errs[i] == nil {
					files[i+1], errs[i] = r.writeFile(dir, SamplePageName(i), page)
				}
				if r.Progress != nil && errs[i] == nil {
					mu.Lock()
					done++
					r.Progress(done, n)
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	var measured timeRange
	for _, tr := range ranges {
		measured.merge(tr)
	}
	if r.Load == nil && r.LoadRecord == nil {
		// Results are whole: runs on no sample's page count too.
		measured = timeRange{}
		for _, res := range r.Results {
			measured.add(res.Params)
		}
	}
	var buf bytes.Buffer
	if err := renderIndex(&buf, r, measured); err != nil {
		return nil, err
	}
	if files[0], err = r.writeFile(dir, "index.html", buf.Bytes()); err != nil {
		return nil, err
	}
	sort.Slice(files, func(a, b int) bool { return files[a].Name < files[b].Name })
	return files, nil
}

// renderIndex writes the index page of a validated report.
func renderIndex(w *bytes.Buffer, r *Report, measured timeRange) error {
	if err := tmpl.ExecuteTemplate(w, "index", buildIndex(r, measured)); err != nil {
		return fmt.Errorf("htmlreport: index: %w", err)
	}
	cleanText(w)
	return nil
}

// renderSample renders the page of sample i of a validated report with w
// and returns it (valid until w's next use) and the measured_at range of
// its runs.
func renderSample(w *writer, r *Report, i int) ([]byte, timeRange, error) {
	w.b = w.b[:0]
	page, err := buildSample(r, i, w)
	if err != nil {
		return nil, timeRange{}, fmt.Errorf("htmlreport: %s: %w", SamplePageName(i), err)
	}
	sections := w.b
	w.b = w.page[:0]
	w.samplePage(&page, sections)
	w.page, w.b = w.b, sections
	return w.page, page.measured, nil
}

// cleanText replaces, in a rendered page, invalid UTF-8 and the control
// characters that neither HTML nor XML text may hold (C0 controls other
// than tab, newline and carriage return, DEL, and the non-characters
// U+FFFE and U+FFFF) by U+FFFD. They can only
// come from user strings; html/template escapes markup but passes them
// through.
func cleanText(b *bytes.Buffer) {
	p := b.Bytes()
	ok := true
	for i := 0; i < len(p); {
		c := p[i]
		if c >= 0x20 && c < 0x7f || c == '\n' || c == '\t' || c == '\r' {
			i++
			continue
		}
		if c < 0x80 {
			ok = false
			break
		}
		r, n := utf8.DecodeRune(p[i:])
		if r == utf8.RuneError && n <= 1 || r == 0xFFFE || r == 0xFFFF {
			ok = false
			break
		}
		i += n
	}
	if ok {
		return
	}
	out := make([]byte, 0, len(p))
	for len(p) > 0 {
		r, n := utf8.DecodeRune(p)
		switch {
		case r == utf8.RuneError && n <= 1,
			r < 0x20 && r != '\t' && r != '\n' && r != '\r',
			r == 0x7f, r == 0xFFFE, r == 0xFFFF:
			out = utf8.AppendRune(out, utf8.RuneError)
		default:
			out = append(out, p[:n]...)
		}
		p = p[n:]
	}
	b.Reset()
	b.Write(out)
}

// prepare returns r ready to write: a copy with its briefs taken from
// its results when it has none, checked by validate.
func prepare(r *Report) (*Report, error) {
	if r.Briefs == nil {
		c := *r
		c.Briefs = dls.Briefs(r.Results)
		r = &c
	}
	return r, validate(r)
}

// validate checks the indices that link samples to results.
func validate(r *Report) error {
	for i, b := range r.Briefs {
		if b == nil || (r.Results != nil && i < len(r.Results) && r.Results[i] == nil) {
			return fmt.Errorf("result %d is nil", i)
		}
	}
	if r.Results != nil && len(r.Results) != len(r.Briefs) {
		return fmt.Errorf("%d results but %d briefs", len(r.Results), len(r.Briefs))
	}
	if r.Results == nil && r.Load == nil && r.LoadRecord == nil && len(r.Briefs) > 0 {
		return fmt.Errorf("briefs without results need Load or LoadRecord")
	}
	for i, s := range r.Samples {
		if s == nil {
			return fmt.Errorf("sample %d is nil", i)
		}
		for _, set := range []struct {
			name string
			idx  []int
		}{{"runs", s.Runs}, {"used", s.Used}, {"outliers", s.Outliers}} {
			for _, k := range set.idx {
				if k < 0 || k >= len(r.Briefs) {
					return fmt.Errorf("sample %d (%q): %s index %d outside the %d results", i, s.Name, set.name, k, len(r.Briefs))
				}
			}
		}
	}
	for _, c := range r.Batch.Checks {
		if c.Sample >= len(r.Samples) {
			return fmt.Errorf("suitability check %q: sample index %d outside the %d samples", c.Quantity, c.Sample, len(r.Samples))
		}
	}
	return nil
}

// writeFile writes data to dir/name atomically, so that a reader never
// sees a half-written page; in a staging folder (Report.Staged), which
// nobody reads before it is flushed and published, in place.
func (r *Report) writeFile(dir, name string, data []byte) (PageFile, error) {
	var err error
	if r.Staged {
		err = atomicfile.WriteStaged(filepath.Join(dir, name), data)
	} else {
		err = atomicfile.Write(filepath.Join(dir, name), data)
	}
	if err != nil {
		return PageFile{}, fmt.Errorf("htmlreport: %w", err)
	}
	sum := sha256.Sum256(data)
	return PageFile{Name: name, Bytes: int64(len(data)), SHA256: hex.EncodeToString(sum[:])}, nil
}
