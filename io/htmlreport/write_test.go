package htmlreport

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"

	"dlsbatch/dls"
)

// writeDemo writes the demo report into a fresh folder and returns it.
func writeDemo(t *testing.T, r *Report) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "report")
	if _, err := Write(dir, r); err != nil {
		t.Fatal(err)
	}
	return dir
}

func readPage(t *testing.T, dir, name string) (*node, []byte) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	return parsePage(t, b), b
}

// The index lists each sample once, problems first, with its verdict
// word, a link to its page named from its position, its temperatures, and
// its flags with their messages as title text.
func TestIndexRows(t *testing.T) {
	r := demoReport(t)
	dir := writeDemo(t, r)
	doc, _ := readPage(t, dir, "index.html")

	table := doc.one(t, "samples table", elemClass("table", "samples"))
	rows := bodyRows(t, table)
	if len(rows) != len(r.Samples) {
		t.Fatalf("index has %d sample rows, want %d (one per sample)", len(rows), len(r.Samples))
	}
	// Expected order, worked by hand from the fixture: the fail (sample
	// 1) and invalid (2) verdicts first, then the samples whose run warns
	// (3: the dusty run's sample; 4: the hostile copy), in batch order;
	// then the passing reference (0), whose run is ok.
	order := []int{1, 2, 3, 4, 0}
	// Expected verdict words: the outcomes set in demoReport; a nil
	// verdict shows "none".
	want := []string{"fail", "invalid", "none", "pass", "pass"}
	for row, tr := range rows {
		i := order[row]
		c := cells(tr)
		if len(c) != 10 {
			t.Fatalf("row %d has %d cells, want 10", row, len(c))
		}
		if got := c[0].text(); got != want[row] {
			t.Errorf("row %d verdict %q, want %q", row, got, want[row])
		}
		if got := tr.hasClass("problem"); got != (row < 4) {
			t.Errorf("row %d marked as a problem: %v, want %v", row, got, row < 4)
		}
		// Temperatures: the demo runs were measured at 25 °C, the
		// hostile copy (sample 4) is set to 37 °C.
		wantT := map[bool]string{true: "37.0", false: "25.0"}[i == 4]
		if got := c[5].text(); got != wantT {
			t.Errorf("row %d temperatures %q, want %q", row, got, wantT)
		}
		// The shape is drawn beside the word (not colour alone).
		if len(c[0].all(elemClass("svg", "shape"))) != 1 {
			t.Errorf("row %d verdict has no shape", i)
		}
		a := c[1].one(t, "sample link", elem("a"))
		if a.Attr["href"] != SamplePageName(i) {
			t.Errorf("row %d links %q, want %q", i, a.Attr["href"], SamplePageName(i))
		}
		if a.text() != r.Samples[i].Name {
			t.Errorf("row %d name %q, want %q", i, a.text(), r.Samples[i].Name)
		}
		if got, want := c[6].text(), strings.Join([]string{strconv.Itoa(len(r.Samples[i].Used)), "/", strconv.Itoa(len(r.Samples[i].Runs))}, " "); got != want {
			t.Errorf("row %d runs %q, want %q", i, got, want)
		}
		flags := c[9].all(elemClass("span", "flag"))
		if len(flags) != len(r.Samples[i].Flags) {
			t.Errorf("row %d shows %d flags, want %d", i, len(flags), len(r.Samples[i].Flags))
		}
		for k, f := range flags {
			if f.text() != string(r.Samples[i].Flags[k].Code) || f.Attr["title"] != r.Samples[i].Flags[k].Message {
				t.Errorf("row %d flag %d: %q/%q, want %q/%q", i, k, f.text(), f.Attr["title"], r.Samples[i].Flags[k].Code, r.Samples[i].Flags[k].Message)
			}
		}
	}
	// Sample 2 (gold): two runs, mean ± SD with one decimal; the values
	// are the fixture's own, formatted as documented (%.1f).
	s := r.Samples[1]
	if got, want := cells(rows[0])[7].text(), fixed(s.ZAvgMeanNm, 1)+" ± "+fixed(s.ZAvgSDNm, 1); got != want {
		t.Errorf("gold z-average %q, want %q", got, want)
	}
	// A single run (the reference, last row) has no SD.
	if got := cells(rows[4])[7].text(); strings.Contains(got, "±") {
		t.Errorf("single-run sample shows an SD: %q", got)
	}

	banner := doc.one(t, "batch banner", elemClass("section", "batch"))
	if txt := banner.text(); !strings.Contains(txt, "System suitability: valid") {
		t.Errorf("banner %q lacks the suitability outcome", txt)
	}
	// Counts from the fixture: verdicts pass, fail, invalid, none, pass;
	// statuses of the six demo results plus the hostile (warn) copy.
	c := Count(r.Samples, dls.Briefs(r.Results))
	if c.Pass != 2 || c.Fail != 1 || c.Invalid != 1 || c.None != 1 {
		t.Errorf("verdict counts %+v, want 2 pass, 1 fail, 1 invalid, 1 none", c)
	}
	dl := banner.one(t, "counts", elemClass("dl", "counts"))
	if got := dl.text(); !strings.Contains(got, "2 pass · 1 fail · 1 invalid · 1 without specification") {
		t.Errorf("counts %q", got)
	}
	if got := len(bodyRows(t, banner.one(t, "suitability checks", elemClass("table", "checks")))); got != 3 {
		t.Errorf("banner has %d suitability checks, want 3", got)
	}

	settings := doc.one(t, "settings", elemClass("table", "settings"))
	if got := len(bodyRows(t, settings)); got != len(settingsRows(r.Settings)) || got == 0 {
		t.Errorf("%d settings rows, want %d", got, len(settingsRows(r.Settings)))
	}
}

