package csvdata_test

import (
	"errors"
	"strconv"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

// dataRows are MinPoints valid data rows for a tau_s,g2 header.
func dataRows() string {
	var b strings.Builder
	for k := 1; k <= csvdata.MinPoints; k++ {
		b.WriteString(strconv.Itoa(k) + "e-6," + strconv.FormatFloat(1+0.9/float64(k), 'f', 4, 64) + "\n")
	}
	return b.String()
}

// Messages quote input only as a short escaped excerpt: the first 40
// characters of the cell in Go quoting, then "…" (the rule of
// io/safetext; expected texts written out by hand from it). Positions stay.
func TestMessagesQuoteExcerpts(t *testing.T) {
	passwd := strings.Repeat("root:x:0:0:root:/root:/bin/bash ", 2000) // 64 KB, one cell
	long := strings.Repeat("7", 5000)
	zeros := strings.Repeat("0", 5000)
	cases := []struct {
		name      string
		in        string
		line, col int
		sentinel  error
		contains  []string
		maxLen    int // bound on the whole message
	}{
		{"first line of a system file as header", passwd + "\n", 1, 0, dls.ErrBadHeader,
			[]string{`found "root:x:0:0:root:/root:/bin/bash root:x:0"…;`}, 400},
		{"long cell in a data row", "tau_s,g2\n1e-6," + long + "x\n", 2, 2, dls.ErrNotANumber,
			[]string{`column "g2": "` + long[:40] + `"…: `}, 200},
		{"escape sequence in a cell", "tau_s,g2\n1e-6,1.5\x1b[2J\n", 2, 2, dls.ErrNotANumber,
			[]string{`"1.5\x1b[2J"`}, 200},
		{"long header name repeated", "tau_s,g2," + long + "," + long + "\n", 1, 4, dls.ErrBadHeader,
			[]string{`column 4 "` + long[:40] + `"… repeats the name of column 3`}, 200},
		{"long metadata value", "# temperature_c: " + long + "x\n", 1, 0, dls.ErrBadMetadata,
			[]string{`temperature_c "` + long[:40] + `"…: not a number`}, 200},
		{"earlier lag quoted", "tau_s,g2\n" + zeros + "5e-6,1.2\n1e-6,1.1\n", 3, 1, dls.ErrBadLag,
			[]string{`(line 2 has "` + zeros[:40] + `"…)`}, 300},
		{"many names listed up to ten", "a,b,c,d,e,f,g,h,i,j,k,l,g2\n", 1, 0, dls.ErrBadHeader,
			[]string{`found "a", "b", "c", "d", "e", "f", "g", "h", "i", "j" and 3 more;`}, 400},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			entries := csvdata.Read(strings.NewReader(c.in), "f.csv", nil)
			if len(entries) != 1 || entries[0].Err == nil {
				t.Fatalf("want one failed entry, got %+v", entries)
			}
			err := entries[0].Err
			posErr(t, err, "f.csv", c.line, c.col, c.sentinel)
			msg := err.Error()
			for _, s := range c.contains {
				if !strings.Contains(msg, s) {
					t.Errorf("message %q lacks %q", msg, s)
				}
			}
			// The bound: the reason's fixed text plus one or two excerpts
			// of at most 40 characters (ASCII here, so 40 bytes each).
			if len(msg) > c.maxLen {
				t.Errorf("message of %d bytes, want at most %d: %q", len(msg), c.maxLen, msg)
			}
		})
	}
}

// A metadata value that is not a number keeps its *dls.NumberError (with
// the whole text) for errors.As, without the error printing the whole
// value.
func TestMetaNumErrorNotPrinted(t *testing.T) {
	long := strings.Repeat("9", 1000) + "x"
	err := csvdata.CheckMetaValue(dls.KeyTemperatureC, long)
	var ne *dls.NumberError
	if !errors.As(err, &ne) || ne.Text != long || !errors.Is(err, dls.ErrBadMetadata) || !errors.Is(err, dls.ErrNotANumber) {
		t.Fatalf("error %v does not wrap a *dls.NumberError, ErrBadMetadata and ErrNotANumber", err)
	}
	if n := len(err.Error()); n > 150 {
		t.Errorf("message of %d bytes for a 1001-byte value: %q", n, err)
	}
}

// Repeated warnings of one kind in a file collapse into the first with a
// count; warnings of other kinds stay apart, each with its own line.
func TestRepeatedWarningsCollapse(t *testing.T) {
	var b strings.Builder
	b.WriteString("# sample: A\n")
	for i := 0; i < 12346; i++ {
		b.WriteString("# sample: A\n") // lines 2 … 12347 repeat the key
	}
	b.WriteString("# operator: X\n# instrument: Y\n") // lines 12348, 12349: unknown keys
	b.WriteString("tau_s,g2,extra\n")                 // line 12350
	for k := 1; k <= csvdata.MinPoints; k++ {
		b.WriteString(strconv.Itoa(k) + "e-6," + strconv.FormatFloat(1+0.9/float64(k), 'f', 4, 64) + ",0\n")
	}
	b.WriteString("# sample: late\n# run: late\n") // lines 12359, 12360

	entries := csvdata.Read(strings.NewReader(b.String()), "f.csv", nil)
	if len(entries) != 1 || entries[0].M == nil {
		t.Fatalf("want one measurement, got %+v", entries)
	}
	got := entries[0].M.Warnings
	want := []string{
		"f.csv:2: sample given again (line 1); the value of this line is used (and 12,345 more lines like it)",
		`f.csv:12348: "operator": unknown metadata key (ignored) (and 1 more line like it)`,
		`f.csv:12350: columns not read: "extra"`,
		"f.csv:12359: metadata sample after the header row is ignored (metadata lines come before the header) (and 1 more line like it)",
	}
	if len(got) != len(want) {
		t.Fatalf("warnings\n%q\nwant\n%q", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("warning %d\n%q\nwant\n%q", i, got[i], want[i])
		}
	}
}

// The case of the brief: 10 MB of one repeated metadata line give one
// warning of bounded length, not one per line.
func TestTenMegabytesOfMetadata(t *testing.T) {
	line := "# sample: LOT-0107\n"
	n := 10 << 20 / len(line)
	in := strings.Repeat(line, n) + "tau_s,g2\n" + dataRows()
	entries := csvdata.Read(strings.NewReader(in), "f.csv", nil)
	if len(entries) != 1 || entries[0].M == nil {
		t.Fatalf("want one measurement, got %+v", entries)
	}
	w := entries[0].M.Warnings
	if len(w) != 1 || len(w[0]) > 200 || !strings.HasSuffix(w[0], " more lines like it)") {
		t.Errorf("%d warnings (first %.200q), want one short one", len(w), w)
	}
}
