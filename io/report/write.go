package report

import (
	"bufio"
	"bytes"
	"dlsbatch/io/jsonenc"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"dlsbatch/dls"
	"dlsbatch/dls/batch"
	"dlsbatch/dls/spec"
	"dlsbatch/io/safetext"
	"dlsbatch/io/sheet"
)

// Caution is carried by every report: the results support, not replace,
// qualified review.
const Caution = "Results support, and do not replace, review by qualified staff under the site's quality system and local regulations."

// WriteCSV writes results.csv: a header and one row per result, in the
// order given.
func WriteCSV(w io.Writer, results []*dls.Result) error {
	return writeCSV(w, len(results), func(i int, dst []byte) ([]byte, error) {
		b, err := csvRow(results[i])
		return append(dst, b...), err
	})
}

// writeCSV writes results.csv with n rows, the i-th appended by row to a
// buffer that is reused from row to row (so that a long batch read back
// from the scratch file allocates one buffer, not one per row).
func writeCSV(w io.Writer, n int, row func(i int, dst []byte) ([]byte, error)) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(ColumnNames()); err != nil {
		return fmt.Errorf("results csv: %w", err)
	}
	cw.Flush()
	var b []byte
	for i := range n {
		var err error
		b, err = row(i, b[:0])
		if err != nil {
			return fmt.Errorf("results csv: %w", err)
		}
		if _, err := w.Write(b); err != nil {
			return fmt.Errorf("results csv: %w", err)
		}
	}
	if err := cw.Error(); err != nil {
		return fmt.Errorf("results csv: %w", err)
	}
	return nil
}

// csvRow encodes the results.csv row of r, line end included.
func csvRow(r *dls.Result) ([]byte, error) {
	var b bytes.Buffer
	cw := csv.NewWriter(&b)
	row := make([]string, len(columns))
	for i, c := range columns {
		row[i] = c.get(r)
	}
	cw.Write(row)
	cw.Flush()
	return b.Bytes(), cw.Error()
}

// Document is the top level of results.json.
type Document struct {
	Tool     string             `json:"tool"`
	Version  string             `json:"version"`
	Caution  string             `json:"caution"`
	Complete bool               `json:"complete"` // false: an interrupted run, no verdicts
	Settings *Settings          `json:"settings"`
	Counts   dls.Counts         `json:"counts"`
	Batch    spec.Batch         `json:"batch"`
	Sheet    *sheet.MatchReport `json:"sheet,omitempty"`
	Groups   *batch.GroupReport `json:"groups,omitempty"`
	Samples  []*dls.Sample      `json:"samples"`
	Results  []*dls.Result      `json:"results"`
}

// WriteJSON writes results.json: the document's fields indented, and each
// result compact on a line of its own, so that the file stays readable and
// greppable one measurement per line, and fast to write for thousands of
// measurements with their curves. Keys come in a fixed order (struct order;
// settings in sorted key order). JSON cannot carry NaN or Inf:
// a result holding one is refused, as a last guard behind the pipeline.
func WriteJSON(w io.Writer, doc *Document) error {
	for _, r := range doc.Results {
		if err := checkFinite(r); err != nil {
			return fmt.Errorf("results json: %s: %w", r.File, err)
		}
	}
	return writeJSON(w, doc, dls.Briefs(doc.Results), func(i int, dst []byte) ([]byte, error) {
		return jsonenc.Append(dst, doc.Results[i])
	})
}