// A sample page shows every check of the verdict, the runs table, three
// SVG plots per plotted run and every parameter with its origin.
func TestSamplePage(t *testing.T) {
	r := demoReport(t)
	dir := writeDemo(t, r)
	for i, s := range r.Samples {
		doc, _ := readPage(t, dir, SamplePageName(i))
		if h1 := doc.one(t, "h1", elem("h1")); h1.text() != s.Name {
			t.Errorf("page %d title %q, want %q", i, h1.text(), s.Name)
		}
		verdict := doc.one(t, "verdict", elemClass("section", "verdict"))
		if s.Verdict != nil && len(s.Verdict.Checks) > 0 {
			rows := bodyRows(t, verdict.one(t, "checks", elemClass("table", "checks")))
			if len(rows) != len(s.Verdict.Checks) {
				t.Fatalf("page %d: %d check rows, want %d", i, len(rows), len(s.Verdict.Checks))
			}
			for k, tr := range rows {
				c := cells(tr)
				ck := s.Verdict.Checks[k]
				if !strings.Contains(c[0].text(), ck.Quantity) || c[1].text() != ck.Limit || c[2].text() != checkValue(ck.Quantity, ck.Value) {
					t.Errorf("page %d check %d: %q %q %q", i, k, c[0].text(), c[1].text(), c[2].text())
				}
				want := map[bool]string{true: "pass", false: "fail"}[ck.Pass]
				if c[3].text() != want {
					t.Errorf("page %d check %d result %q, want %q", i, k, c[3].text(), want)
				}
			}
		}
		// Without checks the section says why: no specification (nil
		// verdict) or none evaluated.
		if s.Verdict == nil || len(s.Verdict.Checks) == 0 {
			want := map[bool]string{true: "No specification applies", false: "No limit was evaluated"}[s.Verdict == nil]
			if !strings.Contains(verdict.text(), want) {
				t.Errorf("page %d verdict %q lacks %q", i, verdict.text(), want)
			}
		}
		runs := bodyRows(t, doc.one(t, "runs", elemClass("table", "runs")))
		if len(runs) != len(s.Runs) {
			t.Errorf("page %d: %d run rows, want %d", i, len(runs), len(s.Runs))
		}
		for k, tr := range runs {
			res := r.Results[s.Runs[k]]
			c := cells(tr)
			if c[1].text() != res.File || c[3].text() != string(res.Status) {
				t.Errorf("page %d run %d: file %q status %q, want %q %q", i, k, c[1].text(), c[3].text(), res.File, res.Status)
			}
			outlier := slices.Contains(s.Outliers, s.Runs[k])
			if got := strings.Contains(c[4].text(), "outlier"); got != outlier {
				t.Errorf("page %d run %d: outlier mark %v, want %v", i, k, got, outlier)
			}
		}
		// Every demo result has curves and a distribution: three plots
		// per run.
		plots := doc.all(elemClass("svg", "plot"))
		if len(plots) != 3*len(s.Runs) {
			t.Errorf("page %d: %d plots, want %d", i, len(plots), 3*len(s.Runs))
		}
		params := doc.all(elemClass("table", "params"))
		if len(params) != len(s.Runs) {
			t.Fatalf("page %d: %d params tables, want one per run (%d)", i, len(params), len(s.Runs))
		}
		for k, tb := range params {
			res := r.Results[s.Runs[k]]
			rows := bodyRows(t, tb)
			if len(rows) != len(res.Params) {
				t.Errorf("page %d run %d: %d params, want %d", i, k, len(rows), len(res.Params))
				continue
			}
			for j, tr := range rows {
				p := res.Params[j]
				c := cells(tr)
				// The particle index is shown to four decimals (the
				// format is checked in TestFormats), the text as given
				// on hover.
				value, title := p.Value, ""
				if p.Key == dls.KeyParticleRI && particleIndex(p.Value) != p.Value {
					value, title = particleIndex(p.Value), "as given: "+p.Value
				}
				if c[1].Attr["title"] != title {
					t.Errorf("page %d run %d param %d: title %q, want %q", i, k, j, c[1].Attr["title"], title)
				}
				if c[0].text() != p.Key || c[1].text() != value || c[2].text() != string(p.Origin) || c[3].text() != p.Where {
					t.Errorf("page %d run %d param %d: %q %q %q %q, want %+v", i, k, j, c[0].text(), c[1].text(), c[2].text(), c[3].text(), p)
				}
			}
		}
	}
	// The dusty run carries several warnings (fixture); each is a list
	// item.
	doc, _ := readPage(t, dir, SamplePageName(3))
	lists := doc.all(elemClass("ul", "warnings"))
	if len(lists) != 1 {
		t.Fatalf("%d warning lists, want 1", len(lists))
	}
	if got, want := len(lists[0].all(elem("li"))), len(r.Results[5].Warnings); got != want || want < 2 {
		t.Errorf("%d warnings shown, want %d (the fixture's dusty run has several)", got, want)
	}
}

