package main

import (
	"context"

	"github.com/spf13/pflag"

	"dlsbatch/io/resultdiff"
)

func runDiff(ctx context.Context, e env, args []string) int {
	fs := pflag.NewFlagSet("diff", pflag.ContinueOnError)
	tols := fs.StringArray("tol", nil, "tolerance of a column: column=0.5% (relative), column=0.01 (absolute) or column=exact (repeatable)")
	format := newEnum("text", "text", "md")
	fs.Var(format, "format", "text, or md for a markdown table")
	most := fs.Int("max", 20, "show at most this many differences")
	if code, done := parseFlags(fs, e, "diff", help("diff"), help("diff.exits"), args); done {
		return code
	}
	if fs.NArg() != 2 {
		return usageError(e, "diff", "name two result folders, OLD and NEW")
	}
	tol, err := resultdiff.ParseTols(*tols)
	if err != nil {
		return usageError(e, "diff", err)
	}
	rep, err := resultdiff.Compare(fs.Arg(0), fs.Arg(1), tol)
	if err != nil {
		return usageError(e, "diff", err)
	}
	rep.Write(e.stdout, *most, format.value == "md")
	if rep.Drift() {
		return 1
	}
	return exitOK
}
