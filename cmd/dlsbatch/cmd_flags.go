package main

import (
	"context"

	"github.com/spf13/pflag"

	"dlsbatch/dls/qc"
	"dlsbatch/io/qcfile"
	"dlsbatch/io/report"
)

func runFlags(ctx context.Context, e env, args []string) int {
	fs := pflag.NewFlagSet("flags", pflag.ContinueOnError)
	if code, done := parseFlags(fs, e, "flags", help("flags")+qcfile.Help(), help("flags.exits"), args); done {
		return code
	}
	if fs.NArg() > 0 {
		return usageError(e, "flags", "takes no arguments")
	}
	if err := report.WriteFlagTable(e.stdout, qc.Definitions(qc.DefaultThresholds())); err != nil {
		return exitFatal
	}
	return exitOK
}