// Hostile strings are shown as text: the page still parses, the text
// comes back unchanged, the literal tags never appear, and the only files
// written are index.html and the index-numbered sample pages.
func TestHostileStrings(t *testing.T) {
	r := demoReport(t)
	root := t.TempDir()
	dir := filepath.Join(root, "a", "b", "report")
	if _, err := Write(dir, r); err != nil {
		t.Fatal(err)
	}
	hostile := len(r.Samples) - 1
	doc, raw := readPage(t, dir, SamplePageName(hostile))
	for _, s := range []string{"<script", "<img", "<b>", "<i>"} {
		if bytes.Contains(raw, []byte(s)) {
			t.Errorf("sample page contains the literal %q", s)
		}
	}
	if got := doc.one(t, "h1", elem("h1")).text(); got != hostileName {
		t.Errorf("h1 %q, want %q", got, hostileName)
	}
	if got := doc.one(t, "sub", elemClass("p", "sub")).text(); !strings.Contains(got, "lot "+hostileLot) || !strings.Contains(got, "product "+hostileProduct) {
		t.Errorf("sub line %q lacks the lot and product as text", got)
	}
	if got := doc.one(t, "message", elemClass("p", "msg")).text(); got != strings.Join(strings.Fields(hostileMessage), " ") {
		t.Errorf("message %q, want %q", got, hostileMessage)
	}
	// No element other than the page's own: no script, no img, no b/i.
	for _, name := range []string{"script", "img", "b", "i", "iframe"} {
		if n := len(doc.all(elem(name))); n != 0 {
			t.Errorf("%d <%s> elements on the hostile page", n, name)
		}
	}

	idx, rawIdx := readPage(t, dir, "index.html")
	if bytes.Contains(rawIdx, []byte("<script")) || bytes.Contains(rawIdx, []byte("<img")) {
		t.Error("index contains a literal tag from a user string")
	}
	if len(idx.all(elem("script"))) != 0 {
		t.Error("index has a script element")
	}

	// Files: exactly the index and one page per sample, named by position;
	// nothing written outside the report folder.
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	want := []string{"index.html"}
	for i := range r.Samples {
		want = append(want, SamplePageName(i))
	}
	slices.Sort(want)
	if !slices.Equal(names, want) {
		t.Errorf("files %v, want %v", names, want)
	}
	var outside []string
	filepath.WalkDir(root, func(p string, d os.DirEntry, err error) error {
		if err == nil && !d.IsDir() && filepath.Dir(p) != dir {
			outside = append(outside, p)
		}
		return nil
	})
	if len(outside) > 0 {
		t.Errorf("files written outside the report folder: %v", outside)
	}
	if !regexp.MustCompile(`^sample-\d{4}\.html$`).MatchString(SamplePageName(0)) || SamplePageName(0) != "sample-0001.html" {
		t.Errorf("SamplePageName(0) = %q", SamplePageName(0))
	}
}

