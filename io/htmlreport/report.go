package htmlreport

import (
	"bytes"
	"context"
	"dlsbatch/io/atomicfile"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"sync"
	"unicode/utf8"

	"dlsbatch/dls"
)

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
	// Results are the measurements in results.csv order.
	Results []*dls.Result
	// Samples are the per-sample aggregates; Sample.Runs, Used and Outliers
	// index Results.
	Samples []*dls.Sample
	// Load, when set, gives result i whole for its sample's page (curves,
	// distributions, parameters), so that Results may hold compact copies
	// and memory need not hold every curve of a large batch.
	Load func(i int) (*dls.Result, error)
	// Progress, when set, is called after each page is written (from the
	// goroutines that write them).
	Progress func()
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

// Count tallies samples by verdict and results by status.
func Count(samples []*dls.Sample, results []*dls.Result) Counts {
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
	rc := dls.CountResults(results)
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
// temporary name and renamed into place. Other files in dir are left
// alone. The output depends only on r: the same report gives the same
// bytes. It returns the names of the files written, sorted, or an error
// when a sample indexes a result that does not exist, or when a file
// cannot be written.
func Write(dir string, r *Report) ([]string, error) {
	return WriteContext(context.Background(), dir, r)
}

// WriteContext is Write that stops, with ctx's error, soon after ctx is
// done (between pages).
func WriteContext(ctx context.Context, dir string, r *Report) ([]string, error) {
	if r == nil {
		return nil, fmt.Errorf("htmlreport: nil report")
	}
	if err := validate(r); err != nil {
		return nil, fmt.Errorf("htmlreport: %w", err)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("htmlreport: %w", err)
	}
	var buf bytes.Buffer
	if err := renderIndex(&buf, r); err != nil {
		return nil, err
	}
	if err := writeFile(dir, "index.html", buf.Bytes()); err != nil {
		return nil, err
	}

	// Sample pages are independent: render them on all cores. Each page's
	// bytes depend only on its own data, so the order of work does not
	// matter for the output.
	n := len(r.Samples)
	workers := min(runtime.GOMAXPROCS(0), n)
	errs := make([]error, n)
	next := make(chan int)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var b bytes.Buffer
			for i := range next {
				if errs[i] = ctx.Err(); errs[i] != nil {
					continue
				}
				b.Reset()
				if errs[i] = renderSample(&b, r, i); errs[i] == nil {
					errs[i] = writeFile(dir, SamplePageName(i), b.Bytes())
				}
				if r.Progress != nil {
					r.Progress()
				}
			}
		}()
	}
	for i := range n {
		next <- i
	}
	close(next)
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	names := []string{"index.html"}
	for i := range n {
		names = append(names, SamplePageName(i))
	}
	sort.Strings(names)
	return names, nil
}

// renderIndex writes the index page of a validated report.
func renderIndex(w *bytes.Buffer, r *Report) error {
	if err := tmpl.ExecuteTemplate(w, "index", buildIndex(r)); err != nil {
		return fmt.Errorf("htmlreport: index: %w", err)
	}
	cleanText(w)
	return nil
}

// renderSample writes the page of sample i of a validated report.
func renderSample(w *bytes.Buffer, r *Report, i int) error {
	page, err := buildSample(r, i)
	if err != nil {
		return fmt.Errorf("htmlreport: %s: %w", SamplePageName(i), err)
	}
	if err := tmpl.ExecuteTemplate(w, "sample", page); err != nil {
		return fmt.Errorf("htmlreport: %s: %w", SamplePageName(i), err)
	}
	cleanText(w)
	return nil
}

// cleanText replaces, in a rendered page, invalid UTF-8 and the control
// characters that neither HTML nor XML text may hold (C0 controls other
// than tab, newline and carriage return, DEL, and the non-characters
// U+FFFE and U+FFFF) by U+FFFD. They can only
// come from user strings; html/template escapes markup but passes them
// through.
func cleanText(b *bytes.Buffer) {
	p := b.Bytes()
	ok := utf8.Valid(p) && !bytes.Contains(p, []byte("\uFFFE")) && !bytes.Contains(p, []byte("\uFFFF"))
	for i := 0; ok && i < len(p); i++ {
		if c := p[i]; (c < 0x20 && c != '\t' && c != '\n' && c != '\r') || c == 0x7f {
			ok = false
		}
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

// validate checks the indices that link samples to results.
func validate(r *Report) error {
	for i, res := range r.Results {
		if res == nil {
			return fmt.Errorf("result %d is nil", i)
		}
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
				if k < 0 || k >= len(r.Results) {
					return fmt.Errorf("sample %d (%q): %s index %d outside the %d results", i, s.Name, set.name, k, len(r.Results))
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
// sees a half-written page.
func writeFile(dir, name string, data []byte) error {
	if err := atomicfile.Write(filepath.Join(dir, name), data); err != nil {
		return fmt.Errorf("htmlreport: %w", err)
	}
	return nil
}
