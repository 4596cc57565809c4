package main

import (
	"context"
	"io"

	"dlsbatch/dls/qc"
	"dlsbatch/io/qcfile"
	"dlsbatch/io/report"
)

func runFlags(ctx context.Context, e env, args []string) int {
	return listCommand(e, "flags", help("flags")+qcfile.Help(), args, func(w io.Writer) error {
		return report.WriteFlagTable(w, qc.Definitions(qc.DefaultThresholds()))
	})
}
