package csvdata_test

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/io/csvdata"
)

const goodDir = "../../testdata/good"
const badDir = "../../testdata/bad"

// run describes one run of a fixture by the parameters testdata/good/
// generate.py wrote it from:
//
//	g2 = 1 + beta·exp(-2·gamma·tau), g2m1 = beta·exp(-2·gamma·tau),
//	g1 = exp(-gamma·tau), sigma_k = s0·(1 + k/10), tau_k = tau0·ratio^k.
type run struct {
	label       string
	beta, gamma float64
	s0          float64 // 0 = no sigma column
}

func closedForm(kind dls.CorrKind, r run, tauS float64) float64 {
	switch kind {
	case dls.KindG2:
		return 1 + r.beta*math.Exp(-2*r.gamma*tauS)
	case dls.KindG2m1:
		return r.beta * math.Exp(-2*r.gamma*tauS)
	}
	return math.Exp(-r.gamma * tauS)
}

func TestReadGoodFixtures(t *testing.T) {
	foreign := &csvdata.Options{TauColumn: "Lag time (ms)", CorrColumns: []string{"Correlation"},
		CorrKind: dls.KindG2, SigmaColumn: "Std dev"}
	tests := []struct {
		name       string
		file       string
		opt        *csvdata.Options
		kind       dls.CorrKind
		unit       string
		tauColumn  string
		headerLine int
		tau0       float64 // first lag in s
		runs       []run
		meta       map[string]string // key → value; each from the file
		metaLine   map[string]int    // key → line it is on
	}{
		{name: "single g2, lags in s, full metadata", file: "single_g2_s.csv", kind: dls.KindG2, unit: "s", tauColumn: "tau_s",
			headerLine: 9, tau0: 1e-6, runs: []run{{"", 0.9, 2000, 0}},
			meta: map[string]string{"sample": "demo-lot-A1", "temperature_c": "25.0", "wavelength_nm": "633", "angle_deg": "173",
				"solvent": "water", "particle_ri": "1.59+0.0i", "count_rate_kcps": "312.5", "duration_s": "10"},
			metaLine: map[string]int{"sample": 1, "temperature_c": 2, "particle_ri": 6, "duration_s": 8}},
		{name: "three runs, lags in us, sigma for two", file: "multirun_us.csv", kind: dls.KindG2, unit: "us", tauColumn: "tau_us",
			headerLine: 6, tau0: 1e-6, runs: []run{{"r1", 0.85, 1500, 2e-4}, {"r2", 0.85, 2000, 2e-4}, {"r3", 0.85, 2500, 0}},
			meta: map[string]string{"sample": "demo-lot-A2", "temperature_c": "25.0"}, metaLine: map[string]int{"sample": 1, "temperature_c": 3}},
		{name: "g2m1 with sigma, lags in ms", file: "g2m1_ms.csv", kind: dls.KindG2m1, unit: "ms", tauColumn: "tau_ms",
			headerLine: 3, tau0: 1e-5, runs: []run{{"", 0.8, 500, 1e-4}},
			meta: map[string]string{"sample": "demo-lot-B1", "temperature_c": "20.0"}, metaLine: map[string]int{"temperature_c": 2}},
		{name: "g1, lags in us", file: "g1_us.csv", kind: dls.KindG1, unit: "us", tauColumn: "tau_us",
			headerLine: 2, tau0: 1e-6, runs: []run{{"", 1, 3000, 0}}, meta: map[string]string{"sample": "demo-lot-C1"}},
		{name: "semicolons, decimal commas, CRLF and BOM", file: "semicolon_ms.csv", kind: dls.KindG2, unit: "ms", tauColumn: "tau_ms",
			headerLine: 3, tau0: 1e-6, runs: []run{{"", 0.75, 1200, 0}},
			meta: map[string]string{"sample": "demo-lot-D1", "temperature_c": "20.0"}, metaLine: map[string]int{"sample": 1}},
		{name: "tabs, no metadata", file: "tabs_s.csv", kind: dls.KindG2, unit: "s", tauColumn: "tau_s",
			headerLine: 1, tau0: 1e-6, runs: []run{{"", 0.9, 800, 0}}, meta: map[string]string{}},
		{name: "foreign column names through options", file: "foreign_ms.csv", opt: foreign, kind: dls.KindG2, unit: "ms",
			tauColumn: "Lag time (ms)", headerLine: 2, tau0: 1e-6, runs: []run{{"", 0.7, 1000, 3e-4}}, meta: map[string]string{}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(goodDir, tc.file)
			entries := csvdata.ReadFile(path, tc.opt)
			if len(entries) != len(tc.runs) {
				t.Fatalf("got %d entries, want %d", len(entries), len(tc.runs))
			}
			for i, e := range entries {
				r := tc.runs[i]
				if e.Err != nil {
					t.Fatalf("run %d: %v", i, e.Err)
				}
				m := e.M
				if e.File != path || m.File != path || e.Run != r.label || m.Run != r.label || e.Index != i || m.Index != i {
					t.Errorf("run %d: file %q/%q run %q/%q index %d/%d, want %q run %q index %d",
						i, e.File, m.File, e.Run, m.Run, e.Index, m.Index, path, r.label, i)
				}
				if m.Kind != tc.kind || m.TauUnit != tc.unit || m.TauColumn != tc.tauColumn || m.HeaderLine != tc.headerLine {
					t.Errorf("run %d: kind %v unit %q column %q header line %d, want %v %q %q %d",
						i, m.Kind, m.TauUnit, m.TauColumn, m.HeaderLine, tc.kind, tc.unit, tc.tauColumn, tc.headerLine)
				}
				// 24 rows: the generator's default length.
				if len(m.TauS) != 24 || len(m.Corr) != 24 || len(m.Lines) != 24 {
					t.Fatalf("run %d: %d lags, %d values, %d lines, want 24 each", i, len(m.TauS), len(m.Corr), len(m.Lines))
				}
				for k := range m.TauS {
					// The generator writes tau0·1.4^k with seven significant
					// digits: relative rounding error at most 5e-7.
					want := tc.tau0 * math.Pow(1.4, float64(k))
					if rel := math.Abs(m.TauS[k]-want) / want; rel > 5e-7 {
						t.Errorf("run %d: tau[%d] = %.9g s, want %.9g s (rel %.2g > 5e-7)", i, k, m.TauS[k], want, rel)
					}
					// Values are the closed form at the written lag rounded to
					// 7 decimals: error at most 5e-8, plus 1e-12 for the
					// difference of exp between Python and Go.
					if got, want := m.Corr[k], closedForm(tc.kind, r, m.TauS[k]); math.Abs(got-want) > 5e-8+1e-12 {
						t.Errorf("run %d: corr[%d] = %.8f, want %.8f (closed form, tol 5e-8)", i, k, got, want)
					}
					if m.Lines[k] != tc.headerLine+1+k {
						t.Errorf("run %d: line of point %d = %d, want %d", i, k, m.Lines[k], tc.headerLine+1+k)
					}
				}
				if r.s0 == 0 {
					if m.Sigma != nil {
						t.Errorf("run %d: sigma %v, want nil (no sigma column)", i, m.Sigma[:1])
					}
				} else {
					if len(m.Sigma) != 24 {
						t.Fatalf("run %d: %d sigma values, want 24", i, len(m.Sigma))
					}
					for k, s := range m.Sigma {
						// Seven significant digits again: rel 5e-7.
						want := r.s0 * (1 + float64(k)/10)
						if rel := math.Abs(s-want) / want; rel > 5e-7 {
							t.Errorf("run %d: sigma[%d] = %g, want %g", i, k, s, want)
						}
					}
				}
				for key, val := range tc.meta {
					p, ok := m.Meta.Get(key)
					if !ok || p.Value != val || p.Origin != dls.OriginFile {
						t.Errorf("run %d: meta %s = %+v, want value %q from the file", i, key, p, val)
					}
					if line, ok := tc.metaLine[key]; ok && p.Where != path+":"+strconv.Itoa(line) {
						t.Errorf("run %d: meta %s where %q, want %s:%d", i, key, p.Where, path, line)
					}
				}
				// Each run carries its label as its run parameter; an
				// unlabelled run has none unless the file gives one.
				wantLen := len(tc.meta)
				if r.label != "" {
					wantLen++
					if p, _ := m.Meta.Get(dls.KeyRun); p.Value != r.label {
						t.Errorf("run %d: meta run %q, want the column label %q", i, p.Value, r.label)
					}
				}
				if m.Meta.Len() != wantLen {
					t.Errorf("run %d: %d metadata values %v, want %d", i, m.Meta.Len(), m.Meta.Params(), wantLen)
				}
			}
		})
	}
}

