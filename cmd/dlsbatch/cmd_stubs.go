package main

// Placeholders until each subcommand lands in its own cmd_<name>.go file.

import (
	"context"
	"fmt"
)

func runRun(ctx context.Context, e env, args []string) int {
	fmt.Fprintln(e.stderr, "dlsbatch run: not built yet")
	return exitFatal
}

func runSimulate(ctx context.Context, e env, args []string) int {
	fmt.Fprintln(e.stderr, "dlsbatch simulate: not built yet")
	return exitFatal
}

func runSolvents(ctx context.Context, e env, args []string) int {
	fmt.Fprintln(e.stderr, "dlsbatch solvents: not built yet")
	return exitFatal
}
