package htmlreport

import (
	"strings"
	"testing"
	"time"

	"dlsbatch/dls"
)

// ISO 8601 date and time forms (ISO 8601-1:2019, extended format) that a
// measured_at value may take; times without a zone read as UTC. Expected
// instants worked by hand.
func TestMeasuredTime(t *testing.T) {
	utc := func(y int, mo time.Month, d, h, mi, s, ns int) time.Time {
		return time.Date(y, mo, d, h, mi, s, ns, time.UTC)
	}
	for _, tc := range []struct {
		in   string
		want time.Time
		ok   bool
	}{
		{"2024-03-05T21:07:30Z", utc(2024, 3, 5, 21, 7, 30, 0), true},
		{"2024-03-05T22:07:30+01:00", utc(2024, 3, 5, 21, 7, 30, 0), true},
		{"2024-03-05T21:07:30.25Z", utc(2024, 3, 5, 21, 7, 30, 250e6), true},
		{"2024-03-05T21:07:30", utc(2024, 3, 5, 21, 7, 30, 0), true},
		{"2024-03-05 21:07:30", utc(2024, 3, 5, 21, 7, 30, 0), true},
		{"2024-03-05T21:07", utc(2024, 3, 5, 21, 7, 0, 0), true},
		{"2024-03-05T21:07Z", utc(2024, 3, 5, 21, 7, 0, 0), true},
		{"2024-03-05", utc(2024, 3, 5, 0, 0, 0, 0), true},
		{" 2024-03-05 ", utc(2024, 3, 5, 0, 0, 0, 0), true},
		{"05.03.2024 21:07", time.Time{}, false},
		{"2024-13-05", time.Time{}, false},
		{"yesterday", time.Time{}, false},
	} {
		got, ok := measuredTime(tc.in)
		if ok != tc.ok || (ok && !got.Equal(tc.want)) {
			t.Errorf("measuredTime(%q) = %v, %v; want %v, %v", tc.in, got, ok, tc.want, tc.ok)
		}
	}
}

// The earliest and latest measured_at are chosen by time, not by text
// (an offset puts the text out of order), whatever the order in which
// runs are merged; unreadable values are not counted.
func TestTimeRange(t *testing.T) {
	params := func(v string) []dls.Param {
		return []dls.Param{{Key: "sample", Value: "x"}, {Key: KeyMeasuredAt, Value: v}}
	}
	values := []string{"2024-03-05T23:30:00+02:00", "2024-03-05T21:10:00Z", "not a time", "2024-03-06T01:00:00+00:00", "2024-03-05T21:40:00"}
	// By hand: 23:30+02:00 is 21:30Z, the earliest is 21:10Z, the latest
	// 2024-03-06 01:00Z; four readable values.
	for _, order := range [][]int{{0, 1, 2, 3, 4}, {4, 3, 2, 1, 0}, {2, 0, 4, 1, 3}} {
		var a, b timeRange
		for k, i := range order {
			if k%2 == 0 {
				a.add(params(values[i]))
			} else {
				b.add(params(values[i]))
			}
		}
		a.merge(b)
		if a.first != "2024-03-05T21:10:00Z" || a.last != "2024-03-06T01:00:00+00:00" || a.n != 4 {
			t.Errorf("order %v: %q … %q (%d), want 2024-03-05T21:10:00Z … 2024-03-06T01:00:00+00:00 (4)", order, a.first, a.last, a.n)
		}
	}
}

// The index names the batch: input root, each table with its SHA-256, the
// tool and version, and the first and last measured_at of the runs (from
// the records when the pages read them back), or what the caller states.
func TestBatchRecord(t *testing.T) {
	base := demoReport(t)
	base.InputRoot = "/lab/runs/2024-03-05"
	base.Tables = []TableFile{
		{Role: "sample sheet", Path: "sheet.csv", SHA256: strings.Repeat("ab", 32)},
		{Role: "specification", Path: "spec.csv", SHA256: strings.Repeat("cd", 32)},
	}
	times := []string{"2024-03-05T21:07:00Z", "2024-03-05T23:59:00Z", "2024-03-05T22:00:00Z"}
	for i, v := range times {
		res := *base.Results[i]
		res.Params = append(append([]dls.Param{}, res.Params...), dls.Param{Key: KeyMeasuredAt, Value: v, Origin: dls.OriginFile})
		base.Results[i] = &res
	}
	for _, tc := range []struct {
		name     string
		r        *Report
		measured string
	}{
		{"results in memory", base, "2024-03-05T21:07:00Z … 2024-03-05T23:59:00Z"},
		{"records", withRecords(t, base), "2024-03-05T21:07:00Z … 2024-03-05T23:59:00Z"},
		{"stated by the caller", func() *Report { c := *base; c.MeasuredFirst, c.MeasuredLast = "A", "B"; return &c }(), "A … B"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			doc, _ := readPage(t, writeDemo(t, tc.r), "index.html")
			rec := doc.one(t, "batch record", elemClass("table", "record"))
			rows := map[string]string{}
			for _, tr := range bodyRows(t, rec) {
				c := cells(tr)
				rows[c[0].text()] = c[1].text()
			}
			if !strings.Contains(rows["input root"], "/lab/runs/2024-03-05") {
				t.Errorf("input root %q", rows["input root"])
			}
			for _, tf := range base.Tables {
				if got := rows[tf.Role]; !strings.Contains(got, tf.Path) || !strings.Contains(got, "SHA-256 "+tf.SHA256) {
					t.Errorf("%s: %q", tf.Role, got)
				}
			}
			if got := rows["made by"]; got != "dlsbatch 0.0.0-test" {
				t.Errorf("made by %q", got)
			}
			if got := rows["measured"]; !strings.HasPrefix(got, tc.measured) {
				t.Errorf("measured %q, want it to start with %q", got, tc.measured)
			}
			if tc.r.MeasuredFirst == "" && !strings.Contains(rows["measured"], "3 of 7 measurements") {
				t.Errorf("measured %q does not say that 3 of the 7 runs state it", rows["measured"])
			}
		})
	}
	doc, _ := readPage(t, writeDemo(t, demoReport(t)), "index.html")
	if got := doc.one(t, "batch record", elemClass("table", "record")).text(); !strings.Contains(got, "no measurement states when it was made") {
		t.Errorf("without measured_at: %q", got)
	}
}