// The caution is on every page, at the top and in the footer.
func TestCautionOnEveryPage(t *testing.T) {
	r := demoReport(t)
	r.Caution = "" // the default applies
	dir := writeDemo(t, r)
	pages := []string{"index.html"}
	for i := range r.Samples {
		pages = append(pages, SamplePageName(i))
	}
	// The caution's wording is set by the project's rules for lot-release
	// outputs.
	const want = "Results support, and do not replace, review by qualified staff under the site's quality system and local regulations."
	for _, name := range pages {
		doc, _ := readPage(t, dir, name)
		top := doc.one(t, name+" caution", elemClass("p", "caution"))
		if !strings.Contains(top.text(), want) {
			t.Errorf("%s: caution %q", name, top.text())
		}
		foot := doc.one(t, name+" footer", elem("footer"))
		if !strings.Contains(foot.text(), want) {
			t.Errorf("%s: footer %q", name, foot.text())
		}
	}
}

// Every sample page states the resolution limit of its intensity peaks
// beside the runs table (the measured table is in DEVELOPERS.md).
func TestResolutionLimitOnSamplePages(t *testing.T) {
	r := demoReport(t)
	dir := writeDemo(t, r)
	for i := range r.Samples {
		name := SamplePageName(i)
		doc, _ := readPage(t, dir, name)
		found := false
		for _, n := range doc.all(elemClass("p", "note")) {
			if strings.Contains(n.text(), "closer than a factor of about 3 in diameter") {
				found = true
			}
		}
		if !found {
			t.Errorf("%s: no note states the resolution limit", name)
		}
	}
}

// writeWith writes r into a fresh folder and returns every file's bytes.
func writeWith(t *testing.T, r *Report) map[string][]byte {
	t.Helper()
	dir := writeDemo(t, r)
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	out := map[string][]byte{}
	for _, e := range entries {
		if out[e.Name()], err = os.ReadFile(filepath.Join(dir, e.Name())); err != nil {
			t.Fatal(err)
		}
	}
	return out
}

// withRecords makes r's pages read every run back from its JSON record
// while Results hold compact copies, as a run hands them over.
func withRecords(t *testing.T, r *Report) *Report {
	t.Helper()
	c := *r
	c.Results = make([]*dls.Result, len(r.Results))
	raw := make([][]byte, len(r.Results))
	for i, res := range r.Results {
		var err error
		if raw[i], err = json.Marshal(res); err != nil {
			t.Fatal(err)
		}
		c.Results[i] = compactOf(res)
	}
	c.LoadRecord = func(i int, dst []byte) ([]byte, error) { return append(dst, raw[i]...), nil }
	return &c
}

