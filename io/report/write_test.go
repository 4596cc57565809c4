package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"dlsbatch/dls"
	"dlsbatch/dls/qc"
	"dlsbatch/dls/spec"
)

func sampleResults() []*dls.Result {
	ok := &dls.Result{Identity: dls.Identity{File: "a.csv", Sample: "lot, 7", Status: dls.StatusOK}, Conditions: dls.Conditions{HasConditions: true, TemperatureC: 25, Solvent: "water", ViscosityMPaS: 0.890022, RefractiveIndex: 1.33162, WavelengthNm: 632.8, AngleDeg: 173, QPerM: 2.639445e7}, Cumulants: dls.Cumulants{HasCumulants: true, GammaMeanPerS: 3418.78, ZAvgNm: 100.0004, PDI: 0.01234, Method: "nonlinear", Order: 2}}
	bad := &dls.Result{Identity: dls.Identity{File: "b.csv", Run: "r1", Status: dls.StatusError, Message: `b.csv:4:2: "abc" is not a number`}}
	return []*dls.Result{ok, bad}
}

func TestWriteCSV(t *testing.T) {
	var b bytes.Buffer
	if err := WriteCSV(&b, sampleResults()); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 3 {
		t.Fatalf("%d rows, want header + 2", len(rows))
	}
	// The columns the output contract names, in its order, lead the header.
	want := []string{"file", "sample", "run", "status", "message", "temperature_c", "solvent", "viscosity_mpas",
		"refractive_index", "wavelength_nm", "angle_deg"}
	for i, w := range want {
		if rows[0][i] != w {
			t.Errorf("column %d is %q, want %q", i, rows[0][i], w)
		}
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	for _, need := range []string{"gamma_mean_per_s", "diffusion_m2_per_s", "z_avg_nm", "pdi", "intercept", "baseline", "fit_rms"} {
		if _, ok := col[need]; !ok {
			t.Errorf("no column %s", need)
		}
	}
	if got := rows[1][col["z_avg_nm"]]; got != "100.000" {
		t.Errorf("z_avg_nm written %q, want fixed 3 decimals 100.000", got)
	}
	if got := rows[1][col["sample"]]; got != "lot, 7" {
		t.Errorf("sample with a comma came back %q", got)
	}
	// An error row has its message and empty numeric cells, never 0 or NaN.
	for _, c := range []string{"z_avg_nm", "pdi", "temperature_c", "viscosity_mpas"} {
		if v := rows[2][col[c]]; v != "" {
			t.Errorf("error row %s = %q, want empty", c, v)
		}
	}
	if rows[2][col["message"]] != `b.csv:4:2: "abc" is not a number` {
		t.Errorf("message came back %q", rows[2][col["message"]])
	}
}

func TestWriteJSONDeterministicAndFinite(t *testing.T) {
	doc := &Document{Tool: "dlsbatch", Version: "test", Caution: Caution, Settings: &Settings{CumulantMethod: "nonlinear"}, Results: sampleResults()}
	var b1, b2 bytes.Buffer
	if err := WriteJSON(&b1, doc); err != nil {
		t.Fatal(err)
	}
	if err := WriteJSON(&b2, doc); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b1.Bytes(), b2.Bytes()) {
		t.Error("two writes differ")
	}
	var back Document
	if err := json.Unmarshal(b1.Bytes(), &back); err != nil {
		t.Fatal(err)
	}
	if len(back.Results) != 2 || back.Results[0].ZAvgNm != 100.0004 {
		t.Errorf("round trip lost data: %+v", back.Results)
	}
	doc.Results[0].PDI = math.NaN()
	if err := WriteJSON(&bytes.Buffer{}, doc); err == nil {
		t.Error("NaN accepted")
	}
}

func TestWriteSummary(t *testing.T) {
	var b bytes.Buffer
	rs := sampleResults()
	smp := []*dls.Sample{{Name: "lot, 7", NRuns: 1, NUsed: 1, ZAvgMeanNm: 100.0004, TemperaturesC: []float64{25}}, {Name: "", NRuns: 1}}
	if err := WriteSummary(&b, dls.Briefs(rs), smp, spec.Batch{}, ProblemsOf(rs, SummaryProblems)); err != nil {
		t.Fatal(err)
	}
	s := b.String()
	for _, want := range []string{"lot, 7", "100.0", "2 measurements: 1 ok, 0 warn, 1 error", `error b.csv[r1]:4:2: "abc" is not a number`} {
		if !strings.Contains(s, want) {
			t.Errorf("summary lacks %q:\n%s", want, s)
		}
	}
}

