package main

import (
	"context"
	"fmt"

	"github.com/spf13/pflag"

	"dlsbatch/io/report"
)

func runVerify(ctx context.Context, e env, args []string) int {
	fs := pflag.NewFlagSet("verify", pflag.ContinueOnError)
	if code, done := parseFlags(fs, e, "verify", help("verify"), help("verify.exits"), args); done {
		return code
	}
	if fs.NArg() != 1 {
		return usageError(e, "verify", "name one result folder")
	}
	v, err := report.Verify(fs.Arg(0))
	if err != nil {
		return usageError(e, "verify", err)
	}
	for _, d := range v.Differences {
		fmt.Fprintf(e.stdout, "%s %s\n  expected %s\n  found    %s\n", d.Kind, d.File, d.Expected, d.Found)
	}
	if !v.OK() {
		fmt.Fprintf(e.stdout, "%s: %d difference(s) in %d files checked\n", fs.Arg(0), len(v.Differences), v.Checked)
		return 1
	}
	fmt.Fprintf(e.stdout, "%s: intact and complete (%d files checked)\n", fs.Arg(0), v.Checked)
	return exitOK
}
