package main

import (
	"context"
	"errors"
	"fmt"
	"strings"

	"github.com/spf13/pflag"

	"dlsbatch/io/batchrun"
	"dlsbatch/io/report"
)

func runMerge(ctx context.Context, e env, args []string) int {
	fs := pflag.NewFlagSet("merge", pflag.ContinueOnError)
	cfg := &batchrun.MergeConfig{}
	var noReport, quiet bool
	fs.StringVarP(&cfg.Out, "out", "o", "", "folder for the merged result set (required)")
	fs.BoolVar(&cfg.Force, "force", false, "replace results already in the --out folder")
	fs.BoolVar(&noReport, "no-report", false, "do not write the HTML report")
	fs.BoolVarP(&quiet, "quiet", "q", false, "print no summary")
	if code, done := parseFlags(fs, e, "merge", help("merge"), help("merge.exits"), args); done {
		return code
	}
	cfg.Dirs, cfg.HTMLReport = fs.Args(), !noReport
	if cfg.Out == "" {
		return usageError(e, "merge", "--out DIR is required")
	}
	res, err := batchrun.Merge(ctx, cfg)
	switch {
	case errors.Is(err, batchrun.ErrUsage):
		return usageError(e, "merge", strings.TrimPrefix(err.Error(), batchrun.ErrUsage.Error()+": "))
	case err != nil:
		fmt.Fprintln(e.stderr, "dlsbatch merge:", err)
		return exitFatal
	}
	if !quiet {
		report.WriteSummary(e.stdout, res.Results, res.Samples, res.Batch, res.Problems)
	}
	return exitCode(res.Counts, res.Batch)
}