// TestMultiRunLabelWins: the file's "# run:" is replaced by the column
// labels, with a warning naming the line of the key.
func TestMultiRunLabelWins(t *testing.T) {
	path := filepath.Join(goodDir, "multirun_us.csv")
	entries := csvdata.ReadFile(path, nil)
	for _, e := range entries {
		if e.Err != nil {
			t.Fatal(e.Err)
		}
		if len(e.M.Warnings) != 1 || !strings.HasPrefix(e.M.Warnings[0], path+":2: ") ||
			!strings.Contains(e.M.Warnings[0], `"whole-set"`) {
			t.Errorf("run %s: warnings %q, want one naming line 2 and the replaced value", e.Run, e.M.Warnings)
		}
	}
	// The runs own their slices.
	entries[1].M.TauS[0] = -1
	if entries[0].M.TauS[0] < 0 || entries[2].M.TauS[0] < 0 {
		t.Error("runs share the lag slice")
	}
}

// posErr asserts that err is a *dls.PosError at file:line:col wrapping want.
func posErr(t *testing.T, err error, file string, line, col int, want error) {
	t.Helper()
	var pe *dls.PosError
	if !errors.As(err, &pe) {
		t.Fatalf("error %v (%T) is not a *dls.PosError", err, err)
	}
	if pe.File != file || pe.Line != line || pe.Column != col {
		t.Errorf("error at %s:%d:%d, want %s:%d:%d (%v)", pe.File, pe.Line, pe.Column, file, line, col, err)
	}
	if !errors.Is(err, want) {
		t.Errorf("error %q does not wrap %q", err, want)
	}
}