// The same report gives the same bytes whatever the number of workers
// (Workers, and GOMAXPROCS for the default), whether pages read the runs
// from memory or back from their records, whether it is written in place
// (Staged) or file by file through temporary names, and whether other work
// shares its workers (Beside, which runs once).
func TestDeterministic(t *testing.T) {
	for _, base := range []struct {
		name string
		r    *Report
	}{{"demo", demoReport(t)}, {"synthetic", synthReport(7, 3)}} {
		want := writeWith(t, base.r)
		if len(want) != len(base.r.Samples)+1 {
			t.Fatalf("%s: %d files, want %d", base.name, len(want), len(base.r.Samples)+1)
		}
		variants := map[string]func() *Report{
			"one worker":   func() *Report { c := *base.r; c.Workers = 1; return &c },
			"five workers": func() *Report { c := *base.r; c.Workers = 5; return &c },
			"records":      func() *Report { c := withRecords(t, base.r); c.Workers = 2; return c },
			"staged":       func() *Report { c := *base.r; c.Staged = true; return &c },
		}
		for _, name := range []string{"one worker", "five workers", "records", "staged"} {
			got := writeWith(t, variants[name]())
			for f, b := range want {
				if !bytes.Equal(got[f], b) {
					t.Errorf("%s, %s: %s differs", base.name, name, f)
				}
			}
			if len(got) != len(want) {
				t.Errorf("%s, %s: %d files, want %d", base.name, name, len(got), len(want))
			}
		}
		// Other work beside the pages (a run's tables): done once, by one
		// of the workers, whatever their number, and the pages unchanged.
		for _, workers := range []int{1, 2, 5} {
			c := *base.r
			c.Workers = workers
			var calls atomic.Int32
			c.Beside = func() { calls.Add(1) }
			got := writeWith(t, &c)
			if n := calls.Load(); n != 1 {
				t.Errorf("%s, %d workers: the work beside the pages ran %d times, want once", base.name, workers, n)
			}
			for f, b := range want {
				if !bytes.Equal(got[f], b) {
					t.Errorf("%s, %d workers with work beside: %s differs", base.name, workers, f)
				}
			}
		}
		prev := runtime.GOMAXPROCS(1)
		got := writeWith(t, base.r)
		runtime.GOMAXPROCS(prev)
		for f, b := range want {
			if !bytes.Equal(got[f], b) {
				t.Errorf("%s, GOMAXPROCS 1: %s differs", base.name, f)
			}
		}
	}
}

// Progress is called once per sample page, one call at a time, counting
// up to the number of sample pages; WriteFiles reports every page with
// its size and SHA-256, which match the files (crypto/sha256 of the bytes
// read back).
func TestProgressAndHashes(t *testing.T) {
	r := synthReport(9, 2)
	r.Workers = 3
	var calls []int
	r.Progress = func(done, total int) {
		if total != 9 {
			t.Errorf("total %d, want 9", total)
		}
		calls = append(calls, done) // calls come one at a time
	}
	dir := filepath.Join(t.TempDir(), "report")
	files, err := WriteFiles(context.Background(), dir, r)
	if err != nil {
		t.Fatal(err)
	}
	for k, d := range calls {
		if d != k+1 {
			t.Fatalf("progress calls %v, want 1 … 9", calls)
		}
	}
	if len(calls) != 9 {
		t.Errorf("%d progress calls, want 9", len(calls))
	}
	if len(files) != 10 || files[0].Name != "index.html" {
		t.Fatalf("files %+v", files)
	}
	for _, f := range files {
		b, err := os.ReadFile(filepath.Join(dir, f.Name))
		if err != nil {
			t.Fatal(err)
		}
		sum := sha256.Sum256(b)
		if f.Bytes != int64(len(b)) || f.SHA256 != hex.EncodeToString(sum[:]) {
			t.Errorf("%s: %d bytes %s, file has %d bytes %x", f.Name, f.Bytes, f.SHA256, len(b), sum)
		}
	}
}

