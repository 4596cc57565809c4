package main

import (
	"context"
	"fmt"
)

// runSolvents is a placeholder until the subcommand is built.
func runSolvents(ctx context.Context, e env, args []string) int {
	fmt.Fprintln(e.stderr, "dlsbatch solvents: not built yet")
	return exitFatal
}