// writeJSON writes results.json with the i-th result's encoding appended
// by result to a buffer reused from result to result. The samples array is
// encoded one sample at a time (the bytes json.Marshal gives for the whole
// slice), so that a batch of thousands of samples is never one buffer.
func writeJSON(w io.Writer, doc *Document, results []*dls.Brief, result func(i int, dst []byte) ([]byte, error)) error {
	bw := bufio.NewWriter(w)
	field := func(name string, v any, last bool) error {
		bw.WriteString(" " + strconv.Quote(name) + ": ")
		if err := marshalTo(bw, v); err != nil {
			return err
		}
		if !last {
			bw.WriteString(",")
		}
		bw.WriteString("\n")
		return nil
	}
	bw.WriteString("{\n")
	for _, f := range []struct {
		name string
		v    any
	}{{"tool", doc.Tool}, {"version", doc.Version}, {"caution", doc.Caution}, {"complete", doc.Complete}, {"settings", doc.Settings}, {"counts", doc.Counts},
		{"batch", doc.Batch}, {"sheet", doc.Sheet}, {"groups", doc.Groups}, {"samples", doc.Samples}} {
		if err := field(f.name, f.v, false); err != nil {
			return fmt.Errorf("results json: %w", err)
		}
	}
	bw.WriteString(" \"results\": [")
	var b []byte
	for i, r := range results {
		var err error
		b, err = result(i, b[:0])
		if err != nil {
			return fmt.Errorf("results json: %s: %w", r.File, err)
		}
		if i > 0 {
			bw.WriteString(",")
		}
		bw.WriteString("\n  ")
		bw.Write(b)
	}
	bw.WriteString("\n ]\n}\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("results json: %w", err)
	}
	return nil
}

// marshalTo writes json.Marshal(v) to w; a slice of samples element by
// element, with json.Marshal's brackets and commas (null when nil).
func marshalTo(w *bufio.Writer, v any) error {
	samples, ok := v.([]*dls.Sample)
	if !ok || samples == nil {
		b, err := json.Marshal(v)
		w.Write(b)
		return err
	}
	w.WriteByte('[')
	for i, s := range samples {
		if i > 0 {
			w.WriteByte(',')
		}
		b, err := json.Marshal(s)
		if err != nil {
			return err
		}
		w.Write(b)
	}
	return w.WriteByte(']')
}

func checkFinite(r *dls.Result) error {
	if c, d := r.Finite(); !c || !d {
		return fmt.Errorf("non-finite value in result")
	}
	return nil
}

// WriteSummary prints a short table for the terminal: one line per sample
// (verdict when a specification is in force, runs used of measured, mean
// and SD of the z-average, mean PDI, flag codes), then the batch outcome,
// the counts, and the first problems with file and line. Every text that
// comes from the inputs (names, lots, file names, messages, reasons) goes
// through safetext.Terminal: the summary is printed to a terminal, where
// escape sequences or control characters in a file name or cell would act
// instead of showing.
func WriteSummary(w io.Writer, results []*dls.Brief, samples []*dls.Sample, b spec.Batch, problems []Problem) error {
	return buffered(w, func(w io.Writer) error { return writeSummary(w, results, samples, b, problems) })
}

