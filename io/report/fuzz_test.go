package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"strings"
	"testing"

	"dlsbatch/dls"
)

// crlf is what encoding/csv's reader makes of a field: it documents that a
// carriage return before a newline is dropped, also inside quoted fields.
func crlf(s string) string { return strings.ReplaceAll(s, "\r\n", "\n") }

// jsonText is what encoding/json makes of a string: valid UTF-8, each
// invalid byte replaced by U+FFFD (documented for Marshal).
func jsonText(s string) string { return string([]rune(s)) }

// FuzzWriters: for any text in the text fields, results.csv and samples.csv
// read back with encoding/csv (the reference reader) to the neutralised
// cells, which undo exactly to the text, every numeric cell is untouched,
// and results.json unmarshals to the same strings.
func FuzzWriters(f *testing.F) {
	f.Add("a.csv", "LOT-0107", "r1", "a.csv:3: bad", "water", "lot 7")
	f.Add("=cmd|' /C calc'!A0.csv", "+1", "-2+3", "@SUM(A1)", "\tx", "\rx")
	f.Add("'=x", "\"quoted, with comma\"", "\r\n", "line\nbreak", "\xff\xfe", "")
	f.Fuzz(func(t *testing.T, file, sample, run, message, solvent, other string) {
		r := &dls.Result{
			Identity: dls.Identity{File: file, Sample: sample, Run: run, Status: dls.StatusError, Message: message,
				Lot: other, Product: other, Role: dls.Role(other), Group: other},
			Conditions: dls.Conditions{HasConditions: true, TemperatureC: -12.5, Solvent: solvent, ViscosityMPaS: 1,
				RefractiveIndex: 1.33, WavelengthNm: 633, AngleDeg: 90, QPerM: 1.8e7, ViscositySource: other, IndexSource: other},
			Assumptions: []string{other},
		}
		smp := &dls.Sample{Name: sample, Lot: other, Product: other, Role: dls.Role(other), Group: solvent, Runs: []int{0}, Outliers: []int{0},
			NRuns: 1, TemperaturesC: []float64{-12.5}, Verdict: &dls.Verdict{Outcome: dls.VerdictFail, Reason: message}}

		var b bytes.Buffer
		if err := WriteCSV(&b, []*dls.Result{r}); err != nil {
			t.Fatal(err)
		}
		rows, err := csv.NewReader(&b).ReadAll()
		if err != nil {
			t.Fatalf("results.csv does not read back: %v", err)
		}
		if len(rows) != 2 {
			t.Fatalf("results.csv has %d rows, want 2", len(rows))
		}
		checkCells(t, "results.csv", rows, map[string]string{"file": file, "sample": sample, "run": run, "message": message,
			"solvent": solvent, "viscosity_source": other, "refractive_index_source": other, "assumptions": other,
			"temperature_c": "", "status": "error"})
		if got := rows[1][5]; got != "-12.50" {
			t.Errorf("temperature_c = %q, want the number -12.50", got)
		}

		b.Reset()
		if err := WriteSamplesCSV(&b, []*dls.Sample{smp}, []*dls.Brief{r.Brief()}); err != nil {
			t.Fatal(err)
		}
		rows, err = csv.NewReader(&b).ReadAll()
		if err != nil {
			t.Fatalf("samples.csv does not read back: %v", err)
		}
		if len(rows) != 2 {
			t.Fatalf("samples.csv has %d rows, want 2", len(rows))
		}
		id := file
		if run != "" {
			id += "[" + run + "]"
		}
		checkCells(t, "samples.csv", rows, map[string]string{"sample": sample, "lot": other, "product": other, "role": other,
			"group": solvent, "outliers": id, "verdict_reason": message})
		if got := rows[1][5]; got != "-12.50" {
			t.Errorf("samples temperature_c = %q, want the number -12.50", got)
		}

		b.Reset()
		if err := WriteJSON(&b, &Document{Samples: []*dls.Sample{smp}, Results: []*dls.Result{r}}); err != nil {
			t.Fatal(err)
		}
		var back Document
		if err := json.Unmarshal(b.Bytes(), &back); err != nil {
			t.Fatalf("results.json does not unmarshal: %v", err)
		}
		g := back.Results[0]
		for _, c := range []struct{ got, want string }{{g.File, file}, {g.Sample, sample}, {g.Run, run}, {g.Message, message},
			{g.Solvent, solvent}, {g.Lot, other}, {back.Samples[0].Name, sample}, {back.Samples[0].Verdict.Reason, message}} {
			if c.got != jsonText(c.want) {
				t.Errorf("results.json gives %q for %q", c.got, c.want)
			}
		}
	})
}

// checkCells checks the named cells of rows[1]: the cell read back is the
// neutralised text (up to encoding/csv's CRLF rule), and undoing the
// neutralisation gives the text exactly. A want of "" only checks that the
// column exists.
func checkCells(t *testing.T, what string, rows [][]string, want map[string]string) {
	t.Helper()
	col := map[string]int{}
	for i, n := range rows[0] {
		col[n] = i
	}
	for name, raw := range want {
		i, ok := col[name]
		if !ok {
			t.Fatalf("%s has no column %s", what, name)
		}
		if raw == "" {
			continue
		}
		got := rows[1][i]
		if got != crlf(neutralise(raw)) {
			t.Errorf("%s %s reads back %q, want %q", what, name, got, crlf(neutralise(raw)))
		}
		if undo(neutralise(raw)) != raw {
			t.Errorf("%s %s: neutralising %q cannot be undone", what, name, raw)
		}
		if got != "" && strings.IndexByte(formulaStart, got[0]) >= 0 {
			t.Errorf("%s %s cell %q starts a formula", what, name, got)
		}
	}
}
