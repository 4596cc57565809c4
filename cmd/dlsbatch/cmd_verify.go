package main

import (
	"context"

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
	if v.Write(e.stdout, fs.Arg(0)); !v.OK() {
		return 1
	}
	return exitOK
}