// Self-contained: no URL that leaves the folder, no script, no external
// stylesheet, every local link resolves to a written page.
func TestOffline(t *testing.T) {
	r := demoReport(t)
	dir := writeDemo(t, r)
	entries, _ := os.ReadDir(dir)
	external := regexp.MustCompile(`(?i)(src|href)\s*=\s*"(https?:|//|file:|data:)|url\(|@import`)
	for _, e := range entries {
		doc, raw := readPage(t, dir, e.Name())
		if m := external.Find(raw); m != nil {
			t.Errorf("%s references outside the report: %q", e.Name(), m)
		}
		if n := len(doc.all(func(n *node) bool { return n.Name == "script" || n.Name == "link" || n.Name == "img" })); n != 0 {
			t.Errorf("%s has %d script/link/img elements", e.Name(), n)
		}
		for _, a := range doc.all(elem("a")) {
			href := a.Attr["href"]
			if strings.HasPrefix(href, "#") {
				if id := href[1:]; len(doc.all(func(n *node) bool { return n.Attr["id"] == id })) != 1 {
					t.Errorf("%s: anchor %q has no single target", e.Name(), href)
				}
				continue
			}
			if _, err := os.Stat(filepath.Join(dir, href)); err != nil {
				t.Errorf("%s links %q, which was not written", e.Name(), href)
			}
		}
	}
}

// Pages that plot only some of their runs (MaxPlotRuns) read the others'
// records without their curves and distribution: the pages are the bytes
// of the same report drawn from the runs in memory.
func TestUnplottedRunsFromRecords(t *testing.T) {
	base := synthReport(7, 3)
	base.MaxPlotRuns = 1
	want := writeWith(t, base)
	got := writeWith(t, withRecords(t, base))
	if len(got) != len(want) {
		t.Fatalf("%d files, want %d", len(got), len(want))
	}
	for f, b := range want {
		if !bytes.Equal(got[f], b) {
			t.Errorf("%s differs when its unplotted runs are read from their records", f)
		}
	}
	// The skip is taken: a record read for a run not plotted has no curves.
	raw, err := json.Marshal(base.Results[0])
	if err != nil {
		t.Fatal(err)
	}
	var arena []float64
	for _, plots := range []bool{true, false} {
		r, err := pageRecord(compactOf(base.Results[0]), raw, &arena, nil, plots)
		if err != nil || (r.Curves != nil) != plots || (r.Distribution != nil) != plots || len(r.Params) == 0 {
			t.Errorf("plots %v: curves %v, distribution %v, %d params, %v", plots, r.Curves != nil, r.Distribution != nil, len(r.Params), err)
		}
	}
}

// MaxPlotRuns bounds the plots on a page, not the tables.
func TestPlotLimit(t *testing.T) {
	r := synthReport(1, 5)
	for _, tc := range []struct {
		name  string
		limit int
		plots int // 3 per plotted run
	}{
		{"two", 2, 6},
		{"default is more than five", 0, 15},
		{"no limit", -1, 15},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r.MaxPlotRuns = tc.limit
			dir := writeDemo(t, r)
			doc, _ := readPage(t, dir, SamplePageName(0))
			if got := len(doc.all(elemClass("svg", "plot"))); got != tc.plots {
				t.Errorf("%d plots, want %d", got, tc.plots)
			}
			if got := len(bodyRows(t, doc.one(t, "runs", elemClass("table", "runs")))); got != 5 {
				t.Errorf("%d run rows, want 5", got)
			}
			if got := len(doc.all(elemClass("table", "params"))); got != 5 {
				t.Errorf("%d params tables, want 5", got)
			}
		})
	}
}

// Indices that point outside the results are refused with an error that
// names the sample; nothing is written.
func TestWriteErrors(t *testing.T) {
	for _, tc := range []struct {
		name   string
		modify func(r *Report)
		want   string
	}{
		{"run index too large", func(r *Report) { r.Samples[1].Runs = append(r.Samples[1].Runs, 99) }, "runs index 99"},
		{"negative used index", func(r *Report) { r.Samples[0].Used = []int{-1} }, "used index -1"},
		{"outlier index", func(r *Report) { r.Samples[2].Outliers = []int{7} }, "outliers index 7"},
		{"nil result", func(r *Report) { r.Results[3] = nil }, "result 3 is nil"},
		{"nil sample", func(r *Report) { r.Samples[0] = nil }, "sample 0 is nil"},
		{"suitability sample", func(r *Report) { r.Batch.Checks[0].Sample = 40 }, "sample index 40"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := demoReport(t)
			tc.modify(r)
			dir := filepath.Join(t.TempDir(), "out")
			_, err := Write(dir, r)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v, want one containing %q", err, tc.want)
			}
			if _, err := os.Stat(dir); !os.IsNotExist(err) {
				t.Errorf("report folder created despite the error")
			}
		})
	}
	if _, err := Write(t.TempDir(), nil); err == nil {
		t.Error("nil report: no error")
	}
}

