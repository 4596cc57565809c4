package qcfile

import (
	"errors"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/qc"
)

func TestReadFile(t *testing.T) {
	// The values written in testdata/site-thresholds.csv; every other key
	// keeps its default. All are short decimals parsed by strconv, so the
	// comparison is exact.
	got, err := ReadFile("testdata/site-thresholds.csv", qc.DefaultThresholds())
	if err != nil {
		t.Fatal(err)
	}
	want := qc.DefaultThresholds()
	want.MaxPDI, want.MinRuns, want.MinCountRateKcps, want.MaxRSDPct = 0.2, 5, 50, 3
	if got != want {
		t.Errorf("got %+v\nwant %+v", got, want)
	}
	if _, err := ReadFile("testdata/no-such-file.csv", qc.DefaultThresholds()); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
}

// TestDocExample parses the example of the package documentation, so that
// the documented format cannot drift from the reader.
func TestDocExample(t *testing.T) {
	b, err := os.ReadFile("doc.go")
	if err != nil {
		t.Fatal(err)
	}
	var ex []string
	in := false
	for _, l := range strings.Split(string(b), "\n") {
		switch {
		case strings.HasPrefix(l, "// Example:"):
			in = true
		case in && strings.HasPrefix(l, "//\t"):
			ex = append(ex, strings.TrimPrefix(l, "//\t"))
		case in && len(ex) > 0:
			in = false
		}
	}
	if len(ex) < 3 {
		t.Fatalf("no example found in doc.go: %q", ex)
	}
	got, err := Parse(strings.NewReader(strings.Join(ex, "\n")), "doc.go", qc.DefaultThresholds())
	if err != nil {
		t.Fatalf("the documented example does not parse: %v", err)
	}
	if got.MaxPDI != 0.25 || got.MinRuns != 5 || got.MinCountRateKcps != 50 {
		t.Errorf("example gives %+v", got)
	}
}

func TestParseCaseAndComments(t *testing.T) {
	// Column names and keys in any case, a comment, a blank line, and an
	// integer key written as 4.0 (a whole number).
	in := "# site\n\nKEY,Value\nMax_PDI,0.3\nmin_runs,4.0\n"
	got, err := Parse(strings.NewReader(in), "t.csv", qc.DefaultThresholds())
	if err != nil {
		t.Fatal(err)
	}
	if got.MaxPDI != 0.3 || got.MinRuns != 4 {
		t.Errorf("got %+v", got)
	}
}

