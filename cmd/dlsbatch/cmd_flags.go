package main

import (
	"context"
	"fmt"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"dlsbatch/dls/qc"
)

const flagsUsage = `Usage: dlsbatch flags

Lists every quality-control flag that results can carry: its code (stable
across versions), whether it concerns one run or a whole sample, what it
means, and the threshold that raises it. The thresholds are common-practice
defaults; each site should review them against its instruments and products.
`

func runFlags(ctx context.Context, e env, args []string) int {
	fs := pflag.NewFlagSet("flags", pflag.ContinueOnError)
	if code, done := parseFlags(fs, e, "flags", flagsUsage, args); done {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(e.stderr, "dlsbatch flags: takes no arguments\n")
		return exitUsage
	}
	tw := tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "code\tlevel\tmeaning\tthreshold")
	for _, d := range qc.Definitions(qc.DefaultThresholds()) {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", d.Code, d.Level, d.Meaning, d.Threshold)
	}
	if err := tw.Flush(); err != nil {
		return exitFatal
	}
	return exitOK
}