// TestReadBadFixtures: one row per kind of bad input. Lines and cells are
// those the generator (testdata/good/generate.py) put the fault on.
func TestReadBadFixtures(t *testing.T) {
	tests := []struct {
		name      string
		file      string
		line, col int
		sentinel  error
		contains  []string
		runs      int // entries expected
	}{
		{"missing header", "missing_header.csv", 2, 0, dls.ErrBadHeader, []string{"no header row"}, 1},
		{"no lag column", "unknown_header_no_lag.csv", 2, 0, dls.ErrBadHeader,
			[]string{`found "time", "g2"`, "tau_s, tau_ms or tau_us"}, 1},
		{"no correlation column", "unknown_header_no_corr.csv", 2, 0, dls.ErrBadHeader,
			[]string{`found "tau_s", "intensity"`, "g2, g2m1 or g1"}, 1},
		{"non-numeric cell", "non_numeric.csv", 7, 2, dls.ErrNotANumber, []string{`column "g2"`, `"1.9x2"`}, 1},
		{"NaN", "nan_value.csv", 8, 2, dls.ErrNonFinite, []string{`"NaN"`}, 1},
		{"Inf", "inf_value.csv", 9, 2, dls.ErrNonFinite, []string{`"+Inf"`}, 1},
		{"hexadecimal", "hex_value.csv", 7, 2, dls.ErrNotANumber, []string{`"0x1.ep0"`, "hexadecimal"}, 1},
		{"digit separator", "digit_separator.csv", 8, 2, dls.ErrNotANumber, []string{`"1_9"`, "'_'"}, 1},
		{"underflow", "underflow_value.csv", 9, 2, dls.ErrOutOfRange, []string{`"1e-400"`, "underflows"}, 1},
		{"negative lag", "negative_lag.csv", 3, 1, dls.ErrBadLag, []string{"not positive"}, 1},
		{"zero lag", "zero_lag.csv", 3, 1, dls.ErrBadLag, []string{"not positive"}, 1},
		{"non-increasing lag", "non_increasing_lag.csv", 7, 1, dls.ErrBadLag, []string{"does not increase", "line 6"}, 1},
		{"too few points", "too_few_points.csv", 2, 0, dls.ErrTooFewPoints, []string{"7 data rows", "at least 8"}, 1},
		{"empty file", "empty.csv", 0, 0, dls.ErrEmpty, nil, 1},
		{"NUL bytes", "not_text_nul.csv", 2, 0, dls.ErrNotText, []string{"NUL"}, 1},
		{"invalid UTF-8", "not_text_utf8.csv", 3, 0, dls.ErrNotText, []string{"UTF-8"}, 1},
		{"UTF-16", "utf16.csv", 1, 0, dls.ErrNotText, []string{"UTF-16"}, 1},
		{"wrong cell count", "wrong_cell_count.csv", 5, 3, csvdata.ErrCellCount, []string{"3 cells", "header has 2"}, 1},
		{"duplicate column", "duplicate_column.csv", 2, 3, dls.ErrBadHeader, []string{`"G2"`, "column 2"}, 1},
		{"bad metadata value", "bad_metadata.csv", 2, 0, dls.ErrBadMetadata, []string{"temperature_c", `"warm"`}, 1},
		{"bad lag fails every run", "multirun_bad_lag.csv", 6, 1, dls.ErrNotANumber, []string{`"abc"`}, 3},
		{"sigma without its run", "orphan_sigma.csv", 2, 3, dls.ErrBadHeader, []string{`"sigma_b"`, `"g2_b"`}, 1},
		{"mixed kinds", "mixed_kinds.csv", 2, 3, dls.ErrBadHeader, []string{"two kinds"}, 1},
		{"negative sigma", "negative_sigma.csv", 5, 3, dls.ErrOutOfRange, []string{`column "sigma"`}, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(badDir, tc.file)
			entries := csvdata.ReadFile(path, nil)
			if len(entries) != tc.runs {
				t.Fatalf("got %d entries, want %d", len(entries), tc.runs)
			}
			for _, e := range entries {
				if e.M != nil || e.Err == nil {
					t.Fatalf("entry %+v: want an error and no measurement", e)
				}
				posErr(t, e.Err, path, tc.line, tc.col, tc.sentinel)
				for _, s := range tc.contains {
					if !strings.Contains(e.Err.Error(), s) {
						t.Errorf("message %q lacks %q", e.Err, s)
					}
				}
			}
		})
	}
}

