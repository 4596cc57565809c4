package qcfile

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"

	"dlsbatch/dls"
	"dlsbatch/dls/qc"
	"dlsbatch/io/csvtable"
)

// ErrDuplicate is wrapped by the error for a key given twice.
var ErrDuplicate = errors.New("threshold given twice")

// Columns returns the columns of a thresholds file (a new slice each
// call).
func Columns() []string { return []string{"key", "value", "note"} }

// ReadFile parses the thresholds file at path over base (usually
// qc.DefaultThresholds()). Errors say "QC thresholds" and wrap those of
// os.Open and Parse.
func ReadFile(path string, base qc.Thresholds) (qc.Thresholds, error) {
	f, err := os.Open(path)
	if err != nil {
		return base, fmt.Errorf("QC thresholds: %w", err)
	}
	defer f.Close()
	th, err := Parse(f, path, base)
	if err != nil {
		return base, fmt.Errorf("QC thresholds: %w", err)
	}
	return th, nil
}

// Parse reads a thresholds file from r and returns base with the values it
// lists; name identifies the file in errors. Every error is a
// *dls.PosError; on error base is returned unchanged.
func Parse(r io.Reader, name string, base qc.Thresholds) (qc.Thresholds, error) {
	t, err := csvtable.Read(r, name)
	if err != nil {
		return base, err
	}
	if err := t.CheckHeader(Columns(), []string{"key", "value"}); err != nil {
		return base, err
	}
	kc, vc := t.Col("key"), t.Col("value")
	th := base
	row := map[string]int{} // key → row index of the table
	for i, rec := range t.Rows {
		key, val := strings.ToLower(rec[kc]), rec[vc]
		switch {
		case key == "":
			return base, t.Err(i, kc, fmt.Errorf("empty key: %w", dls.ErrMissingValue))
		case val == "":
			return base, t.Err(i, vc, fmt.Errorf("%s has no value: %w", key, dls.ErrMissingValue))
		}
		if prev, dup := row[key]; dup {
			return base, t.Err(i, kc, fmt.Errorf("%s already set on line %d: %w", key, t.Line(prev), ErrDuplicate))
		}
		v, err := strconv.ParseFloat(val, 64)
		if err != nil {
			return base, t.Err(i, vc, fmt.Errorf("%s %q is not a number: %w: %w", key, val, dls.ErrNotANumber, err))
		}
		if err := th.Set(key, v); err != nil {
			col := vc
			if errors.Is(err, qc.ErrUnknownThreshold) {
				col = kc
			}
			return base, t.Err(i, col, err)
		}
		row[key] = i
	}
	if len(t.Rows) == 0 {
		return base, &dls.PosError{File: name, Err: dls.ErrEmpty}
	}
	if err := th.Validate(); err != nil {
		// Blame the later of the two rows that made the window; the file
		// gives at least one of them, as base is assumed valid.
		i, ok := row["max_intercept"]
		if j, okj := row["min_intercept"]; okj && (!ok || j > i) {
			i, ok = j, true
		}
		if !ok {
			return base, &dls.PosError{File: name, Err: err}
		}
		return base, t.Err(i, vc, err)
	}
	return th, nil
}

// Help documents the file of `dlsbatch run --qc-thresholds`
// with every key, its default and its range (from dls/qc, so that the help
// cannot drift from the reader).
func Help() string {
	var b strings.Builder
	b.WriteString(`
A site sets its own thresholds with 'dlsbatch run --qc-thresholds FILE'.
FILE is a CSV table, one threshold per row, that replaces the defaults of
the keys it lists; the keys are the names under qc_thresholds in
results.json and manifest.json. Columns: key and value (required), note
(optional, free text). Lines starting with '#' are comments. An unknown
or repeated key, a value that is not a number or lies outside its key's
range, or min_intercept above max_intercept stops the run before any
analysis (exit 2) with file, line and column. The file's SHA-256 goes
into manifest.json. Example:

  # thresholds of the sizing lab, reviewed by QA
  key,value,note
  max_pdi,0.25,narrow products only
  min_runs,5,SOP: five repeats

`)
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "key\tdefault\trange")
	d := qc.DefaultThresholds()
	for _, k := range qc.ThresholdKeys() {
		v, _ := d.Value(k.Key)
		r := fmt.Sprintf("%g … %g", k.Min, k.Max)
		if k.Integer {
			r += ", whole number"
		}
		fmt.Fprintf(tw, "%s\t%g\t%s\n", k.Key, v, r)
	}
	tw.Flush()
	return b.String()
}
