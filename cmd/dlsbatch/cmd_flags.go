package main

import (
	"context"
	"fmt"
	"strings"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"dlsbatch/dls/qc"
	"dlsbatch/io/report"
)

const flagsUsage = `Usage: dlsbatch flags

Lists every quality-control flag that results can carry: its code (stable
across versions), whether it concerns one run or a whole sample, what it
means, and the threshold that raises it. The thresholds are common-practice
defaults; each site should review them against its instruments and products.
`

// thresholdsFileHelp documents the file of `dlsbatch run --qc-thresholds`
// with every key, its default and its range (from dls/qc, so that the help
// cannot drift from the reader).
func thresholdsFileHelp() string {
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

func runFlags(ctx context.Context, e env, args []string) int {
	fs := pflag.NewFlagSet("flags", pflag.ContinueOnError)
	if code, done := parseFlags(fs, e, "flags", flagsUsage+thresholdsFileHelp(), args); done {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(e.stderr, "dlsbatch flags: takes no arguments\n")
		return exitUsage
	}
	if err := report.WriteFlagTable(e.stdout, qc.Definitions(qc.DefaultThresholds())); err != nil {
		return exitFatal
	}
	return exitOK
}