// TestMultiRunBadValue: a bad value in run b fails only run b.
func TestMultiRunBadValue(t *testing.T) {
	path := filepath.Join(badDir, "multirun_bad_value.csv")
	entries := csvdata.ReadFile(path, nil)
	if len(entries) != 3 {
		t.Fatalf("got %d entries, want 3", len(entries))
	}
	for i, label := range []string{"a", "b", "c"} {
		e := entries[i]
		if e.Run != label || e.Index != i {
			t.Errorf("entry %d: run %q index %d, want %q %d", i, e.Run, e.Index, label, i)
		}
		if label == "b" {
			posErr(t, e.Err, path, 6, 3, dls.ErrNotANumber)
			continue
		}
		if e.Err != nil {
			t.Fatalf("run %s: %v", label, e.Err)
		}
		// 12 rows written by the generator for this file.
		if len(e.M.Corr) != 12 {
			t.Errorf("run %s: %d values, want 12", label, len(e.M.Corr))
		}
	}
}

// TestReadEdgeCases covers the rules of the format that the fixtures do not.
func TestReadEdgeCases(t *testing.T) {
	rows := func(n int, sep string, extra string) string {
		var b strings.Builder
		for k := 0; k < n; k++ {
			b.WriteString(strconv.Itoa(k+1) + "e-6" + sep + "1.5" + extra + "\n")
		}
		return b.String()
	}
	ten := rows(10, ",", "")
	tests := []struct {
		name     string
		in       string
		opt      *csvdata.Options
		line     int    // of the error; 0 with sentinel nil
		col      int    // of the error
		sentinel error  // nil = must read
		errText  string // a part of the error's message, when given
		runs     []string
		kind     dls.CorrKind
		first    float64 // first lag in s when it reads
		warn     []string
		meta     map[string]string
	}{
		{name: "comment without colon and plain comment", in: "# just a note\n# created 12:30 by hand\ntau_s,g2\n" + ten,
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "unknown metadata key warns", in: "# operator: someone\ntau_s,g2\n" + ten,
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, warn: []string{"x.csv:1: ", `"operator": unknown metadata key`}, meta: map[string]string{}},
		{name: "key given twice: later line wins", in: "# temperature_c: 20\n# temperature_c: 25\ntau_s,g2\n" + ten,
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, warn: []string{"x.csv:2: ", "line 1"}, meta: map[string]string{"temperature_c": "25"}},
		{name: "empty value gives no value", in: "# viscosity_mpas:\ntau_s,g2\n" + ten,
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "keys are case-insensitive", in: "# Temperature_C: 21.5\ntau_s,g2\n" + ten,
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"temperature_c": "21.5"}},
		{name: "run key labels a single run", in: "# run: 3\ntau_s,g2\n" + ten,
			runs: []string{"3"}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"run": "3"}},
		{name: "metadata after header warns", in: "tau_s,g2\n" + ten[:strings.Index(ten, "5e-6")] + "# temperature_c: 30\n" + ten[strings.Index(ten, "5e-6"):],
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, warn: []string{"x.csv:6: ", "after the header"}, meta: map[string]string{}},
		{name: "blank and all-empty rows skipped", in: "tau_s,g2\n\n" + rows(5, ",", "") + " , \n\n" + rows(10, ",", "")[len(rows(5, ",", "")):],
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "trailing delimiter is an unnamed column", in: "tau_s,g2,\n" + rows(10, ",", ","),
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "quoted header and cells", in: "\"tau_ms\",\"g2\"\n" + strings.ReplaceAll(rows(10, ",", ""), "1.5", "\"1.5\""),
			runs: []string{""}, kind: dls.KindG2, first: 1e-9, meta: map[string]string{}},
		{name: "upper-case names", in: "TAU_US,G2M1\n" + rows(10, ",", ""),
			runs: []string{""}, kind: dls.KindG2m1, first: 1e-12, meta: map[string]string{}},
		{name: "unused column warns", in: "tau_s,g2,note\n" + rows(10, ",", ",x"),
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, warn: []string{"x.csv:1: ", `"note"`}, meta: map[string]string{}},
		{name: "labelled and unlabelled runs", in: "tau_s,g2,g2_B\n" + rows(10, ",", ",1.2"),
			runs: []string{"", "B"}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "missing cell", in: "tau_s,g2\n" + rows(3, ",", "") + "4e-6,\n", line: 5, col: 2, sentinel: dls.ErrMissingValue},
		{name: "overflowing value", in: "tau_s,g2\n" + rows(3, ",", "") + "4e-6,1e999\n", line: 5, col: 2, sentinel: dls.ErrNonFinite},
		// Number syntax (dls.ParseNumber): strconv.ParseFloat reads the
		// first three as 1, 10 and 0; the reader does not.
		{name: "hexadecimal value", in: "tau_s,g2\n" + rows(3, ",", "") + "4e-6,0x1p0\n", line: 5, col: 2, sentinel: dls.ErrNotANumber},
		{name: "digit separator in a value", in: "tau_s,g2\n" + rows(3, ",", "") + "4e-6,1_0\n", line: 5, col: 2, sentinel: dls.ErrNotANumber},
		{name: "underflowing value", in: "tau_s,g2\n" + rows(3, ",", "") + "4e-6,1e-400\n", line: 5, col: 2, sentinel: dls.ErrOutOfRange},
		{name: "underflowing lag", in: "tau_s,g2\n1e-400,1.5\n", line: 2, col: 1, sentinel: dls.ErrOutOfRange},
		{name: "infinity spelt out", in: "tau_s,g2\n" + rows(3, ",", "") + "4e-6,infinity\n", line: 5, col: 2, sentinel: dls.ErrNonFinite},
		{name: "space inside a value", in: "tau_s,g2\n" + rows(3, ",", "") + "4e-6,1 .5\n", line: 5, col: 2, sentinel: dls.ErrNotANumber},
		{name: "leading plus, leading and trailing point", in: "tau_s,g2\n" + strings.Replace(strings.Replace(strings.Replace(ten, ",1.5", ",+1.5", 1), ",1.5", ",.5", 1), ",1.5", ",5.", 1),
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "hexadecimal metadata", in: "# temperature_c: 0x19\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrNotANumber},
		{name: "digit separator in metadata", in: "# duration_s: 1_000\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrBadMetadata},
		{name: "underflowing metadata", in: "# concentration_mg_ml: 1e-400\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrOutOfRange},
		{name: "hexadecimal particle index", in: "# particle_ri: 0x1p0+0i\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrBadMetadata},
		{name: "signed metadata", in: "# temperature_c: +25.\ntau_s,g2\n" + ten,
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"temperature_c": "+25."}},
		{name: "equal lags", in: "tau_s,g2\n1e-6,1.5\n1e-6,1.4\n", line: 3, col: 1, sentinel: dls.ErrBadLag},
		{name: "two lag columns", in: "tau_s,tau_ms,g2\n", line: 1, col: 2, sentinel: dls.ErrBadHeader},
		{name: "only comments", in: "# sample: x\n\n", line: 2, sentinel: dls.ErrEmpty},
		{name: "only blank lines and a BOM", in: "\xef\xbb\xbf\n  \n", line: 0, sentinel: dls.ErrEmpty},
		{name: "header without rows", in: "tau_s,g2\n", line: 1, sentinel: dls.ErrTooFewPoints},
		{name: "bad particle index", in: "# particle_ri: 1.59+i0.01\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrBadMetadata},
		{name: "decimal comma in metadata", in: "# angle_deg: 90,0\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrBadMetadata},
		{name: "non-finite metadata", in: "# angle_deg: NaN\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrNonFinite},
		{name: "line too long", in: "tau_s,g2\n" + strings.Repeat("1", 5<<20) + "\n", line: 2, sentinel: dls.ErrNotText},
		{name: "bad option unit", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{TauUnit: "min"}, sentinel: csvdata.ErrBadOptions},
		{name: "bad option kind", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{CorrKind: 9}, sentinel: csvdata.ErrBadOptions},
		{name: "bad option comma", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{Comma: '.'}, sentinel: csvdata.ErrBadOptions},
		{name: "sigma option with two runs", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{CorrColumns: []string{"a", "b"}, SigmaColumn: "s"}, sentinel: csvdata.ErrBadOptions},
		{name: "unit option contradicts the name", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{TauUnit: "ms"}, line: 1, col: 1, sentinel: dls.ErrBadHeader},
		{name: "unit option agrees with the name", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{TauUnit: "s"},
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "kind option contradicts the name", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{CorrKind: dls.KindG1}, line: 1, col: 2, sentinel: dls.ErrBadHeader},
		{name: "foreign lag without unit", in: "lag,g2\n" + ten, opt: &csvdata.Options{TauColumn: "lag"}, line: 1, col: 1, sentinel: dls.ErrBadHeader},
		// A unit in the name and another in the options: the reader cannot
		// tell which is right (1 ms = 1000 µs, BIPM SI brochure, 9th ed.).
		{name: "foreign lag unit option contradicts the name", in: "Lag time (µs),g2\n" + ten, opt: &csvdata.Options{TauColumn: "Lag time (µs)", TauUnit: "ms"},
			line: 1, col: 1, sentinel: dls.ErrBadHeader, errText: "says us but the unit given is ms"},
		{name: "foreign lag unit option agrees with the name", in: "Lag time (µs),g2\n" + ten, opt: &csvdata.Options{TauColumn: "Lag time (µs)", TauUnit: "us"},
			runs: []string{""}, kind: dls.KindG2, first: 1e-12, meta: map[string]string{}},
		{name: "foreign lag with unit option", in: "lag,g2\n" + ten, opt: &csvdata.Options{TauColumn: "lag", TauUnit: "µs"},
			runs: []string{""}, kind: dls.KindG2, first: 1e-12, meta: map[string]string{}},
		{name: "foreign lag unit in brackets", in: "Delay [ms];Value\n" + rows(10, ";", ""), opt: &csvdata.Options{TauColumn: "delay [ms]", CorrColumns: []string{"VALUE"}, CorrKind: dls.KindG1},
			runs: []string{""}, kind: dls.KindG1, first: 1e-9, meta: map[string]string{}},
		{name: "foreign columns named several", in: "t_us\tA\tB\n" + rows(10, "\t", "\t1.1"), opt: &csvdata.Options{TauColumn: "t_us", CorrColumns: []string{"A", "B"}, CorrKind: dls.KindG2},
			runs: []string{"A", "B"}, kind: dls.KindG2, first: 1e-12, meta: map[string]string{}},
		{name: "format columns chosen by name", in: "tau_s,g2_a,g2_b\n" + rows(10, ",", ",1.1"), opt: &csvdata.Options{CorrColumns: []string{"g2_b"}},
			runs: []string{"b"}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "lag option takes a name of the format", in: "g2_t (ms),g2\n" + ten, opt: &csvdata.Options{TauColumn: "g2_t (ms)"},
			runs: []string{""}, kind: dls.KindG2, first: 1e-9, meta: map[string]string{}},
		{name: "foreign kind unknown", in: "tau_s,corr\n" + ten, opt: &csvdata.Options{CorrColumns: []string{"corr"}}, line: 1, col: 2, sentinel: dls.ErrBadHeader},
		{name: "foreign column missing", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{TauColumn: "lag (s)"}, line: 1, sentinel: dls.ErrBadHeader},
		// Decimal commas (ISO 80000-1:2022, 7.3.2, allows the comma as
		// the decimal sign): in a file delimited by ';' or tab, or with
		// Options.DecimalComma, metadata numbers take them too and are
		// stored with a point.
		{name: "decimal comma in metadata of a ';' file", in: "# temperature_c: 25,0\n# particle_ri: 1,59+0,01i\n# kd: -8,5\ntau_s;g2\n" + rows(10, ";", ""),
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"temperature_c": "25.0", "particle_ri": "1.59+0.01i", "kd": "-8.5"}},
		{name: "decimal comma forced in a ',' file", in: "# angle_deg: 90,0\ntau_s,g2\n" + ten, opt: &csvdata.Options{DecimalComma: true},
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"angle_deg": "90.0"}},
		{name: "text metadata keeps its commas", in: "# sample: lot 3,4\ntau_s;g2\n" + rows(10, ";", ""),
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"sample": "lot 3,4"}},
		{name: "two decimal commas in a number", in: "# angle_deg: 1,7,3\ntau_s;g2\n" + rows(10, ";", ""), line: 1, sentinel: dls.ErrBadMetadata, errText: `"1,7,3"`},
		// A preamble without '#': lines "key: value" or "key<TAB>value"
		// with keys of the format are metadata; others get a hint.
		{name: "preamble of known keys", in: "Temperature_C: 25\nangle_deg\t173\nsample:  LOT 7 \n\ntau_s,g2\n" + ten,
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"temperature_c": "25", "angle_deg": "173", "sample": "LOT 7"}},
		{name: "tab preamble with decimal commas", in: "temperature_c\t25,5\ntau_s\tg2\n" + rows(10, "\t", ""),
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"temperature_c": "25.5"}},
		{name: "preamble of unknown keys", in: "Operator: A. N. Other\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrBadHeader, errText: "--skip-lines"},
		{name: "preamble skipped", in: "Operator: A. N. Other\nDate\t1.2.2024\ntau_s,g2\n" + ten, opt: &csvdata.Options{SkipLines: 2},
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
		{name: "skipped lines still count", in: "x\ny\ntau_s,g2\n" + rows(3, ",", "") + "4e-6,x\n", opt: &csvdata.Options{SkipLines: 2}, line: 7, col: 2, sentinel: dls.ErrNotANumber},
		{name: "negative lines to skip", in: "tau_s,g2\n" + ten, opt: &csvdata.Options{SkipLines: -1}, sentinel: csvdata.ErrBadOptions},
		// Windows-1252 (Unicode Consortium mapping table CP1252.TXT: 0xB5
		// is U+00B5 MICRO SIGN, 0x80 U+20AC EURO SIGN, 0x81 undefined).
		{name: "Latin-1 metadata", in: "# sample: Probe \xb5-1\n# lot: \x80 12\ntau_s,g2\n" + ten,
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{"sample": "Probe µ-1", "lot": "€ 12"}, warn: []string{"x.csv:1: not UTF-8: read as Windows-1252"}},
		{name: "Latin-1 after UTF-8 beyond ASCII", in: "# sample: µ\n# lot: \xb5\ntau_s,g2\n" + ten, line: 2, sentinel: dls.ErrNotText},
		{name: "byte undefined in Windows-1252", in: "# sample: \x81\ntau_s,g2\n" + ten, line: 1, sentinel: dls.ErrNotText},
		{name: "control character in a Latin-1 file", in: "# sample: \xb5\ntau_s,g2\n\x01" + ten, line: 3, sentinel: dls.ErrNotText},
		{name: "explicit comma", in: "tau_s|g2\n" + strings.ReplaceAll(ten, ",", "|"), opt: &csvdata.Options{Comma: '|'},
			runs: []string{""}, kind: dls.KindG2, first: 1e-6, meta: map[string]string{}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			entries := csvdata.Read(strings.NewReader(tc.in), "x.csv", tc.opt)
			if len(entries) == 0 {
				t.Fatal("no entries")
			}
			if tc.sentinel != nil {
				for _, e := range entries {
					posErr(t, e.Err, "x.csv", tc.line, tc.col, tc.sentinel)
					if e.Err != nil && !strings.Contains(e.Err.Error(), tc.errText) {
						t.Errorf("error %q lacks %q", e.Err, tc.errText)
					}
					if e.M != nil {
						t.Error("measurement with an error")
					}
				}
				return
			}
			if len(entries) != len(tc.runs) {
				t.Fatalf("got %d entries, want %d", len(entries), len(tc.runs))
			}
			for i, e := range entries {
				if e.Err != nil {
					t.Fatalf("run %d: %v", i, e.Err)
				}
				if e.Run != tc.runs[i] || e.M.Kind != tc.kind {
					t.Errorf("run %d: label %q kind %v, want %q %v", i, e.Run, e.M.Kind, tc.runs[i], tc.kind)
				}
				// The lags are k·1e-6 in the file's unit; the SI prefixes are
				// exact powers of ten (BIPM, The International System of
				// Units, 9th ed., 2019) and one division rounds once.
				if got := e.M.TauS[0]; math.Abs(got-tc.first) > 1e-15*tc.first {
					t.Errorf("run %d: first lag %g s, want %g s", i, got, tc.first)
				}
				if len(e.M.TauS) != 10 {
					t.Errorf("run %d: %d points, want 10", i, len(e.M.TauS))
				}
				joined := strings.Join(e.M.Warnings, "\n")
				for _, w := range tc.warn {
					if !strings.Contains(joined, w) {
						t.Errorf("run %d: warnings %q lack %q", i, e.M.Warnings, w)
					}
				}
				if len(tc.warn) == 0 && len(e.M.Warnings) > 0 {
					t.Errorf("run %d: unexpected warnings %q", i, e.M.Warnings)
				}
				for k, v := range tc.meta {
					if got := e.M.Meta.String(k); got != v {
						t.Errorf("run %d: meta %s = %q, want %q", i, k, got, v)
					}
				}
				if len(tc.meta) == 0 && tc.runs[i] == "" && e.M.Meta.Len() != 0 {
					t.Errorf("run %d: metadata %v, want none", i, e.M.Meta.Params())
				}
			}
		})
	}
}