func writeSummary(w io.Writer, results []*dls.Brief, samples []*dls.Sample, b spec.Batch, problems []Problem) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	// The flags come last and untabbed, so that tabwriter does not pad
	// every line to the longest list of flags (a long list made every line
	// of the table wrap in a terminal of 80 columns).
	head := "sample\tT °C\truns\tz-average nm\tSD nm\tPDI\tflags"
	if b.Specified {
		head = "verdict\t" + head
	}
	fmt.Fprintln(tw, head)
	for _, smp := range problemsFirst(samples) {
		name := smp.Name
		if smp.Lot != "" {
			name += " (" + smp.Lot + ")"
		}
		name = safetext.Terminal(name)
		ts := make([]string, len(smp.TemperaturesC))
		for i, t := range smp.TemperaturesC {
			ts[i] = fixed(t, 1)
		}
		zs, sd, pd := "–", "–", "–"
		if smp.Role == dls.RoleBlank {
			zs = "(blank)" // the dispersant's signal, not a particle size
		} else if smp.NUsed > 0 {
			zs, pd = fixed(smp.ZAvgMeanNm, 1), fixed(smp.PDIMean, 3)
			if smp.NUsed > 1 {
				sd = fixed(smp.ZAvgSDNm, 1)
			}
		}
		row := fmt.Sprintf("%s\t%s\t%d/%d\t%s\t%s\t%s\t%s", name, strings.Join(ts, ","), smp.NUsed, smp.NRuns, zs, sd, pd, safetext.Terminal(flagCodes(smp.Flags)))
		if b.Specified {
			v := "–"
			if smp.Verdict != nil {
				v = safetext.Terminal(strings.ToUpper(string(smp.Verdict.Outcome)))
			}
			row = v + "\t" + row
		}
		fmt.Fprintln(tw, row)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	c := dls.CountBriefs(results)
	fmt.Fprintf(w, "\n%d measurements: %d ok, %d warn, %d error\n", c.Total, c.OK, c.Warn, c.Error)
	if b.Specified {
		if b.Valid {
			fmt.Fprintf(w, "batch valid (system suitability passed): %d pass, %d fail, %d without specification\n", b.Pass, b.Fail, b.NoSpec)
		} else {
			fmt.Fprintf(w, "BATCH INVALID: %s\n", safetext.Terminal(b.Reason))
		}
		// The reasons of failed samples, and in a valid batch those of
		// samples invalid on their own (bracketing, data of another sample);
		// in an invalid batch every verdict is invalid for its one reason.
		for _, smp := range samples {
			switch v := smp.Verdict; {
			case v == nil:
			case v.Outcome == dls.VerdictFail:
				fmt.Fprintf(w, "  FAIL  %s: %s\n", safetext.Terminal(smp.Name), safetext.Terminal(v.Reason))
			case v.Outcome == dls.VerdictInvalid && b.Valid:
				fmt.Fprintf(w, "  INVALID  %s: %s\n", safetext.Terminal(smp.Name), safetext.Terminal(v.Reason))
			}
		}
	}
	for _, p := range problems {
		id := p.File
		if p.Run != "" {
			id += "[" + p.Run + "]"
		}
		if rest, ok := strings.CutPrefix(p.Message, p.File+":"); ok {
			// Errors name file and line already: keep that, with the run.
			fmt.Fprintf(w, "  %-5s %s:%s\n", p.Status, safetext.Terminal(id), safetext.Terminal(rest))
			continue
		}
		fmt.Fprintf(w, "  %-5s %s: %s\n", p.Status, safetext.Terminal(id), safetext.Terminal(p.Message))
	}
	if more := c.Warn + c.Error - len(problems); more > 0 {
		fmt.Fprintf(w, "  … %d more in results.csv\n", more)
	}
	return nil
}

// Problem is a measurement whose status is not ok, as the summary lists
// it: its file, run, status and message.
type Problem struct {
	File, Run string
	Status    dls.Status
	Message   string
}

// SummaryProblems is how many problems the summary lists.
const SummaryProblems = 10

// Problems returns the first max measurements (in results order) whose
// status is not ok, with the message that message gives for result i
// (the briefs leave messages out).
func Problems(results []*dls.Brief, max int, message func(i int) (string, error)) ([]Problem, error) {
	var out []Problem
	for i, r := range results {
		if len(out) == max {
			break
		}
		if r.Status == dls.StatusOK {
			continue
		}
		msg, err := message(i)
		if err != nil {
			return nil, err
		}
		out = append(out, Problem{File: r.File, Run: r.Run, Status: r.Status, Message: msg})
	}
	return out, nil
}

// ProblemsOf is Problems for results held whole.
func ProblemsOf(results []*dls.Result, max int) []Problem {
	p, _ := Problems(dls.Briefs(results), max, func(i int) (string, error) { return results[i].Message, nil })
	return p
}

// flagCodes lists the distinct codes of flags, in first-seen order.
func flagCodes(f []dls.Flag) string {
	seen := map[dls.FlagCode]bool{}
	var out []string
	for _, x := range f {
		if !seen[x.Code] {
			seen[x.Code] = true
			out = append(out, string(x.Code))
		}
	}
	return strings.Join(out, " ")
}

