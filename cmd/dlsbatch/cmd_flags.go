package main

import (
	"context"
	"fmt"

	"github.com/spf13/pflag"

	"dlsbatch/dls/qc"
	"dlsbatch/io/qcfile"
	"dlsbatch/io/report"
)

const flagsUsage = `Usage: dlsbatch flags

Lists every quality-control flag that results can carry: its code (stable
across versions), whether it concerns one run or a whole sample, what it
means, and the threshold that raises it. The thresholds are common-practice
defaults; each site should review them against its instruments and products.
`

func runFlags(ctx context.Context, e env, args []string) int {
	fs := pflag.NewFlagSet("flags", pflag.ContinueOnError)
	if code, done := parseFlags(fs, e, "flags", flagsUsage+qcfile.Help(), args); done {
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
