package main

import (
	"context"
	"fmt"
)

// runRun is a placeholder until the subcommand is built.
func runRun(ctx context.Context, e env, args []string) int {
	fmt.Fprintln(e.stderr, "dlsbatch run: not built yet")
	return exitFatal
}