// TestNumError: a non-numeric cell keeps the *dls.NumberError of its text.
func TestNumError(t *testing.T) {
	e := csvdata.Read(strings.NewReader("tau_s,g2\n1e-6,x\n"), "x.csv", nil)[0]
	var ne *dls.NumberError
	if !errors.As(e.Err, &ne) || ne.Text != "x" {
		t.Errorf("error %v does not wrap the *dls.NumberError for %q", e.Err, "x")
	}
}

// TestNumberForms: every form of dls.ParseNumber's syntax reads in a data
// cell to the float64 nearest its decimal value (IEEE 754 round to
// nearest, so the comparison is exact), with and without a decimal comma.
func TestNumberForms(t *testing.T) {
	forms := []struct {
		text string
		want float64
	}{
		{"1.5", 1.5}, {"+1.5", 1.5}, {".5", 0.5}, {"5.", 5}, {"1.5e0", 1.5}, {"15E-1", 1.5}, {"+0.15e+1", 1.5}, {"-1.5", -1.5},
	}
	for _, comma := range []string{",", ";"} {
		in := "tau_s" + comma + "g2\n"
		for k, f := range forms {
			text := f.text
			if comma == ";" {
				text = strings.Replace(text, ".", ",", 1)
			}
			in += strconv.Itoa(k+1) + "e-6" + comma + text + "\n"
		}
		e := csvdata.Read(strings.NewReader(in), "x.csv", nil)[0]
		if e.Err != nil {
			t.Fatalf("delimiter %q: %v", comma, e.Err)
		}
		for k, f := range forms {
			if got := e.M.Corr[k]; got != f.want {
				t.Errorf("delimiter %q: %q read as %g, want %g", comma, f.text, got, f.want)
			}
		}
	}
}

