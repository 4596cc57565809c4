package main

import (
	"context"
	"errors"
	"fmt"
	"runtime"
	"strings"

	"github.com/spf13/pflag"

	"dlsbatch/io/batchrun"
	"dlsbatch/io/profile"
	"dlsbatch/io/progress"
	"dlsbatch/io/report"
)

func runMerge(ctx context.Context, e env, args []string) int {
	fs := pflag.NewFlagSet("merge", pflag.ContinueOnError)
	cfg := &batchrun.MergeConfig{}
	var noReport, quiet bool
	var prof profile.Files
	mode := newEnum(progress.Auto, progress.Modes()...)
	fs.StringVarP(&cfg.Out, "out", "o", "", "folder for the merged result set (required)")
	fs.BoolVar(&cfg.Force, "force", false, "replace results already in the --out folder")
	fs.BoolVar(&noReport, "no-report", false, "do not write the HTML report")
	fs.BoolVarP(&quiet, "quiet", "q", false, "print no summary and no progress")
	fs.IntVarP(&cfg.Workers, "jobs", "j", runtime.NumCPU(), "parallel work (joint analyses, report pages); output is the same for any value")
	fs.Var(mode, "progress", "progress on stderr: auto (a bar on a terminal, else a line every 10 % or 10 s), bar, lines or none")
	prof.AddFlags(fs, "merge")
	if code, done := parseFlags(fs, e, "merge", help("merge"), help("merge.exits"), args); done {
		return code
	}
	cfg.Dirs, cfg.HTMLReport = fs.Args(), !noReport
	switch {
	case cfg.Out == "":
		return usageError(e, "merge", "--out DIR is required")
	case cfg.Workers < 1:
		return usageError(e, "merge", fmt.Sprintf("-j %d: give at least 1", cfg.Workers))
	}
	endProfiles, err := prof.Begin(func(err error) { fmt.Fprintln(e.stderr, "dlsbatch merge:", err) })
	if err != nil {
		return usageError(e, "merge", err)
	}
	defer endProfiles()
	if m := mode.value; !quiet && m != progress.None {
		bars := progress.New(e.stderr, m, e.stderrIsTerminal, "dlsbatch merge: ")
		cfg.Progress = bars.Update
		defer bars.Done()
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