// WriteSamplesCSV writes samples.csv: one row per sample with its
// statistics, flags and verdict.
func WriteSamplesCSV(w io.Writer, samples []*dls.Sample, results []*dls.Brief) error {
	cw := csv.NewWriter(w)
	head := make([]string, len(sampleColumns))
	for i, c := range sampleColumns {
		head[i] = c.name
	}
	cw.Write(head)
	for _, s := range samples {
		ts := make([]string, len(s.TemperaturesC))
		for i, t := range s.TemperaturesC {
			ts[i] = fixed(t, 2)
		}
		var out []string
		for _, i := range s.Outliers {
			out = append(out, results[i].RunID())
		}
		// A blank's fit describes the dispersant's signal, not particles:
		// no size is reported for it (its count rate and verdict are).
		blank := s.Role == dls.RoleBlank
		stat := func(v float64, prec int) string {
			if s.NUsed == 0 || blank {
				return ""
			}
			return fixed(v, prec)
		}
		sd := func(v float64, prec int) string {
			if s.NUsed < 2 || blank {
				return ""
			}
			return fixed(v, prec)
		}
		opt := func(v float64) string {
			if v == 0 || blank {
				return ""
			}
			return fixed(v, 3)
		}
		verdict, reason := "", ""
		if s.Verdict != nil {
			verdict, reason = string(s.Verdict.Outcome), s.Verdict.Reason
		}
		row := []string{s.Name, s.Lot, s.Product, string(s.Role), s.Group, strings.Join(ts, " "), strconv.Itoa(s.NRuns), strconv.Itoa(s.NUsed),
			stat(s.ZAvgMeanNm, 3), sd(s.ZAvgSDNm, 3), sd(s.ZAvgRSDPct, 2), stat(s.PDIMean, 4), sd(s.PDISD, 4), opt(s.Peak1MeanNm), opt(s.D90MeanNm),
			strings.Join(out, " "), strconv.FormatBool(s.OutliersExcluded), flagCodes(s.Flags), verdict, reason}
		for k := range 3 {
			if k >= len(s.IntensityPeaks) || blank {
				row = append(row, "", "", "")
				continue
			}
			p := s.IntensityPeaks[k]
			row = append(row, fixed(p.MeanNm, 2), fixed(p.AreaPct, 1), fmt.Sprintf("%d/%d", p.NRuns, p.NOf))
		}
		row = append(row, jointCells(s.Joint, blank)...)
		for i, c := range sampleColumns {
			if c.text {
				row[i] = neutralise(row[i])
			}
		}
		cw.Write(row)
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("samples csv: %w", err)
	}
	return nil
}

// jointCells are the joint_* cells of samples.csv: empty without a joint
// inversion (or for a blank); its peaks are those reported, the largest
// share first, as a run's are.
func jointCells(j *dls.JointDistribution, blank bool) []string {
	cells := make([]string, 14)
	if j == nil || blank {
		return cells
	}
	cells[0] = strconv.Itoa(len(j.Runs))
	if j.Intensity != nil {
		for k, p := range j.Intensity.Peaks {
			if k == 3 {
				break
			}
			cells[1+4*k], cells[2+4*k], cells[3+4*k], cells[4+4*k] = fixed(p.MeanNm, 2), fixed(p.MeanUNm, 2), fixed(p.AreaPct, 1), fixed(p.AreaUPct, 1)
		}
	}
	cells[13] = j.Note
	return cells
}

// problemsFirst orders samples for a person reading the summary: failed or
// invalid verdicts first, then samples with flags, then the rest, each in
// the order given (stable).
func problemsFirst(samples []*dls.Sample) []*dls.Sample {
	rank := func(s *dls.Sample) int {
		switch {
		case s.Verdict != nil && s.Verdict.Outcome != dls.VerdictPass:
			return 0
		case len(s.Flags) > 0:
			return 1
		}
		return 2
	}
	out := append([]*dls.Sample(nil), samples...)
	sort.SliceStable(out, func(i, j int) bool { return rank(out[i]) < rank(out[j]) })
	return out
}

// buffered calls write with w behind one buffer, so that an aligned table
// reaches w in a few writes instead of one per cell (text/tabwriter writes
// each cell and padding on its own, and a terminal or a pipe takes a
// system call for each: about 1,000 for the summary of 50 samples), and
// returns write's error or else the flush's.
func buffered(w io.Writer, write func(io.Writer) error) error {
	bw := bufio.NewWriterSize(w, 64<<10)
	err := write(bw)
	if ferr := bw.Flush(); err == nil {
		err = ferr
	}
	return err
}