// TestDecimalComma: with ';' as delimiter, "1,5" is 1.5; with ',' it would
// be two cells.
func TestDecimalComma(t *testing.T) {
	in := "tau_ms;g2\n"
	for k := 1; k <= 8; k++ {
		in += strconv.Itoa(k) + ",5e-3;1,25\n"
	}
	e := csvdata.Read(strings.NewReader(in), "x.csv", nil)[0]
	if e.Err != nil {
		t.Fatal(e.Err)
	}
	// 1,5e-3 ms = 1.5e-6 s; one division by 1e3 rounds once (1e-15 rel).
	if got := e.M.TauS[0]; math.Abs(got-1.5e-6) > 1.5e-21 {
		t.Errorf("lag %g, want 1.5e-6", got)
	}
	if got := e.M.Corr[0]; got != 1.25 { // 1.25 is exact in binary
		t.Errorf("value %g, want 1.25", got)
	}
}

// TestBatchUnaffected: a failing file leaves the next one intact.
func TestBatchUnaffected(t *testing.T) {
	paths := []string{filepath.Join(badDir, "not_text_nul.csv"), filepath.Join(goodDir, "single_g2_s.csv")}
	var ok, failed int
	for _, p := range paths {
		for _, e := range csvdata.ReadFile(p, nil) {
			if e.Err != nil {
				failed++
			} else {
				ok++
			}
		}
	}
	if ok != 1 || failed != 1 {
		t.Errorf("ok %d failed %d, want 1 and 1", ok, failed)
	}
	e := csvdata.ReadFile(filepath.Join(badDir, "no-such-file.csv"), nil)
	if len(e) != 1 || e[0].Err == nil {
		t.Fatalf("missing file: %+v", e)
	}
	var pe *dls.PosError
	if !errors.As(e[0].Err, &pe) || pe.Line != 0 {
		t.Errorf("missing file: error %v, want a *dls.PosError without line", e[0].Err)
	}
}