func TestParseErrors(t *testing.T) {
	h := "key,value\n"
	cases := []struct {
		name, in  string
		line, col int
		want      error
		substr    string
	}{
		{"unknown key", h + "max_pd,0.3\n", 2, 1, qc.ErrUnknownThreshold, "known: min_intercept"},
		{"duplicate key", h + "max_pdi,0.3\nMAX_PDI,0.2\n", 3, 1, ErrDuplicate, "line 2"},
		{"not a number", h + "max_pdi,0.3x\n", 2, 9, dls.ErrNotANumber, `"0.3x"`},
		{"wraps strconv", h + "max_pdi,1e999\n", 2, 9, strconv.ErrRange, "not a number"},
		{"not finite", h + "max_pdi,NaN\n", 2, 9, dls.ErrNonFinite, "max_pdi"},
		{"above range", h + "max_pdi,30\n", 2, 9, dls.ErrOutOfRange, "outside 0 … 1"},
		{"below range", h + "outlier_k,0.5\n", 2, 11, dls.ErrOutOfRange, "outside 1 … 100"},
		{"fraction written as a percentage", h + "max_dist_mismatch,10\n", 2, 19, dls.ErrOutOfRange, "max_dist_mismatch"},
		{"not whole", h + "min_runs,3.5\n", 2, 10, dls.ErrOutOfRange, "whole number"},
		{"empty value", h + "max_pdi,\n", 2, 9, dls.ErrMissingValue, "no value"},
		{"empty key", h + ",0.3\n", 2, 1, dls.ErrMissingValue, "empty key"},
		{"inverted intercept window", h + "max_intercept,0.5\nmin_intercept,0.8\n", 3, 15, dls.ErrOutOfRange, "above max_intercept"},
		{"inverted by max alone", h + "min_intercept,0.6\nmax_pdi,0.2\nmax_intercept,0.55\n", 4, 15, dls.ErrOutOfRange, "above max_intercept"},
		{"unknown column", "key,value,comment\nmax_pdi,0.3,x\n", 1, 11, dls.ErrBadHeader, "unknown column"},
		{"missing value column", "key\nmax_pdi\n", 1, 1, dls.ErrBadHeader, `"value"`},
		{"ragged row", h + "max_pdi,0.3,extra\n", 2, 1, dls.ErrBadHeader, "3 fields"},
		{"no rows", "# nothing set\nkey,value\n", 0, 0, dls.ErrEmpty, "empty"},
		{"empty file", "", 0, 0, dls.ErrEmpty, "empty"},
		{"not text", "key,value\nmax_pdi,\x00\n", 0, 0, dls.ErrNotText, "text"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			base := qc.DefaultThresholds()
			got, err := Parse(strings.NewReader(c.in), "site.csv", base)
			var pe *dls.PosError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is not positioned", err)
			}
			if pe.Line != c.line || pe.Column != c.col {
				t.Errorf("%v at %d:%d, want %d:%d", err, pe.Line, pe.Column, c.line, c.col)
			}
			if !errors.Is(err, c.want) {
				t.Errorf("%v does not wrap %v", err, c.want)
			}
			if !strings.Contains(err.Error(), c.substr) || !strings.HasPrefix(err.Error(), "site.csv:") {
				t.Errorf("%v lacks %q or the file name", err, c.substr)
			}
			if got != base {
				t.Errorf("failed parse returned changed thresholds %+v", got)
			}
		})
	}
}

// format writes th as a thresholds file listing every key, with the
// shortest decimal that parses back to the same float64.
func format(th qc.Thresholds) string {
	var b strings.Builder
	b.WriteString("key,value\n")
	for _, k := range qc.ThresholdKeys() {
		v, _ := th.Value(k.Key)
		fmt.Fprintf(&b, "%s,%s\n", k.Key, strconv.FormatFloat(v, 'g', -1, 64))
	}
	return b.String()
}

func FuzzParse(f *testing.F) {
	if b, err := os.ReadFile("testdata/site-thresholds.csv"); err == nil {
		f.Add(string(b))
	}
	f.Add(format(qc.DefaultThresholds()))
	f.Add("key,value\nmin_intercept,0.9\nmax_intercept,0.95\n")
	f.Add("key,value,note\n\"max_pdi\",\"0.1\",\"a, quoted note\"\n")
	f.Add("key,value\nmin_runs,1e1\n")
	f.Fuzz(func(t *testing.T, in string) {
		base := qc.DefaultThresholds()
		th, err := Parse(strings.NewReader(in), "f.csv", base)
		if err != nil {
			var pe *dls.PosError
			if !errors.As(err, &pe) || pe.File != "f.csv" {
				t.Fatalf("unpositioned error %v", err)
			}
			if th != base {
				t.Fatalf("error %v with changed thresholds", err)
			}
			return
		}
		// Whatever parses lies inside every range and round-trips.
		for _, k := range qc.ThresholdKeys() {
			v, _ := th.Value(k.Key)
			if !(v >= k.Min && v <= k.Max) || (k.Integer && v != math.Trunc(v)) {
				t.Fatalf("%s = %g outside %g … %g", k.Key, v, k.Min, k.Max)
			}
		}
		if err := th.Validate(); err != nil {
			t.Fatal(err)
		}
		back, err := Parse(strings.NewReader(format(th)), "back.csv", qc.Thresholds{})
		if err != nil || back != th {
			t.Fatalf("round trip: %v\n%+v\n%+v", err, back, th)
		}
	})
}