// TestWriteSummaryReasons: below the table, a failed sample's reason is
// given, and in a valid batch so is that of a sample invalid on its own
// (bracketing, data of another sample); in an invalid batch the batch's
// one reason stands for every sample.
func TestWriteSummaryReasons(t *testing.T) {
	rs := sampleResults()
	smp := []*dls.Sample{
		{Name: "lot 1", Verdict: &dls.Verdict{Outcome: dls.VerdictFail, Reason: "pdi 0.3 outside ≤ 0.1"}},
		{Name: "lot 2", Verdict: &dls.Verdict{Outcome: dls.VerdictInvalid, Reason: "data of another sample: b.csv"}},
	}
	for _, c := range []struct {
		batch   spec.Batch
		invalid bool
	}{{spec.Batch{Specified: true, Valid: true}, true}, {spec.Batch{Specified: true, Reason: "reference failed"}, false}} {
		var b bytes.Buffer
		if err := WriteSummary(&b, dls.Briefs(rs), smp, c.batch, nil); err != nil {
			t.Fatal(err)
		}
		out := b.String()
		if !strings.Contains(out, "  FAIL  lot 1: pdi 0.3 outside ≤ 0.1\n") {
			t.Errorf("valid %v: no FAIL line with the reason:\n%s", c.batch.Valid, out)
		}
		if got := strings.Contains(out, "  INVALID  lot 2: data of another sample: b.csv\n"); got != c.invalid {
			t.Errorf("valid %v: INVALID line shown %v, want %v:\n%s", c.batch.Valid, got, c.invalid, out)
		}
	}
}

// writeCounter counts the writes it is given.
type writeCounter struct {
	bytes.Buffer
	writes int
}

func (w *writeCounter) Write(p []byte) (int, error) {
	w.writes++
	return w.Buffer.Write(p)
}

// The tables for the terminal reach it in one write, not one per cell
// (text/tabwriter writes cells and padding one by one), with the same text.
func TestTablesWrittenOnce(t *testing.T) {
	rs := sampleResults()
	var smp []*dls.Sample
	for i := range 50 {
		smp = append(smp, &dls.Sample{Name: fmt.Sprintf("s%02d", i), NRuns: 3, NUsed: 3, ZAvgMeanNm: 100 + float64(i), TemperaturesC: []float64{25}})
	}
	var plain bytes.Buffer
	if err := writeSummary(&plain, dls.Briefs(rs), smp, spec.Batch{}, ProblemsOf(rs, SummaryProblems)); err != nil {
		t.Fatal(err)
	}
	var w writeCounter
	if err := WriteSummary(&w, dls.Briefs(rs), smp, spec.Batch{}, ProblemsOf(rs, SummaryProblems)); err != nil {
		t.Fatal(err)
	}
	if w.writes != 1 || w.String() != plain.String() {
		t.Errorf("summary in %d writes (want 1), same text %v", w.writes, w.String() == plain.String())
	}
	var f writeCounter
	if err := WriteFlagTable(&f, qc.Definitions(qc.DefaultThresholds())); err != nil || f.writes != 1 {
		t.Errorf("flag table in %d writes (want 1), %v", f.writes, err)
	}
}

// TestSummaryProblemsFirst: failed and invalid verdicts lead the summary,
// then flagged samples, then the rest, each group in batch order.
func TestSummaryProblemsFirst(t *testing.T) {
	pass := &dls.Verdict{Outcome: dls.VerdictPass}
	samples := []*dls.Sample{
		{Name: "a-clean", Verdict: pass},
		{Name: "b-flagged", Verdict: pass, Flags: []dls.Flag{{Code: "HIGH-PDI"}}},
		{Name: "c-failed", Verdict: &dls.Verdict{Outcome: dls.VerdictFail}},
		{Name: "d-clean", Verdict: pass},
		{Name: "e-invalid", Verdict: &dls.Verdict{Outcome: dls.VerdictInvalid}},
	}
	var got []string
	for _, s := range problemsFirst(samples) {
		got = append(got, s.Name)
	}
	if want := "c-failed e-invalid b-flagged a-clean d-clean"; strings.Join(got, " ") != want {
		t.Errorf("order %v, want %s", got, want)
	}
}

// The summary lists the first SummaryProblems measurements that are not
// ok, in results order, with their messages from the full records, and
// counts the rest.
func TestSummaryProblems(t *testing.T) {
	var rs []*dls.Result
	for i := range 14 {
		st, msg := dls.StatusWarn, fmt.Sprintf("remark %d", i)
		switch {
		case i%3 == 0:
			st, msg = dls.StatusOK, ""
		case i == 13:
			st, msg = dls.StatusError, fmt.Sprintf("m%02d.csv:7: bad line", i)
		}
		rs = append(rs, &dls.Result{Identity: dls.Identity{File: fmt.Sprintf("m%02d.csv", i), Status: st, Message: msg}})
	}
	ps := ProblemsOf(rs, 4)
	var ids []string
	for _, p := range ps {
		ids = append(ids, p.File+" "+p.Message)
	}
	if want := "m01.csv remark 1|m02.csv remark 2|m04.csv remark 4|m05.csv remark 5"; strings.Join(ids, "|") != want {
		t.Errorf("problems %q, want %q", strings.Join(ids, "|"), want)
	}
	var b bytes.Buffer
	if err := WriteSummary(&b, dls.Briefs(rs), nil, spec.Batch{}, ProblemsOf(rs, SummaryProblems)); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	// 9 of the 14 are not ok (every third is): all 9 listed, none more;
	// the error keeps its file:line form.
	if strings.Contains(out, "more in results.csv") || !strings.Contains(out, "  error m13.csv:7: bad line\n") || strings.Count(out, "\n  warn ") != 8 {
		t.Errorf("summary:\n%s", out)
	}
	b.Reset()
	if err := WriteSummary(&b, dls.Briefs(rs), nil, spec.Batch{}, ps); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "  … 5 more in results.csv\n") {
		t.Errorf("summary with 4 of 9 problems does not count the other 5:\n%s", b.String())
	}
}