// TestFileErrorFailsEveryRun: a fault of the whole file gives one failed
// Entry per run once the header is known.
func TestFileErrorFailsEveryRun(t *testing.T) {
	rows := "1e-6,1.9,1.8\n2e-6,1.8,1.7\n"
	tests := []struct {
		name     string
		in       string
		line     int
		sentinel error
	}{
		{"bad metadata", "# angle_deg: wide\ntau_s,g2_a,g2_b\n" + rows, 1, dls.ErrBadMetadata},
		{"too few points", "tau_s,g2_a,g2_b\n" + rows, 1, dls.ErrTooFewPoints},
		{"not text after the header", "tau_s,g2_a,g2_b\n" + rows + "\x00\n", 4, dls.ErrNotText},
		{"wrong cell count", "tau_s,g2_a,g2_b\n" + rows + "3e-6,1.7\n", 4, csvdata.ErrCellCount},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			entries := csvdata.Read(strings.NewReader(tc.in), "x.csv", nil)
			if len(entries) != 2 || entries[0].Run != "a" || entries[1].Run != "b" || entries[1].Index != 1 {
				t.Fatalf("entries %+v, want runs a and b", entries)
			}
			for _, e := range entries {
				posErr(t, e.Err, "x.csv", tc.line, 0, tc.sentinel)
			}
		})
	}
}