// An unknown verdict outcome is never shown as a pass.
func TestUnknownOutcome(t *testing.T) {
	s := &dls.Sample{Verdict: &dls.Verdict{Outcome: "maybe"}}
	if got := verdictMark(s); got.Word != string(dls.VerdictInvalid) {
		t.Errorf("unknown outcome shown as %q, want invalid", got.Word)
	}
}

func TestMergeFlags(t *testing.T) {
	got := mergeFlags([]dls.Flag{{Code: "A", Message: "r1"}, {Code: "B", Message: "x"}, {Code: "A", Message: "r2"}})
	if len(got) != 2 || got[0].Code != "A" || got[0].Message != "r1; r2" || got[1].Code != "B" {
		t.Errorf("merged %+v", got)
	}
}

// TestPeaksWithUncertainty checks that a sample page states each run's
// intensity peaks with the standard uncertainties the inversion gave them,
// and the peaks matched across the sample's runs with how many runs show
// each: the page must say what results.csv and samples.csv say, in the
// same rounding as the other sizes of the page.
func TestPeaksWithUncertainty(t *testing.T) {
	r := demoReport(t)
	// The fixture predates the peaks' uncertainties: give every peak one
	// (2 % of its mean, 2 points of area) and every sample its peaks
	// matched across runs, as a run computes them.
	for _, res := range r.Results {
		if res.Intensity == nil {
			continue
		}
		pks := slices.Clone(res.Intensity.Peaks)
		for k := range pks {
			pks[k].MeanUNm, pks[k].AreaUPct = 0.02*pks[k].MeanNm, 2
		}
		in := *res.Intensity
		in.Peaks = pks
		res.Intensity = &in
	}
	for _, s := range r.Samples {
		var runs [][]dls.Peak
		for _, idx := range s.Used {
			if in := r.Results[idx].Intensity; in != nil {
				runs = append(runs, in.Peaks)
			}
		}
		s.IntensityPeaks = dls.MatchPeaks(runs)
	}
	dir := writeDemo(t, r)
	withU, matched := 0, 0
	for i, s := range r.Samples {
		_, raw := readPage(t, dir, SamplePageName(i))
		page := string(raw)
		for _, idx := range s.Runs {
			res := r.Results[idx]
			if res.Intensity == nil {
				continue
			}
			for _, pk := range res.Intensity.Peaks {
				want := peakText(pk)
				if !strings.Contains(page, want) {
					t.Errorf("%s: run %s: peak %q missing", SamplePageName(i), res.File, want)
				}
				if pk.MeanUNm > 0 && strings.Contains(want, size(pk.MeanNm)+" ± "+size(pk.MeanUNm)+" nm") {
					withU++
				}
			}
		}
		for _, pk := range s.IntensityPeaks {
			matched++
			want := fmt.Sprintf("in %d of %d runs", pk.NRuns, pk.NOf)
			if !strings.Contains(page, size(pk.MeanNm)+" nm (") || !strings.Contains(page, want) {
				t.Errorf("%s: matched peak at %s nm (%s) missing", SamplePageName(i), size(pk.MeanNm), want)
			}
		}
	}
	if withU == 0 || matched == 0 {
		t.Errorf("%d peaks with an uncertainty, %d matched across runs: nothing was checked", withU, matched)
	}
}

func TestPeakText(t *testing.T) {
	for _, c := range []struct {
		pk   dls.Peak
		want string
	}{
		{dls.Peak{MeanNm: 52.14, AreaPct: 48.4, MeanUNm: 1.26, AreaUPct: 3.2}, "52.1 ± 1.26 nm (48 ± 3 %)"},
		{dls.Peak{MeanNm: 151.2, AreaPct: 100}, "151 nm (100 %)"},
	} {
		if got := peakText(c.pk); got != c.want {
			t.Errorf("peakText(%+v) = %q, want %q", c.pk, got, c.want)
		}
	}
}