func TestParticleRIMaterialName(t *testing.T) {
	// A material name is kept for the analysis to resolve; a malformed
	// number is still an error.
	ten := ""
	for i := 1; i <= 10; i++ {
		ten += strconv.Itoa(i) + "e-6," + strconv.FormatFloat(1+0.9*math.Exp(-float64(i)*0.1), 'f', 4, 64) + "\n"
	}
	es := csvdata.Read(strings.NewReader("# particle_ri: polystyrene\ntau_s,g2\n"+ten), "m.csv", nil)
	if es[0].Err != nil || es[0].M.Meta.String(dls.KeyParticleRI) != "polystyrene" {
		t.Errorf("material name: %+v", es[0])
	}
	es = csvdata.Read(strings.NewReader("# particle_ri: 1.59+i0.01\ntau_s,g2\n"+ten), "m.csv", nil)
	if es[0].Err == nil {
		t.Error("malformed complex index accepted")
	}
}

// TestLimits: a file over the size, row or column limit is refused with
// ErrTooLarge naming the limit; at the limit it is read (limits are this
// package's documented Options).
func TestLimits(t *testing.T) {
	var b strings.Builder
	b.WriteString("tau_s,g2\n")
	for i := 1; i <= 50; i++ {
		fmt.Fprintf(&b, "%de-6,%.6f\n", i, 1+0.9*math.Exp(-2*2000*float64(i)*1e-6))
	}
	data := b.String()
	for _, tc := range []struct {
		name string
		o    csvdata.Options
		ok   bool
		want string
	}{
		{"defaults", csvdata.Options{}, true, ""},
		{"rows at the limit", csvdata.Options{MaxRows: 50}, true, ""},
		{"rows over", csvdata.Options{MaxRows: 49}, false, "more than 49 data rows"},
		{"columns over", csvdata.Options{MaxColumns: 1}, false, "2 columns, more than 1"},
		{"bytes at the limit", csvdata.Options{MaxBytes: int64(len(data))}, true, ""},
		{"bytes over", csvdata.Options{MaxBytes: int64(len(data)) - 1}, false, "larger than"},
	} {
		es := csvdata.Read(strings.NewReader(data), "x.csv", &tc.o)
		err := es[0].Err
		if tc.ok {
			if err != nil {
				t.Errorf("%s: %v", tc.name, err)
			}
			continue
		}
		if !errors.Is(err, csvdata.ErrTooLarge) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want ErrTooLarge with %q", tc.name, err, tc.want)
		}
	}
}
